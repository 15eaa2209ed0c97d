"""Column generation: the covering LP over all valid routes, solved without listing them.

Each round solves the LP over the routes found so far, prices every possible
first job under the LP's duals (:mod:`.pricing`), and adds the routes heavier
than 1 (negative reduced cost).  When no route is heavier than 1 the LP is
optimal over all routes (Lübbecke & Desrosiers, "Selected topics in column
generation", Operations Research 53(6), 2005, section 2).

Every round also gives a lower bound without waiting for the end: if the
heaviest route weighs W >= 1, the duals divided by W are feasible for the
dual LP, so no plan has fewer than LP / W routes (Farley, "A note on bounding
a class of linear programming problems, including cutting stock problems",
Operations Research 38(5), 1990).  Those scaled duals are the weights the
certificate prints.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from .master import LPResult, Master, ceil_bound
from .pricing import BranchRules, heaviest_routes
from .problem import WorkdayClass

__all__ = ["Generated", "generate_columns"]

_EPS = 1e-9
_ALPHA = 0.5  # weight of the best-bound duals in the smoothed duals


@dataclass
class Generated:
    """Outcome of column generation at one node of the search."""

    lp: LPResult | None  # the last LP solved (None: the node has no cover)
    bound: float  # proven lower bound for the node (Farley), 0 if none
    weights: np.ndarray | None  # scaled duals proving ``bound`` (root only is printed)
    optimal: bool  # the LP is optimal over all routes of the node
    rounds: int


def _new_routes(priced_routes: list[np.ndarray], heaviest: np.ndarray,
                limit: int) -> list[np.ndarray]:
    """The heaviest priced routes first, at most ``limit``."""
    if len(priced_routes) <= limit:
        return priced_routes
    weight = np.array([heaviest[r[0]] for r in priced_routes])
    keep = np.argsort(-weight, kind="stable")[:limit]
    return [priced_routes[k] for k in keep]


def generate_columns(problem: WorkdayClass, master: Master, *, rules: BranchRules | None = None,
                     allowed: Callable[[], np.ndarray] | None = None,
                     stop_at: int | None = None, check: Callable[[], bool] | None = None,
                     max_new: int | None = None, settle: bool = True,
                     covered: np.ndarray | None = None) -> Generated:
    """Run column generation at a node until the LP is optimal or the bound settles.

    ``allowed()`` gives the mask of master routes valid under ``rules`` (called
    after routes are added).  It stops early when the rounded bound can no
    longer change (ceil of the bound equals ceil of the LP value) or reaches
    ``stop_at`` (no better plan can be found here), or when ``check()`` says
    time is up.  ``settle=False`` goes on to LP optimality (more routes for
    integer plans).  ``covered`` marks jobs already covered outside the LP (their
    duals are ignored).

    Pricing uses smoothed duals, a mix of the LP's duals and the duals of the
    best bound so far, which damps the duals' swings between rounds (Wentges,
    "Weighted Dantzig-Wolfe decomposition for linear mixed-integer
    programming", International Transactions in OR 4(2), 1997); when the mix
    finds no route that helps the LP, the LP's own duals are priced.
    """
    max_new = max_new or problem.m
    center: np.ndarray | None = None
    best_bound = 0.0
    lp: LPResult | None = None
    rounds = 0
    while True:
        if allowed is not None:
            master.allow(allowed())
        lp = master.solve()
        rounds += 1
        if lp is None:
            return Generated(None, float("inf"), None, True, rounds)
        duals = lp.duals if covered is None else np.where(covered, 0.0, lp.duals)
        fresh, optimal = 0, False
        for mix in ((_ALPHA, 0.0) if center is not None else (0.0,)):
            price = duals if mix == 0.0 else mix * center + (1 - mix) * duals
            priced = heaviest_routes(problem, price, rules=rules, max_routes=max_new)
            bound = float(price.sum()) / max(priced.max_weight, 1.0)
            if bound > best_bound:
                best_bound, center = bound, price / max(priced.max_weight, 1.0)
            useful = [r for r in priced.routes if duals[r].sum() > 1.0 + _EPS]
            if mix == 0.0:
                optimal = priced.max_weight <= 1.0 + _EPS or not priced.routes
            fresh = master.add(_new_routes(useful, priced.heaviest, max_new))
            if fresh or optimal:
                break
        if center is None:
            center = duals
        settled = settle and ceil_bound(best_bound) >= ceil_bound(lp.value)
        done = stop_at is not None and ceil_bound(best_bound) >= stop_at
        if optimal or settled or done or fresh == 0 or (check is not None and check()):
            return Generated(lp, best_bound, center, optimal, rounds)
