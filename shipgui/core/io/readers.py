"""Readers for the jobs, sites and travel files: rows of text to checked records.

All problems of one file are collected and reported together (up to
``MAX_PROBLEMS``), each with file, row and column.  Reading only: checks that
need the whole day (travel times, the depot's day) are in
:mod:`shipgui.core.day`.
"""

from __future__ import annotations

import math
import unicodedata
from collections.abc import Iterable, Mapping
from dataclasses import dataclass
from datetime import date
from decimal import Decimal, InvalidOperation
from pathlib import Path

from ..clock import MAX_HOURS, ClockValue, parse_clock, parse_minutes, resolve_clock
from ..errors import MAX_PROBLEMS, InputError, InputErrors, Problem, ProblemCollector
from ..model import SITE_DETAILS, DayInputs, Job, Settings, Site
from .tables import Table, read_table

__all__ = ["read_jobs", "read_sites", "read_travel", "read_inputs", "MAX_PROBLEMS",
           "parse_priority", "parse_movable"]


def _has_control(text: str) -> bool:
    return any(unicodedata.category(ch) == "Cc" for ch in text)


def _require(table: Table, columns: Iterable[str], what: str) -> None:
    missing = [c for c in columns if not table.has(c)]
    if missing:
        names = ", ".join(f"'{c}'" for c in missing)
        has = ", ".join(c for c in table.columns if c and not _has_control(c))
        raise InputError(f"the {what} file needs the column{'s' if len(missing) > 1 else ''} "
                         f"{names} in its header row (it has: {has or 'none'})",
                         file=table.path, row=1, column=missing[0])


def _table(path: str | Path, *, sheet: str | None, delimiter: str | None,
           minutes_columns: Iterable[str] = ()) -> Table:
    return read_table(path, sheet=sheet, delimiter=delimiter, minutes_columns=minutes_columns)


def _cells(table: Table, issues: ProblemCollector):
    """Yield (row number, {column: value}) with control characters rejected."""
    wanted = [c for c in table.columns if c]
    unreadable = set()
    for p in table.problems:  # cells a workbook could not give a value for
        issues.add(p.message, p.file, p.row, p.column)
        unreadable.add(p.row)
    for number, values in table.rows:
        if number in unreadable:
            continue
        record = dict(zip(table.columns, values))
        bad = [c for c in wanted if _has_control(record[c])]
        for column in bad:
            issues.add("the value holds a control character (a hidden, non-printing "
                       "character); retype it", table.path, number, column)
        if not bad:
            yield number, record


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
    plain = text.replace(",", ".") if text.count(",") == 1 and "." not in text else text
    try:
        value = Decimal(plain)
    except InvalidOperation:
        raise ValueError(f"'{text}' is not a number; a priority is a positive number "
                         "such as 1, 2 or 0.5") from None
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
    table = _table(path, sheet=sheet, delimiter=delimiter, minutes_columns=("duration",))
    _require(table, ("job", "origin", "start"), "jobs")
    if not (table.has("end") or table.has("duration")):
        raise InputError("the jobs file needs a column 'end' or a column 'duration'",
                         file=table.path, row=1, column="end")
    issues = ProblemCollector()
    raws = []
    seen: dict[str, int] = {}
    for number, record in _cells(table, issues):
        job_id = record.get("job", "")
        if job_id in seen:
            issues.add(f"job '{job_id}' is listed twice (first in row {seen[job_id]}); "
                       "job ids must be unique", table.path, number, "job")
            continue
        if job_id:
            seen[job_id] = number
        raws.append(_parse_job_row(table, number, record, issues))
    raws = [r for r in raws if r is not None]
    found = len(issues.problems)
    plan_date = _plan_date(table, raws, issues)
    if len(issues.problems) > found or issues.more:  # no plan date: times cannot be resolved
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
    ok = True
    for column in ("job", "origin", "start"):
        if not record.get(column):
            issues.add(f"'{column}' is empty; every job needs one", table.path, number, column)
            ok = False
    for column in ("start", "end"):
        text = record.get(column, "")
        if text:
            try:
                setattr(raw, column, parse_clock(text))
            except ValueError as exc:
                issues.add(str(exc), table.path, number, column)
                ok = False
    if record.get("duration"):
        try:
            raw.duration = parse_minutes(record["duration"], allow_zero=False)
        except ValueError as exc:
            issues.add(str(exc), table.path, number, "duration")
            ok = False
    for column, parse in (("priority", parse_priority), ("movable", parse_movable)):
        text = record.get(column, "")
        if column == "priority" and not text.strip():
            continue
        try:
            setattr(raw, column, parse(text))
        except ValueError as exc:
            job = f"job {record['job']}: " if record.get("job") else ""
            issues.add(job + str(exc), table.path, number, column)
            ok = False
    if ok and raw.end is None and raw.duration is None:
        issues.add("the job has neither an end time nor a duration", table.path, number,
                   "end" if table.has("end") else "duration")
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
                   "while others do", table.path, raw.row, col)
        return None
    if aware:
        zone = aware[0].tzinfo
        for raw, col, m in moments:
            try:
                getattr(raw, col).moment = m.astimezone(zone)
            except OverflowError:
                issues.add("the date-time is out of the calendar's range once converted to "
                           "the file's time zone", table.path, raw.row, col)
                return None
    return min(getattr(raw, col).moment.date() for raw, col, _ in moments)


def _finish_job(table: Table, raw: _RawJob, plan_date: date | None,
                issues: ProblemCollector) -> Job | None:
    rec = raw.record
    start = resolve_clock(raw.start, plan_date)  # type: ignore[arg-type]
    end = resolve_clock(raw.end, plan_date) if raw.end is not None else None
    if end is not None and raw.duration is not None and end - start != raw.duration:
        issues.add(f"end {rec['end']} and duration {rec['duration']} min disagree; "
                   "give one of them", table.path, raw.row, "duration")
        return None
    if end is None:
        end = start + raw.duration  # type: ignore[operator]
    for column, value in (("start", start), ("end", end)):
        if abs(value) > MAX_HOURS * 3600:  # e.g. a date-time typed with the wrong year
            given = rec.get(column) or f"{rec.get('duration')} min after the start"
            issues.add(f"the job's {column} ({given}) is more than {MAX_HOURS} hours after the "
                       "plan day's midnight; a plan covers one day and the night after",
                       table.path, raw.row, column if rec.get(column) else "duration")
            return None
    if end <= start:
        hint = (" (a job past midnight ends at 24:00 or later, e.g. 25:30)"
                if raw.end is not None and raw.end.moment is None else "")
        issues.add(f"the job ends ({rec.get('end')}) before or when it starts "
                   f"({rec['start']}){hint}", table.path, raw.row, "end")
        return None
    return Job(id=rec["job"], origin=rec["origin"],
               destination=rec.get("destination") or rec["origin"],
               start=start, end=end, vehicle_class=rec.get("vehicle_class", ""),
               customer=rec.get("customer", ""), reference=rec.get("reference", ""),
               notes=rec.get("notes", ""), row=raw.row, priority=raw.priority,
               movable=raw.movable)


# ---------------------------------------------------------------------- sites

def _float(text: str, low: float, high: float) -> float:
    value = float(text.replace(",", ".")) if text.count(",") == 1 and "." not in text \
        else float(text)
    if not math.isfinite(value) or not (low <= value <= high):
        raise ValueError
    return value


def read_sites(path: str | Path, *, sheet: str | None = None,
               delimiter: str | None = None) -> list[Site]:
    """Read and check the sites file (CSV, or a sheet of an XLSX workbook)."""
    table = _table(path, sheet=sheet, delimiter=delimiter)
    _require(table, ("site",), "sites")
    issues = ProblemCollector()
    sites: list[Site] = []
    seen: dict[str, int] = {}
    ranges = {"lat": (-90, 90), "lon": (-180, 180), "x_km": (-1e5, 1e5), "y_km": (-1e5, 1e5)}
    for number, rec in _cells(table, issues):
        if not rec.get("site"):
            issues.add("'site' is empty; every site needs an id", table.path, number, "site")
            continue
        coords: dict[str, float | None] = {}
        for column, (low, high) in ranges.items():
            text = rec.get(column, "")
            coords[column] = None
            if text:
                try:
                    coords[column] = _float(text, low, high)
                except ValueError:
                    issues.add(f"'{text}' is not a number between {low:g} and {high:g}",
                               table.path, number, column)
        for a, b in (("lat", "lon"), ("x_km", "y_km")):
            if (coords[a] is None) != (coords[b] is None) and rec.get(a, "") + rec.get(b, ""):
                missing = a if coords[a] is None else b
                issues.add(f"'{a}' and '{b}' go together; '{missing}' is missing",
                           table.path, number, missing)
        if rec["site"] in seen:
            issues.add(f"site '{rec['site']}' is listed twice (first in row "
                       f"{seen[rec['site']]})", table.path, number, "site")
            continue
        seen[rec["site"]] = number
        details = {column: rec.get(column, "") for column in SITE_DETAILS}
        sites.append(Site(rec["site"], rec.get("name", ""), rec.get("address", ""),
                          coords["lat"], coords["lon"], coords["x_km"], coords["y_km"],
                          **details))
    issues.raise_if_any()
    return sites


# --------------------------------------------------------------------- travel

def read_travel(path: str | Path, *, sheet: str | None = None,
                delimiter: str | None = None) -> dict[tuple[str, str], tuple[int, int]]:
    """Read the travel file (CSV or XLSX): (from, to) -> (seconds rounded up, row)."""
    table = _table(path, sheet=sheet, delimiter=delimiter, minutes_columns=("minutes",))
    _require(table, ("from", "to", "minutes"), "travel")
    issues = ProblemCollector()
    pairs: dict[tuple[str, str], tuple[int, int]] = {}
    for number, rec in _cells(table, issues):
        a, b = rec["from"], rec["to"]
        if not a or not b:
            column = "from" if not a else "to"
            issues.add(f"'{column}' is empty", table.path, number, column)
            continue
        try:
            seconds = parse_minutes(rec["minutes"])
        except ValueError as exc:
            issues.add(str(exc), table.path, number, "minutes")
            continue
        if a == b and seconds:
            issues.add("travel from a site to itself is always 0 minutes",
                       table.path, number, "minutes")
            continue
        if (a, b) in pairs:
            issues.add(f"the pair {a} -> {b} is listed twice (first in row "
                       f"{pairs[(a, b)][1]})", table.path, number, "from")
            continue
        pairs[(a, b)] = (seconds, number)
    issues.raise_if_any()
    return pairs


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
