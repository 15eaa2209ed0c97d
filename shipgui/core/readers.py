"""Readers for the jobs, sites and travel files, and the one path that turns them
into a validated :class:`~shipgui.core.model.Day`.

All problems of one file are collected and reported together (up to
``MAX_PROBLEMS``), each with file, row and column.
"""

from __future__ import annotations

import hashlib
import math
import unicodedata
from collections.abc import Iterable, Mapping
from dataclasses import dataclass, field
from datetime import date
from pathlib import Path

import numpy as np

from .clock import (
    MAX_HOURS,
    ClockValue,
    format_minutes,
    parse_clock,
    parse_minutes,
    resolve_clock,
)
from .errors import InputError, InputErrors, Problem
from .model import Day, Job, Settings, Site
from .tables import Table, read_table
from .travel import close_travel, estimate_seconds, haversine_km

__all__ = ["read_jobs", "read_sites", "read_travel", "build_day", "load_day",
           "MAX_PROBLEMS", "MAX_SITES"]

MAX_PROBLEMS = 50
# The travel closure is cubic in the number of sites: 2 000 sites take about
# ten seconds, far beyond any regional day; more is a broken file.
MAX_SITES = 2_000
DEFAULT_SETTINGS = Settings()


@dataclass
class _Collector:
    """Gathers problems so that a file's mistakes are all reported at once."""

    problems: list[Problem] = field(default_factory=list)
    more: int = 0

    def add(self, message: str, file: str | None = None, row: int | None = None,
            column: str | None = None) -> None:
        if len(self.problems) < MAX_PROBLEMS:
            self.problems.append(Problem(message, file, row, column))
        else:
            self.more += 1

    def raise_if_any(self) -> None:
        if self.problems:
            raise InputErrors(self.problems, more=self.more)


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


def _cells(table: Table, issues: _Collector):
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


def read_jobs(path: str | Path, *, sheet: str | None = None,
              delimiter: str | None = None) -> tuple[list[Job], date | None]:
    """Read and check the jobs file (CSV, or a sheet of an XLSX workbook); returns
    the jobs and the plan date if the file used date-times (else ``None``)."""
    table = _table(path, sheet=sheet, delimiter=delimiter, minutes_columns=("duration",))
    _require(table, ("job", "origin", "start"), "jobs")
    if not (table.has("end") or table.has("duration")):
        raise InputError("the jobs file needs a column 'end' or a column 'duration'",
                         file=table.path, row=1, column="end")
    issues = _Collector()
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
                   issues: _Collector) -> _RawJob | None:
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
    if ok and raw.end is None and raw.duration is None:
        issues.add("the job has neither an end time nor a duration", table.path, number,
                   "end" if table.has("end") else "duration")
        ok = False
    return raw if ok else None


def _plan_date(table: Table, raws: list[_RawJob], issues: _Collector) -> date | None:
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
                issues: _Collector) -> Job | None:
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
               notes=rec.get("notes", ""), row=raw.row)


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
    issues = _Collector()
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
        sites.append(Site(rec["site"], rec.get("name", ""), rec.get("address", ""),
                          coords["lat"], coords["lon"], coords["x_km"], coords["y_km"]))
    issues.raise_if_any()
    return sites


# --------------------------------------------------------------------- travel

def read_travel(path: str | Path, *, sheet: str | None = None,
                delimiter: str | None = None) -> dict[tuple[str, str], tuple[int, int]]:
    """Read the travel file (CSV or XLSX): (from, to) -> (seconds rounded up, row)."""
    table = _table(path, sheet=sheet, delimiter=delimiter, minutes_columns=("minutes",))
    _require(table, ("from", "to", "minutes"), "travel")
    issues = _Collector()
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


# ------------------------------------------------------------------------ day

def load_day(jobs_path: str | Path, sites_path: str | Path | None = None,
             travel_path: str | Path | None = None, *,
             settings: Settings = DEFAULT_SETTINGS, sheets: Mapping[str, str] | None = None,
             delimiter: str | None = None) -> Day:
    """Read the files and build a validated day (see :func:`build_day`).

    ``sheets`` picks a sheet per workbook by file kind ("jobs", "sites",
    "travel"; default the first sheet); ``delimiter`` overrides the CSV
    delimiter detected on each header.
    """
    sheets = dict(sheets or {})
    unknown = set(sheets) - {"jobs", "sites", "travel"}
    if unknown:
        raise ValueError(f"unknown file kind(s) for sheets: {sorted(unknown)}")
    jobs, plan_date = read_jobs(jobs_path, sheet=sheets.get("jobs"), delimiter=delimiter)
    sites = (read_sites(sites_path, sheet=sheets.get("sites"), delimiter=delimiter)
             if sites_path else [])
    travel = (read_travel(travel_path, sheet=sheets.get("travel"), delimiter=delimiter)
              if travel_path else {})
    sources = {"jobs": str(jobs_path)}
    if sites_path:
        sources["sites"] = str(sites_path)
    if travel_path:
        sources["travel"] = str(travel_path)
    return build_day(jobs, sites, travel, settings=settings, plan_date=plan_date,
                     sources=sources)


def build_day(jobs: list[Job], sites: list[Site],
              travel: dict[tuple[str, str], tuple[int, int]], *,
              settings: Settings = DEFAULT_SETTINGS, plan_date: date | None = None,
              sources: dict[str, str] | None = None) -> Day:
    """Check jobs against the travel times and the depot day; close the travel matrix.

    Raises :class:`InputErrors` listing every job or pair that is wrong.
    """
    sources = dict(sources or {})
    by_id = {s.id: s for s in sites}
    used = _used_sites(jobs, settings)
    site_ids = _site_order(sites, travel, used)
    if len(site_ids) > MAX_SITES:
        raise InputError(f"the day names {len(site_ids)} different sites; more than "
                         f"{MAX_SITES} is not a regional day (check the site columns)",
                         file=sources.get("sites") or sources.get("travel")
                         or sources.get("jobs"))
    matrix, estimated = _travel_matrix(site_ids, by_id, travel, used, settings, sources)
    try:
        closed, shortened = close_travel(matrix)
    except ValueError as exc:
        raise InputError(str(exc), file=sources.get("travel")) from None
    index = {s: k for k, s in enumerate(site_ids)}
    _check_jobs(jobs, closed, index, settings, sources.get("jobs"))
    warnings = []
    if estimated:
        warnings.append(f"{estimated} travel times were estimated from site coordinates "
                        f"(circuity {settings.circuity:g}, {settings.speed_kmh:g} km/h)")
    if shortened:
        warnings.append(f"{shortened} travel times were shortened because driving via "
                        "another site is quicker; check those values in the travel file")
    return Day(tuple(jobs), tuple(site_ids), by_id, closed, settings, tuple(warnings),
               shortened, estimated, plan_date, sources,
               _fingerprint(jobs, by_id, site_ids, closed, settings))


def _used_sites(jobs: list[Job], settings: Settings) -> list[str]:
    used = dict.fromkeys(s for j in jobs for s in (j.origin, j.destination))
    if settings.depot:
        used[settings.depot] = None
    return list(used)


def _site_order(sites: list[Site], travel: dict, used: list[str]) -> list[str]:
    order = dict.fromkeys(s.id for s in sites)
    for a, b in travel:
        order[a] = order[b] = None
    for s in used:
        order[s] = None
    return list(order)


def _travel_matrix(site_ids, by_id, travel, used, settings: Settings, sources):
    n = len(site_ids)
    index = {s: k for k, s in enumerate(site_ids)}
    matrix = np.full((n, n), -1, dtype=np.int64)
    for (a, b), (seconds, _row) in travel.items():
        matrix[index[a], index[b]] = seconds
    np.fill_diagonal(matrix, 0)
    estimated = _estimate_missing(matrix, site_ids, by_id, settings)
    used_idx = np.array([index[s] for s in used], dtype=np.int64)
    sub = matrix[np.ix_(used_idx, used_idx)]
    missing = np.argwhere(sub < 0)
    if len(missing):
        _report_missing([(used[a], used[b]) for a, b in missing], by_id, sources)
    return matrix, estimated


def _report_missing(pairs: list[tuple[str, str]], by_id: dict[str, Site],
                    sources: dict[str, str]) -> None:
    """One message for all missing travel times, naming pairs and the sites to fix."""
    examples = ", ".join(f"{a} -> {b}" for a, b in pairs[:5])
    lacking = list(dict.fromkeys(s for pair in pairs for s in pair
                                 if not _has_coords(by_id.get(s))))
    if lacking:
        unknown = [s for s in lacking if s not in by_id]
        fix = (f"sites without coordinates: {', '.join(lacking[:12])}"
               + (" ..." if len(lacking) > 12 else "")
               + (" (not in the sites file)" if unknown and len(unknown) == len(lacking) else "")
               + "; give them lat/lon or x_km/y_km in the sites file, or list the pairs "
               "in the travel file")
    else:
        fix = "these sites mix lat/lon and x/y km coordinates; list the pairs in the travel file"
    if not sources.get("travel") and not sources.get("sites"):
        fix = "give a travel file (from, to, minutes) or a sites file with coordinates"
    raise InputError(f"no travel time for {len(pairs)} pair(s) of sites, e.g. {examples}: {fix}",
                     file=sources.get("travel") or sources.get("sites") or sources.get("jobs"))


def _has_coords(site: Site | None) -> bool:
    return site is not None and (site.has_latlon or site.has_xy)


def _estimate_missing(matrix: np.ndarray, site_ids, by_id, settings: Settings) -> int:
    """Fill missing pairs from coordinates, in place; returns how many were filled."""
    total = 0
    for kind in ("latlon", "xy"):
        idx = [k for k, s in enumerate(site_ids) if s in by_id and
               getattr(by_id[s], f"has_{kind}")]
        if len(idx) < 2:
            continue
        sel = np.array(idx)
        if kind == "latlon":
            lat = np.array([by_id[site_ids[k]].lat for k in idx])
            lon = np.array([by_id[site_ids[k]].lon for k in idx])
            km = haversine_km(lat[:, None], lon[:, None], lat[None, :], lon[None, :])
        else:
            x = np.array([by_id[site_ids[k]].x_km for k in idx])
            y = np.array([by_id[site_ids[k]].y_km for k in idx])
            km = np.hypot(x[:, None] - x[None, :], y[:, None] - y[None, :])
        est = estimate_seconds(km, speed_kmh=settings.speed_kmh, circuity=settings.circuity)
        block = matrix[np.ix_(sel, sel)]
        fill = block < 0
        total += int(fill.sum())
        block[fill] = est[fill]
        matrix[np.ix_(sel, sel)] = block
    return total


def _check_jobs(jobs: list[Job], travel: np.ndarray, index: dict[str, int],
                settings: Settings, jobs_file: str | None) -> None:
    if not jobs:
        return
    origin = np.array([index[j.origin] for j in jobs])
    dest = np.array([index[j.destination] for j in jobs])
    start = np.array([j.start for j in jobs], dtype=np.int64)
    end = np.array([j.end for j in jobs], dtype=np.int64)
    issues = _Collector()
    short = end - start - travel[origin, dest]
    for k in np.flatnonzero(short < 0):
        j = jobs[k]
        issues.add(f"job {j.id}: the drive {j.origin} -> {j.destination} takes "
                   f"{format_minutes(travel[origin[k], dest[k]])} min but the slot is only "
                   f"{format_minutes(end[k] - start[k])} min", jobs_file, j.row, "end")
    if settings.depot:
        d = index[settings.depot]
        if settings.day_start is not None:
            late = settings.day_start + travel[d, origin] - start
            for k in np.flatnonzero(late > 0):
                j = jobs[k]
                issues.add(f"job {j.id} cannot be reached from depot {settings.depot} in time: "
                           f"it misses its start by {format_minutes(late[k])} min",
                           jobs_file, j.row, "start")
        if settings.day_end is not None:
            over = end + travel[dest, d] - settings.day_end
            for k in np.flatnonzero(over > 0):
                j = jobs[k]
                issues.add(f"job {j.id}: the vehicle is back at depot {settings.depot} "
                           f"{format_minutes(over[k])} min after the day ends",
                           jobs_file, j.row, "end")
    issues.raise_if_any()


def _fingerprint(jobs: list[Job], sites: dict[str, Site], site_ids: list[str],
                 travel: np.ndarray, settings: Settings) -> str:
    """A short hash of everything the plan depends on, printed on every page so
    that a printout can be matched to its data."""
    h = hashlib.sha256()
    h.update(repr([tuple(vars(j).values())[:9] for j in jobs]).encode())
    h.update(repr(sorted((k, tuple(vars(v).values())) for k, v in sites.items())).encode())
    h.update(repr(site_ids).encode())
    h.update(np.ascontiguousarray(travel, dtype=np.int64).tobytes())
    h.update(repr(settings).encode())
    return h.hexdigest()[:12]
