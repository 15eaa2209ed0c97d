"""From a validated day to a verified minimum-fleet plan.

A minimum set of vehicles is a minimum chain cover of the "can follow" order:
n minus a maximum matching between left and right copies of the jobs (Fulkerson,
"Note on Dilworth's decomposition theorem", Proc. AMS 7(4), 1956).  The
matching's final search also yields a maximum antichain, the certificate.
"""

from __future__ import annotations

import time
from collections.abc import Callable

import numpy as np

from ..model import Day, Plan
from .deadhead import TRADEOFF_SHOWN, plan_deadhead
from .least_deadhead import class_costs, least_cost_links
from .matching import default_kernel, maximum_matching
from .precedence import class_indexes
from .verify import check_plan

__all__ = ["solve_day", "Cancelled"]


class Cancelled(Exception):
    """The caller asked the solve to stop."""


def solve_day(day: Day, *, kernel: str | None = None, least_deadhead: bool = True,
              tradeoff: int = TRADEOFF_SHOWN,
              progress: Callable[[str], None] | None = None,
              cancelled: Callable[[], bool] | None = None) -> Plan:
    """Minimum fleet, routes and certificate for ``day``, independently verified.

    With ``least_deadhead`` (the default) the routes are, among all
    minimum-fleet plans, one with the least empty driving
    (:mod:`shipgui.core.fleet.least_deadhead`), and ``tradeoff`` extra vehicles are
    priced: ``plan.tradeoff`` lists (vehicles, least empty driving with at most
    that many vehicles), ``plan.tradeoff_exact`` the same with exactly that many.
    Without it the routes are those of the maximum matching (any minimum-fleet
    plan) and there is no trade-off.
    ``progress`` is called with a stage name between steps; when
    ``cancelled()`` turns true the solve stops with :class:`Cancelled` (also
    between the rounds of the least-deadhead stage).  The fleet takes
    O(phases * n * sites) time; memory is O(n * sites) throughout.
    """
    kernel = kernel or default_kernel()
    timings: dict[str, float] = {}

    def stop_if_cancelled() -> None:
        if cancelled is not None and cancelled():
            raise Cancelled()

    def stage(name: str, t0: float) -> float:
        timings[name] = timings.get(name, 0.0) + time.perf_counter() - t0
        stop_if_cancelled()
        if progress is not None:
            progress(name)
        return time.perf_counter()

    t = time.perf_counter()
    indexes = class_indexes(day)
    t = stage("relation", t)
    routes: list[tuple[int, ...]] = []
    certificate: list[int] = []
    savings: list[int] = []  # per extra vehicle in one class; can be negative
    for index in indexes:
        matching = maximum_matching(index, kernel=kernel, day=day)
        t = stage("matching", t)
        succ = matching.succ
        if least_deadhead and index.m:
            costs = class_costs(day, index)
            best = least_cost_links(costs, succ, extra=tradeoff, check=stop_if_cancelled)
            if best.links != matching.size:
                raise RuntimeError("least-deadhead plan lost the minimum fleet")
            succ = best.succ
            savings.extend(a - b for a, b in zip(best.curve, best.curve[1:]))
            t = stage("least deadhead", t)
        routes.extend(_chains(index.jobs, succ))
        certificate.extend(int(k) for k in index.jobs[matching.antichain])
    routes.sort(key=lambda r: (int(day.start[r[0]]), r[0]))
    certificate.sort(key=lambda k: (int(day.start[k]), k))
    t = stage("routes", t)
    failures = check_plan(day, routes, certificate)
    stage("verification", t)
    total, per_route = plan_deadhead(day, routes)
    exact = _merge_tradeoff(len(routes), total, savings, tradeoff if least_deadhead else 0)
    return Plan(day, tuple(routes), tuple(certificate), not failures, timings, kernel,
                deadhead_seconds=total, route_deadhead_seconds=per_route,
                tradeoff=_at_most(exact), tradeoff_exact=exact,
                least_deadhead=least_deadhead, verification_failures=tuple(failures))


def _merge_tradeoff(vehicles: int, deadhead: int, savings: list[int],
                    extra: int) -> tuple[tuple[int, int], ...]:
    """Least empty driving with exactly vehicles + t vehicles, t = 0..extra.

    Each class's saving per extra vehicle does not grow (its cost curve is
    convex: a min-cost flow value; Ahuja, Magnanti & Orlin, Network Flows, 1993,
    ch. 9), so taking the largest savings over all classes first is optimal.
    A saving is negative when a vehicle's drive out and back costs more than
    the link it replaces.  Stops when no class can split a route any more.
    """
    if extra <= 0:
        return ()
    best = sorted(savings, reverse=True)
    points = [(vehicles, deadhead)]
    for saving in best[:extra]:
        deadhead -= saving
        points.append((points[-1][0] + 1, deadhead))
    return tuple(points)


def _at_most(exact: tuple[tuple[int, int], ...]) -> tuple[tuple[int, int], ...]:
    """From exactly k vehicles to at most k: the running minimum."""
    points, low = [], None
    for vehicles, deadhead in exact:
        low = deadhead if low is None else min(low, deadhead)
        points.append((vehicles, low))
    return tuple(points)


def _chains(jobs: np.ndarray, succ: np.ndarray) -> list[tuple[int, ...]]:
    """Follow the matched links from every job that starts a chain."""
    succ_list = succ.tolist()
    global_ids = jobs.tolist()
    chains = []
    starts = np.ones(len(succ), dtype=bool)
    starts[succ[succ >= 0]] = False  # a job some other job links to does not start a chain
    for head in np.flatnonzero(starts).tolist():
        chain = []
        k = head
        while k >= 0:
            chain.append(global_ids[k])
            k = succ_list[k]
        chains.append(tuple(chain))
    return chains
