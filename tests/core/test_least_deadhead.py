"""Least empty driving among minimum-fleet plans, against outside references."""

import networkx as nx
import numpy as np
import pytest

from shipgui.core import Job, Settings, build_day, can_follow_matrix, solve_day
from shipgui.core.fleet.deadhead import plan_deadhead
from shipgui.core.fleet.least_deadhead import class_costs, least_cost_links
from shipgui.core.fleet.matching import maximum_matching
from shipgui.core.fleet.precedence import class_indexes
from tests.support.days import random_day

# Kernel tests: CI runs them a second time as plain Python (NUMBA_DISABLE_JIT=1).
pytestmark = pytest.mark.kernels


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
    cost = costs.matrix()
    for i, j in zip(*m.nonzero()):
        g.add_edge(("L", i), ("R", j), capacity=1, weight=int(cost[j, costs.group_of[i]]))
    flow = nx.max_flow_min_cost(g, "s", "t")
    value = sum(f * g[u][v]["weight"] for u in flow for v, f in flow[u].items())
    return sum(flow["s"].values()), value


def _one_class(seed, depot=False):
    rng = np.random.default_rng(seed)
    settings = Settings(turnaround=int(rng.integers(0, 10)) * 60,
                        depot="S0" if depot else None)
    return random_day(int(rng.integers(2, 35)), int(rng.integers(1, 6)), seed=seed,
                      settings=settings)


# Ways to reach the optimum: every link arc from the start; one group per
# successor, then pricing rounds re-optimised by warm-started cost scaling; the
# same with successive-shortest-path repairs.
STRATEGIES = {"all-arcs": (10**6, 10**6), "priced-scaling": (1, 0), "priced-repair": (1, 10**6)}


@pytest.fixture(params=list(STRATEGIES))
def strategy(request):
    groups, repair = STRATEGIES[request.param]
    return {"candidate_groups": groups, "repair_limit": repair}


@pytest.mark.parametrize("seed", range(110))
def test_least_cost_equals_networkx_min_cost_flow(seed, strategy):
    day = _one_class(seed, depot=seed % 2 == 1)
    index = class_indexes(day)[0]
    costs = class_costs(day, index)
    matching = maximum_matching(index, day=day)
    best = least_cost_links(costs, matching.succ, **strategy)
    assert (best.links, best.link_cost) == _networkx_min_cost(day, costs)
    assert best.links == matching.size  # still the minimum fleet
    # The links are real: each one is a compatible pair, each job used once.
    follows = can_follow_matrix(day).toarray()
    linked = np.flatnonzero(best.succ >= 0)
    assert follows[linked, best.succ[linked]].all()
    assert len(set(best.succ[linked].tolist())) == len(linked)


@pytest.mark.parametrize("seed", range(8))
def test_least_cost_equals_scipy_assignment_on_all_pairs(seed):
    # Reference: the straightforward sparse assignment on every compatible pair
    # (scipy min_weight_full_bipartite_matching; Jonker & Volgenant, Computing 38,
    # 1987); ending a route costs more than any total of links, so the number of
    # links is maximal first.  Larger days than networkx can check quickly.
    import scipy.sparse as sparse
    from scipy.sparse.csgraph import min_weight_full_bipartite_matching

    from tests.support.days import regional_day
    day = regional_day(300 + 40 * seed, 25, seed=seed)
    index = class_indexes(day)[0]
    costs = class_costs(day, index)
    best = least_cost_links(costs, maximum_matching(index, day=day).succ)
    follows = can_follow_matrix(day).tocoo()
    n = day.n
    local = np.empty(n, dtype=np.int64)
    local[index.jobs] = np.arange(n)
    i, j = local[follows.row], local[follows.col]
    w = costs.matrix()[j, costs.group_of[i]] + 1 - costs.matrix().min()
    end = int(w.max()) * (n + 1)
    graph = sparse.csr_matrix(
        (np.concatenate([w, np.full(n, end)]).astype(float),
         (np.concatenate([i, np.arange(n)]), np.concatenate([j, n + np.arange(n)]))),
        shape=(n, 2 * n))
    rows, cols = min_weight_full_bipartite_matching(graph)
    linked = cols < n
    assert linked.sum() == best.links
    assert int(costs.cost_of(cols[linked], costs.group_of[rows[linked]]).sum()) == best.link_cost


def test_least_deadhead_is_deterministic():
    from shipgui.core.export.plan_json import plan_to_json
    from tests.support.days import regional_day
    day = regional_day(400, 30, seed=11)
    first = plan_to_json(solve_day(day, least_deadhead=True, tradeoff=5))
    assert all(plan_to_json(solve_day(day, least_deadhead=True, tradeoff=5)) == first
               for _ in range(3))


def _successor_maps(follows):
    """Every way to give each job at most one successor it can precede, no job
    taken twice: all chain covers, as successor lists (brute force)."""
    n = len(follows)
    succ = [-1] * n
    taken = [False] * n

    def place(i):
        if i == n:
            yield succ
            return
        yield from place(i + 1)  # i ends a route
        for j in np.flatnonzero(follows[i]).tolist():
            if not taken[j]:
                taken[j], succ[i] = True, j
                yield from place(i + 1)
                taken[j], succ[i] = False, -1

    yield from place(0)


@pytest.mark.parametrize("seed", range(30))
def test_plan_deadhead_is_least_by_brute_force(seed):
    # Brute force over every chain cover of size = width for n <= 8, half of the
    # days with a depot (pull-out and pull-in counted).
    rng = np.random.default_rng(500 + seed)
    settings = Settings(depot="S1") if seed % 2 else Settings()
    day = random_day(int(rng.integers(2, 9)), 3, seed=seed, settings=settings)
    plan = solve_day(day)
    assert plan.verified and plan.least_deadhead
    best = min(plan_deadhead(day, _routes_of(succ))[0]
               for succ in _successor_maps(can_follow_matrix(day).toarray())
               if day.n - sum(j >= 0 for j in succ) == plan.vehicles)
    assert plan.deadhead_seconds == best


def test_least_deadhead_never_worse_than_bare_matching():
    day = random_day(120, 6, seed=3)
    bare, least = solve_day(day, least_deadhead=False), solve_day(day)
    assert least.least_deadhead and not bare.least_deadhead and bare.tradeoff == ()
    assert least.vehicles == bare.vehicles and least.verified
    assert least.deadhead_seconds <= bare.deadhead_seconds


def test_tanker_example_deadhead():
    # Ahuja, Magnanti & Orlin (1993), Application 6.6 data as in test_solver; fleet 2.
    # The only 2-vehicle plan is 1 -> 4 (empty C->B, 1 day) and 3 -> 2 (empty D->A,
    # 1 day): 2 days of empty travel, computed here, not quoted from the book.
    from tests.support.days import tanker_day
    plan = solve_day(tanker_day(strict=False), least_deadhead=True)
    assert plan.vehicles == 2 and plan.verified
    assert plan.deadhead_seconds == 2 * 24 * 3600  # C->B 1 day + D->A 1 day


@pytest.mark.parametrize("seed", range(12))
def test_tradeoff_matches_networkx_and_is_monotone(seed, strategy):
    # Exactly k vehicles, no depot: removing a link never adds empty driving.
    day = _one_class(seed)
    index = class_indexes(day)[0]
    costs = class_costs(day, index)
    best = least_cost_links(costs, maximum_matching(index, day=day).succ, extra=3, **strategy)
    curve = best.curve
    assert curve[0] == best.link_cost and len(curve) == min(4, best.links + 1)
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
    # Brute force over every chain cover (any size) of a small two-class day,
    # half of them with a depot: least empty driving with exactly and with at
    # most k vehicles, for k = minimum .. minimum + 3.
    rng = np.random.default_rng(900 + seed)
    settings = Settings(depot="S0") if seed % 2 else Settings()
    day = random_day(int(rng.integers(2, 9)), 3, seed=seed, classes=2, settings=settings)
    plan = solve_day(day, least_deadhead=True, tradeoff=3)
    best: dict[int, int] = {}
    for succ in _successor_maps(can_follow_matrix(day).toarray()):
        vehicles = day.n - sum(j >= 0 for j in succ)
        dead = plan_deadhead(day, _routes_of(succ))[0]
        best[vehicles] = min(best.get(vehicles, dead), dead)
    assert plan.tradeoff[0] == (plan.vehicles, plan.deadhead_seconds)
    assert plan.tradeoff_exact[0] == plan.tradeoff[0]
    for vehicles, dead in plan.tradeoff:
        assert dead == min(v for k, v in best.items() if k <= vehicles)
    for vehicles, dead in plan.tradeoff_exact:
        assert dead == best[vehicles]
    assert all(a[1] >= b[1] for a, b in zip(plan.tradeoff, plan.tradeoff[1:]))


def _routes_of(succ):
    """Routes (tuples of jobs) from a successor assignment."""
    heads = set(range(len(succ))) - {j for j in succ if j >= 0}
    routes = []
    for k in sorted(heads):
        route = [k]
        while succ[route[-1]] >= 0:
            route.append(succ[route[-1]])
        routes.append(tuple(route))
    return routes


def test_same_plan_without_numba():
    # The kernels also run as plain Python (numba missing or NUMBA_DISABLE_JIT=1):
    # same routes and trade-off as the compiled ones.
    import json
    import os
    import subprocess
    import sys
    from pathlib import Path

    from shipgui.core.export.plan_json import plan_to_dict
    root = Path(__file__).resolve().parents[2]
    code = ("import json; from shipgui.core import solve_day; "
            "from shipgui.core.export.plan_json import plan_to_dict; "
            "from tests.support.days import random_day; from shipgui.core import Settings; "
            "print(json.dumps([plan_to_dict(solve_day(random_day(40, 5, seed=s, settings="
            "Settings(depot='S0') if s % 2 else Settings()))) for s in range(4)]))")
    env = dict(os.environ, NUMBA_DISABLE_JIT="1", PYTHONPATH=str(root))
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         env=env, cwd=root, timeout=600, check=True).stdout
    plain = json.loads(out)
    compiled = [plan_to_dict(solve_day(random_day(40, 5, seed=s, settings=Settings(
        depot="S0") if s % 2 else Settings()))) for s in range(4)]
    assert [p["routes"] for p in plain] == [p["routes"] for p in compiled]
    assert [p["tradeoff"] for p in plain] == [p["tradeoff"] for p in compiled]


def test_cancel_reaches_inside_the_least_deadhead_kernels():
    # A long least-deadhead stage stops soon after the cancel, even in the middle
    # of a compiled kernel (a watcher sets the kernels' stop flag).
    import threading
    import time

    from shipgui.core.fleet.solve import Cancelled
    from tests.support.days import regional_day
    solve_day(regional_day(200, 20, seed=1))  # compiled before the clock runs
    day = regional_day(6000, 150, seed=2)
    reached = threading.Event()

    def progress(stage):
        if stage == "matching":  # the least-deadhead stage starts now
            reached.set()
            threading.Timer(0.2, cancel_at.append, [time.perf_counter()]).start()

    cancel_at: list[float] = []
    with pytest.raises(Cancelled):
        solve_day(day, progress=progress, cancelled=lambda: bool(cancel_at))
    assert reached.is_set()
    assert time.perf_counter() - cancel_at[0] < 1.0


def test_time_limit_keeps_a_verified_minimum_fleet_and_says_so():
    # Bounded: when the least-deadhead stage reaches its time limit the plan keeps
    # the matching's routes (still the minimum, verified), claims nothing more,
    # and says why -- in the plan, the JSON and the command line's summary.
    from shipgui.core.export.plan_json import plan_to_dict
    from tests.support.days import regional_day
    day = regional_day(6000, 150, seed=3)
    bare = solve_day(day, least_deadhead=False)
    stopped = solve_day(day, least_deadhead_seconds=0.001)
    assert stopped.verified and not stopped.least_deadhead and stopped.tradeoff == ()
    assert stopped.vehicles == bare.vehicles and stopped.routes == bare.routes
    assert "time limit" in stopped.deadhead_note and "fewest vehicles" in stopped.deadhead_note
    data = plan_to_dict(stopped)
    assert data["least_deadhead"] is False and data["least_deadhead_note"] == stopped.deadhead_note
    assert "least_deadhead_note" not in plan_to_dict(bare)
    full = solve_day(regional_day(300, 25, seed=3), least_deadhead_seconds=60)
    assert full.least_deadhead and full.deadhead_note == ""


def test_tradeoff_rows_for_screens_and_sheets():
    # One list for the app and the PDF: the minimum fleet and five more, savings in
    # the whole minutes the figures show, "exactly" flagged only when it shows
    # differently.
    import dataclasses

    from shipgui.core.fleet.deadhead import tradeoff_rows
    from tests.support.days import regional_day
    plan = solve_day(regional_day(200, 20, seed=4), tradeoff=8)
    rows = tradeoff_rows(plan)
    assert [r.vehicles for r in rows] == [plan.vehicles + t for t in range(6)]
    assert rows[0].saving_minutes == 0 and rows[0].at_most == plan.deadhead_seconds
    base = -(-plan.deadhead_seconds // 60)
    assert all(r.saving_minutes == base - -(-r.at_most // 60) for r in rows)
    assert not any(r.exactly_differs for r in rows)  # no depot
    v, d = plan.vehicles, plan.deadhead_seconds
    a = (d // 60 - 3) * 60  # a whole minute: a - 30 s shows as the same minute
    odd = dataclasses.replace(plan, tradeoff=((v, d), (v + 1, a), (v + 2, a)),
                              tradeoff_exact=((v, d), (v + 1, a - 30), (v + 2, a + 60)))
    assert [r.exactly_differs for r in tradeoff_rows(odd)] == [False, False, True]
    assert tradeoff_rows(solve_day(regional_day(200, 20, seed=4), least_deadhead=False)) == []


def test_fleet_and_proof_come_before_the_least_deadhead_stage():
    # A screen shows the fleet and its proof at once; the routes follow. The early
    # plan is whole and verified on its own (never a mix of two solves).
    from tests.support.days import regional_day
    day = regional_day(300, 25, seed=6)
    events = []
    plan = solve_day(day, progress=events.append, fleet_first=events.append)
    (fleet,) = [e for e in events if not isinstance(e, str)]
    assert events.index(fleet) < events.index("least deadhead")
    assert fleet.verified and not fleet.least_deadhead and fleet.tradeoff == ()
    assert fleet.vehicles == plan.vehicles and fleet.certificate == plan.certificate
    assert sorted(j for route in fleet.routes for j in route) == list(range(day.n))
    assert plan.least_deadhead and plan.deadhead_seconds <= fleet.deadhead_seconds
    calls = []
    solve_day(day, least_deadhead=False, fleet_first=calls.append)
    assert calls == []  # no stage to wait for: the plan itself is the answer
