"""Reference answers for the working-day limit on small days, by brute force.

Written from the contract's words only (sections 1 and 5), sharing no code with
shipgui's solver: a route is valid when every job can follow the one before
it and ``back(last) - leave(first) <= limit``.
"""

from __future__ import annotations

from functools import cache

import numpy as np
from scipy.optimize import Bounds, LinearConstraint, milp


def _leave_back(day):
    depot = day.settings.depot
    leave = [int(j.start) for j in day.jobs]
    back = [int(j.end) for j in day.jobs]
    if depot is not None:
        for k, j in enumerate(day.jobs):
            leave[k] -= day.travel_between(depot, j.origin)
            back[k] += day.travel_between(j.destination, depot)
    return leave, back


def _can_follow(day, i: int, j: int) -> bool:
    a, b = day.jobs[i], day.jobs[j]
    return (i != j and a.vehicle_class == b.vehicle_class
            and a.end + day.settings.turnaround + day.travel_between(a.destination, b.origin)
            <= b.start)


def valid_routes(day, limit: int) -> list[tuple[int, ...]]:
    """Every valid route (as job indices in driving order), by depth-first search."""
    n = day.n
    leave, back = _leave_back(day)
    routes = []

    def extend(route):
        routes.append(tuple(route))
        for j in range(n):
            if _can_follow(day, route[-1], j) and back[j] - leave[route[0]] <= limit:
                extend(route + [j])

    for f in range(n):
        if back[f] - leave[f] <= limit:
            extend([f])
    return routes


def minimum_by_subsets(day, limit: int) -> int:
    """The fewest valid routes covering every job: dynamic programme over subsets
    (each subset's cheapest cover takes its lowest job's route first).  2^n states."""
    n = day.n
    routes = valid_routes(day, limit)
    masks_by_low: dict[int, set[int]] = {}
    for route in routes:
        mask = sum(1 << k for k in route)
        masks_by_low.setdefault(min(route), set()).add(mask)

    @cache
    def cover(rest: int) -> int:
        if rest == 0:
            return 0
        low = (rest & -rest).bit_length() - 1
        best = n + 1
        for mask in masks_by_low.get(low, ()):
            if mask & rest == mask:
                best = min(best, 1 + cover(rest & ~mask))
        return best

    return cover((1 << n) - 1)


def minimum_by_milp(day, limit: int) -> int:
    """The fewest valid routes partitioning the jobs: scipy's milp (HiGHS) over the
    full list of valid routes."""
    routes = valid_routes(day, limit)
    a = np.zeros((day.n, len(routes)))
    for c, route in enumerate(routes):
        a[list(route), c] = 1
    result = milp(np.ones(len(routes)), constraints=LinearConstraint(a, 1, 1),
                  integrality=np.ones(len(routes)), bounds=Bounds(0, 1))
    assert result.status == 0, result.message
    return int(round(result.fun))
