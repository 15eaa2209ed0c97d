"""From a validated day with a working-day limit to a verified plan with a proven bound."""

from __future__ import annotations

import math
import time
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from ..fleet.deadhead import plan_deadhead
from ..fleet.matching import maximum_matching
from ..fleet.precedence import prefix_index
from ..fleet.shortfall import vehicle_pools
from ..model import Day, Plan, Shortfall, WorkdayInfo, priority_units
from .certificate import WEIGHT_TOLERANCE, clean_weights
from .deadhead import less_deadhead
from .problem import WorkdayClass, workday_classes
from .search import LP_JOBS, ClassSearch, search_class, start_class
from .shortfall import serve_most_within_limit
from .verify import check_workday_plan, check_workday_shortfall

__all__ = ["solve_workday", "Progress", "DEFAULT_TIME_LIMIT"]

DEFAULT_TIME_LIMIT = 60.0  # seconds of search before the best plan is kept
# Less empty driving gets at most this share of the time limit, and at most a
# quarter second plus this much per job: a plan with fewer vehicles matters more
# (on the demo day that is under a second, which keeps the whole answer near 2 s).
_DEADHEAD_SHARE = 0.15
_DEADHEAD_SECONDS_PER_JOB = 0.003
# With fewer vehicles than the fast plan needs, this share of the time looks for
# a plan that serves every job before the jobs to hand on are chosen.
_FULL_FLEET_SHARE = 0.25


@dataclass(frozen=True)
class Progress:
    """The best plan and the proven bound so far (reported as they improve)."""

    vehicles: int
    lower_bound: int
    seconds: float


def solve_workday(day: Day, *, time_limit: float = DEFAULT_TIME_LIMIT,
                  cancelled: Callable[[], bool] | None = None,
                  on_progress: Callable[[Progress], None] | None = None) -> Plan:
    """The fewest vehicles with every route's working day within
    ``day.settings.max_day``, with a proven lower bound, independently verified.

    Stops when the plan is proven minimum, after ``time_limit`` seconds, or
    when ``cancelled()`` turns true, and returns the best plan found (never
    raises for a stop).  ``on_progress`` hears every improvement.
    """
    t0 = time.monotonic()
    limit = int(day.settings.max_day)  # type: ignore[arg-type]
    stop = cancelled or (lambda: False)
    classes = workday_classes(day, limit)
    antichains = [maximum_matching(c.index, day=day).antichain for c in classes]
    states = [start_class(day, c, a) for c, a in zip(classes, antichains)]
    if day.settings.vehicle_limit and _short(day, states):
        # First a short search for the fleet that serves every job: it may fit after all.
        first = t0 + _FULL_FLEET_SHARE * time_limit
        for k, problem in enumerate(classes):
            states[k] = search_class(day, problem, states[k], deadline=first, stop=stop,
                                     report=lambda _s: None)
        if _short(day, states):
            return _short_plan(day, classes, states, antichains, limit, t0,
                               deadline=t0 + time_limit, stop=stop)
    best = {"vehicles": None, "bound": None}

    def report(_state: ClassSearch | None = None) -> None:
        vehicles = sum(s.vehicles for s in states)
        bound = sum(s.bound for s in states)
        if (vehicles, bound) != (best["vehicles"], best["bound"]):
            best.update(vehicles=vehicles, bound=bound)
            if on_progress is not None:
                on_progress(Progress(vehicles, bound, time.monotonic() - t0))

    report()
    sizes = np.array([c.m for c in classes], dtype=float) + 1.0
    for k, problem in enumerate(classes):
        share = sizes[k] / sizes[k:].sum()
        deadline = time.monotonic() + max(0.0, t0 + time_limit - time.monotonic()) * share
        states[k] = search_class(day, problem, states[k], deadline=deadline, stop=stop,
                                 report=report)
    status = _less_deadhead(day, classes, states, t0, time_limit, stop)  # type: ignore[arg-type]
    return _plan(day, classes, states, antichains, limit, t0, stopped=stop(),  # type: ignore
                 deadhead_status=status)


def _less_deadhead(day: Day, classes: list[WorkdayClass], states: list[ClassSearch],
                   t0: float, time_limit: float, stop: Callable[[], bool]) -> str:
    """Less empty driving for each class's fleet, in the time left (at most a share)."""
    depot = None if day.settings.depot is None else day.site_index[day.settings.depot]
    total = sum(c.m for c in classes)
    cap = min(_DEADHEAD_SHARE * time_limit, 0.25 + _DEADHEAD_SECONDS_PER_JOB * total)
    end = min(t0 + time_limit, time.monotonic() + cap)
    proven, searched = True, False
    for k, (problem, state) in enumerate(zip(classes, states)):
        left = end - time.monotonic()
        if left <= 0 or stop() or problem.m > LP_JOBS:
            return "searched" if searched else "not optimised"
        share = problem.m / max(1, sum(c.m for c in classes[k:]))
        result = less_deadhead(problem, day.travel, depot, state.routes, state.pool,
                               deadline=time.monotonic() + left * share, stop=stop)
        searched = True
        state.routes = result.routes
        proven = proven and result.proven_least
    return "proven least" if proven else "searched"


def _plan(day: Day, classes: list[WorkdayClass], states: list[ClassSearch],
          antichains: list[np.ndarray], limit: int, t0: float, stopped: bool,
          deadhead_status: str) -> Plan:
    routes = [tuple(int(c.jobs[k]) for k in r) for c, s in zip(classes, states) for r in s.routes]
    routes.sort(key=lambda r: (int(day.start[r[0]]), r[0]))
    certificate, weights = _certificate(day, classes, states, antichains)
    bound = max(len(certificate),
                math.ceil(sum(w for _, w in weights) - WEIGHT_TOLERANCE) if weights else 0)
    failures = check_workday_plan(day, routes, certificate, dict(weights) or None, bound, limit)
    shortfall = None
    if day.settings.vehicle_limit:  # enough vehicles: every job served
        total_priority = sum(priority_units(j) for j in day.jobs)
        pools = vehicle_pools(day)
        shortfall = Shortfall((), total_priority, total_priority, len(routes),
                              weights=np.zeros(day.n), heaviest=(0.0,) * len(pools))
        failures += check_workday_shortfall(day, routes, [], shortfall, limit)
    total, per_route = plan_deadhead(day, routes)
    finished = all(s.finished for s in states)
    status = ("proven" if finished else "stopped" if stopped
              else "too large" if any(s.too_large for s in states) else "time limit")
    info = WorkdayInfo(
        limit=limit, unlimited_vehicles=sum(len(a) for a in antichains),
        lp_bound=None if any(s.lp_bound is None for s in states)
        else sum(s.lp_bound for s in states), status=status,
        minimum_by_search=finished and bound < len(routes),
        nodes=sum(s.nodes for s in states),
        routes_generated=sum(s.routes_generated for s in states),
        first_plan_seconds=max((s.first_plan_seconds for s in states), default=0.0),
        seconds=time.monotonic() - t0, deadhead_status=deadhead_status)
    certificate.sort(key=lambda k: (int(day.start[k]), k))
    return Plan(day, tuple(routes), tuple(certificate), not failures,
                {"working-day search": info.seconds}, "branch-and-price",
                deadhead_seconds=total, route_deadhead_seconds=per_route,
                least_deadhead=deadhead_status == "proven least",
                verification_failures=tuple(failures), bound=bound,
                certificate_weights=tuple(weights), workday=info, shortfall=shortfall)


def _certificate(day: Day, classes: list[WorkdayClass], states: list[ClassSearch],
                 antichains: list[np.ndarray]) -> tuple[list[int], list[tuple[int, float]]]:
    """Jobs pairwise not fitting one working day, and weights when they prove more.

    Per class the stronger of the two is used: the pairwise set counts as weight
    1 per job in the weights (a route holds at most one of them).
    """
    jobs: list[int] = []
    weights: list[tuple[int, float]] = []
    weights_help = False
    for problem, state in zip(classes, states):
        pairs = state.pairwise
        jobs.extend(int(problem.jobs[k]) for k in pairs)
        duals = None if state.weights is None else clean_weights(problem, state.weights)
        if duals is not None and duals.sum() > len(pairs) + WEIGHT_TOLERANCE:
            weights_help = True
            weights.extend((int(problem.jobs[k]), float(duals[k]))
                           for k in np.flatnonzero(duals > 0))
        else:
            weights.extend((int(problem.jobs[k]), 1.0) for k in pairs)
    if not weights_help or math.ceil(sum(w for _, w in weights) - WEIGHT_TOLERANCE) <= len(jobs):
        return jobs, []
    weights.sort(key=lambda item: (int(day.start[item[0]]), item[0]))
    return jobs, weights


def _short(day: Day, states: list[ClassSearch]) -> bool:
    """Whether some pool of vehicles has fewer than the fast plan needs."""
    return any(pool.vehicles < sum(states[c].vehicles for c in pool.classes)
               for pool in vehicle_pools(day))


def _short_plan(day: Day, classes: list[WorkdayClass], states: list[ClassSearch],
                antichains: list[np.ndarray], limit: int, t0: float, *, deadline: float,
                stop: Callable[[], bool]) -> Plan:
    """The most priority served with the vehicles available, within the limit."""
    served = serve_most_within_limit(day, classes, vehicle_pools(day), deadline=deadline,
                                     stop=stop)
    routes = served.routes
    unserved = np.zeros(day.n, dtype=bool)
    unserved[list(served.unserved)] = True
    certificate: list[int] = []  # the served jobs' plain certificate: fewest routes for them
    for c in range(len(day.class_names)):
        jobs = np.flatnonzero(~unserved & (day.vclass == c))
        if len(jobs):
            index = prefix_index(day, jobs)
            certificate.extend(int(k) for k in index.jobs[
                maximum_matching(index, day=day).antichain])
    certificate.sort(key=lambda k: (int(day.start[k]), k))
    priority = np.array([priority_units(j) for j in day.jobs], dtype=np.int64)
    shortfall = Shortfall(served.unserved, int(priority[~unserved].sum()), served.upper_bound,
                          sum(s.vehicles for s in states), weights=served.weights,
                          heaviest=served.heaviest)
    failures = check_workday_shortfall(day, routes, certificate, shortfall, limit)
    total, per_route = plan_deadhead(day, routes)
    info = WorkdayInfo(limit=limit, unlimited_vehicles=sum(len(a) for a in antichains),
                       lp_bound=None, status="stopped" if stop() else
                       ("proven" if shortfall.exact else "time limit"),
                       seconds=time.monotonic() - t0)
    return Plan(day, tuple(routes), tuple(certificate), not failures,
                {"working-day search": info.seconds}, "branch-and-price",
                deadhead_seconds=total, route_deadhead_seconds=per_route,
                verification_failures=tuple(failures), bound=len(certificate),
                workday=info, shortfall=shortfall)
