"""Pricing: the heaviest routes for given job weights, on one vehicle class.

Wraps :func:`._pricing_kernel.price_routes`: picks the jobs that matter (weight
above zero, or tied by a branching rule), renumbers them, rebuilds the prefix
form of the relation on them, and maps routes back to the class's local jobs.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from ._pricing_kernel import (
    NEG,
    NO_FIRST,
    NO_LAST,
    NO_PRED,
    NO_SUCC,
    ActiveJobs,
    LinkCosts,
    Rules,
    price_routes,
)
from .problem import WorkdayClass

__all__ = ["BranchRules", "Priced", "heaviest_routes", "NO_FIRST", "NO_LAST", "NO_PRED",
           "NO_SUCC"]

_EPS = 1e-9


@dataclass
class BranchRules:
    """Rules a branch of the search puts on routes (class-local job numbers).

    ``flags[j]``: NO_* bits; ``forced[i] = j``: whenever i is on a route, j comes
    right after it (and j has i right before it); ``forbidden``: pairs (i, j)
    that may not be consecutive.
    """

    m: int
    flags: np.ndarray = field(default=None)  # type: ignore[assignment]
    forced: dict[int, int] = field(default_factory=dict)
    forbidden: set[tuple[int, int]] = field(default_factory=set)

    def __post_init__(self) -> None:
        if self.flags is None:
            self.flags = np.zeros(self.m, dtype=np.int8)

    def copy(self) -> BranchRules:
        return BranchRules(self.m, self.flags.copy(), dict(self.forced), set(self.forbidden))

    @property
    def empty(self) -> bool:
        return not (self.forced or self.forbidden or self.flags.any())

    def tied_jobs(self) -> np.ndarray:
        """Jobs a rule ties to another one: they must stay in the pricing."""
        tied = [j for pair in self.forced.items() for j in pair]
        return np.array(sorted(set(tied)), dtype=np.int64)


@dataclass(frozen=True)
class Priced:
    """``heaviest[f]`` for every class-local job (NEG when it was not priced or may
    not start a route); ``routes``: the heavy routes found (class-local jobs)."""

    heaviest: np.ndarray
    routes: list[np.ndarray]

    @property
    def max_weight(self) -> float:
        return float(self.heaviest.max()) if len(self.heaviest) else 0.0


def _active_jobs(problem: WorkdayClass, active: np.ndarray) -> ActiveJobs:
    """The prefix form of the relation restricted to ``active`` (sorted local jobs)."""
    index = problem.index
    m, n_groups = index.latest.shape
    is_active = np.zeros(m, dtype=bool)
    is_active[active] = True
    # Positions of the full index that hold active jobs, kept in position order.
    keep = is_active[index.order]
    count = np.cumsum(keep)  # active positions up to and including each position
    group_of_full = index.group_of_position()
    new_group_start = np.searchsorted(np.flatnonzero(keep), index.group_start).astype(np.int64)
    renumber = np.full(m, -1, dtype=np.int64)
    renumber[active] = np.arange(len(active))
    job_at = renumber[index.order[keep]]
    group_of = group_of_full[keep].astype(np.int64)
    pos_of = np.empty(len(active), dtype=np.int64)
    pos_of[job_at] = np.arange(len(active))
    lat = index.latest[active].astype(np.int64)  # full positions
    mapped = np.where(lat >= 0, count[np.maximum(lat, 0)] - 1, -1)
    # An active position at or before q within q's group, else none.
    latest = np.where(mapped >= new_group_start[None, :-1], mapped, -1).astype(np.int64)
    ready = problem.ready[active]
    ready_pos = ready[job_at]
    ins_order = np.argsort(ready_pos, kind="stable").astype(np.int64)
    return ActiveJobs(problem.start[active], ready, problem.leave[active], problem.back[active],
                      np.ascontiguousarray(latest), job_at, group_of, new_group_start, pos_of,
                      ins_order, ready_pos[ins_order])


def _active_rules(rules: BranchRules | None, active: np.ndarray) -> Rules:
    count = len(active)
    if rules is None or rules.empty:
        return Rules(np.zeros(count, dtype=np.int8), np.full(count, -1, dtype=np.int64),
                     np.zeros(count + 1, dtype=np.int64), np.zeros(0, dtype=np.int64))
    renumber = {int(j): k for k, j in enumerate(active)}
    flags = rules.flags[active].copy()
    forced_pred = np.full(count, -1, dtype=np.int64)
    for i, j in rules.forced.items():
        forced_pred[renumber[j]] = renumber[i]
        flags[renumber[i]] |= NO_SUCC | NO_LAST  # i leads on to j only
    lists: list[list[int]] = [[] for _ in range(count)]
    for i, j in rules.forbidden:
        if i in renumber and j in renumber:
            lists[renumber[j]].append(renumber[i])
    ptr = np.zeros(count + 1, dtype=np.int64)
    ptr[1:] = np.cumsum([len(x) for x in lists])
    idx = np.array([i for x in lists for i in x], dtype=np.int64)
    return Rules(flags, forced_pred, ptr, idx)


def heaviest_routes(problem: WorkdayClass, weight: np.ndarray, *,
                    rules: BranchRules | None = None, firsts: np.ndarray | None = None,
                    threshold: float = 1.0 + _EPS, max_routes: int = 1 << 30,
                    link_costs: tuple[float, np.ndarray, np.ndarray, np.ndarray] | None = None,
                    ) -> Priced:
    """The heaviest route from every job (or from ``firsts``) under ``weight``.

    Only jobs of positive weight (and jobs tied by a rule) take part: any other
    job can be dropped from a route without lowering its weight or breaking it
    (:mod:`.problem`), unless a rule forbids a pair or a job's place.  Routes
    heavier than ``threshold`` are returned, at most ``max_routes`` of them (by
    the kernel's buffer).  ``link_costs`` = (lam, link[j, g] per class-local job
    and full group, pull_out, pull_in) makes each route also pay lam times its
    empty driving.
    """
    m = problem.m
    heaviest = np.full(m, NEG)
    positive = weight > _EPS
    if rules is not None and not rules.empty:
        positive[rules.tied_jobs()] = True
        if rules.forbidden or rules.flags.any():
            # A job of no weight can bridge a forbidden pair (i, then it, then j) or
            # start a route in place of a job that may not: all jobs take part.
            positive[:] = True
    active = np.flatnonzero(positive)
    if len(active) == 0:
        return Priced(heaviest, [])
    jobs = _active_jobs(problem, active)
    arules = _active_rules(rules, active)
    renumber = np.full(m, -1, dtype=np.int64)
    renumber[active] = np.arange(len(active))
    if firsts is None:
        local_firsts = np.arange(len(active), dtype=np.int64)
    else:
        local_firsts = renumber[np.asarray(firsts, dtype=np.int64)]
        local_firsts = local_firsts[local_firsts >= 0]
    if link_costs is None:
        costs = LinkCosts(0.0, np.zeros((1, 1)), np.zeros(1), np.zeros(1))
    else:
        lam, link, pull_out, pull_in = link_costs
        costs = LinkCosts(float(lam), np.ascontiguousarray(link[active]), pull_out[active],
                          pull_in[active])
    out = np.empty(len(local_firsts), dtype=np.float64)
    cap = min(max_routes, len(local_firsts))
    route_ptr = np.zeros(cap + 1, dtype=np.int64)
    route_buf = np.empty(max(1, cap * 32), dtype=np.int64)
    written = price_routes(jobs, np.ascontiguousarray(weight[active], dtype=np.float64),
                           np.int64(problem.limit), arules, costs, local_firsts,
                           float(threshold), out, route_ptr, route_buf)
    heaviest[active[local_firsts]] = out
    routes = [active[route_buf[route_ptr[k]:route_ptr[k + 1]]] for k in range(written)]
    return Priced(heaviest, routes)
