"""Least empty driving among minimum-fleet plans, against outside references."""

import itertools

import networkx as nx
import numpy as np
import pytest

from shipgui.core import Job, Settings, build_day, can_follow_matrix, solve_day
from shipgui.core.least_deadhead import class_costs, least_cost_links, tradeoff_curve
from shipgui.core.matching import maximum_matching
from shipgui.core.precedence import class_indexes
from tests.support.days import random_day


def _networkx_min_cost(day, costs, extra_vehicles=0):
    """Reference: networkx max_flow_min_cost on the split graph (Ahuja, Magnanti &
    Orlin, Network Flows, 1993, ch. 9 formulation), optionally with the flow value
    capped to force ``extra_vehicles`` more vehicles."""
    m = can_follow_matrix(day)
    g = nx.DiGraph()
    n = day.n
    width = n - maximum_matching(costs.index, day=day).size
    links = n - width - extra_vehicles
    g.add_edge("s", "cap", capacity=links, weight=0)
    for i in range(n):
        g.add_edge("cap", ("L", i), capacity=1, weight=0)
        g.add_edge(("R", i), "t", capacity=1, weight=0)
    for i, j in zip(*m.nonzero()):
        g.add_edge(("L", i), ("R", j), capacity=1, weight=int(costs.cost[j, costs.group_of[i]]))
    flow = nx.max_flow_min_cost(g, "s", "t")
    value = sum(f * g[u][v]["weight"] for u in flow for v, f in flow[u].items())
    return sum(flow["s"].values()), value


def _one_class(seed, depot=False):
    rng = np.random.default_rng(seed)
    settings = Settings(turnaround=int(rng.integers(0, 10)) * 60,
                        depot="S0" if depot else None)
    return random_day(int(rng.integers(2, 35)), int(rng.integers(1, 6)), seed=seed,
                      settings=settings)


@pytest.mark.parametrize("pricing", [False, True], ids=["all-pairs", "column-generation"])
@pytest.mark.parametrize("seed", range(110))
def test_least_cost_equals_networkx_min_cost_flow(seed, pricing, monkeypatch):
    # Both ways of choosing candidates: all pairs at once, or pricing rounds.
    import shipgui.core.least_deadhead as least
    if pricing:
        monkeypatch.setattr(least, "_ALL_PAIRS_LIMIT", 0)
    day = _one_class(seed, depot=seed % 2 == 1)
    index = class_indexes(day)[0]
    costs = class_costs(day, index)
    matching = maximum_matching(index, day=day)
    best = least_cost_links(costs, initial=matching.succ)
    assert (best.links, best.link_cost) == _networkx_min_cost(day, costs)
    assert best.links == matching.size  # still the minimum fleet


@pytest.mark.parametrize("seed", range(25))
def test_plan_deadhead_is_least_by_brute_force(seed):
    # Brute force over every chain cover of size = width for n <= 7.
    rng = np.random.default_rng(500 + seed)
    day = random_day(int(rng.integers(2, 8)), 3, seed=seed)
    plan = solve_day(day, least_deadhead=True)
    assert plan.verified
    follows = can_follow_matrix(day).toarray()
    best = None
    for succ in itertools.product(*[[-1, *np.flatnonzero(follows[i])] for i in range(day.n)]):
        targets = [s for s in succ if s >= 0]
        if len(targets) != len(set(targets)) or day.n - len(targets) != plan.vehicles:
            continue
        dead = sum(int(day.travel[day.destination[i], day.origin[j]])
                   for i, j in enumerate(succ) if j >= 0)
        best = dead if best is None else min(best, dead)
    assert plan.deadhead_seconds == best


def test_least_deadhead_never_worse_than_bare_matching():
    day = random_day(120, 6, seed=3)
    bare, least = solve_day(day), solve_day(day, least_deadhead=True)
    assert least.vehicles == bare.vehicles and least.verified
    assert least.deadhead_seconds <= bare.deadhead_seconds


def test_tanker_example_deadhead():
    # Ahuja, Magnanti & Orlin (1993), Application 6.6 data as in test_solver; fleet 2.
    # The only 2-vehicle plan is 1 -> 4 (empty C->B, 1 day) and 3 -> 2 (empty D->A,
    # 1 day): 2 days of empty travel, computed here, not quoted from the book.
    from tests.core.test_solver import _tanker
    plan = solve_day(_tanker(strict=False), least_deadhead=True)
    assert plan.vehicles == 2 and plan.verified
    assert plan.deadhead_seconds == 2 * 24 * 3600  # C->B 1 day + D->A 1 day


@pytest.mark.parametrize("seed", range(12))
def test_tradeoff_matches_networkx_and_is_monotone(seed):
    day = _one_class(seed)
    index = class_indexes(day)[0]
    costs = class_costs(day, index)
    best = least_cost_links(costs, initial=maximum_matching(index, day=day).succ)
    curve = tradeoff_curve(costs, best, 3)
    assert curve[0] == best.link_cost
    assert all(a >= b for a, b in zip(curve, curve[1:]))
    for extra, value in enumerate(curve):
        assert _networkx_min_cost(day, costs, extra)[1] == value


def test_depot_pull_out_and_pull_in_counted():
    jobs = [Job("A", "X", "X", 8 * 3600, 9 * 3600)]
    travel = {("D", "X"): (600, 0), ("X", "D"): (900, 0)}
    day = build_day(jobs, [], travel, settings=Settings(depot="D"))
    assert solve_day(day, least_deadhead=True).deadhead_seconds == 1500


@pytest.mark.parametrize("seed", range(15))
def test_plan_tradeoff_by_brute_force_over_classes(seed):
    # Brute force over every chain cover (any size) of a small two-class day:
    # least empty driving with at most k vehicles, for k = minimum .. minimum + 3.
    rng = np.random.default_rng(900 + seed)
    day = random_day(int(rng.integers(2, 8)), 3, seed=seed, classes=2)
    plan = solve_day(day, least_deadhead=True, tradeoff=3)
    follows = can_follow_matrix(day).toarray()
    best: dict[int, int] = {}
    for succ in itertools.product(*[[-1, *np.flatnonzero(follows[i])] for i in range(day.n)]):
        targets = [s for s in succ if s >= 0]
        if len(targets) != len(set(targets)):
            continue
        vehicles = day.n - len(targets)
        dead = sum(int(day.travel[day.destination[i], day.origin[j]])
                   for i, j in enumerate(succ) if j >= 0)
        best[vehicles] = min(best.get(vehicles, dead), dead)
    assert plan.tradeoff[0] == (plan.vehicles, plan.deadhead_seconds)
    for vehicles, dead in plan.tradeoff:
        assert dead == min(v for k, v in best.items() if k <= vehicles)
