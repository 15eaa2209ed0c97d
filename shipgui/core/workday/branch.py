"""Branch and price: closing the gap between the best plan and the LP bound.

A node of the search is a set of branching rules on consecutive jobs (Desrosiers
et al. 1995, section 6: branching on the arcs of the underlying network, the
usual rule for vehicle scheduling): "j comes right after i" in one child,
"never right after" in the other, on the arc whose LP flow is most
fractional.  Both children keep every plan of the parent that obeys them, so
the search is exact; pricing honours the rules (:mod:`.pricing`), and each
node's column generation gives a proven bound for its part of the search.  A
node whose rounded bound reaches the best plan is closed; when every node is
closed, the best plan is the minimum.  Depth first, "comes after" first, so
the search also dives towards whole-numbered plans.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from .generation import generate_columns
from .master import Master, ceil_bound, cover_to_routes
from .pricing import NO_FIRST, NO_LAST, BranchRules
from .problem import WorkdayClass

__all__ = ["BranchOutcome", "branch_and_price", "compatible"]

_EPS = 1e-6


@dataclass
class BranchOutcome:
    plan: list[np.ndarray] | None  # a better plan found, if any
    closed: bool  # every node closed: the best plan is proven minimum
    nodes: int
    bound: int  # proven bound over the open nodes (>= the root's) when not closed


def compatible(routes: list[np.ndarray], rules: BranchRules) -> np.ndarray:
    """Which routes obey the rules (a forced pair consecutive, a forbidden pair not)."""
    ok = np.ones(len(routes), dtype=bool)
    if rules.empty:
        return ok
    pred_of = {j: i for i, j in rules.forced.items()}
    for k, route in enumerate(routes):
        r = route.tolist()
        if rules.flags[r[0]] & NO_FIRST or rules.flags[r[-1]] & NO_LAST:
            ok[k] = False
            continue
        for pos, job in enumerate(r):
            after = r[pos + 1] if pos + 1 < len(r) else -1
            before = r[pos - 1] if pos else -1
            if rules.forced.get(job, after) != after or pred_of.get(job, before) != before:
                ok[k] = False
                break
            if after >= 0 and (job, after) in rules.forbidden:
                ok[k] = False
                break
    return ok


def _chain(rules: BranchRules, job: int) -> list[int]:
    """The jobs a forced rule ties to ``job``, in order."""
    pred_of = {j: i for i, j in rules.forced.items()}
    head = job
    while head in pred_of:
        head = pred_of[head]
    chain = [head]
    while chain[-1] in rules.forced:
        chain.append(rules.forced[chain[-1]])
    return chain


def _fallback_routes(problem: WorkdayClass, rules: BranchRules) -> list[np.ndarray] | None:
    """One allowed route per job (its forced chain), or None if a chain is too long."""
    routes, seen = [], set()
    for job in range(problem.m):
        chain = _chain(rules, job)
        key = tuple(chain)
        if key in seen:
            continue
        seen.add(key)
        if problem.back[chain[-1]] - problem.leave[chain[0]] > problem.limit:
            return None
        routes.append(np.array(chain, dtype=np.int64))
    return routes


def _arc_flows(routes: list[np.ndarray], x: np.ndarray) -> dict[tuple[int, int], float]:
    flows: dict[tuple[int, int], float] = {}
    for k in np.flatnonzero(x > _EPS):
        r = routes[k]
        for i, j in zip(r[:-1].tolist(), r[1:].tolist()):
            flows[(i, j)] = flows.get((i, j), 0.0) + float(x[k])
    return flows


def _branch_arc(routes, x) -> tuple[int, int] | None:
    flows = _arc_flows(routes, x)
    best, best_gap = None, 0.5 - _EPS
    for arc, flow in flows.items():
        gap = abs(flow - round(flow))
        if gap > _EPS and 0.5 - gap < best_gap:
            best, best_gap = arc, 0.5 - gap
    return best


def branch_and_price(problem: WorkdayClass, master: Master, incumbent: int, *,
                     time_up: Callable[[], bool],
                     on_plan: Callable[[list[np.ndarray]], None] | None = None,
                     max_nodes: int = 100_000) -> BranchOutcome:
    """Search for a plan with fewer than ``incumbent`` routes, or prove there is none."""
    stack: list[tuple[BranchRules, int]] = [(BranchRules(problem.m), 0)]
    best_plan, nodes = None, 0
    open_bounds: list[int] = []
    while stack:
        if time_up() or nodes >= max_nodes:
            open_bounds.extend(bound for _rules, bound in stack)
            break
        rules, _parent_bound = stack.pop()
        nodes += 1
        fallback = _fallback_routes(problem, rules)
        if fallback is None:
            continue  # a forced chain is longer than a working day: no plan here
        master.add(fallback)
        result = generate_columns(problem, master, rules=rules,
                                  allowed=lambda r=rules: compatible(master.routes, r),
                                  stop_at=incumbent, check=time_up)
        lp = result.lp
        if lp is None or ceil_bound(result.bound) >= incumbent:
            continue
        if not result.optimal and time_up():
            open_bounds.append(ceil_bound(result.bound))
            break
        chosen = lp.x > _EPS
        if np.all(np.abs(lp.x[chosen] - np.round(lp.x[chosen])) <= _EPS):
            plan = cover_to_routes([master.routes[k] for k in np.flatnonzero(lp.x > 0.5)],
                                   problem.m)
            if len(plan) < incumbent:
                best_plan, incumbent = plan, len(plan)
                if on_plan is not None:
                    on_plan(plan)
            continue
        arc = _branch_arc(master.routes, lp.x)
        if arc is None:
            open_bounds.append(ceil_bound(result.bound))  # cannot split further here
            continue
        forbid = rules.copy()
        forbid.forbidden.add(arc)
        force = rules.copy()
        force.forced[arc[0]] = arc[1]
        stack.append((forbid, ceil_bound(result.bound)))
        stack.append((force, ceil_bound(result.bound)))
    closed = not open_bounds and not stack
    bound = min(open_bounds + [incumbent]) if not closed else incumbent
    return BranchOutcome(best_plan, closed, nodes, bound)

