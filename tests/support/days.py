"""Generated days for tests and benchmarks (invented data, no real places)."""

from __future__ import annotations

import csv
import itertools
from pathlib import Path

import numpy as np

from shipgui.core.day import build_day
from shipgui.core.model import Job, Settings, Site


def random_day(n: int, sites: int, *, seed: int = 0, classes: int = 1,
               turnaround_min: int = 5, max_travel_min: int = 40, horizon_min: int = 600,
               settings: Settings | None = None):
    """A day with a random (unclosed) travel matrix in whole minutes."""
    rng = np.random.default_rng(seed)
    t = rng.integers(0, max_travel_min + 1, (sites, sites)) * 60
    travel = {(f"S{a}", f"S{b}"): (int(t[a, b]), 0)
              for a in range(sites) for b in range(sites) if a != b}
    jobs = []
    for k in range(n):
        o, d = rng.integers(0, sites, 2)
        start = int(rng.integers(0, horizon_min)) * 60
        length = int(t[o, d]) + int(rng.integers(1, 300)) * 60
        jobs.append(Job(f"J{k}", f"S{o}", f"S{d}", start, start + length,
                        vehicle_class=str(rng.integers(0, classes)) if classes > 1 else ""))
    return build_day(jobs, [], travel,
                     settings=settings or Settings(turnaround=turnaround_min * 60))


def regional_day(n: int, sites: int, *, seed: int = 0, turnaround_min: int = 10):
    """A benchmark-style day: sites on an 80 km square, travel from coordinates."""
    rng = np.random.default_rng(seed)
    xy = rng.uniform(0, 80, (sites, 2))
    site_list = [Site(f"S{k}", x_km=float(x), y_km=float(y)) for k, (x, y) in enumerate(xy)]
    km = np.hypot(*(xy[:, None, :] - xy[None, :, :]).transpose(2, 0, 1))
    settings = Settings(turnaround=turnaround_min * 60)
    secs = np.ceil(np.round(km * settings.circuity / settings.speed_kmh * 3600, 6)).astype(int)
    o = rng.integers(0, sites, n)
    d = rng.integers(0, sites, n)
    start = rng.integers(5 * 60, 20 * 60, n) * 60
    end = start + secs[o, d] + rng.integers(15, 90, n) * 60
    jobs = [Job(f"J{k:05d}", f"S{o[k]}", f"S{d[k]}", int(start[k]), int(end[k]))
            for k in range(n)]
    return build_day(jobs, site_list, {}, settings=settings)


def slot_day(slots, *, turnaround=0, travel=None, sites=("A",)):
    """A day from (origin, destination, start, end) slots in seconds; travel in
    seconds per (from, to), 0 for pairs not given."""
    jobs = [Job(f"J{k}", o, d, s, e) for k, (o, d, s, e) in enumerate(slots)]
    pairs = {(a, b): (v, 0) for (a, b), v in (travel or {}).items()}
    for a, b in itertools.permutations(sites, 2):
        pairs.setdefault((a, b), (0, 0))
    return build_day(jobs, [], pairs, settings=Settings(turnaround=turnaround))


def tanker_day(strict: bool):
    """Tanker scheduling, Ahuja, Magnanti & Orlin, Network Flows (1993), Application
    6.6: shipments 1 A->C day 3, 2 A->C day 8, 3 B->D day 3, 4 B->C day 6; loaded
    times A->C 3, A->D 2, B->C 2, B->D 3; empty C->A 2, C->B 1, D->A 1, D->B 2 (days).
    A strict rule ("arrive before the next departure") is a 1-second turnaround."""
    day_s = 24 * 3600
    loaded = {("A", "C"): 3, ("A", "D"): 2, ("B", "C"): 2, ("B", "D"): 3}
    empty = {("C", "A"): 2, ("C", "B"): 1, ("D", "A"): 1, ("D", "B"): 2}
    travel = {k: v * day_s for k, v in {**loaded, **empty}.items()}
    for a, b in itertools.permutations("ABCD", 2):
        travel.setdefault((a, b), 30 * day_s)  # no direct road given: effectively none
    shipments = [("A", "C", 3), ("A", "C", 8), ("B", "D", 3), ("B", "C", 6)]
    # The day of a shipment is its delivery date, so it leaves loaded[o, d] days before.
    slots = [(o, d, (t - loaded[(o, d)]) * day_s, t * day_s) for o, d, t in shipments]
    return slot_day(slots, travel=travel, sites="ABCD", turnaround=1 if strict else 0)


def depot_day(n: int, sites: int, *, seed: int = 0, turnaround_min: int = 10,
              max_day_min: int | None = None, classes: int = 1, span_h: tuple = (5, 20)):
    """A regional day with a depot (site S0 at the centre), travel from coordinates.

    Sites on a 60 km square; jobs start between ``span_h`` hours; slots of the
    drive plus 15-90 minutes.  Invented data for tests and benchmarks.
    """
    rng = np.random.default_rng(seed)
    xy = rng.uniform(0, 60, (sites, 2))
    xy[0] = (30, 30)
    site_list = [Site(f"S{k}", x_km=float(x), y_km=float(y)) for k, (x, y) in enumerate(xy)]
    km = np.hypot(*(xy[:, None, :] - xy[None, :, :]).transpose(2, 0, 1))
    base = Settings()
    secs = np.ceil(np.round(km * base.circuity / base.speed_kmh * 3600, 6)).astype(int)
    o = rng.integers(1, sites, n)
    d = rng.integers(1, sites, n)
    start = rng.integers(span_h[0] * 60, span_h[1] * 60, n) * 60
    end = start + secs[o, d] + rng.integers(15, 90, n) * 60
    jobs = [Job(f"J{k:05d}", f"S{o[k]}", f"S{d[k]}", int(start[k]), int(end[k]),
                vehicle_class=str(rng.integers(0, classes)) if classes > 1 else "")
            for k in range(n)]
    settings = Settings(turnaround=turnaround_min * 60, depot="S0",
                        max_day=None if max_day_min is None else max_day_min * 60)
    return build_day(jobs, site_list, {}, settings=settings)
def rebuild(day, *, jobs=None, settings=None):
    """``day`` built again from its jobs (or ``jobs``) and closed travel times, with
    other ``settings`` if given: for limits, priorities and moved slots in tests."""
    travel = {(a, b): (int(day.travel[i, j]), 0) for i, a in enumerate(day.site_ids)
              for j, b in enumerate(day.site_ids) if i != j}
    return build_day(list(day.jobs if jobs is None else jobs), list(day.sites.values()),
                     travel, settings=settings or day.settings)


def with_priorities(day, rng, choices=(1, 2, 3, 0.5)):
    """``day`` with a random priority from ``choices`` on every job."""
    import dataclasses
    jobs = [dataclasses.replace(j, priority=float(rng.choice(choices))) for j in day.jobs]
    return rebuild(day, jobs=jobs)


def write_regional_csv(folder: Path, n: int, sites: int) -> tuple[Path, Path]:
    """:func:`regional_day` (seed ``n``) as a jobs CSV (times to the minute) and
    a sites CSV in ``folder``; returns both paths."""
    day = regional_day(n, sites, seed=n)
    jobs, site_file = Path(folder, "jobs.csv"), Path(folder, "sites.csv")
    with open(jobs, "w", newline="") as f:
        w = csv.writer(f)
        w.writerow(["job", "origin", "destination", "start", "end"])
        for j in day.jobs:
            w.writerow([j.id, j.origin, j.destination, f"{j.start // 3600:02d}:"
                        f"{j.start % 3600 // 60:02d}", f"{j.end // 3600:02d}:"
                        f"{j.end % 3600 // 60:02d}"])
    with open(site_file, "w", newline="") as f:
        w = csv.writer(f)
        w.writerow(["site", "x_km", "y_km"])
        for s in day.sites.values():
            w.writerow([s.id, s.x_km, s.y_km])
    return jobs, site_file
