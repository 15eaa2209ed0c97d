"""Readers for the jobs, sites and travel files: rows of text to checked records.

All problems of one file are collected and reported together (up to
``MAX_PROBLEMS``), each with file, row and column.  Reading only: checks that
need the whole day (travel times, the depot's day) are in
:mod:`shipgui.core.day`.
"""

from __future__ import annotations

from collections.abc import Iterable, Iterator, Mapping
from dataclasses import dataclass
from datetime import date
from decimal import Decimal
from pathlib import Path

from ..clock import (
    NUMBER_FORMS,
    ClockValue,
    parse_clock,
    parse_decimal,
    parse_minutes,
    resolve_clock,
)
from ..errors import MAX_PROBLEMS, InputError, InputErrors, Problem, ProblemCollector
from ..model import SITE_DETAILS, DayInputs, Job, Settings, Site, TravelPairs
from .tables import Table, read_table
from .validation import (
    COORDINATE_RANGES,
    ID_COLUMNS,
    IdRegister,
    check_job,
    check_site,
    check_text,
    check_travel,
    parse_coordinate,
)

__all__ = ["read_jobs", "read_sites", "read_travel", "read_inputs", "read_day_file",
           "table_kind", "jobs_from_table", "sites_from_table", "travel_from_table",
           "MAX_PROBLEMS", "parse_priority", "parse_movable"]


def _printable(text: str) -> bool:
    try:
        check_text(text)
    except ValueError:
        return False
    return True


def _require(table: Table, columns: Iterable[str], what: str) -> None:
    missing = [c for c in columns if not table.has(c)]
    if missing:
        names = ", ".join(f"'{c}'" for c in missing)
        has = ", ".join(c for c in table.columns if _printable(c))
        raise InputError(f"the {what} file needs the column{'s' if len(missing) > 1 else ''} "
                         f"{names} in its header row (it has: {has or 'none'})",
                         file=table.path, row=1, column=missing[0])


def _table(path: str | Path, *, sheet: str | None, delimiter: str | None) -> Table:
    return read_table(path, sheet=sheet, delimiter=delimiter)


def _cells(table: Table, issues: ProblemCollector,
           job_column: str | None = None) -> Iterator[tuple[int, dict[str, str]]]:
    """Yield (row number, {column: value}) for the rows whose every value passes the
    text rules (:func:`~shipgui.core.io.validation.check_text`); the others are
    reported, naming the job where the row is one."""
    unreadable = set()
    for p in table.problems:  # cells a workbook could not give a value for
        issues.add(p.message, p.file, p.row, p.column)
        unreadable.add(p.row)
    for number, values in table.rows:
        if number in unreadable:
            continue
        record = dict(zip(table.columns, values))
        job = record.get(job_column, "") if job_column else ""
        if job and not _printable(job):
            job = ""
        clean = True
        for column, value in record.items():
            try:
                check_text(value, id_like=column in ID_COLUMNS)
            except ValueError as exc:
                issues.add(str(exc), table.path, number, column,
                           job=None if column == job_column else job or None)
                clean = False
        if clean:
            yield number, record


def table_kind(table: Table) -> str | None:
    """"jobs", "sites" or "travel" by the header's columns, else None."""
    if table.has("job"):
        return "jobs"
    if table.has("from") and table.has("to") and table.has("minutes"):
        return "travel"
    if table.has("site"):
        return "sites"
    return None


# ----------------------------------------------------------------------- jobs

@dataclass
class _RawJob:
    row: int
    record: dict[str, str]
    start: ClockValue | None = None
    end: ClockValue | None = None
    duration: int | None = None
    priority: float = 1.0
    movable: bool = True


MAX_PRIORITY = 1_000_000


def parse_priority(text: str) -> float:
    """A job's priority as typed: a positive number with at most three decimals
    (a decimal comma is fine).  Raises ``ValueError`` with a readable reason."""
    text = text.strip()
    try:
        value = parse_decimal(text)  # the one number form of every column
    except ValueError:
        raise ValueError(f"'{text}' is not a number; a priority is a positive number "
                         f"such as 1, 2 or 0.5 ({NUMBER_FORMS})") from None
    if not value.is_finite() or value <= 0 or value > MAX_PRIORITY:
        raise ValueError(f"priority '{text}' must be more than 0 and at most "
                         f"{MAX_PRIORITY:,}".replace(",", " "))
    if value != value.quantize(Decimal("0.001")):
        raise ValueError(f"priority '{text}' has more than three decimals")
    return float(value)


def parse_movable(text: str) -> bool:
    """'yes' or 'no' (any case; empty means yes).  Raises ``ValueError`` otherwise."""
    word = text.strip().lower()
    if word in ("", "yes"):
        return True
    if word == "no":
        return False
    raise ValueError(f"'{text}' should be yes or no (no keeps the job's time slot)")


def read_jobs(path: str | Path, *, sheet: str | None = None,
              delimiter: str | None = None) -> tuple[list[Job], date | None]:
    """Read and check the jobs file (CSV, or a sheet of an XLSX workbook); returns
    the jobs and the plan date if the file used date-times (else ``None``)."""
    return jobs_from_table(_table(path, sheet=sheet, delimiter=delimiter))


def jobs_from_table(table: Table) -> tuple[list[Job], date | None]:
    """The checked jobs of a table read by :func:`read_table`, and the plan date."""
    _require(table, ("job", "origin", "start"), "jobs")
    if not (table.has("end") or table.has("duration")):
        raise InputError("the jobs file needs a column 'end' or a column 'duration'",
                         file=table.path, row=1, column="end")
    issues = ProblemCollector()
    raws = []
    ids = IdRegister("job")
    for number, record in _cells(table, issues, "job"):
        job_id = record.get("job", "")
        clash = ids.add(job_id, number) if job_id else None
        if clash:
            issues.add(clash, table.path, number, "job", job=job_id)
            continue
        raw = _parse_job_row(table, number, record, issues)
        if raw is not None:
            raws.append(raw)
    found = len(issues)
    plan_date = _plan_date(table, raws, issues)
    if len(issues) > found:  # no plan date: times cannot be resolved
        issues.raise_if_any()
    jobs = [job for job in (_finish_job(table, raw, plan_date, issues) for raw in raws)
            if job is not None]
    if not jobs and not issues.problems:
        issues.add("the jobs file has no jobs (only a header)", table.path, 1)
    issues.raise_if_any()
    return jobs, plan_date


def _parse_job_row(table: Table, number: int, record: dict[str, str],
                   issues: ProblemCollector) -> _RawJob | None:
    raw = _RawJob(number, record)
    job = record.get("job") or None
    ok = True
    for column in ("job", "origin", "start"):
        if not record.get(column):
            issues.add(f"'{column}' is empty; every job needs one", table.path, number, column,
                       job=job)
            ok = False
    for column in ("start", "end"):
        text = record.get(column, "")
        if text:
            try:
                setattr(raw, column, parse_clock(text))
            except ValueError as exc:
                issues.add(str(exc), table.path, number, column, job=job)
                ok = False
    if record.get("duration"):
        try:
            raw.duration = parse_minutes(record["duration"], allow_zero=False)
        except ValueError as exc:
            issues.add(str(exc), table.path, number, "duration", job=job)
            ok = False
    for column, parse in (("priority", parse_priority), ("movable", parse_movable)):
        text = record.get(column, "")
        if column == "priority" and not text.strip():
            continue
        try:
            setattr(raw, column, parse(text))
        except ValueError as exc:
            issues.add(str(exc), table.path, number, column, job=job)
            ok = False
    if ok and raw.end is None and raw.duration is None:
        issues.add("the job has neither an end time nor a duration", table.path, number,
                   "end" if table.has("end") else "duration", job=job)
        ok = False
    return raw if ok else None


def _plan_date(table: Table, raws: list[_RawJob], issues: ProblemCollector) -> date | None:
    moments = [(raw, col, v.moment) for raw in raws for col, v in
               (("start", raw.start), ("end", raw.end)) if v is not None and v.moment]
    if not moments:
        return None
    aware = [m for _, _, m in moments if m.tzinfo is not None]
    if aware and len(aware) != len(moments):
        raw, col, _ = next(x for x in moments if x[2].tzinfo is None)
        issues.add("date-times must all carry a UTC offset or all not; this one has none "
                   "while others do", table.path, raw.row, col, job=raw.record.get("job"))
        return None
    if aware:
        zone = aware[0].tzinfo
        for raw, col, m in moments:
            try:
                getattr(raw, col).moment = m.astimezone(zone)
            except OverflowError:
                issues.add("the date-time is out of the calendar's range once converted to "
                           "the file's time zone", table.path, raw.row, col,
                           job=raw.record.get("job"))
                return None
    return min(getattr(raw, col).moment.date() for raw, col, _ in moments)


def _finish_job(table: Table, raw: _RawJob, plan_date: date | None,
                issues: ProblemCollector) -> Job | None:
    rec = raw.record
    start = resolve_clock(raw.start, plan_date)  # type: ignore[arg-type]
    end = resolve_clock(raw.end, plan_date) if raw.end is not None else None
    if end is not None and raw.duration is not None and end - start != raw.duration:
        issues.add(f"end {rec['end']} and duration {rec['duration']} min disagree; "
                   "give one of them", table.path, raw.row, "duration", job=rec["job"])
        return None
    if end is None:
        end = start + raw.duration  # type: ignore[operator]
    job = Job(id=rec["job"], origin=rec["origin"],
              destination=rec.get("destination") or rec["origin"],
              start=start, end=end, vehicle_class=rec.get("vehicle_class", ""),
              customer=rec.get("customer", ""), reference=rec.get("reference", ""),
              notes=rec.get("notes", ""), row=raw.row, priority=raw.priority,
              movable=raw.movable)
    problems = check_job(job, texts=False)  # _cells checked every value's text
    for column, message in problems:
        if column == "end" and not rec.get("end"):
            column = "duration"  # the end was worked out from the duration
        issues.add(message, table.path, raw.row, column, job=job.id)
    return None if problems else job


# ---------------------------------------------------------------------- sites

def read_sites(path: str | Path, *, sheet: str | None = None,
               delimiter: str | None = None) -> list[Site]:
    """Read and check the sites file (CSV, or a sheet of an XLSX workbook)."""
    return sites_from_table(_table(path, sheet=sheet, delimiter=delimiter))


def sites_from_table(table: Table) -> list[Site]:
    """The checked sites of a table read by :func:`read_table`."""
    _require(table, ("site",), "sites")
    issues = ProblemCollector()
    sites: list[Site] = []
    ids = IdRegister("site")
    for number, rec in _cells(table, issues):
        coords: dict[str, float | None] = {}
        typo = False
        for column in COORDINATE_RANGES:
            text = rec.get(column, "")
            coords[column] = None
            if text:
                try:
                    coords[column] = parse_coordinate(text, column)
                except ValueError as exc:
                    issues.add(str(exc), table.path, number, column)
                    typo = True
        details = {column: rec.get(column, "") for column in SITE_DETAILS}
        site = Site(rec.get("site", ""), rec.get("name", ""), rec.get("address", ""),
                    row=number, **coords, **details)
        problems = [] if typo else check_site(site)
        for column, message in problems:
            issues.add(message, table.path, number, column)
        clash = ids.add(site.id, number) if site.id else None
        if clash:
            issues.add(clash, table.path, number, "site")
        elif not typo and not problems:
            sites.append(site)
    issues.raise_if_any()
    return sites


# --------------------------------------------------------------------- travel

def read_travel(path: str | Path, *, sheet: str | None = None,
                delimiter: str | None = None) -> TravelPairs:
    """Read the travel file (CSV or XLSX): (from, to) -> (seconds rounded up, row)."""
    return travel_from_table(_table(path, sheet=sheet, delimiter=delimiter))


def travel_from_table(table: Table) -> TravelPairs:
    """The checked travel pairs of a table read by :func:`read_table`."""
    _require(table, ("from", "to", "minutes"), "travel")
    issues = ProblemCollector()
    pairs: TravelPairs = {}
    for number, rec in _cells(table, issues):
        a, b = rec["from"], rec["to"]
        try:
            seconds = parse_minutes(rec["minutes"])
        except ValueError as exc:
            issues.add(str(exc), table.path, number, "minutes")
            seconds = None
        problems = check_travel(a, b, 0 if seconds is None else seconds)
        for column, message in problems:
            issues.add(message, table.path, number, column)
        if problems or seconds is None:
            continue
        if (a, b) in pairs:
            issues.add(f"the pair {a} -> {b} is listed twice (first in row "
                       f"{pairs[(a, b)][1]})", table.path, number, "from")
            continue
        pairs[(a, b)] = (seconds, number)
    issues.raise_if_any()
    return pairs


def read_day_file(path: str | Path, *, sheet: str | None = None,
                  delimiter: str | None = None) -> tuple[str, object]:
    """Read a table file of any kind: ("jobs", (jobs, plan date)), ("sites", sites)
    or ("travel", pairs), by its header.

    The file is read by the same code as for the command line, so it is refused
    with the same messages; a header that fits no kind is read as a jobs file
    (as the command line reads its first file), whose message names the missing
    columns.
    """
    table = _table(path, sheet=sheet, delimiter=delimiter)
    kind = table_kind(table) or "jobs"
    read = {"jobs": jobs_from_table, "sites": sites_from_table, "travel": travel_from_table}
    return kind, read[kind](table)


# ----------------------------------------------------------------- all files

def read_inputs(jobs_path: str | Path, sites_path: str | Path | None = None,
                travel_path: str | Path | None = None, *, settings: Settings | None = None,
                sheets: Mapping[str, str] | None = None,
                delimiter: str | None = None) -> DayInputs:
    """Read a jobs file and the optional sites and travel files.

    ``sheets`` picks a sheet per workbook by file kind ("jobs", "sites",
    "travel"; default the first sheet); ``delimiter`` overrides the CSV
    delimiter detected on each header.  The problems of all files are
    reported together (:class:`InputErrors`).
    """
    sheets = dict(sheets or {})
    unknown = set(sheets) - {"jobs", "sites", "travel"}
    if unknown:
        raise ValueError(f"unknown file kind(s) for sheets: {sorted(unknown)}")
    readers = {"jobs": (read_jobs, jobs_path), "sites": (read_sites, sites_path),
               "travel": (read_travel, travel_path)}
    problems: list[Problem] = []
    results: dict = {}
    for kind, (read, path) in readers.items():
        if not path:
            continue
        try:
            results[kind] = read(path, sheet=sheets.get(kind), delimiter=delimiter)
        except InputError as exc:
            problems.extend(exc.problems)
    if problems:
        raise InputErrors(problems)
    jobs, plan_date = results["jobs"]
    sources = {kind: str(path) for kind, (_read, path) in readers.items() if path}
    return DayInputs(tuple(jobs), tuple(results.get("sites", ())), results.get("travel", {}),
                     settings or Settings(), plan_date, sources)
