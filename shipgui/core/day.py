"""From checked records to a validated :class:`~shipgui.core.model.Day`.

:func:`build_day` estimates missing travel times from coordinates, closes the
travel matrix under shortest paths and checks every job against it and
against the depot's day; :func:`load_day` reads the files first.  All
problems are collected and reported together, each with file, row and column.
"""

from __future__ import annotations

import difflib
import hashlib
import math
import unicodedata
from collections.abc import Mapping
from dataclasses import dataclass, replace
from datetime import date
from pathlib import Path

import numpy as np

from .clock import format_day_clock, format_duration, format_minutes
from .errors import InputError, Problem, ProblemCollector
from .io.readers import read_inputs
from .io.validation import check_settings, class_key
from .model import Day, DayInputs, Job, Settings, ShortenedTravel, Site
from .travel import close_travel, estimate_seconds, haversine_km

__all__ = ["build_day", "build_inputs", "load_day", "settings_text", "MAX_SITES"]

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
    _check_day_settings(settings)
    jobs, warnings = _one_spelling_per_class(jobs)
    settings = _class_names_as_spelled(jobs, settings)
    by_id = {s.id: s for s in sites}
    used = _used_sites(jobs, settings)
    site_ids = _site_order(sites, travel, used)
    if len(site_ids) > MAX_SITES:
        raise InputError(f"the day names {len(site_ids)} different sites; more than "
                         f"{MAX_SITES} is not a regional day (check the site columns)",
                         file=sources.get("sites") or sources.get("travel")
                         or sources.get("jobs"))
    matrix, estimated = _travel_matrix(site_ids, by_id, travel, used, settings, sources, jobs)
    try:
        closed, shortened_count = close_travel(matrix)
    except ValueError as exc:
        raise InputError(str(exc), file=sources.get("travel")) from None
    index = {s: k for k, s in enumerate(site_ids)}
    misplaced = _misplaced_sites(sites, used, estimated, index, sources.get("sites"))
    _check_jobs(jobs, closed, index, settings, sources.get("jobs"), misplaced,
                sources.get("sites"))
    _check_vehicle_limits(jobs, settings, sources.get("jobs"))
    shortened = _shortened(matrix, closed, site_ids, travel)
    if estimated.any():
        warnings.append(f"{int(estimated.sum())} travel times were estimated from site "
                        f"coordinates (circuity {settings.circuity:g}, "
                        f"{settings.speed_kmh:g} km/h)")
    warnings.extend(_shortened_warnings(shortened))
    return Day(tuple(jobs), tuple(site_ids), by_id, closed, settings, tuple(warnings),
               shortened_count, int(estimated.sum()), plan_date, sources,
               _fingerprint(jobs, by_id, site_ids, closed, settings), tuple(shortened))


def settings_text(settings: Settings) -> str:
    """The day's settings in one line, as a dispatcher checks them."""
    s = settings
    parts = [f"depot {s.depot}" if s.depot else "no depot"]
    if s.depot and (s.day_start is not None or s.day_end is not None):
        start, end = (format_day_clock(t) if t is not None else "open"
                      for t in (s.day_start, s.day_end))
        parts.append(f"day {start}–{end}")
    parts.append(f"turnaround {format_minutes(s.turnaround)} min")
    if s.max_day is not None:
        parts.append(f"working day at most {format_duration(s.max_day)}")
    parts.append(f"average speed {s.speed_kmh:g} km/h, road factor {s.circuity:.2f}")
    return ", ".join(parts)


def _check_day_settings(settings: Settings) -> None:
    issues = ProblemCollector()
    for _name, message in check_settings(settings):
        issues.add(message)  # the sentence names the setting
    issues.raise_if_any()


def _one_spelling_per_class(jobs: list[Job]) -> tuple[list[Job], list[str]]:
    """Vehicle classes compared without case and surrounding spaces ("Reefer " is
    "reefer"); each class keeps its first spelling, and differing spellings are
    named in a warning."""
    spellings: dict[str, dict[str, int]] = {}
    for job in jobs:
        counts = spellings.setdefault(class_key(job.vehicle_class), {})
        counts[job.vehicle_class] = counts.get(job.vehicle_class, 0) + 1
    mixed = {key: counts for key, counts in spellings.items() if len(counts) > 1}
    if not mixed:
        return list(jobs), []
    first = {key: next(iter(counts)) for key, counts in mixed.items()}
    jobs = [replace(j, vehicle_class=first[key])
            if (key := class_key(j.vehicle_class)) in first and j.vehicle_class != first[key]
            else j for j in jobs]
    warnings = []
    for key, counts in mixed.items():
        others = [f"'{name}' ({n} job{'s' if n != 1 else ''})"
                  for name, n in list(counts.items())[1:]]
        warnings.append(f"vehicle class '{first[key]}' is also written "
                        f"{', '.join(others)}; case and spaces do not matter, so they are "
                        f"one class, shown as '{first[key]}'")
    return jobs, warnings


def _class_names_as_spelled(jobs: list[Job], settings: Settings) -> Settings:
    """Vehicles given per class name that class as the jobs spell it ("reefer=3"
    for the class shown as "Reefer")."""
    if not settings.class_vehicles:
        return settings
    spelled = {class_key(j.vehicle_class): j.vehicle_class for j in jobs}
    return replace(settings, class_vehicles=tuple(
        (spelled.get(class_key(name), name), count) for name, count in settings.class_vehicles))


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


def _travel_matrix(site_ids, by_id, travel, used, settings: Settings, sources, jobs):
    """The travel matrix (seconds, -1 where unknown) and where it was estimated."""
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
        pairs = [(used[a], used[b]) for a, b in missing]
        _report_unknown_sites(pairs, by_id, travel, jobs, settings, sources)
        _report_missing(pairs, by_id, sources)
    return matrix, estimated


def _report_unknown_sites(pairs: list[tuple[str, str]], by_id: dict[str, Site],
                          travel: dict, jobs: list[Job], settings: Settings,
                          sources: dict[str, str]) -> None:
    """A site named by a job or the depot setting that no sites or travel file knows
    is most likely mistyped: name it, and every job (row, column) that uses it."""
    if not by_id and not travel:
        return  # nothing to know sites from; _report_missing says what to give
    known = set(by_id) | {s for pair in travel for s in pair}
    unknown = {s for pair in pairs for s in pair} - known
    if not unknown:
        return
    files = " or ".join(name for name, present in (("the sites file", by_id),
                                                   ("the travel file", travel)) if present)
    candidates = sorted(known)
    issues = ProblemCollector()
    if settings.depot in unknown:
        issues.add(f"the depot '{settings.depot}' is not a site in {files}"
                   f"{_did_you_mean(settings.depot, candidates)}")
    jobs_file = sources.get("jobs")
    for job in jobs:
        for column in ("origin", "destination"):
            site = getattr(job, column)
            if site in unknown and (column == "origin" or site != job.origin):
                issues.add(f"the site '{site}' is not in {files}"
                           f"{_did_you_mean(site, candidates)}", jobs_file, job.row or None,
                           column, job=job.id)
    issues.raise_if_any()


def _did_you_mean(name: str, candidates: list[str]) -> str:
    def fold(text: str) -> str:  # "ｙａｒｄ " and "Yard" are spelled alike
        return unicodedata.normalize("NFKC", text).casefold().strip()
    folded = {fold(c): c for c in candidates}
    match = folded.get(fold(name))
    if match is None:
        close = difflib.get_close_matches(name, candidates, n=1, cutoff=0.75)
        match = close[0] if close else None
    return f" (did you mean '{match}'?)" if match else ""


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


def _estimate_missing(matrix: np.ndarray, site_ids, by_id, settings: Settings) -> np.ndarray:
    """Fill missing pairs from coordinates, in place; returns where it filled them."""
    estimated = np.zeros(matrix.shape, dtype=bool)
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
        block[fill] = est[fill]
        matrix[np.ix_(sel, sel)] = block
        estimated[np.ix_(sel, sel)] = fill
    return estimated


# A site this many times farther from the middle of the day's sites than the
# typical site, and at least this far, is most likely mistyped (common practice
# for a robust outlier test: distances against their median).
_OUTLIER_FACTOR = 10.0
_OUTLIER_MIN_KM = 200.0


@dataclass(frozen=True)
class _Misplaced:
    """A site whose coordinates put it far from all the others."""

    site: Site
    message: str
    swapped: bool  # swapping lat and lon puts it among the others


def _misplaced_sites(sites: list[Site], used: list[str], estimated: np.ndarray,
                     index: dict[str, int], sites_file: str | None) -> list[_Misplaced]:
    """Sites (lat/lon, used by the day, with estimated travel) far from the others.

    Swapped lat/lon are reported at once, on the site's row; a site that is just
    far away is reported only if jobs then fail (see :func:`_check_jobs`), since a
    long drive may be real.
    """
    placed = [s for s in sites if s.has_latlon]  # the day's region: every site given
    if len(placed) < 3:
        return []
    lat = np.array([s.lat for s in placed])
    lon = np.array([s.lon for s in placed])
    middle = (float(np.median(lat)), float(np.median(lon)))
    km = haversine_km(lat, lon, *middle)
    typical = float(np.median(km))
    limit = max(_OUTLIER_FACTOR * typical, _OUTLIER_MIN_KM)
    used_set = set(used)
    found = []
    for k in np.flatnonzero(km > limit):
        site = placed[k]
        at = index.get(site.id)
        if site.id not in used_set or not (estimated[at].any() or estimated[:, at].any()):
            continue  # no travel time of the day comes from these coordinates
        swapped_km = (float(haversine_km(site.lon, site.lat, *middle))
                      if abs(site.lon) <= 90 else math.inf)
        if swapped_km <= limit:
            found.append(_Misplaced(site, f"lat and lon look swapped: ({site.lat:g}, "
                                          f"{site.lon:g}) lies {km[k]:.0f} km from the day's "
                                          f"other sites, ({site.lon:g}, {site.lat:g}) would be "
                                          f"{swapped_km:.0f} km from them; swap the two values",
                                    True))
        else:
            found.append(_Misplaced(site, f"the site lies {km[k]:.0f} km from the day's other "
                                          f"sites (most are within {typical:.0f} km); check "
                                          "its lat and lon", False))
    swapped = [m for m in found if m.swapped]
    if swapped:
        issues = ProblemCollector()
        for m in swapped:
            issues.add(m.message, sites_file, m.site.row or None, "lat")
        issues.raise_if_any()
    return found


def _check_jobs(jobs: list[Job], travel: np.ndarray, index: dict[str, int],
                settings: Settings, jobs_file: str | None,
                misplaced: list[_Misplaced] = (), sites_file: str | None = None) -> None:
    if not jobs:
        return
    origin = np.array([index[j.origin] for j in jobs])
    dest = np.array([index[j.destination] for j in jobs])
    start = np.array([j.start for j in jobs], dtype=np.int64)
    end = np.array([j.end for j in jobs], dtype=np.int64)
    found: list[tuple[int, str, str]] = []  # (job position, column, sentence)
    short = end - start - travel[origin, dest]
    for k in np.flatnonzero(short < 0):
        j = jobs[k]
        found.append((k, "end", f"the drive {j.origin} -> {j.destination} takes "
                                f"{format_minutes(travel[origin[k], dest[k]])} min but the slot "
                                f"is only {format_minutes(end[k] - start[k])} min"))
    if settings.depot:
        d = index[settings.depot]
        if settings.day_start is not None:
            late = settings.day_start + travel[d, origin] - start
            for k in np.flatnonzero(late > 0):
                found.append((k, "start", f"the job cannot be reached from depot "
                                          f"{settings.depot} in time: it misses its start by "
                                          f"{format_minutes(late[k])} min"))
        if settings.day_end is not None:
            over = end + travel[dest, d] - settings.day_end
            for k in np.flatnonzero(over > 0):
                found.append((k, "end", f"the vehicle is back at depot {settings.depot} "
                                        f"{format_minutes(over[k])} min after the day ends"))
    if settings.max_day is not None:
        found.extend(_working_day_problems(jobs, travel, origin, dest, index, settings))
    if found:
        _raise_job_problems(jobs, found, misplaced, settings, jobs_file, sites_file)


def _working_day_problems(jobs, travel, origin, dest, index,
                          settings: Settings) -> list[tuple[int, str, str]]:
    """Every job alone must fit the longest working day (contract section 5)."""
    start = np.array([j.start for j in jobs], dtype=np.int64)
    end = np.array([j.end for j in jobs], dtype=np.int64)
    pull_out = pull_in = np.zeros(len(jobs), dtype=np.int64)
    if settings.depot:
        d = index[settings.depot]
        pull_out, pull_in = travel[d, origin], travel[dest, d]
    own = pull_out + (end - start) + pull_in
    limit = format_duration(settings.max_day)  # type: ignore[arg-type]
    found = []
    for k in np.flatnonzero(own > settings.max_day):
        parts = (f" (pull-out {format_duration(pull_out[k])}, the job "
                 f"{format_duration(end[k] - start[k])}, pull-in {format_duration(pull_in[k])})"
                 if settings.depot else "")
        found.append((k, "end", f"the job alone makes a working day of "
                                f"{format_duration(own[k])}{parts}, "
                                f"{format_minutes(own[k] - settings.max_day)} min over the "
                                f"longest working day of {limit}"))
    return found


def _raise_job_problems(jobs: list[Job], found: list[tuple[int, str, str]],
                        misplaced: list[_Misplaced], settings: Settings,
                        jobs_file: str | None, sites_file: str | None) -> None:
    """The jobs' problems, except those a far-off site explains: that site is
    blamed once, on its own row, with the number of jobs it upsets."""
    issues = ProblemCollector()
    far = {m.site.id: m for m in misplaced}
    blamed: dict[str, set[int]] = {}
    for k, column, message in found:
        j = jobs[k]
        culprit = next((s for s in (j.origin, j.destination, settings.depot) if s in far), None)
        if culprit is not None:
            blamed.setdefault(culprit, set()).add(k)
            continue
        issues.add(message, jobs_file, j.row or None, column, job=j.id)
    for site_id, upset in blamed.items():
        m = far[site_id]
        count = len(upset)
        issues.problems.insert(0, Problem(
            f"{m.message}; {count} job{'s' if count != 1 else ''} using site {site_id} "
            f"cannot be driven in time because of it", sites_file, m.site.row or None, "lat"))
    issues.raise_if_any()


def _shortened(matrix: np.ndarray, closed: np.ndarray, site_ids: list[str],
               travel: dict) -> list[ShortenedTravel]:
    """The pairs the closure shortened: travel-file pairs first, then estimates;
    each the largest cut first."""
    rows, cols = np.nonzero((closed < matrix) & (matrix >= 0))
    pairs = [ShortenedTravel(site_ids[a], site_ids[b], int(matrix[a, b]), int(closed[a, b]),
                             travel.get((site_ids[a], site_ids[b]), (0, 0))[1])
             for a, b in zip(rows.tolist(), cols.tolist())]
    pairs.sort(key=lambda p: (p.row == 0, p.used - p.given, p.origin, p.destination))
    return pairs


SHORTENED_LISTED = 10  # pairs named in a warning; all are in Day.shortened


def _shortened_warnings(pairs: list[ShortenedTravel]) -> list[str]:
    """One warning for shortened travel-file times (to check in that file), one for
    shortened estimates (a given time via another site beats the estimate)."""
    warnings = []
    given = [p for p in pairs if p.row]
    estimated = [p for p in pairs if not p.row]
    for group, word, advice in (
            (given, "given", "check those values in the travel file"),
            (estimated, "estimated",
             "a travel time given for part of the way is quicker than the estimate")):
        if not group:
            continue
        listed = "; ".join(f"{p.origin} -> {p.destination} {format_minutes(p.given)} min "
                           f"{word}, {format_minutes(p.used)} min used"
                           for p in group[:SHORTENED_LISTED])
        more = (f"; and {len(group) - SHORTENED_LISTED} more"
                if len(group) > SHORTENED_LISTED else "")
        kind = "travel time" if word == "given" else "estimated travel time"
        warnings.append(f"{len(group)} {kind}{'s were' if len(group) != 1 else ' was'} "
                        f"shortened because driving via another site is quicker: {listed}"
                        f"{more}; {advice}")
    return warnings


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
    # Sites without their row: where a site was read from is no part of the plan.
    h.update(repr(sorted((k, tuple(x for name, x in vars(v).items() if name != "row"))
                         for k, v in sites.items())).encode())
    h.update(repr(site_ids).encode())
    h.update(np.ascontiguousarray(travel, dtype=np.int64).tobytes())
    h.update(repr(settings).encode())
    return h.hexdigest()[:12]
