"""The covering problem over routes: its LP (for duals and bounds) and integer plans.

    minimise   sum of x_r                     (vehicles)
    subject to sum of x_r over routes r with job j  >= 1   for every job j
               x_r >= 0  (LP)  or  x_r in {0, 1}  (plans)

Covering rather than partitioning: a job covered twice can be dropped from all
but one route (a sub-route of a valid route is valid), and the LP's duals are
then non-negative, as the certificate's weights must be.  The LP is HiGHS
(Huangfu & Hall, "Parallelizing the dual revised simplex method", Mathematical
Programming Computation 10, 2018) through ``highspy``, kept between rounds so
that new routes re-solve from the last basis.
"""

from __future__ import annotations

import math
import os
import sys
import threading
from dataclasses import dataclass

import highspy
import numpy as np

__all__ = ["Master", "LPResult", "cover_to_routes", "covering_mip", "new_highs", "ceil_bound"]

_INF = highspy.kHighsInf


@dataclass(frozen=True)
class LPResult:
    value: float
    x: np.ndarray  # per route of the pool
    duals: np.ndarray  # per job, >= 0


_BANNER_LOCK = threading.Lock()
_banner_shown = False


def new_highs() -> highspy.Highs:
    """A silent HiGHS instance.  HiGHS prints a banner on the first instance of a
    process, before any option can be set; it is sent to /dev/null so that our
    command line prints only its own lines."""
    global _banner_shown
    with _BANNER_LOCK:
        if _banner_shown:
            h = highspy.Highs()
        else:
            h = _quietly(highspy.Highs)
            _banner_shown = True
    h.setOptionValue("output_flag", False)
    h.setOptionValue("threads", 1)
    return h


def _quietly(make):
    """Call ``make()`` with the process's standard output pointed at /dev/null."""
    sys.stdout.flush()
    try:
        saved = os.dup(1)
    except OSError:  # no standard output at all (a windowed app): nothing to hide
        return make()
    try:
        with open(os.devnull, "wb") as null:
            os.dup2(null.fileno(), 1)
            return make()
    finally:
        os.dup2(saved, 1)
        os.close(saved)


class Master:
    """The LP over a growing list of routes (class-local job numbers)."""

    def __init__(self, m: int) -> None:
        self.m = m
        self.routes: list[np.ndarray] = []
        self.costs: list[float] = []
        self._known: dict[bytes, int] = {}
        self._lp = new_highs()
        self._lp.addRows(m, np.ones(m), np.full(m, _INF), 0, np.zeros(0, np.int32),
                         np.zeros(0, np.int32), np.zeros(0))
        self._lp.changeObjectiveSense(highspy.ObjSense.kMinimize)
        self._upper = np.zeros(0)

    def __len__(self) -> int:
        return len(self.routes)

    def add(self, routes, cost: float = 1.0) -> int:
        """Add routes not seen yet; returns how many were new."""
        fresh = []
        for route in routes:
            route = np.asarray(route, dtype=np.int64)
            key = route.tobytes()
            if key in self._known:
                continue
            self._known[key] = len(self.routes) + len(fresh)
            fresh.append(route)
        if not fresh:
            return 0
        starts = np.cumsum([0] + [len(r) for r in fresh[:-1]]).astype(np.int32)
        index = np.concatenate(fresh).astype(np.int32)
        self._lp.addCols(len(fresh), np.full(len(fresh), cost), np.zeros(len(fresh)),
                         np.full(len(fresh), _INF), len(index), starts, index,
                         np.ones(len(index)))
        self.routes.extend(fresh)
        self.costs.extend([cost] * len(fresh))
        self._upper = np.concatenate([self._upper, np.full(len(fresh), _INF)])
        return len(fresh)

    def allow(self, allowed: np.ndarray) -> None:
        """Let only the routes marked True take a value (the others are fixed at 0)."""
        upper = np.where(allowed, _INF, 0.0)
        changed = np.flatnonzero(upper != self._upper)
        if len(changed):
            self._lp.changeColsBounds(len(changed), changed.astype(np.int32),
                                      np.zeros(len(changed)), upper[changed])
            self._upper = upper

    def cover_only(self, needed: np.ndarray) -> None:
        """Ask the LP to cover only the jobs marked True (the others are covered
        already, by routes fixed outside the LP)."""
        lower = np.where(needed, 1.0, 0.0)
        self._lp.changeRowsBounds(self.m, np.arange(self.m, dtype=np.int32), lower,
                                  np.full(self.m, _INF))

    def solve(self) -> LPResult | None:
        """The LP optimum over the allowed routes, or None if they cannot cover every job."""
        self._lp.run()
        if self._lp.getModelStatus() != highspy.HighsModelStatus.kOptimal:
            return None
        solution = self._lp.getSolution()
        value = self._lp.getInfo().objective_function_value
        duals = np.maximum(np.asarray(solution.row_dual, dtype=np.float64), 0.0)
        return LPResult(float(value), np.asarray(solution.col_value, dtype=np.float64), duals)

    def integer_plan(self, *, time_limit: float = 10.0,
                     cutoff: int | None = None) -> tuple[list[np.ndarray], bool] | None:
        """The fewest routes of the pool covering every job (see :func:`covering_mip`);
        ``cutoff``: only plans with fewer routes are of use."""
        found = covering_mip(self.m, self.routes, np.ones(len(self.routes)),
                             time_limit=time_limit, cutoff=cutoff)
        if found is None or not found[0]:
            return None
        return cover_to_routes(found[0], self.m), found[1]


def covering_mip(m: int, routes: list[np.ndarray], costs: np.ndarray, *,
                 time_limit: float, fleet: int | None = None, cutoff: float | None = None,
                 start: np.ndarray | None = None) -> tuple[list[np.ndarray], bool] | None:
    """The cheapest set of ``routes`` covering all ``m`` jobs (HiGHS branch and bound).

    ``fleet`` caps the number of routes; ``cutoff``: only plans cheaper than it
    are of use; ``start`` marks a known cover to start from.  Returns (routes
    chosen, proven optimal over these routes) or None when none was found in
    time.
    """
    if not routes:
        return None
    mip = new_highs()
    mip.setOptionValue("time_limit", float(max(time_limit, 0.01)))
    mip.setOptionValue("mip_rel_gap", 0.0)
    mip.addRows(m, np.ones(m), np.full(m, _INF), 0, np.zeros(0, np.int32),
                np.zeros(0, np.int32), np.zeros(0))
    rows = list(routes)
    if fleet is not None:  # one more row: every route counts against the fleet
        mip.addRow(-_INF, float(fleet), 0, np.zeros(0, np.int32), np.zeros(0))
        rows = [np.append(r, m) for r in rows]
    n = len(rows)
    starts = np.cumsum([0] + [len(r) for r in rows[:-1]]).astype(np.int32)
    index = np.concatenate(rows).astype(np.int32)
    mip.addCols(n, np.asarray(costs, dtype=np.float64), np.zeros(n), np.ones(n), len(index),
                starts, index, np.ones(len(index)))
    mip.changeColsIntegrality(n, np.arange(n, dtype=np.int32),
                              np.full(n, highspy.HighsVarType.kInteger))
    mip.changeObjectiveSense(highspy.ObjSense.kMinimize)
    if cutoff is not None:
        mip.setOptionValue("objective_bound", float(cutoff) - 0.5)
    if start is not None:
        solution = highspy.HighsSolution()
        solution.col_value = list(np.asarray(start, dtype=np.float64))
        solution.value_valid = True
        mip.setSolution(solution)
    mip.run()
    solution = mip.getSolution()
    if not solution.value_valid:
        return None
    x = np.asarray(solution.col_value)
    optimal = mip.getModelStatus() == highspy.HighsModelStatus.kOptimal
    return [routes[k] for k in np.flatnonzero(x > 0.5)], optimal


def cover_to_routes(routes: list[np.ndarray], m: int) -> list[np.ndarray]:
    """A plan from a cover: each job kept on the first route that has it."""
    seen = np.zeros(m, dtype=bool)
    plan = []
    for route in sorted(routes, key=len, reverse=True):
        keep = route[~seen[route]]
        seen[keep] = True
        if len(keep):
            plan.append(keep)
    if not seen.all():
        missing = int((~seen).sum())
        raise RuntimeError(f"the cover leaves {missing} jobs out")
    return plan


def ceil_bound(value: float) -> int:
    """The least whole number of vehicles at or above an LP bound (1e-6 slack)."""
    return int(math.ceil(value - 1e-6))
