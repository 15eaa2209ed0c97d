"""Less empty driving for the planned fleet, under the working-day limit.

With the number of vehicles fixed at K (the best plan's), the routes are chosen
for the least empty driving (pull-out, drives between jobs, pull-in):

    minimise   sum of deadhead_r x_r
    subject to sum of x_r over routes with job j >= 1   for every job j
               sum of x_r <= K

Dropping a job from a route never adds empty driving (triangle inequality), so
covering is as good as partitioning.  Column generation prices routes by their
duals minus their empty driving (:mod:`.pricing` with link costs); when it
finishes, its LP value is a lower bound on the empty driving of any plan with
K vehicles, and an integer plan over the generated routes that reaches it is
proven least; otherwise it is only less than before, or the same.
"""

from __future__ import annotations

import math
import time
from collections.abc import Callable
from dataclasses import dataclass

import highspy
import numpy as np

from .master import cover_to_routes, covering_mip, new_highs
from .pricing import heaviest_routes
from .problem import WorkdayClass

__all__ = ["LessDeadhead", "less_deadhead", "route_deadhead"]

_INF = highspy.kHighsInf
_EPS = 1e-6
# The integer plan over the generated routes gets this many seconds per job at
# most: it finds good plans early and spends long on proving them (measured on
# the demo day: 9 s to prove what it had after a fraction of that).
_MIP_SECONDS_PER_JOB = 0.005
_LP_SHARE = 0.6  # of this step's time, for the LP; the rest for the dive and the MIP


@dataclass(frozen=True)
class LessDeadhead:
    routes: list[np.ndarray]
    deadhead: int  # seconds
    proven_least: bool


def _costs(problem: WorkdayClass, travel: np.ndarray, depot: int | None):
    """Link cost per (job, destination group), pull-out and pull-in per job (seconds)."""
    index = problem.index
    link = travel[index.group_site][:, problem.origin].T.astype(np.float64)
    if depot is None:
        zero = np.zeros(problem.m)
        return link, zero, zero
    return (link, travel[depot, problem.origin].astype(np.float64),
            travel[problem.destination, depot].astype(np.float64))


def route_deadhead(problem: WorkdayClass, travel: np.ndarray, depot: int | None,
                   route: np.ndarray) -> int:
    """Empty driving of one route (class-local jobs), seconds."""
    drive = int(travel[problem.destination[route[:-1]], problem.origin[route[1:]]].sum())
    if depot is not None:
        drive += int(travel[depot, problem.origin[route[0]]])
        drive += int(travel[problem.destination[route[-1]], depot])
    return drive


class _FleetLP:
    """The covering LP with route costs and one row capping the fleet at K."""

    def __init__(self, m: int, fleet: int) -> None:
        self.m, self.fleet = m, fleet
        self.routes: list[np.ndarray] = []
        self.costs: list[float] = []
        self._known: set[bytes] = set()
        self.lp = new_highs()
        self.lp.addRows(m, np.ones(m), np.full(m, _INF), 0, np.zeros(0, np.int32),
                        np.zeros(0, np.int32), np.zeros(0))
        self.lp.addRow(-_INF, float(fleet), 0, np.zeros(0, np.int32), np.zeros(0))
        self.lp.changeObjectiveSense(highspy.ObjSense.kMinimize)

    def add(self, routes: list[np.ndarray], costs: list[float]) -> int:
        fresh = [(r, c) for r, c in zip(routes, costs) if r.tobytes() not in self._known]
        if not fresh:
            return 0
        for r, c in fresh:
            self._known.add(r.tobytes())
            self.routes.append(r)
            self.costs.append(c)
        rows = [np.append(r, self.m) for r, _ in fresh]  # every route counts in the fleet row
        starts = np.cumsum([0] + [len(r) for r in rows[:-1]]).astype(np.int32)
        index = np.concatenate(rows).astype(np.int32)
        self.lp.addCols(len(fresh), np.array([c for _, c in fresh]), np.zeros(len(fresh)),
                        np.full(len(fresh), _INF), len(index), starts, index,
                        np.ones(len(index)))
        return len(fresh)

    def solve(self):
        self.lp.run()
        if self.lp.getModelStatus() != highspy.HighsModelStatus.kOptimal:
            return None
        sol = self.lp.getSolution()
        duals = np.asarray(sol.row_dual, dtype=np.float64)
        self.reduced = np.asarray(sol.col_dual, dtype=np.float64)
        return (self.lp.getInfo().objective_function_value, np.maximum(duals[:self.m], 0.0),
                min(duals[self.m], 0.0))

    def dive(self, stop: Callable[[], bool]) -> list[np.ndarray] | None:
        """Fix the route the LP takes most of, re-solve, until the LP plan is whole
        (the diving heuristic, as for the fleet in :mod:`.search`)."""
        covered = np.zeros(self.m, dtype=bool)
        fixed: list[np.ndarray] = []
        rows = np.arange(self.m + 1, dtype=np.int32)
        try:
            while not stop():
                lower = np.append(np.where(covered, 0.0, 1.0), -_INF)
                upper = np.append(np.full(self.m, _INF), float(self.fleet - len(fixed)))
                self.lp.changeRowsBounds(self.m + 1, rows, lower, upper)
                self.lp.run()
                if self.lp.getModelStatus() != highspy.HighsModelStatus.kOptimal:
                    return None
                x = np.asarray(self.lp.getSolution().col_value)
                used = np.flatnonzero(x > 1e-6)
                whole = used[x[used] > 1 - 1e-6]
                if len(whole) == len(used):
                    return fixed + [self.routes[k] for k in whole]
                take = whole if len(whole) else [int(used[np.argmax(x[used])])]
                for k in take:
                    fixed.append(self.routes[k])
                    covered[self.routes[k]] = True
                if covered.all():
                    return fixed
            return None
        finally:
            self.lp.changeRowsBounds(self.m + 1, rows, np.append(np.ones(self.m), -_INF),
                                     np.append(np.full(self.m, _INF), float(self.fleet)))

    def integer_plan(self, time_limit: float, start: list[int], keep: np.ndarray):
        """The cheapest plan over the routes marked in ``keep`` (and ``start``)."""
        keep = keep.copy()
        keep[start] = True
        columns = np.flatnonzero(keep)
        return covering_mip(self.m, [self.routes[k] for k in columns],
                            np.array([self.costs[k] for k in columns]), time_limit=time_limit,
                            fleet=self.fleet, start=np.isin(columns, start))


def less_deadhead(problem: WorkdayClass, travel: np.ndarray, depot: int | None,
                  plan: list[np.ndarray], pool: list[np.ndarray], *, deadline: float,
                  stop: Callable[[], bool]) -> LessDeadhead:
    """The plan's fleet with less (if possible the least) empty driving."""
    start_cost = sum(route_deadhead(problem, travel, depot, r) for r in plan)
    if problem.m == 0 or not plan:
        return LessDeadhead(plan, start_cost, True)

    # The LP gets most of the time; the rest is for turning it into a plan.
    lp_deadline = time.monotonic() + _LP_SHARE * max(0.0, deadline - time.monotonic())

    def time_up() -> bool:
        return time.monotonic() >= deadline or stop()

    def lp_time_up() -> bool:
        return time.monotonic() >= lp_deadline or stop()

    link, pull_out, pull_in = _costs(problem, travel, depot)
    lp = _FleetLP(problem.m, len(plan))
    cost_of = [route_deadhead(problem, travel, depot, r) for r in pool]
    lp.add(list(pool), [float(c) for c in cost_of])
    lp.add(list(plan), [float(route_deadhead(problem, travel, depot, r)) for r in plan])
    converged, value = False, 0.0
    while not lp_time_up():
        solved = lp.solve()
        if solved is None:
            break
        value, duals, sigma = solved
        priced = heaviest_routes(problem, duals, threshold=-sigma + _EPS,
                                 max_routes=max(50, problem.m // 4),
                                 link_costs=(1.0, link, pull_out, pull_in))
        fresh = lp.add(priced.routes, [float(route_deadhead(problem, travel, depot, r))
                                       for r in priced.routes])
        if fresh == 0:
            converged = True
            break
    best, best_cost = plan, start_cost
    if not converged and lp.solve() is None:  # the last routes added are in the LP too
        return LessDeadhead(plan, start_cost, False)
    dived = lp.dive(time_up)
    if dived is not None:
        dived = cover_to_routes(dived, problem.m)
        cost = sum(route_deadhead(problem, travel, depot, r) for r in dived)
        if len(dived) <= len(plan) and cost < best_cost:
            best, best_cost = dived, cost
    if converged and best_cost <= math.ceil(value - _EPS):
        return LessDeadhead(best, best_cost, True)
    where = {r.tobytes(): k for k, r in enumerate(lp.routes)}
    budget = min(max(0.2, deadline - time.monotonic()), _MIP_SECONDS_PER_JOB * problem.m)
    # Reduced-cost fixing: a route whose reduced cost exceeds the gap between the
    # plan and the LP bound is in no plan cheaper than this one (Nemhauser &
    # Wolsey, Integer and Combinatorial Optimization, 1988, section II.5.1).
    keep = lp.reduced <= (best_cost - value) + _EPS if hasattr(lp, "reduced") else \
        np.ones(len(lp.routes), dtype=bool)
    keep = np.concatenate([keep, np.ones(len(lp.routes) - len(keep), dtype=bool)])
    start = [where[r.tobytes()] for r in best if r.tobytes() in where]
    found = None if time_up() else lp.integer_plan(max(0.2, budget), start, keep)
    if found is not None:
        routes = cover_to_routes(found[0], problem.m)
        cost = sum(route_deadhead(problem, travel, depot, r) for r in routes)
        if len(routes) <= len(plan) and cost < best_cost:
            best, best_cost = routes, cost
    proven = converged and best_cost <= math.ceil(value - _EPS)
    return LessDeadhead(best, best_cost, proven)
