"""Independent check of a plan, written separately and kept simple on purpose.

It shares no code with the solver: it reads the day's raw arrays and the closed
travel matrix and checks, with the contract's formula, that

1. the routes use every job exactly once,
2. in every route each job can follow the one before,
3. the travel matrix obeys the triangle inequality (so "can follow" is
   transitive and no route can hide two certificate jobs),
4. the certificate jobs pairwise cannot follow each other, and
5. there are as many certificate jobs as routes.

Together these prove the plan is a minimum fleet (Dilworth, "A decomposition
theorem for partially ordered sets", Annals of Mathematics 51(1), 1950): each
vehicle does at most one certificate job, so no plan has fewer vehicles.
"""

from __future__ import annotations

import numpy as np

from ..model import Day

__all__ = ["check_plan", "triangle_failures"]


def _follows(day: Day, i: np.ndarray, j: np.ndarray) -> np.ndarray:
    """Elementwise: can job j follow job i (contract section 1)?"""
    same_class = day.vclass[i] == day.vclass[j]
    arrive = day.end[i] + day.settings.turnaround + day.travel[day.destination[i], day.origin[j]]
    return same_class & (arrive <= day.start[j]) & (i != j)


def triangle_failures(day: Day) -> list[str]:
    """The travel matrix must obey the triangle inequality: then "can follow" is
    transitive and dropping a job from a route keeps it valid (both proofs rely
    on it).  O(sites^3) comparisons, a site at a time."""
    t = day.travel
    for b in range(t.shape[0]):
        if np.any(t[:, b, None] + t[None, b, :] < t):
            return ["travel times break the triangle inequality"]
    return []


def check_plan(day: Day, routes, certificate) -> list[str]:
    """Check a plan without any of the solver's code; the failures found, if any.

    Parameters
    ----------
    day : the validated day.
    routes : one sequence of job indices per vehicle, in time order.
    certificate : job indices claimed pairwise unable to share a vehicle.

    Returns
    -------
    list of str
        Empty when every job is in exactly one route, each job in a route can
        follow the one before it, the travel times satisfy the triangle
        inequality (so "can follow" is transitive and routes need no more),
        the certificate jobs are pairwise unable to follow each other in either
        order, and there are as many of them as routes: then no plan has fewer
        vehicles.  Else one sentence per failure.

    Notes
    -----
    O(n + s^3 + k^2) for n jobs, s sites and k certificate jobs (the pairs are
    checked in blocks with numpy).

    References
    ----------
    Dilworth, "A decomposition theorem for partially ordered sets", Annals of
    Mathematics 51(1), 1950 (an antichain as large as a chain cover proves both
    minimum).

    Examples
    --------
    >>> from shipgui.core import Job, Settings, build_day
    >>> H = 3600
    >>> jobs = [Job("J1", "A", "B", 8 * H, 9 * H), Job("J2", "B", "A", 9 * H + 900, 10 * H),
    ...         Job("J3", "A", "A", 8 * H + 1800, 9 * H + 1800)]
    >>> day = build_day(jobs, [], {("A", "B"): (1200, 2), ("B", "A"): (1200, 3)},
    ...                 settings=Settings(turnaround=600))
    >>> check_plan(day, [(0, 1), (2,)], [0, 2])
    []
    >>> check_plan(day, [(0, 2), (1,)], [0, 2])
    ['vehicle 1: a job cannot follow the one before it']
    """
    failures: list[str] = []
    n = day.n
    flat = np.array([k for route in routes for k in route], dtype=np.int64)
    counts = np.bincount(flat, minlength=n) if len(flat) else np.zeros(n, np.int64)
    if len(flat) and (flat.min() < 0 or flat.max() >= n):
        return ["a route names a job that does not exist"]
    if np.any(counts != 1):
        failures.append(f"{int(np.sum(counts == 0))} jobs are in no route and "
                        f"{int(np.sum(counts > 1))} in more than one")
    # Every pair of consecutive jobs of a route, all routes at once.
    lengths = np.fromiter((len(route) for route in routes), np.int64, len(routes))
    owner = np.repeat(np.arange(len(routes)), lengths)
    pairs = np.flatnonzero(owner[:-1] == owner[1:])
    broken = np.zeros(len(routes), dtype=bool)
    broken[owner[pairs[~_follows(day, flat[pairs], flat[pairs + 1])]]] = True
    for number in np.flatnonzero(broken | (lengths == 0)) + 1:
        if lengths[number - 1] == 0:
            failures.append(f"vehicle {number} has no jobs")
        else:
            failures.append(f"vehicle {number}: a job cannot follow the one before it")
    if np.any(day.end <= day.start):
        failures.append("a job ends before it starts")
    failures += triangle_failures(day)
    cert = np.asarray(certificate, dtype=np.int64)
    if len(np.unique(cert)) != len(cert):
        failures.append("a certificate job is listed twice")
    if len(cert) != len(routes):
        failures.append(f"{len(cert)} certificate jobs but {len(routes)} routes")
    step = max(1, (1 << 22) // max(len(cert), 1))
    for a in range(0, len(cert), step):
        i = cert[a:a + step, None]
        j = cert[None, :]
        if np.any(_follows(day, i, j)):
            failures.append("two certificate jobs could share a vehicle")
            break
    return failures
