"""Proofs that no plan has fewer vehicles, in the two forms the contract prints.

* Jobs that pairwise do not fit one working day: two jobs fit when one can
  follow the other and the route of just those two is within the limit.  A
  route holds at most one job of such a set (a sub-route of a valid route is
  valid), so the set's size is a lower bound.  Finding the largest set is
  hard; a greedy search started from the plain certificate (the antichain,
  whose pairs cannot follow each other at all) and led by the LP's weights
  finds good ones.
* Job weights, no route carrying more than 1: at least ceil(sum) vehicles.
  The covering LP's duals scaled by the heaviest route (:mod:`.generation`),
  rounded down to clean values so the printed numbers check exactly.
"""

from __future__ import annotations

from fractions import Fraction

import numpy as np

from .pricing import heaviest_routes
from .problem import WorkdayClass

__all__ = ["pairwise_set", "clean_weights", "WEIGHT_TOLERANCE"]

WEIGHT_TOLERANCE = 1e-6  # the contract's tolerance on route weight and on the sum


def _no_fit_with(problem: WorkdayClass, travel: np.ndarray, members: np.ndarray,
                 candidates: np.ndarray) -> np.ndarray:
    """For each candidate: fits with no member, in either order."""
    if len(members) == 0:
        return np.ones(len(candidates), dtype=bool)
    i = members[None, :]
    j = candidates[:, None]
    clash = problem.fits(i, j, travel) | problem.fits(j, i, travel)
    return ~clash.any(axis=1)


def _grow(problem: WorkdayClass, travel: np.ndarray, start: np.ndarray,
          order: np.ndarray) -> np.ndarray:
    """Add jobs in ``order`` to ``start`` while none fits with a member."""
    members = list(dict.fromkeys(int(k) for k in start))
    taken = np.zeros(problem.m, dtype=bool)
    taken[members] = True
    rest = order[~taken[order]]
    block = 256  # candidates checked against the members in one numpy call
    for at in range(0, len(rest), block):
        head = rest[at:at + block]
        ok = _no_fit_with(problem, travel, np.array(members, dtype=np.int64), head)
        before = len(members)
        for k in head[ok].tolist():
            new = np.array(members[before:], dtype=np.int64)
            if _no_fit_with(problem, travel, new, np.array([k]))[0]:
                members.append(k)
    return np.array(members, dtype=np.int64)


def pairwise_set(problem: WorkdayClass, travel: np.ndarray, antichain: np.ndarray,
                 weights: np.ndarray | None) -> np.ndarray:
    """A large set of jobs (class-local) no two of which fit one working day."""
    if problem.m == 0:
        return np.zeros(0, dtype=np.int64)
    by_start = np.arange(problem.m, dtype=np.int64)
    orders = [by_start]
    if weights is not None:
        orders.insert(0, np.argsort(-weights, kind="stable").astype(np.int64))
    best = np.asarray(antichain, dtype=np.int64)
    for order in orders:
        for start in (antichain, np.zeros(0, dtype=np.int64)):
            found = _grow(problem, travel, np.asarray(start, dtype=np.int64), order)
            if len(found) > len(best):
                best = found
    return np.sort(best)


def clean_weights(problem: WorkdayClass, weights: np.ndarray) -> np.ndarray:
    """Weights no route carries above 1, as simple fractions where that keeps the sum.

    The LP's duals are floats; they are first tried as fractions with small
    denominators (LP duals of such problems are often halves, thirds ...), and
    kept when the heaviest route still weighs at most 1 and the sum does not
    fall.  Otherwise they are rounded down to 1e-9 and scaled by the heaviest
    route.
    """
    weights = np.maximum(np.asarray(weights, dtype=np.float64), 0.0)
    total = float(weights.sum())
    for denominator in (2, 3, 4, 6, 12, 60):
        simple = np.array([float(Fraction(w).limit_denominator(denominator)) for w in weights])
        if simple.sum() + 1e-9 < np.floor(total + 1e-6) and simple.sum() + 1e-9 < total:
            continue
        heaviest = heaviest_routes(problem, simple, threshold=np.inf).max_weight
        if heaviest <= 1.0 + 1e-12 and np.ceil(simple.sum() - WEIGHT_TOLERANCE) >= np.ceil(
                total - WEIGHT_TOLERANCE):
            return simple
    heaviest = max(1.0, heaviest_routes(problem, weights, threshold=np.inf).max_weight)
    return np.floor(weights / heaviest * 1e9) / 1e9
