"""Fewer vehicles than needed: the most priority served, against outside references."""

import dataclasses

import networkx as nx
import numpy as np
import pytest

from shipgui.core import InputError, Job, Settings, build_day, can_follow_matrix, solve_day
from shipgui.core.fleet.deadhead import plan_deadhead
from shipgui.core.fleet.shortfall import service_levels
from shipgui.core.fleet.verify_shortfall import check_shortfall
from shipgui.core.model import priority_units
from tests.support.days import random_day, rebuild, with_priorities


def _limited(day, rng, *, per_class):
    """``day`` with fewer vehicles than it needs (one number, or per class)."""
    width = solve_day(day, least_deadhead=False).vehicles
    if per_class and len(day.class_names) > 1:
        name = str(rng.choice(day.class_names))
        jobs = sum(1 for j in day.jobs if j.vehicle_class == name)
        limit = Settings(**{**vars(day.settings), "class_vehicles": (
            (name, int(rng.integers(1, jobs + 1))),)})
    else:
        limit = dataclasses.replace(day.settings, vehicles=int(rng.integers(1, width + 1)))
    return rebuild(day, settings=limit)


def _pools(day):
    """(vehicles, jobs) per group of vehicles, read from the settings."""
    s = day.settings
    if s.vehicles is not None:
        return [(s.vehicles, list(range(day.n)))]
    named = dict(s.class_vehicles)
    return [(named.get(c, day.n), [k for k, j in enumerate(day.jobs) if j.vehicle_class == c])
            for c in day.class_names]


def _networkx_reference(day):
    """(priority, jobs, vehicles, empty driving) of the best plan, lexicographically,
    by networkx min_cost_flow (network simplex) on the node-split graph with
    exact big-integer weights (Arkin & Silverberg, "Scheduling jobs with fixed
    start and end times", Discrete Applied Mathematics 18(1), 1987; Ahuja,
    Magnanti & Orlin, Network Flows, 1993, ch. 9)."""
    follows = can_follow_matrix(day)
    t = day.travel
    depot = day.site_index.get(day.settings.depot) if day.settings.depot else None
    longest = int(t.max()) + 1
    drive_weight = 1
    vehicle_weight = (2 * day.n + 2) * longest  # more than any empty driving
    job_weight = (day.n + 1) * vehicle_weight + 1  # more than vehicles and driving
    priority_weight = (day.n + 1) * job_weight  # more than all of the above
    g = nx.DiGraph()
    for p, (vehicles, jobs) in enumerate(_pools(day)):
        g.add_node(("pool", p), demand=-vehicles)
        g.add_edge(("pool", p), "t", capacity=vehicles, weight=0)
        for k in jobs:
            pull_out = 0 if depot is None else int(t[depot, day.origin[k]])
            g.add_edge(("pool", p), ("in", k), capacity=1,
                       weight=vehicle_weight + pull_out * drive_weight)
    g.nodes["t"]["demand"] = sum(v for v, _ in _pools(day))
    for k, job in enumerate(day.jobs):
        g.add_edge(("in", k), ("out", k), capacity=1,
                   weight=-(priority_units(job) * priority_weight + job_weight))
        pull_in = 0 if depot is None else int(t[day.destination[k], depot])
        g.add_edge(("out", k), "t", capacity=1, weight=pull_in * drive_weight)
    for i, j in zip(*follows.nonzero()):
        g.add_edge(("out", i), ("in", j), capacity=1,
                   weight=int(t[day.destination[i], day.origin[j]]) * drive_weight)
    flow = nx.min_cost_flow(g)
    served = [k for k in range(day.n) if flow[("in", k)][("out", k)]]
    vehicles = sum(flow[("pool", p)].get(("in", k), 0)
                   for p, (_, jobs) in enumerate(_pools(day)) for k in jobs)
    cost = nx.cost_of_flow(g, flow)
    driving = (cost + sum(priority_units(day.jobs[k]) * priority_weight + job_weight
                          for k in served) - vehicles * vehicle_weight)
    return (sum(priority_units(day.jobs[k]) for k in served), len(served), vehicles, driving)


def _answer(plan):
    sf = plan.shortfall
    served = plan.day.n - len(sf.unserved)
    return (sf.served_priority, served, plan.vehicles, plan.deadhead_seconds)


@pytest.mark.parametrize("seed", range(120))
def test_most_priority_equals_networkx_min_cost_flow(seed):
    rng = np.random.default_rng(seed)
    settings = Settings(turnaround=int(rng.integers(0, 10)) * 60,
                        depot="S0" if seed % 3 == 0 else None)
    day = random_day(int(rng.integers(1, 40)), int(rng.integers(1, 6)), seed=seed,
                     classes=int(rng.integers(1, 3)), settings=settings)
    if seed % 2:
        day = with_priorities(day, rng)
    day = _limited(day, rng, per_class=seed % 4 >= 2)
    plan = solve_day(day)
    assert plan.verified, plan.verification_failures
    assert _answer(plan) == _networkx_reference(day)
    sf = plan.shortfall
    assert sf.served_upper_bound == sf.served_priority  # exact without a working-day limit
    assert plan_deadhead(day, plan.routes)[0] == plan.deadhead_seconds


def _width(follows: np.ndarray, jobs) -> int:
    """Largest set of pairwise incompatible jobs among ``jobs``: networkx lists every
    antichain of the order (brute force)."""
    dag = nx.DiGraph()
    dag.add_nodes_from(jobs)
    dag.add_edges_from((i, j) for i in jobs for j in jobs if follows[i, j])
    return max((len(a) for a in nx.antichains(dag)), default=0)


@pytest.mark.parametrize("seed", range(40))
def test_most_priority_equals_brute_force_over_job_sets(seed):
    # Every set of jobs that the pools' vehicles can run (Dilworth: a set needs as
    # many vehicles as its largest antichain, class by class), the best by priority.
    rng = np.random.default_rng(500 + seed)
    day = random_day(int(rng.integers(1, 11)), int(rng.integers(1, 4)), seed=seed,
                     classes=1 + seed % 2)
    day = _limited(with_priorities(day, rng), rng, per_class=seed % 4 >= 2)
    follows = can_follow_matrix(day).toarray()
    classes = [[k for k in range(day.n) if day.vclass[k] == c]
               for c in range(len(day.class_names))]
    best = 0
    for mask in range(1 << day.n):
        chosen = {k for k in range(day.n) if mask >> k & 1}
        fits = all(sum(_width(follows, [k for k in jobs_c if k in chosen and k in pool])
                       for jobs_c in classes) <= vehicles
                   for vehicles, pool in _pools(day))
        if fits:
            best = max(best, sum(priority_units(day.jobs[k]) for k in chosen))
    plan = solve_day(day)
    assert plan.verified, plan.verification_failures
    assert plan.shortfall.served_priority == plan.shortfall.served_upper_bound == best


@pytest.mark.parametrize("seed", range(40))
def test_greene_kleitman_groups_prove_the_served_count(seed):
    # Equal priorities: the proof is a partition of the jobs into groups no two of
    # whose jobs can share a vehicle, and the sum over groups of min(K, group size)
    # equals the most jobs K vehicles can serve (Greene & Kleitman 1976; Greene 1976).
    rng = np.random.default_rng(900 + seed)
    day = random_day(int(rng.integers(2, 60)), int(rng.integers(1, 6)), seed=seed)
    day = _limited(day, rng, per_class=False)
    plan = solve_day(day)
    k = day.settings.vehicles
    proof = plan.shortfall.proof
    levels = service_levels(day, proof)
    conceded = [j for j in range(day.n) if proof.conceded[j]]
    groups = [level.jobs for level in levels] + [(j,) for j in conceded]
    assert sorted(j for group in groups for j in group) == list(range(day.n))  # a partition
    assert all(level.thickness == 1000 for level in levels)  # one priority unit each
    follows = can_follow_matrix(day).toarray()
    for group in groups:
        assert not any(follows[a, b] for a in group for b in group)
    served = day.n - len(plan.shortfall.unserved)
    assert sum(min(k, len(group)) for group in groups) == served
    assert plan.shortfall.served_priority == 1000 * served


@pytest.mark.parametrize("seed", range(20))
def test_enough_vehicles_changes_nothing(seed):
    rng = np.random.default_rng(seed)
    day = random_day(int(rng.integers(1, 50)), 4, seed=seed, classes=1 + seed % 2)
    plain = solve_day(day)
    roomy = rebuild(day, settings=dataclasses.replace(
        day.settings, vehicles=plain.vehicles + int(rng.integers(0, 3))))
    plan = solve_day(roomy)
    assert plan.verified and plan.routes == plain.routes
    assert plan.shortfall.unserved == () and plan.shortfall.needed_for_all == plain.vehicles
    assert plan.deadhead_seconds == plain.deadhead_seconds


def test_checker_rejects_tampered_answers():
    day = _limited(random_day(40, 4, seed=3), np.random.default_rng(1), per_class=False)
    plan = solve_day(day)
    sf = plan.shortfall
    assert sf.unserved and check_shortfall(day, plan.routes, plan.certificate, sf) == []

    def spoiled(**changes):
        return check_shortfall(day, plan.routes, plan.certificate,
                               dataclasses.replace(sf, **changes))
    assert spoiled(unserved=sf.unserved[1:])  # a job silently dropped
    assert spoiled(served_upper_bound=sf.served_upper_bound + 1000)  # bound overstated
    assert spoiled(served_priority=sf.served_priority + 1000)
    low = np.array(sf.proof.low)
    low[sf.unserved[0]] += 1
    assert spoiled(proof=dataclasses.replace(sf.proof, low=low))  # a span too short
    extra = list(plan.routes) + [(sf.unserved[0],)]
    assert check_shortfall(day, extra, plan.certificate,
                           dataclasses.replace(sf, unserved=sf.unserved[1:]))  # one too many


def test_unknown_class_and_bad_counts_are_input_errors():
    jobs = [Job("A", "X", "X", 0, 3600, "van"), Job("B", "X", "X", 0, 3600, "van")]
    with pytest.raises(InputError, match="class 'truck'"):
        build_day(jobs, [], {}, settings=Settings(class_vehicles=(("truck", 1),)))
    with pytest.raises(InputError, match="1 or more"):
        build_day(jobs, [], {}, settings=Settings(vehicles=0))


def test_overlapping_jobs_keep_the_higher_priorities():
    # Three jobs at the same time, one vehicle: the one of priority 5 is served.
    jobs = [Job(f"J{k}", "X", "X", 0, 3600, priority=p) for k, p in enumerate((2, 5, 1))]
    day = build_day(jobs, [], {}, settings=Settings(vehicles=1))
    plan = solve_day(day)
    assert plan.route_ids() == [["J1"]]
    assert sorted(day.jobs[k].id for k in plan.shortfall.unserved) == ["J0", "J2"]
    assert plan.shortfall.served_priority == plan.shortfall.served_upper_bound == 5000



def test_cancel_reaches_inside_the_vehicle_limit_stages():
    from shipgui.core.fleet.solve import Cancelled
    from tests.support.days import regional_day
    day = regional_day(300, 20, seed=2)
    day = rebuild(day, settings=dataclasses.replace(day.settings, vehicles=10))
    calls = []

    def cancelled():
        calls.append(1)
        return len(calls) >= 4  # relation, matching, then inside the flow stages

    with pytest.raises(Cancelled):
        solve_day(day, cancelled=cancelled)
    assert len(calls) == 4
