"""First plans within the working-day limit, found in one pass each (milliseconds).

Jobs are taken in start order; each goes to the open route it fits best (its
last job can be followed and the working day stays within the limit), else it
opens a route: the best-fit rule for interval scheduling (common practice).
"Best" scores the arrival at the job (late arrival: little waiting) minus a
weight times the working day the route would still have left (little left:
the route is used up before it expires).  A few weights are tried and the
plan with the fewest routes kept; it gives the search a plan to beat at once.
"""

from __future__ import annotations

import numpy as np

from .._jit import jit
from .problem import WorkdayClass

__all__ = ["greedy_routes"]


_SPAN_WEIGHTS = (0.0, 0.1, 0.5, 2.0)  # weights of the working day left, tried in turn


@jit
def _best_fit(start, ready, leave, back, origin, destination, travel, limit, span_weight):
    m = start.shape[0]
    route_of = np.full(m, -1, dtype=np.int64)
    last = np.empty(m, dtype=np.int64)  # last job of each open route
    first_leave = np.empty(m, dtype=np.int64)
    routes = 0
    for j in range(m):
        best = -1
        best_score = -1e300
        for r in range(routes):
            i = last[r]
            arrival = ready[i] + travel[destination[i], origin[j]]
            if arrival <= start[j] and back[j] - first_leave[r] <= limit:
                score = arrival - span_weight * (limit - (back[j] - first_leave[r]))
                if score > best_score:
                    best_score = score
                    best = r
        if best < 0:
            best = routes
            routes += 1
            first_leave[best] = leave[j]
        last[best] = j
        route_of[j] = best
    return route_of


def greedy_routes(problem: WorkdayClass, travel: np.ndarray) -> list[np.ndarray]:
    """A valid plan for one class (class-local job numbers, each route in time order)."""
    if problem.m == 0:
        return []
    best = None
    for weight in _SPAN_WEIGHTS:  # local jobs are numbered in start order
        route_of = _best_fit(problem.start, problem.ready, problem.leave, problem.back,
                             problem.origin, problem.destination, travel,
                             np.int64(problem.limit), float(weight))
        if best is None or route_of.max() < best.max():
            best = route_of
    route_of = best
    order = np.argsort(route_of, kind="stable")
    cuts = np.flatnonzero(np.diff(route_of[order])) + 1
    return [np.asarray(r, dtype=np.int64) for r in np.split(order, cuts)]
