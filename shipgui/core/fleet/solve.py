"""From a validated day to a verified minimum-fleet plan.

A minimum set of vehicles is a minimum chain cover of the "can follow" order:
n minus a maximum matching between left and right copies of the jobs (Fulkerson,
"Note on Dilworth's decomposition theorem", Proc. AMS 7(4), 1956).  The
matching's final search also yields a maximum antichain, the certificate.
"""

from __future__ import annotations

import threading
import time
from collections.abc import Callable
from dataclasses import dataclass, replace

import numpy as np

from ..model import Day, Plan, ServiceProof, Shortfall, priority_units
from .deadhead import TRADEOFF_SHOWN, plan_deadhead
from .least_deadhead import Stopped, class_costs, least_cost_links
from .matching import default_kernel, maximum_matching
from .precedence import PrefixIndex, class_indexes, prefix_index
from .shortfall import Pool, proof_bound, serve_most, vehicle_pools
from .verify import check_plan
from .verify_shortfall import check_shortfall

__all__ = ["solve_day", "Cancelled", "stopped_note", "LEAST_DEADHEAD_SECONDS"]

# How often the watcher of a long least-empty-driving stage looks at the clock
# and at the caller's cancel flag.
WATCH_POLL_S = 0.05
# The command line's and the app's time limit of the least-empty-driving stage
# (seconds): days up to about 100 000 jobs finish well within it on a 2-core
# machine; larger ones keep a verified minimum fleet and say so.
LEAST_DEADHEAD_SECONDS = 120.0


class Cancelled(Exception):
    """The caller asked the solve to stop."""


class _Watch:
    """Sets the least-empty-driving kernels' stop flag when the solve is
    cancelled or the stage's time is up.  A thread of its own: the kernels
    run for seconds without the GIL, between the caller's cancel checks."""

    def __init__(self, seconds: float | None, cancelled: Callable[[], bool] | None) -> None:
        self.flag = np.zeros(1, dtype=np.int64)
        self.timed_out = False
        self._seconds, self._cancelled = seconds, cancelled
        self._end = threading.Event()
        self._thread: threading.Thread | None = None

    def __enter__(self) -> _Watch:
        if self._seconds is not None or self._cancelled is not None:
            self._deadline = None if self._seconds is None else (
                time.perf_counter() + self._seconds)
            self._thread = threading.Thread(target=self._watch, daemon=True,
                                            name="shipgui-least-deadhead-watch")
            self._thread.start()
        return self

    def __exit__(self, *_exc) -> None:
        self._end.set()
        if self._thread is not None:
            self._thread.join()

    def _watch(self) -> None:
        while not self._end.wait(WATCH_POLL_S):
            if self._cancelled is not None and self._cancelled():
                self.flag[0] = 1
                return
            if self._deadline is not None and time.perf_counter() >= self._deadline:
                self.timed_out = True
                self.flag[0] = 1
                return


def solve_day(day: Day, *, kernel: str | None = None, least_deadhead: bool = True,
              tradeoff: int = TRADEOFF_SHOWN,
              progress: Callable[[str], None] | None = None,
              cancelled: Callable[[], bool] | None = None,
              fleet_first: Callable[[Plan], None] | None = None,
              least_deadhead_seconds: float | None = None) -> Plan:
    """Minimum fleet, routes and certificate for ``day``, independently verified.

    Parameters
    ----------
    day : a validated day (:func:`shipgui.core.day.build_day`).
    kernel : the matching kernel, "hopcroft-karp" or "dinic" (default: the
        fastest available, see :func:`.matching.default_kernel`).
    least_deadhead : among all minimum-fleet plans, pick one with the least empty
        driving (default); False keeps the maximum matching's routes.
    tradeoff : with ``least_deadhead``, also price this many extra vehicles.
    progress : called with a stage name ("relation", "matching", "least
        deadhead", "routes", "verification") as each stage ends.
    cancelled : polled between stages and pricing rounds (and by a watcher
        thread during the least-empty-driving kernels).
    fleet_first : with ``least_deadhead``, called with the verified
        minimum-fleet plan (the matching's routes and the certificate) before
        the least-empty-driving stage starts, so that a screen can show the
        fleet and its proof at once; the plan returned replaces it.
    least_deadhead_seconds : time limit of the least-empty-driving stage (None:
        none).  When it is reached the plan keeps the matching's routes (a
        minimum fleet, verified), ``least_deadhead`` is false and
        ``deadhead_note`` says why.

    Returns
    -------
    Plan
        Routes (job indices in time order, one route per vehicle), the
        certificate (as many jobs as routes, pairwise unable to share a
        vehicle), ``verified`` from :func:`.verify.check_plan`, the empty
        driving, and ``tradeoff`` / ``tradeoff_exact``: (vehicles, least empty
        driving with at most / exactly that many).

    Raises
    ------
    Cancelled
        When ``cancelled()`` turned true.

    Notes
    -----
    The minimum fleet is n minus a maximum matching of the "can follow" order
    (a minimum chain cover, Dilworth); the matching's last search gives the
    certificate (König).  The fleet takes O(phases * n * sites) time with
    phases O(sqrt(n)); least empty driving adds a min-cost flow on O(n * sites)
    arcs.  Memory is O(n * sites) throughout.

    References
    ----------
    Dilworth, "A decomposition theorem for partially ordered sets", Annals of
    Mathematics 51(1), 1950.  Fulkerson, "Note on Dilworth's decomposition
    theorem", Proc. AMS 7(4), 1956.

    Examples
    --------
    >>> from shipgui.core import Job, Settings, build_day
    >>> H = 3600
    >>> jobs = [Job("J1", "A", "B", 8 * H, 9 * H), Job("J2", "B", "A", 9 * H + 900, 10 * H),
    ...         Job("J3", "A", "A", 8 * H + 1800, 9 * H + 1800)]
    >>> day = build_day(jobs, [], {("A", "B"): (1200, 2), ("B", "A"): (1200, 3)},
    ...                 settings=Settings(turnaround=600))
    >>> plan = solve_day(day)
    >>> plan.vehicles, plan.route_ids(), plan.verified
    (2, [['J1', 'J2'], ['J3']], True)

    J3 overlaps J1 and cannot be reached after J2, so the proof holds J3 and one
    of the other two:

    >>> len(plan.certificate_ids()), "J3" in plan.certificate_ids()
    (2, True)
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
    if day.settings.vehicle_limit:
        short = _short_plan(day, indexes, kernel, stop_if_cancelled, stage, timings)
        if short is not None:
            return short
        t = time.perf_counter()
    matchings = []
    for index in indexes:
        matchings.append(maximum_matching(index, kernel=kernel, day=day))
        t = stage("matching", t)
    certificate = sorted((int(k) for index, matching in zip(indexes, matchings)
                          for k in index.jobs[matching.antichain]),
                         key=lambda k: (int(day.start[k]), k))
    fleet = _Fleet(day, indexes, certificate, kernel, timings)
    first_plan = None
    if not least_deadhead or fleet_first is not None:
        first_plan = fleet.plan([m.succ for m in matchings], stage)
        if not least_deadhead:
            return first_plan
        fleet_first(first_plan)
    succs: list[np.ndarray] = []
    savings: list[int] = []  # per extra vehicle in one class; can be negative
    with _Watch(least_deadhead_seconds, cancelled) as watch:
        try:
            for index, matching in zip(indexes, matchings):
                succ = matching.succ
                if index.m:
                    best = least_cost_links(class_costs(day, index), succ, extra=tradeoff,
                                            check=stop_if_cancelled, stop=watch.flag)
                    if best.links != matching.size:
                        raise RuntimeError("least-deadhead plan lost the minimum fleet")
                    succ = best.succ
                    savings.extend(a - b for a, b in zip(best.curve, best.curve[1:]))
                    t = stage("least deadhead", t)
                succs.append(succ)
        except Stopped:
            stop_if_cancelled()
            if not watch.timed_out:
                raise
            timings["least deadhead"] = timings.get("least deadhead", 0.0) + (
                time.perf_counter() - t)
            plan = first_plan or fleet.plan([m.succ for m in matchings], stage)
            return replace(plan, timings=dict(timings),
                           deadhead_note=stopped_note(least_deadhead_seconds))
    return fleet.plan(succs, stage, savings=savings, tradeoff=tradeoff)


def stopped_note(seconds: float | None) -> str:
    """What a plan says when the least-empty-driving stage reached its time limit."""
    return (f"The search for the least empty driving stopped at its time limit "
            f"({seconds:g} s): these routes use the fewest vehicles, but their empty "
            "driving is not the least possible.")


@dataclass(frozen=True)
class _Fleet:
    """What every plan of one solve shares: the day, the classes, the certificate."""

    day: Day
    indexes: list
    certificate: list[int]
    kernel: str
    timings: dict[str, float]

    def plan(self, succs: list[np.ndarray], stage: Callable[[str, float], float], *,
             savings: list[int] | None = None, tradeoff: int = 0) -> Plan:
        """The verified plan of these links (``savings``: least-deadhead links)."""
        day = self.day
        t = time.perf_counter()
        routes: list[tuple[int, ...]] = []
        for index, succ in zip(self.indexes, succs):
            routes.extend(_chains(index.jobs, succ))
        routes.sort(key=lambda r: (int(day.start[r[0]]), r[0]))
        t = stage("routes", t)
        failures = check_plan(day, routes, self.certificate)
        stage("verification", t)
        total, per_route = plan_deadhead(day, routes)
        least = savings is not None
        exact = _merge_tradeoff(len(routes), total, savings or [], tradeoff if least else 0)
        shortfall = None
        if day.settings.vehicle_limit:  # enough vehicles: every job served
            shortfall = _everything_served(day, len(routes))
            failures += check_shortfall(day, routes, self.certificate, shortfall)
        return Plan(day, tuple(routes), tuple(self.certificate), not failures,
                    dict(self.timings), self.kernel, deadhead_seconds=total,
                    route_deadhead_seconds=per_route, tradeoff=_at_most(exact),
                    tradeoff_exact=exact, least_deadhead=least,
                    verification_failures=tuple(failures), shortfall=shortfall)


def _everything_served(day: Day, vehicles: int) -> Shortfall:
    """Every job served; the proof concedes every job's whole priority."""
    priority = np.fromiter((priority_units(j) for j in day.jobs), np.int64, day.n)
    zero = np.zeros(day.n, dtype=np.int64)
    pools = tuple((p.vehicles, tuple(day.class_names[c] for c in p.classes))
                  for p in vehicle_pools(day))
    total = int(priority.sum())
    return Shortfall((), total, total, vehicles, ServiceProof(priority, zero, zero, pools))


def _short_plan(day: Day, indexes: list[PrefixIndex], kernel: str,
                check: Callable[[], None], stage: Callable[[str, float], float],
                timings: dict[str, float]) -> Plan | None:
    """The plan for fewer vehicles than needed, or None when every pool of vehicles
    has enough (then the minimum-fleet plan stands)."""
    t = time.perf_counter()
    pools = vehicle_pools(day)
    width = [index.m - maximum_matching(index, kernel=kernel, day=day).size
             for index in indexes]
    needed = [sum(width[c] for c in pool.classes) for pool in pools]
    stage("matching", t)
    short = [pool.vehicles < need for pool, need in zip(pools, needed)]
    if not any(short):
        return None
    return _solve_short(day, indexes, pools, sum(needed), all(short), kernel, check, stage,
                        timings)


def _solve_short(day: Day, indexes: list[PrefixIndex], pools: list[Pool], needed: int,
                 every_pool_short: bool, kernel: str, check: Callable[[], None],
                 stage: Callable[[str, float], float], timings: dict[str, float]) -> Plan:
    """The plan that serves the most priority with the vehicles available, checked
    independently."""
    t = time.perf_counter()
    served = serve_most(day, indexes, pools, every_pool_short=every_pool_short, check=check)
    t = stage("serving the most", t)
    routes = served.routes
    certificate: list[int] = []
    keep = np.ones(day.n, dtype=bool)
    keep[list(served.unserved)] = False
    for c in range(len(day.class_names)):
        jobs = np.flatnonzero(keep & (day.vclass == c))
        if len(jobs):
            index = prefix_index(day, jobs)
            certificate.extend(int(k) for k in index.jobs[
                maximum_matching(index, kernel=kernel, day=day).antichain])
    certificate.sort(key=lambda k: (int(day.start[k]), k))
    priority = np.fromiter((priority_units(j) for j in day.jobs), np.int64, day.n)
    shortfall = Shortfall(served.unserved, int(priority[keep].sum()),
                          proof_bound(day, served.proof), needed, served.proof)
    t = stage("routes", t)
    failures = check_shortfall(day, routes, certificate, shortfall)
    stage("verification", t)
    total, per_route = plan_deadhead(day, routes)
    return Plan(day, tuple(routes), tuple(certificate), not failures, timings, kernel,
                deadhead_seconds=total, route_deadhead_seconds=per_route,
                least_deadhead=True, verification_failures=tuple(failures),
                shortfall=shortfall)


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
