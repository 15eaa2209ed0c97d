"""Pricing (the heaviest route per first job) against brute force over all routes,
with and without the branching rules of the search."""

from __future__ import annotations

import numpy as np
import pytest

from shipgui.core.workday.pricing import NO_FIRST, NO_LAST, BranchRules, heaviest_routes
from shipgui.core.workday.problem import workday_classes
from tests.support.days import depot_day, random_day


def _follows(c, travel, i, j):
    return c.ready[i] + travel[c.destination[i], c.origin[j]] <= c.start[j]


def _allowed(route, rules: BranchRules) -> bool:
    if rules.flags[route[0]] & NO_FIRST or rules.flags[route[-1]] & NO_LAST:
        return False
    pred_of = {j: i for i, j in rules.forced.items()}
    for pos, job in enumerate(route):
        after = route[pos + 1] if pos + 1 < len(route) else -1
        before = route[pos - 1] if pos else -1
        if job in rules.forced and rules.forced[job] != after:
            return False
        if job in pred_of and pred_of[job] != before:
            return False
        if after >= 0 and (job, after) in rules.forbidden:
            return False
    return True


def _brute(c, travel, weight, rules):
    """Heaviest allowed route per first job, by enumerating every valid route."""
    best = np.full(c.m, -np.inf)

    def extend(route, total):
        if c.back[route[-1]] - c.leave[route[0]] > c.limit:
            return
        if _allowed(route, rules):
            best[route[0]] = max(best[route[0]], total)
        for j in range(route[-1] + 1, c.m):
            if _follows(c, travel, route[-1], j):
                extend(route + [j], total + weight[j])

    for f in range(c.m):
        extend([f], weight[f])
    return best


def _rules(c, travel, rng) -> BranchRules:
    rules = BranchRules(c.m)
    pairs = [(i, j) for i in range(c.m) for j in range(i + 1, c.m)
             if _follows(c, travel, i, j) and c.back[j] - c.leave[i] <= c.limit]
    rng.shuffle(pairs)
    used_i, used_j = set(), set()
    for i, j in pairs[:2]:
        if i not in used_i and j not in used_j and i not in used_j and j not in used_i:
            rules.forced[i] = j
            used_i.add(i)
            used_j.add(j)
    for i, j in pairs[2:5]:
        if i not in rules.forced:
            rules.forbidden.add((i, j))
    return rules


@pytest.mark.parametrize("seed", range(120))
def test_heaviest_routes_match_brute_force(seed):
    rng = np.random.default_rng(seed)
    day = (depot_day(10, 5, seed=seed, span_h=(6, 12)) if seed % 2
           else random_day(10, 4, seed=seed, horizon_min=420))
    leave_back = None
    c = workday_classes(day, 10**9)[0]
    own = int((c.back - c.leave).max())
    c = workday_classes(day, int(rng.integers(own, own + 8 * 3600)))[0]
    weight = rng.random(c.m) * (rng.random(c.m) < 0.7)
    rules = _rules(c, day.travel, rng) if seed % 3 else BranchRules(c.m)
    got = heaviest_routes(c, weight, rules=rules, threshold=-1.0)
    want = _brute(c, day.travel, weight, rules)
    for f in range(c.m):
        if weight[f] > 1e-9 or (rules.forbidden and np.isfinite(want[f])):
            expected = want[f] if np.isfinite(want[f]) else None
            value = got.heaviest[f] if got.heaviest[f] > -1e299 else None
            assert (value is None) == (expected is None), (f, value, expected)
            if expected is not None:
                assert value == pytest.approx(expected), (f, leave_back)
    for route in got.routes:  # every route returned is valid, allowed, of the stated weight
        assert c.back[route[-1]] - c.leave[route[0]] <= c.limit
        assert all(_follows(c, day.travel, a, b) for a, b in zip(route, route[1:]))
        assert _allowed(list(route), rules)
        assert weight[route].sum() == pytest.approx(got.heaviest[route[0]])
