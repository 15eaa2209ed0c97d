"""The search for one vehicle class: first plan, bounds, integer plans, branching.

1. best-fit plans (:mod:`.greedy`) and the split-day bound (:mod:`.epochs`),
   both at once; often they meet and the search is over;
2. column generation at the root (:mod:`.generation`): the LP bound and the
   weights that prove it, and a pairwise certificate led by those weights
   (:mod:`.certificate`);
3. plans from the LP: diving (fix routes the LP likes, re-solve), then an
   integer plan over the routes generated so far (HiGHS branch and bound;
   "price and branch", common practice);
4. branch and price (:mod:`.branch`) while a gap remains and time allows.

Column generation solves an LP with one row per job; beyond ``LP_JOBS`` jobs
in a class it costs more than the time a dispatcher waits, and the answer is
the best-fit plan with the split-day bound.  (Planning groups of routes again
as small days of their own was tried there and found nothing in a minute on
generated days of 1 000 and 10 000 jobs: the gains need the whole day's LP.)

Each step that improves the plan or the bound is reported, so the caller can
show it at once and stop whenever it likes with the best plan kept.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from ..model import Day
from .branch import branch_and_price
from .certificate import pairwise_set
from .epochs import epoch_set
from .generation import generate_columns
from .greedy import greedy_routes
from .master import Master, ceil_bound, cover_to_routes
from .problem import WorkdayClass

__all__ = ["ClassSearch", "start_class", "search_class", "LP_JOBS"]

LP_JOBS = 3000  # column generation up to this many jobs in a class


@dataclass
class ClassSearch:
    """Best plan and proof for one class (class-local job numbers)."""

    routes: list[np.ndarray]
    pairwise: np.ndarray  # jobs pairwise not fitting one working day
    bound: int  # proven: the pairwise set's size, or ceil of the LP weights' sum
    lp_bound: float | None  # the LP's proven fractional bound, once computed
    weights: np.ndarray | None
    minimum_by_search: bool = False
    finished: bool = False  # proven minimum (by the bound or by the search)
    nodes: int = 0
    routes_generated: int = 0
    pool: list[np.ndarray] = field(default_factory=list)  # routes generated, for later use
    too_large: bool = False  # more jobs than the LP search takes: fast plan and bound only
    first_plan_seconds: float = 0.0
    events: list[str] = field(default_factory=list)

    @property
    def vehicles(self) -> int:
        return len(self.routes)


def start_class(day: Day, problem: WorkdayClass, antichain: np.ndarray) -> ClassSearch:
    """The fast part for one class: a best-fit plan and the split-day bound.
    ``antichain``: the plain certificate without the limit (class-local jobs)."""
    t0 = time.monotonic()
    plan = greedy_routes(problem, day.travel)
    state = ClassSearch(plan, np.asarray(antichain, dtype=np.int64), len(antichain), None,
                        None, first_plan_seconds=time.monotonic() - t0)
    if problem.m and not _closed(state):
        _raise_pairwise(state, epoch_set(day, problem))
    state.too_large = problem.m > LP_JOBS
    return state


def search_class(day: Day, problem: WorkdayClass, state: ClassSearch, *,
                 deadline: float, stop: Callable[[], bool],
                 report: Callable[[ClassSearch], None]) -> ClassSearch:
    """Search on from :func:`start_class` until the plan is proven minimum,
    ``deadline`` passes (``time.monotonic()``) or ``stop()`` says so."""
    def time_up() -> bool:
        return time.monotonic() >= deadline or stop()

    if problem.m == 0 or _closed(state) or time_up() or state.too_large:
        return state
    plan = state.routes
    master = Master(problem.m)
    master.add([np.array([j], dtype=np.int64) for j in range(problem.m)])
    master.add(plan)
    _root(day, problem, master, state, time_up, report)
    if _closed(state) or time_up():
        return _finish(state, master)
    _plans_from_lp(problem, master, state, deadline, time_up, report)
    if _closed(state) or time_up():
        return _finish(state, master)

    def better(found: list[np.ndarray]) -> None:
        if len(found) < state.vehicles:
            state.routes = found
            report(state)

    outcome = branch_and_price(problem, master, state.vehicles, time_up=time_up, on_plan=better)
    state.nodes = outcome.nodes
    if outcome.closed:
        state.minimum_by_search = state.vehicles > state.bound
        state.finished = True
    report(state)
    return _finish(state, master)


def _raise_pairwise(state: ClassSearch, found: np.ndarray) -> None:
    if len(found) > len(state.pairwise):
        state.pairwise = found
        state.bound = max(state.bound, len(found))


def _root(day: Day, problem: WorkdayClass, master: Master, state: ClassSearch,
          time_up: Callable[[], bool], report: Callable[[ClassSearch], None]) -> None:
    """The LP bound at the root, and a pairwise set led by its weights."""
    root = generate_columns(problem, master, check=time_up)
    if root.weights is None:
        return
    state.lp_bound = root.bound
    _raise_pairwise(state, pairwise_set(problem, day.travel, state.pairwise, root.weights))
    if ceil_bound(root.bound) > state.bound:
        state.bound, state.weights = ceil_bound(root.bound), root.weights
    elif state.weights is None:
        state.weights = root.weights
    report(state)


def _plans_from_lp(problem: WorkdayClass, master: Master, state: ClassSearch, deadline: float,
                   time_up: Callable[[], bool], report: Callable[[ClassSearch], None]) -> None:
    """Dives, then an integer plan over the generated routes."""
    generate_columns(problem, master, check=time_up, settle=False)
    for _ in range(3):
        if _closed(state) or time_up():
            return
        found = dive(problem, master, state.vehicles, time_up)
        if found is None:
            break
        state.routes = found
        report(state)
    if _closed(state) or time_up():
        return
    _integer_plan(state, master, deadline)
    report(state)


def _closed(state: ClassSearch) -> bool:
    state.finished = state.finished or state.vehicles <= state.bound
    return state.finished


def _finish(state: ClassSearch, master: Master) -> ClassSearch:
    state.routes_generated = len(master)
    state.pool = master.routes
    _closed(state)
    return state


def _integer_plan(state: ClassSearch, master: Master, deadline: float) -> None:
    """The fewest generated routes that cover every job, if fewer than the plan's."""
    budget = min(max(deadline - time.monotonic(), 0.0), 10.0 + 0.02 * master.m)
    found = master.integer_plan(time_limit=budget, cutoff=state.vehicles)
    if found is not None and len(found[0]) < state.vehicles:
        state.routes = found[0]


def dive(problem: WorkdayClass, master: Master, incumbent: int,
         time_up: Callable[[], bool]) -> list[np.ndarray] | None:
    """A plan with fewer than ``incumbent`` routes by fixing routes one by one.

    Each step re-solves the LP (with new routes priced in) over the jobs not
    covered yet and fixes every route the LP takes whole, else the one it takes
    most of; it gives up as soon as the fixed routes plus the LP bound reach the
    incumbent (the diving heuristic for column generation: Joncour, Michel,
    Sadykov, Sverdlov & Vanderbeck, "Column generation based primal
    heuristics", Electronic Notes in Discrete Mathematics 36, 2010).
    """
    covered = np.zeros(problem.m, dtype=bool)
    fixed: list[np.ndarray] = []
    try:
        while not time_up():
            master.cover_only(~covered)
            result = generate_columns(problem, master, check=time_up, covered=covered,
                                      stop_at=incumbent - len(fixed))
            lp = result.lp
            if lp is None or ceil_bound(len(fixed) + result.bound) >= incumbent:
                return None
            whole = np.flatnonzero(lp.x > 1 - 1e-6)
            if len(whole) == np.count_nonzero(lp.x > 1e-6):  # the LP plan is whole
                plan = fixed + [master.routes[k] for k in whole]
                plan = cover_to_routes(plan, problem.m)
                return plan if len(plan) < incumbent else None
            take = whole if len(whole) else [int(np.argmax(lp.x))]
            for k in take:
                fixed.append(master.routes[k])
                covered[master.routes[k]] = True
            if covered.all():
                plan = cover_to_routes(fixed, problem.m)
                return plan if len(plan) < incumbent else None
        return None
    finally:
        master.cover_only(np.ones(problem.m, dtype=bool))
