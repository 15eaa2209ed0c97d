"""From checked records to a validated :class:`~shipgui.core.model.Day`.

:func:`build_day` estimates missing travel times from coordinates, closes the
travel matrix under shortest paths and checks every job against it and
against the depot's day; :func:`load_day` reads the files first.  All
problems are collected and reported together, each with file, row and column.
"""

from __future__ import annotations

import hashlib
from collections.abc import Mapping
from datetime import date
from pathlib import Path

import numpy as np

from .clock import format_duration, format_minutes
from .errors import InputError, ProblemCollector
from .io.readers import read_inputs
from .model import Day, DayInputs, Job, Settings, Site
from .travel import close_travel, estimate_seconds, haversine_km

__all__ = ["build_day", "build_inputs", "load_day", "MAX_SITES"]

# The travel closure is cubic in the number of sites: 2 000 sites take about
# ten seconds, far beyond any regional day; more is a broken file.
MAX_SITES = 2_000
DEFAULT_SETTINGS = Settings()


def load_day(jobs_path: str | Path, sites_path: str | Path | None = None,
             travel_path: str | Path | None = None, *,
             settings: Settings = DEFAULT_SETTINGS, sheets: Mapping[str, str] | None = None,
             delimiter: str | None = None) -> Day:
    """Read the files (:func:`~shipgui.core.io.readers.read_inputs`) and build the day."""
    return build_inputs(read_inputs(jobs_path, sites_path, travel_path, settings=settings,
                                    sheets=sheets, delimiter=delimiter))


def build_inputs(inputs: DayInputs) -> Day:
    """:func:`build_day` from a :class:`DayInputs` record (files, plan file, editor)."""
    return build_day(list(inputs.jobs), list(inputs.sites), dict(inputs.travel),
                     settings=inputs.settings, plan_date=inputs.plan_date,
                     sources=dict(inputs.sources))


def build_day(jobs: list[Job], sites: list[Site],
              travel: dict[tuple[str, str], tuple[int, int]], *,
              settings: Settings = DEFAULT_SETTINGS, plan_date: date | None = None,
              sources: dict[str, str] | None = None) -> Day:
    """Check jobs against the travel times and the depot day; close the travel matrix.

    Parameters
    ----------
    jobs : the day's jobs (times in seconds from the plan day's midnight).
    sites : site records; coordinates estimate travel times missing from ``travel``.
    travel : ``{(from, to): (seconds, row in the travel file)}``, one directed pair each.
    settings : turnaround, depot and its day, speed and circuity for estimates.
    plan_date, sources : carried into the day (printed, and used in messages).

    Returns
    -------
    Day
        The validated day: travel closed under shortest paths (so it satisfies
        the triangle inequality), warnings for estimated and shortened pairs.

    Raises
    ------
    InputErrors
        Listing every job or site pair that is wrong (a pair with no travel time,
        a job shorter than its own drive, a job the depot day cannot reach),
        each with file, row and column.

    Notes
    -----
    O(n) to check the jobs plus O(s^3) for the closure over the s sites in use
    (at most 2 000), by Floyd-Warshall in scipy.

    References
    ----------
    Floyd, "Algorithm 97: Shortest path", Communications of the ACM 5(6), 1962.

    Examples
    --------
    >>> from shipgui.core import Job, Settings, build_day
    >>> H = 3600
    >>> jobs = [Job("J1", "A", "B", 8 * H, 9 * H), Job("J2", "B", "A", 9 * H + 900, 10 * H)]
    >>> day = build_day(jobs, [], {("A", "B"): (1200, 2), ("B", "A"): (1200, 3)},
    ...                 settings=Settings(turnaround=600))
    >>> day.n, day.site_ids, day.travel_between("A", "B")
    (2, ('A', 'B'), 1200)
    >>> build_day(jobs, [], {("A", "B"): (1200, 2)})  # doctest: +IGNORE_EXCEPTION_DETAIL
    Traceback (most recent call last):
    shipgui.core.errors.InputError: no travel time for the pair B -> A
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
    _check_vehicle_limits(jobs, settings, sources.get("jobs"))
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
    issues = ProblemCollector()
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
    if settings.max_day is not None:
        _check_working_days(jobs, travel, origin, dest, index, settings, jobs_file, issues)
    issues.raise_if_any()


def _check_working_days(jobs, travel, origin, dest, index, settings: Settings, jobs_file,
                        issues: ProblemCollector) -> None:
    """Every job alone must fit the longest working day (contract section 5)."""
    start = np.array([j.start for j in jobs], dtype=np.int64)
    end = np.array([j.end for j in jobs], dtype=np.int64)
    pull_out = pull_in = np.zeros(len(jobs), dtype=np.int64)
    if settings.depot:
        d = index[settings.depot]
        pull_out, pull_in = travel[d, origin], travel[dest, d]
    own = pull_out + (end - start) + pull_in
    limit = format_duration(settings.max_day)  # type: ignore[arg-type]
    for k in np.flatnonzero(own > settings.max_day):
        j = jobs[k]
        parts = (f" (pull-out {format_duration(pull_out[k])}, the job "
                 f"{format_duration(end[k] - start[k])}, pull-in {format_duration(pull_in[k])})"
                 if settings.depot else "")
        issues.add(f"job {j.id} alone makes a working day of {format_duration(own[k])}{parts}, "
                   f"{format_minutes(own[k] - settings.max_day)} min over the longest working "
                   f"day of {limit}", jobs_file, j.row, "end")
def _check_vehicle_limits(jobs: list[Job], settings: Settings, jobs_file: str | None) -> None:
    """The vehicles available must be a positive number, per class only for classes
    the jobs use."""
    if settings.vehicles is not None and settings.vehicles < 1:
        raise InputError(f"the vehicles available must be 1 or more (not {settings.vehicles})")
    classes = {j.vehicle_class for j in jobs}
    shown = ", ".join(sorted(c or "(none)" for c in classes))
    for name, count in settings.class_vehicles:
        if count < 1:
            raise InputError(f"the vehicles available for class '{name}' must be 1 or more "
                             f"(not {count})")
        if name not in classes:
            raise InputError(f"vehicles are given for class '{name}', but no job has that "
                             f"vehicle class (classes of the jobs: {shown})", file=jobs_file,
                             column="vehicle_class")


def _fingerprint(jobs: list[Job], sites: dict[str, Site], site_ids: list[str],
                 travel: np.ndarray, settings: Settings) -> str:
    """A short hash of everything the plan depends on, printed on every page so
    that a printout can be matched to its data."""
    h = hashlib.sha256()
    h.update(repr([tuple(vars(j).values())[:9] for j in jobs]).encode())
    # Priority and movable only where set, so days without them keep their print.
    options = [(k, j.priority, j.movable) for k, j in enumerate(jobs)
               if j.priority != 1 or not j.movable]
    if options:
        h.update(repr(options).encode())
    h.update(repr(sorted((k, tuple(vars(v).values())) for k, v in sites.items())).encode())
    h.update(repr(site_ids).encode())
    h.update(np.ascontiguousarray(travel, dtype=np.int64).tobytes())
    h.update(repr(settings).encode())
    return h.hexdigest()[:12]
