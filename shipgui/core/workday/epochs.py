"""A fast, strong lower bound: the day split into parts no vehicle can serve both of.

If every job of set A leaves the depot by time t (``leave <= t``) and every job
of set B is back after ``t + limit`` (``back > t + limit``), no route holds a
job of A and a job of B: together they would make a working day longer than
the limit.  So the fleet is at least the plain minimum of A plus that of B,
and the two maximum antichains (jobs pairwise unable to follow each other;
Dilworth, "A decomposition theorem for partially ordered sets", Annals of
Mathematics 51(1), 1950) together are jobs no two of which fit one working day:
a printable certificate.  With a long day and a short limit the day splits in
more than two parts the same way (consecutive thresholds more than a limit
apart from the previous part's leave).  The thresholds are searched on a grid;
each part's minimum is a maximum matching on the prefix form of the relation,
so the whole search costs a few dozen matchings.
"""

from __future__ import annotations

import numpy as np

from ..fleet.matching import maximum_matching
from ..fleet.precedence import prefix_index
from ..model import Day
from .problem import WorkdayClass

__all__ = ["epoch_set"]

_GRID = 15 * 60  # seconds between thresholds tried


def _antichain(day: Day, problem: WorkdayClass, members: np.ndarray) -> np.ndarray:
    """A maximum antichain of the class-local ``members`` (class-local numbers)."""
    if len(members) == 0:
        return members
    matching = maximum_matching(prefix_index(day, problem.jobs[members]), day=day)
    return members[matching.antichain]


def epoch_set(day: Day, problem: WorkdayClass, *, grid: int = _GRID) -> np.ndarray:
    """Jobs (class-local) pairwise not fitting one working day, from the best split
    of the day into two or three parts that no route can span."""
    if problem.m == 0:
        return np.zeros(0, dtype=np.int64)
    limit = problem.limit
    jobs = np.arange(problem.m, dtype=np.int64)
    thresholds = np.arange(int(problem.leave.min()), int(problem.back.max()) - limit + grid, grid)
    best = _antichain(day, problem, jobs)
    early_cache: dict[int, np.ndarray] = {}
    for t in thresholds:
        early = _antichain(day, problem, jobs[problem.leave <= t])
        early_cache[int(t)] = early
        late = _antichain(day, problem, jobs[problem.back > t + limit])
        if len(early) + len(late) > len(best):
            best = np.concatenate([early, late])
    span = int(problem.back.max()) - int(problem.leave.min())
    if span > 2 * limit:
        best = _three_parts(day, problem, thresholds, early_cache, best)
    return np.sort(best)


def _three_parts(day: Day, problem: WorkdayClass, thresholds: np.ndarray,
                 early_cache: dict[int, np.ndarray], best: np.ndarray) -> np.ndarray:
    """Parts leave <= t1;  back > t1 + limit and leave <= t2;  back > t2 + limit."""
    limit = problem.limit
    jobs = np.arange(problem.m, dtype=np.int64)
    coarse = thresholds[::2]
    for t1 in coarse:
        first = early_cache[int(t1)]
        for t2 in coarse[coarse > t1]:
            middle_set = jobs[(problem.back > t1 + limit) & (problem.leave <= t2)]
            last_set = jobs[problem.back > t2 + limit]
            if len(middle_set) == 0 or len(last_set) == 0:
                continue
            middle = _antichain(day, problem, middle_set)
            last = _antichain(day, problem, last_set)
            if len(first) + len(middle) + len(last) > len(best):
                best = np.concatenate([first, middle, last])
    return best
