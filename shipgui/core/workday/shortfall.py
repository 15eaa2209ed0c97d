"""Fewer vehicles than needed, under a working-day limit: the most priority served.

With K vehicles per pool (all classes, or one class) and every route within the
longest working day, serve the jobs of the most total priority.  Without the
limit this is a flow (:mod:`..fleet.shortfall`); with it the problem is NP-hard
like the fleet itself, so the answer is a plan with a proven upper bound:

    maximise   sum of p_j y_j
    subject to y_j <= sum of x_r over routes r with job j      (j served by a route)
               sum of x_r over the pool's routes <= K           (vehicles available)
               0 <= y_j <= 1,  x_r >= 0 (LP) or x_r in {0, 1} (plans)

solved by column generation with the same pricing as the fleet (:mod:`.pricing`:
a route is worth the duals of its jobs).  The bound needs no LP optimum: for any
job weights w >= 0, a valid route carries at most W_p of them in pool p, so
K vehicles collect at most K_p W_p, and a job adds at most p_j - w_j beyond its
weight; hence no plan serves more than

    sum over pools of K_p W_p  +  sum over jobs of max(0, p_j - w_j),

which the LP duals make tight (linear programming duality).  Independent code
recomputes W_p and the sum (:mod:`.verify`).  Priorities are in thousandths
(:data:`~shipgui.core.model.PRIORITY_UNIT`).
"""

from __future__ import annotations

import math
import time
from collections.abc import Callable
from dataclasses import dataclass

import highspy
import numpy as np

from ..fleet.shortfall import Pool
from ..model import Day, priority_units
from .greedy import greedy_routes
from .master import new_highs
from .pricing import heaviest_routes
from .problem import WorkdayClass

__all__ = ["ServedWithinLimit", "serve_most_within_limit"]

_INF = highspy.kHighsInf
_EPS = 1e-9


@dataclass(frozen=True, eq=False)
class ServedWithinLimit:
    routes: list[tuple[int, ...]]  # job indices of the day
    unserved: tuple[int, ...]
    upper_bound: int  # priority units, proven by ``weights`` and ``heaviest``
    weights: np.ndarray  # per job of the day, priority units (>= 0)
    heaviest: tuple[float, ...]  # per pool: the most weight a valid route carries
    exact: bool  # the LP was solved to the end (the bound is the LP's)


class _ServeLP:
    """The LP above over a growing list of routes of all classes."""

    def __init__(self, day: Day, priority: np.ndarray, pools: list[Pool]) -> None:
        self.n, self.pools = day.n, pools
        self.pool_of_class = {c: k for k, pool in enumerate(pools) for c in pool.classes}
        self.routes: list[np.ndarray] = []  # job indices of the day
        self.route_pool: list[int] = []
        self._known: set[bytes] = set()
        self.lp = new_highs()
        rows = self.n + len(pools)
        self.lp.addRows(rows, np.full(rows, -_INF),
                        np.concatenate([np.zeros(self.n), [p.vehicles for p in pools]]),
                        0, np.zeros(0, np.int32), np.zeros(0, np.int32), np.zeros(0))
        ar = np.arange(self.n, dtype=np.int32)
        self.lp.addCols(self.n, -priority.astype(np.float64), np.zeros(self.n),
                        np.ones(self.n), self.n, ar, ar, np.ones(self.n))  # the y_j
        self.lp.changeObjectiveSense(highspy.ObjSense.kMinimize)

    def add(self, routes: list[np.ndarray], pool: int) -> int:
        fresh = [r for r in routes if r.tobytes() not in self._known]
        for r in fresh:
            self._known.add(r.tobytes())
        if not fresh:
            return 0
        columns = [np.append(r, self.n + pool) for r in fresh]
        values = [np.append(-np.ones(len(r)), 1.0) for r in fresh]
        starts = np.cumsum([0] + [len(c) for c in columns[:-1]]).astype(np.int32)
        self.lp.addCols(len(fresh), np.zeros(len(fresh)), np.zeros(len(fresh)),
                        np.full(len(fresh), _INF), int(sum(len(c) for c in columns)), starts,
                        np.concatenate(columns).astype(np.int32), np.concatenate(values))
        self.routes.extend(fresh)
        self.route_pool.extend([pool] * len(fresh))
        return len(fresh)

    def solve(self) -> tuple[float, np.ndarray, np.ndarray] | None:
        """(-LP value, job duals >= 0, pool duals >= 0), or None."""
        self.lp.run()
        if self.lp.getModelStatus() != highspy.HighsModelStatus.kOptimal:
            return None
        duals = -np.asarray(self.lp.getSolution().row_dual, dtype=np.float64)
        return (-self.lp.getInfo().objective_function_value, np.maximum(duals[:self.n], 0.0),
                np.maximum(duals[self.n:], 0.0))


def _price(classes: list[WorkdayClass], lp: _ServeLP, weights: np.ndarray,
           thresholds: np.ndarray | None) -> tuple[np.ndarray, int]:
    """Heaviest route weight per pool under ``weights``; adds the routes heavier than
    the pool's threshold to the LP (returns how many were new)."""
    heaviest = np.zeros(len(lp.pools))
    fresh = 0
    for c, problem in enumerate(classes):
        if problem.m == 0:
            continue
        p = lp.pool_of_class[c]
        limit = np.inf if thresholds is None else thresholds[p] + 1e-7
        priced = heaviest_routes(problem, weights[problem.jobs], threshold=limit,
                                 max_routes=max(40, problem.m // 4))
        heaviest[p] = max(heaviest[p], priced.max_weight)
        fresh += lp.add([problem.jobs[r] for r in priced.routes], p)
    return heaviest, fresh


def _bound(lp: _ServeLP, priority: np.ndarray, weights: np.ndarray,
           heaviest: np.ndarray) -> float:
    return float(sum(pool.vehicles * w for pool, w in zip(lp.pools, heaviest))
                 + np.maximum(priority - weights, 0.0).sum())


def serve_most_within_limit(day: Day, classes: list[WorkdayClass], pools: list[Pool], *,
                            deadline: float, stop: Callable[[], bool]) -> ServedWithinLimit:
    """The plan serving the most priority with the pools' vehicles, each route
    within the working-day limit, and the proven bound (see the module docstring)."""
    priority = np.array([priority_units(j) for j in day.jobs], dtype=np.int64)
    lp = _ServeLP(day, priority, pools)
    for c, problem in enumerate(classes):
        if problem.m:
            lp.add([problem.jobs[r] for r in greedy_routes(problem, day.travel)],
                   lp.pool_of_class[c])
    best = (math.inf, np.zeros(day.n), np.zeros(len(pools)))
    exact = False
    while not (time.monotonic() >= deadline or stop()):
        solved = lp.solve()
        if solved is None:
            break
        _value, weights, sigma = solved
        heaviest, fresh = _price(classes, lp, weights, sigma)
        bound = _bound(lp, priority, weights, heaviest)
        if bound < best[0]:
            best = (bound, weights, heaviest)
        if fresh == 0:
            exact = True
            break
    routes, served = _plan(day, lp, priority, deadline)
    upper = int(math.floor(best[0] + 1e-6))
    return ServedWithinLimit(routes, tuple(int(k) for k in np.flatnonzero(~served)),
                             max(upper, int(priority[served].sum())), best[1],
                             tuple(float(w) for w in best[2]), exact)


def _plan(day: Day, lp: _ServeLP, priority: np.ndarray,
          deadline: float) -> tuple[list[tuple[int, ...]], np.ndarray]:
    """The integer plan over the generated routes: most priority, then most jobs."""
    time_limit = max(0.5, deadline - time.monotonic())  # HiGHS stops early once optimal
    chosen = _serve_mip(day.n, lp, priority, time_limit)
    served = np.zeros(day.n, dtype=bool)
    routes: list[tuple[int, ...]] = []
    for route in sorted(chosen, key=len, reverse=True):  # a job once, on its longest route
        keep = route[~served[route]]
        served[keep] = True
        if len(keep):
            routes.append(tuple(int(k) for k in keep))
    routes.sort(key=lambda r: (int(day.start[r[0]]), r[0]))
    return routes, served


def _serve_mip(n: int, lp: _ServeLP, priority: np.ndarray,
               time_limit: float) -> list[np.ndarray]:
    """Routes of the pool, at most K per pool, serving the most (priority, jobs)."""
    mip = new_highs()
    mip.passModel(lp.lp.getLp())
    # most priority first, then most jobs: one more unit per job served, the
    # priorities scaled by n + 1 so that no number of jobs outweighs a unit
    mip.changeColsCost(n, np.arange(n, dtype=np.int32),
                       -(priority.astype(np.float64) * (n + 1) + 1.0))
    count = len(lp.routes)
    columns = np.arange(n, n + count, dtype=np.int32)
    mip.changeColsBounds(count, columns, np.zeros(count), np.ones(count))
    mip.changeColsIntegrality(count, columns, np.full(count, highspy.HighsVarType.kInteger))
    mip.setOptionValue("time_limit", float(time_limit))
    mip.run()
    solution = mip.getSolution()
    if not solution.value_valid:  # no time for even one plan: the fullest routes per pool
        return _fullest(lp, priority)
    x = np.asarray(solution.col_value)[n:]
    return [lp.routes[k] for k in np.flatnonzero(x > 0.5)]


def _fullest(lp: _ServeLP, priority: np.ndarray) -> list[np.ndarray]:
    chosen: list[np.ndarray] = []
    for p, pool in enumerate(lp.pools):
        mine = [r for r, q in zip(lp.routes, lp.route_pool) if q == p]
        mine.sort(key=lambda r: -int(priority[r].sum()))
        chosen.extend(mine[:pool.vehicles])
    return chosen
