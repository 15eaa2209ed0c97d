"""One set of rules for the values of a day, whatever they come from.

The CSV and XLSX readers, the plan file and the app's cell edits all check
jobs, sites, travel pairs and settings here, so the three accept and refuse
the same things with the same sentences.  Each check returns the problems as
(column, sentence) pairs or raises ``ValueError`` with the sentence; the
caller adds where the value came from (file, row, job id).

Text rules: surrounding spaces are ignored; control characters (line breaks,
tabs, NUL, ESC) and broken characters (lone UTF-16 surrogates, which no file
can store) are refused everywhere; ids (job, site, vehicle class) are at most
:data:`MAX_ID_CHARS` characters and hold no invisible characters, and two job
ids that only look alike (``J1`` and a full-width ``Ｊ1``) are refused as well.
"""

from __future__ import annotations

import math
import re
import unicodedata
from collections.abc import Iterable, Iterator
from dataclasses import dataclass, field

from ..clock import MAX_HOURS, NUMBER_FORMS, format_clock, parse_decimal
from ..model import SITE_DETAILS, Job, Settings, Site

__all__ = ["MAX_FIELD_CHARS", "MAX_ID_CHARS", "MAX_TRAVEL_SECONDS", "COORDINATE_RANGES",
           "JOB_COLUMNS", "ID_COLUMNS", "check_text", "check_job", "check_site",
           "check_travel", "check_settings", "parse_coordinate", "IdRegister", "class_key"]

MAX_FIELD_CHARS = 10_000  # a note longer than a few pages is a broken file, not a note
MAX_ID_CHARS = 100  # ids are printed in tables and on every sheet
MAX_TRAVEL_SECONDS = 100_000 * 60  # more than two months of driving is a typo
COORDINATE_RANGES = {"lat": (-90.0, 90.0), "lon": (-180.0, 180.0),
                     "x_km": (-1e5, 1e5), "y_km": (-1e5, 1e5)}

# File column -> Job attribute, in the jobs file's words.
JOB_COLUMNS = {"job": "id", "origin": "origin", "destination": "destination",
               "vehicle_class": "vehicle_class", "customer": "customer",
               "reference": "reference", "notes": "notes"}
ID_COLUMNS = frozenset({"job", "origin", "destination", "vehicle_class", "site", "from", "to",
                        "depot"})

# C0 and C1 controls (Unicode category Cc) and the surrogate block (Cs): the
# same test as unicodedata.category, as one fast scan.
_UNSTORABLE = re.compile("[\x00-\x1f\x7f-\x9f\ud800-\udfff]")


def _invisible(text: str) -> str | None:
    """The first character of an id that shows as nothing or as a plain space."""
    for ch in text:
        category = unicodedata.category(ch)
        if category == "Cf" or (category.startswith("Z") and ch != " "):
            return ch
    return None


def check_text(text: str, *, id_like: bool = False) -> str:
    """``text`` without surrounding spaces, or ``ValueError`` saying what is wrong."""
    text = text.strip()
    limit = MAX_ID_CHARS if id_like else MAX_FIELD_CHARS
    if len(text) > limit:
        kind = "an id" if id_like else "a planning value"
        raise ValueError(f"the value is {len(text)} characters long; over {limit} is not "
                         f"{kind}")
    bad = _UNSTORABLE.search(text)
    if bad is not None:
        if "\ud800" <= bad.group() <= "\udfff":
            raise ValueError("the value holds a broken character (half of a UTF-16 pair, "
                             "which no file can store); retype it")
        raise ValueError("the value holds a control character (a hidden, non-printing "
                         "character such as a line break, tab or escape); retype it")
    if id_like and not text.isascii():
        ch = _invisible(text)
        if ch is not None:
            raise ValueError(f"the id holds an invisible character (U+{ord(ch):04X}) that "
                             "would make it differ from an id that looks the same; retype it")
    return text


def class_key(vehicle_class: str) -> str:
    """Vehicle classes are one class whatever their case and surrounding spaces."""
    return vehicle_class.strip().casefold()


# ------------------------------------------------------------------------ jobs

def check_job(job: Job, *, texts: bool = True) -> list[tuple[str, str]]:
    """(column, sentence) for every rule ``job`` breaks on its own; [] if none.

    Text fields (skipped with ``texts=False`` when every value was put through
    :func:`check_text` already), required ids, times within the plan day and the
    night after, and an end after the start.  Ids against other jobs:
    :class:`IdRegister`.
    """
    problems = []
    for column, attribute in JOB_COLUMNS.items() if texts else ():
        try:
            check_text(getattr(job, attribute), id_like=column in ID_COLUMNS)
        except ValueError as exc:
            problems.append((column, str(exc)))
    for column in ("job", "origin"):
        if not getattr(job, JOB_COLUMNS[column]).strip():
            problems.append((column, f"'{column}' is empty; every job needs one"))
    late = False
    for column in ("start", "end"):
        value = getattr(job, column)
        if abs(value) > MAX_HOURS * 3600:  # e.g. a date-time typed with the wrong year
            problems.append((column, f"the job's {column} ({format_clock(value)}) is more than "
                                     f"{MAX_HOURS} hours after the plan day's midnight; a plan "
                                     "covers one day and the night after"))
            late = True
    if not late and job.end <= job.start:
        problems.append(("end", f"the job ends ({format_clock(job.end)}) before or when it "
                                f"starts ({format_clock(job.start)}); a job past midnight "
                                "ends at 24:00 or later, e.g. 25:30"))
    return problems


@dataclass
class IdRegister:
    """Ids seen so far, to refuse the same id twice, also when only the look is the
    same (Unicode compatibility forms: a full-width ``Ｊ1`` is ``J1``)."""

    what: str = "job"
    _seen: dict[str, tuple[str, int | None]] = field(default_factory=dict)

    def find(self, ident: str) -> tuple[str, int | None] | None:
        """The registered id (and its row) that ``ident`` repeats or looks like."""
        return self._seen.get(unicodedata.normalize("NFKC", ident))

    def add(self, ident: str, row: int | None = None) -> str | None:
        """Register ``ident``; the sentence to report if it clashes, else None."""
        clash = self.find(ident)
        if clash is None:
            self._seen[unicodedata.normalize("NFKC", ident)] = (ident, row)
            return None
        first, first_row = clash
        where = f" (first in row {first_row})" if first_row else ""
        if first == ident:
            return f"{self.what} '{ident}' is listed twice{where}; {self.what} ids must be unique"
        return (f"{self.what} id '{ident}' looks the same as {self.what} '{first}'{where} but "
                f"is written with other characters; {self.what} ids must differ visibly")


def duplicate_jobs(jobs: Iterable[Job]) -> Iterator[tuple[Job, str]]:
    """(job, sentence) for each job whose id repeats an earlier one."""
    ids = IdRegister("job")
    for job in jobs:
        clash = ids.add(job.id, job.row or None)
        if clash:
            yield job, clash


# ----------------------------------------------------------------------- sites

def parse_coordinate(text: str, column: str) -> float:
    """A coordinate as typed, in its column's range; ``ValueError`` says why not."""
    low, high = COORDINATE_RANGES[column]
    try:
        value = float(parse_decimal(text))
    except ValueError:
        raise ValueError(f"'{text}' is not a number between {low:g} and {high:g} "
                         f"({NUMBER_FORMS})") from None
    return _in_range(value, column, text)


def _in_range(value: float, column: str, shown: str) -> float:
    low, high = COORDINATE_RANGES[column]
    if not (math.isfinite(value) and low <= value <= high):
        hint = " (are lat and lon swapped?)" if column == "lat" and abs(value) <= 180 else ""
        raise ValueError(f"'{shown}' is not a number between {low:g} and {high:g}{hint}")
    return value


def check_site(site: Site) -> list[tuple[str, str]]:
    """(column, sentence) for every rule ``site`` breaks on its own; [] if none."""
    problems = []
    for column, value in (("site", site.id), ("name", site.name), ("address", site.address),
                          *((k, getattr(site, k)) for k in SITE_DETAILS)):
        try:
            check_text(value, id_like=column == "site")
        except ValueError as exc:
            problems.append((column, str(exc)))
    if not site.id.strip():
        problems.append(("site", "'site' is empty; every site needs an id"))
    for column in COORDINATE_RANGES:
        value = getattr(site, column)
        if value is not None:
            try:
                _in_range(float(value), column, f"{value:g}")
            except (ValueError, OverflowError) as exc:
                problems.append((column, str(exc)))
    for a, b in (("lat", "lon"), ("x_km", "y_km")):
        if (getattr(site, a) is None) != (getattr(site, b) is None):
            missing = a if getattr(site, a) is None else b
            problems.append((missing, f"'{a}' and '{b}' go together; '{missing}' is missing"))
    return problems


# ---------------------------------------------------------------------- travel

def check_travel(origin: str, destination: str, seconds: int) -> list[tuple[str, str]]:
    """(column, sentence) for every rule one travel pair breaks on its own."""
    problems = []
    for column, value in (("from", origin), ("to", destination)):
        try:
            check_text(value, id_like=True)
        except ValueError as exc:
            problems.append((column, str(exc)))
            continue
        if not value:
            problems.append((column, f"'{column}' is empty"))
    if not 0 <= seconds <= MAX_TRAVEL_SECONDS:
        problems.append(("minutes", "travel takes zero or more minutes, and less than two "
                                    "months"))
    elif origin == destination and seconds:
        problems.append(("minutes", "travel from a site to itself is always 0 minutes"))
    return problems


# -------------------------------------------------------------------- settings

def check_settings(settings: Settings) -> list[tuple[str, str]]:
    """(setting, sentence) for every rule the day's settings break; [] if none."""
    s = settings
    problems = []
    if not (isinstance(s.turnaround, int) and 0 <= s.turnaround <= 24 * 3600):
        problems.append(("turnaround", "the turnaround is whole seconds from 0 to 24 hours"))
    if s.depot is not None:
        try:
            check_text(s.depot, id_like=True)
        except ValueError as exc:
            problems.append(("depot", str(exc)))
    for name, label in (("day_start", "day start"), ("day_end", "day end")):
        value = getattr(s, name)
        if value is None:
            continue
        if not s.depot:
            problems.append((name, f"the {label} ({format_clock(value)}) needs a depot: "
                                   "choose the site the vehicles leave from and return to, "
                                   f"or clear the {label}"))
        elif abs(value) > MAX_HOURS * 3600:
            problems.append((name, f"the {label} is more than {MAX_HOURS} hours after "
                                   "midnight"))
    if s.day_start is not None and s.day_end is not None and s.day_end <= s.day_start:
        problems.append(("day_end", f"the day ends ({format_clock(s.day_end)}) before or when "
                                    f"it starts ({format_clock(s.day_start)}); use 25:00 for "
                                    "01:00 next day"))
    if not (math.isfinite(s.speed_kmh) and 0.1 <= s.speed_kmh <= 1000):
        problems.append(("speed_kmh", "the average speed is from 0.1 to 1000 km/h"))
    if not (math.isfinite(s.circuity) and 1 <= s.circuity <= 100):
        problems.append(("circuity", "the road factor is from 1 to 100"))
    return problems
