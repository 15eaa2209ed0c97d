"""The working-day limit: plans, bounds and their independent check.

Outside references: brute force over subsets and scipy's milp (HiGHS) on the
full list of valid routes (tests/support/workday_reference.py); Dilworth's
theorem (Dilworth, "A decomposition theorem for partially ordered sets",
Annals of Mathematics 51(1), 1950) when the limit is the whole day; interval
partitioning (Kleinberg & Tardos, Algorithm Design, 2005, section 4.1) for
jobs without travel.
"""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from shipgui.core import InputError, Job, Settings, build_day, solve_day
from shipgui.core.demo import load_demo
from shipgui.core.model import Day
from shipgui.core.workday.problem import working_days
from shipgui.core.workday.verify import check_workday_plan
from tests.support.days import depot_day, random_day
from tests.support.workday_reference import minimum_by_milp, minimum_by_subsets, valid_routes


def with_limit(day: Day, minutes: int) -> Day:
    settings = dataclasses.replace(day.settings, max_day=minutes * 60)
    return Day(day.jobs, day.site_ids, day.sites, day.travel, settings)


def _small_days(count: int, n_max: int):
    """Small invented days, half with a depot, with limits from tight to loose."""
    rng = np.random.default_rng(20261202)
    for seed in range(count):
        n = int(rng.integers(3, n_max + 1))
        if seed % 2:
            day = depot_day(n, 5, seed=seed, span_h=(6, 14))
        else:
            day = random_day(n, 4, seed=seed, horizon_min=480)
        leave_back = working_days(day, [[k] for k in range(n)])
        lowest = max(leave_back) // 60 + 1
        yield seed, with_limit(day, int(rng.integers(lowest, lowest + 600)))


def _check(plan) -> None:
    day = plan.day
    limit = day.settings.max_day
    assert plan.verified, plan.verification_failures
    assert sorted(k for r in plan.routes for k in r) == list(range(day.n))
    assert max(working_days(day, plan.routes)) <= limit
    assert plan.lower_bound <= plan.vehicles


@pytest.mark.parametrize("seed, day", list(_small_days(60, 12)))
def test_small_days_are_solved_to_the_minimum_by_brute_force(seed, day):
    plan = solve_day(day, time_limit=30)
    _check(plan)
    assert plan.vehicles == minimum_by_subsets(day, day.settings.max_day)
    assert plan.workday.status == "proven"


@pytest.mark.parametrize("seed, day", list(_small_days(12, 15))[::2])
def test_days_up_to_15_jobs_agree_with_milp_on_all_routes(seed, day):
    plan = solve_day(day, time_limit=30)
    _check(plan)
    assert plan.vehicles == minimum_by_milp(day, day.settings.max_day)


def test_small_days_are_mostly_proven_by_the_printed_certificate():
    # The certificate's forms (pairwise set, LP weights) reach the minimum unless
    # the LP bound rounded up is below it; on these days that should be rare.
    proven = total = 0
    for _seed, day in _small_days(60, 12):
        plan = solve_day(day, time_limit=30)
        total += 1
        proven += plan.proven_minimum
    assert proven >= 0.9 * total


def test_a_limit_of_the_whole_day_gives_the_plain_minimum():
    day = random_day(80, 6, seed=3, horizon_min=600)
    plain = solve_day(day)
    limited = solve_day(with_limit(day, 24 * 60))
    _check(limited)
    assert limited.vehicles == plain.vehicles == limited.lower_bound
    assert limited.proven_minimum


def test_intervals_without_travel_need_the_maximum_overlap():
    # Interval partitioning: as many vehicles as jobs overlap at the busiest time
    # (Kleinberg & Tardos 2005, section 4.1); a limit of the whole day changes nothing.
    rng = np.random.default_rng(7)
    jobs, events = [], []
    for k in range(40):
        start = int(rng.integers(0, 600)) * 60
        end = start + int(rng.integers(10, 180)) * 60
        jobs.append(Job(f"J{k}", "A", "A", start, end))
        events += [(start, 1), (end, -1)]
    overlap = depth = 0
    for _t, step in sorted(events):  # an end before a start at the same time
        depth += step
        overlap = max(overlap, depth)
    day = build_day(jobs, [], {}, settings=Settings(max_day=24 * 3600))
    plan = solve_day(day)
    assert plan.vehicles == plan.lower_bound == overlap


def test_demo_day_matches_the_calibration_figures():
    # ../shared calibration: proven 39 at 11:00, 45 at 10:00, 49 at 9:00, 28
    # without a binding limit; at 12:00 the minimum is 32 or 33.
    demo = load_demo()
    for hours, vehicles in ((11, 39), (10, 45), (9, 49), (24, 28)):
        plan = solve_day(with_limit(demo, hours * 60), time_limit=60)
        _check(plan)
        assert (plan.vehicles, plan.lower_bound) == (vehicles, vehicles), hours
    plan = solve_day(with_limit(demo, 12 * 60), time_limit=60)
    _check(plan)
    assert plan.vehicles <= 33 and plan.lower_bound >= 32


@pytest.mark.parametrize("seed", [23, 26, 31])
def test_weights_prove_more_than_any_pairwise_set_found(seed):
    # Invented days where the pairwise set found is one short: the LP weights
    # (no route carrying above 1) prove the minimum, and the checker, with its own
    # heaviest-route search, accepts them; a weight raised breaks the proof.
    day = with_limit(depot_day(20, 5, seed=seed, span_h=(5, 13)), 360)
    plan = solve_day(day, time_limit=20)
    _check(plan)
    assert plan.certificate_weights and plan.proven_minimum
    weights = dict(plan.certificate_weights)
    assert sum(weights.values()) > len(plan.certificate)
    assert check_workday_plan(day, plan.routes, plan.certificate, weights, plan.lower_bound,
                              day.settings.max_day) == []
    heavier = {k: w * 1.5 for k, w in weights.items()}
    assert any("carries more than 1" in f for f in check_workday_plan(
        day, plan.routes, plan.certificate, heavier, plan.lower_bound, day.settings.max_day))


# ------------------------------------------------------------- the checker

def _demo_plan(hours: int = 11):
    day = with_limit(load_demo(), hours * 60)
    return day, solve_day(day, time_limit=60)


def test_checker_refuses_a_route_over_the_limit():
    day, plan = _demo_plan()
    merged = [plan.routes[0] + plan.routes[-1]] + list(plan.routes[1:-1])
    merged[0] = tuple(sorted(merged[0], key=lambda k: day.jobs[k].start))
    failures = check_workday_plan(day, merged, [], None, 0, day.settings.max_day)
    assert any("longer than the limit" in f or "cannot follow" in f for f in failures)
    # and a route of jobs that do follow each other but span too long a day:
    order = sorted(range(day.n), key=lambda k: day.jobs[k].start)
    early, late = order[0], order[-1]
    leave_back = working_days(day, [[early, late]])[0]
    assert leave_back > day.settings.max_day
    failures = check_workday_plan(day, [(early, late)], [], None, 0, day.settings.max_day)
    assert any("longer than the limit" in f for f in failures)


def test_checker_refuses_a_certificate_pair_that_fits_one_working_day():
    day, plan = _demo_plan()
    route = next(r for r in plan.routes if len(r) >= 2)
    certificate = list(plan.certificate) + [route[0], route[1]]
    failures = check_workday_plan(day, plan.routes, certificate, None, 0,
                                  day.settings.max_day)
    assert any("fit one working day" in f for f in failures)


def test_checker_refuses_weights_that_a_route_carries_above_1():
    day, plan = _demo_plan()
    route = next(r for r in plan.routes if len(r) >= 3)
    weights = {k: 0.4 for k in route}  # this valid route carries 1.2
    failures = check_workday_plan(day, plan.routes, [], weights, 0, day.settings.max_day)
    assert any("carries more than 1" in f for f in failures)
    assert check_workday_plan(day, plan.routes, [], {k: 1 / len(route) for k in route}, 1,
                              day.settings.max_day) == []


def test_checker_refuses_a_bound_the_certificate_does_not_prove():
    day, plan = _demo_plan()
    failures = check_workday_plan(day, plan.routes, plan.certificate[:-1], None,
                                  plan.lower_bound, day.settings.max_day)
    assert any("does not follow from the certificate" in f for f in failures)


# ------------------------------------------------------------- input and stops

def test_a_job_longer_than_the_limit_is_an_input_error_naming_it():
    hour = 3600
    jobs = [Job("J1", "A", "A", 8 * hour, 9 * hour, row=2),
            Job("J2", "A", "A", 8 * hour, 20 * hour, row=3)]
    with pytest.raises(InputError) as info:
        build_day(jobs, [], {}, settings=Settings(max_day=10 * hour))
    problem = info.value.problems[0]
    assert (problem.row, problem.column) == (3, "end")
    assert problem.job == "J2" and "120 min over" in problem.message


def test_the_search_stops_at_the_time_limit_and_keeps_its_plan():
    day = with_limit(depot_day(1000, 40, seed=1), 10 * 60)
    plan = solve_day(day, time_limit=0.2)
    _check(plan)
    assert plan.workday.status in ("time limit", "proven")
    assert plan.proven_minimum == (plan.lower_bound == plan.vehicles)


def test_cancel_keeps_the_best_plan():
    day = with_limit(depot_day(300, 30, seed=4), 10 * 60)
    plan = solve_day(day, cancelled=lambda: True)
    _check(plan)
    assert plan.workday.status in ("stopped", "proven")


def test_every_valid_route_of_a_plan_is_in_the_reference_list():
    day = with_limit(depot_day(10, 4, seed=5, span_h=(6, 12)), 8 * 60)
    plan = solve_day(day, time_limit=10)
    routes = set(valid_routes(day, day.settings.max_day))
    assert all(tuple(r) in routes for r in plan.routes)


# ------------------------------------------------------------- properties

from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402


@settings(max_examples=60, deadline=None)
@given(seed=st.integers(0, 10_000), n=st.integers(1, 18), depot=st.booleans(),
       slack=st.integers(0, 600))
def test_every_plan_is_valid_and_its_bound_sits_between_the_plain_minimum_and_the_plan(
        seed, n, depot, slack):
    base = depot_day(n, 5, seed=seed, span_h=(6, 14)) if depot else \
        random_day(n, 4, seed=seed, horizon_min=480)
    own = max(working_days(base, [[k] for k in range(base.n)])) // 60 + 1
    day = with_limit(base, own + slack)
    plan = solve_day(day, time_limit=20)
    _check(plan)
    plain = solve_day(base)
    assert plain.vehicles <= plan.lower_bound <= plan.vehicles
    assert plan.workday.unlimited_vehicles == plain.vehicles


@pytest.mark.parametrize("seed, limit_min", [(1, 360), (54, 420), (97, 351), (123, 420),
                                             (128, 420)])
def test_branch_and_price_alone_reaches_the_milp_minimum(seed, limit_min):
    # Days whose LP is fractional (x.5 vehicles): branching on consecutive jobs,
    # from the best-fit plan only (no diving, no integer plan over routes), must
    # end with the minimum of scipy's milp over all valid routes and close.
    import time

    from shipgui.core.workday.branch import branch_and_price
    from shipgui.core.workday.greedy import greedy_routes
    from shipgui.core.workday.master import Master
    from shipgui.core.workday.problem import workday_classes
    day = with_limit(depot_day(24, 5, seed=seed, span_h=(5, 13)), limit_min)
    problem = workday_classes(day, limit_min * 60)[0]
    master = Master(problem.m)
    master.add([np.array([j]) for j in range(problem.m)])
    start = greedy_routes(problem, day.travel)
    master.add(start)
    deadline = time.monotonic() + 60
    outcome = branch_and_price(problem, master, len(start),
                               time_up=lambda: time.monotonic() > deadline)
    best = outcome.plan if outcome.plan is not None else start
    assert outcome.closed
    assert len(best) == minimum_by_milp(day, limit_min * 60)
    covered = sorted(int(k) for r in best for k in r)
    assert covered == list(range(problem.m))


@pytest.mark.parametrize("seed", range(8))
def test_vehicle_classes_are_planned_apart_and_add_up(seed):
    base = depot_day(11, 5, seed=seed, span_h=(6, 13), classes=2)
    own = max(working_days(base, [[k] for k in range(base.n)])) // 60 + 1
    day = with_limit(base, own + 60)
    plan = solve_day(day, time_limit=20)
    _check(plan)
    assert plan.vehicles == minimum_by_subsets(day, day.settings.max_day)
    for route in plan.routes:
        assert len({day.jobs[k].vehicle_class for k in route}) == 1


# ------------------------------------------------- fewer vehicles than needed

def _most_priority_by_brute_force(day, vehicles: int) -> int:
    """Most priority (thousandths) of a job set that ``vehicles`` valid routes cover:
    every subset, its fewest routes by the subset dynamic programme."""
    import itertools

    from shipgui.core.model import priority_units
    from tests.support.workday_reference import minimum_by_subsets
    best = 0
    n = day.n
    for size in range(n, -1, -1):
        for subset in itertools.combinations(range(n), size):
            worth = sum(priority_units(day.jobs[k]) for k in subset)
            if worth <= best:
                continue
            part = Day(tuple(day.jobs[k] for k in subset), day.site_ids, day.sites,
                       day.travel, day.settings) if subset else None
            if part is None or minimum_by_subsets(part, day.settings.max_day) <= vehicles:
                best = worth
    return best


@pytest.mark.parametrize("seed", range(10))
def test_fewer_vehicles_within_the_limit_serve_the_most_priority(seed):
    rng = np.random.default_rng(seed)
    base = depot_day(9, 4, seed=seed, span_h=(6, 13))
    jobs = tuple(dataclasses.replace(j, priority=float(rng.integers(1, 4))) for j in base.jobs)
    own = max(working_days(base, [[k] for k in range(base.n)])) // 60 + 1
    full = with_limit(Day(jobs, base.site_ids, base.sites, base.travel, base.settings), own + 60)
    need = solve_day(full, time_limit=20).vehicles
    if need < 2:
        pytest.skip("one vehicle does the whole day")
    settings = dataclasses.replace(full.settings, vehicles=need - 1)
    day = Day(jobs, full.site_ids, full.sites, full.travel, settings)
    plan = solve_day(day, time_limit=20)
    assert plan.verified, plan.verification_failures
    sf = plan.shortfall
    best = _most_priority_by_brute_force(day, need - 1)
    assert sf.served_priority <= best <= sf.served_upper_bound
    assert sf.served_priority == best  # small days: the plan found is the best
    assert plan.vehicles <= need - 1
    assert sorted([k for r in plan.routes for k in r] + list(sf.unserved)) == list(range(9))


def test_the_service_proof_is_checked_independently():
    from shipgui.core.workday.verify import check_workday_shortfall
    demo = load_demo()
    day = Day(demo.jobs, demo.site_ids, demo.sites, demo.travel,
              dataclasses.replace(demo.settings, max_day=11 * 3600, vehicles=36))
    plan = solve_day(day, time_limit=30)
    sf = plan.shortfall
    assert plan.verified and sf.unserved and sf.served_priority <= sf.served_upper_bound
    limit = day.settings.max_day
    ok = check_workday_shortfall(day, plan.routes, plan.certificate, sf, limit)
    assert ok == []
    heavier = dataclasses.replace(sf, weights=sf.weights * 1.3)
    assert any("carries" in f for f in check_workday_shortfall(
        day, plan.routes, plan.certificate, heavier, limit))
    lower = dataclasses.replace(sf, served_upper_bound=sf.served_upper_bound - 1000)
    assert any("not the stated bound" in f or "more priority" in f for f in
               check_workday_shortfall(day, plan.routes, plan.certificate, lower, limit))
    too_many = list(plan.routes) + [(sf.unserved[0],)]
    fixed = dataclasses.replace(sf, unserved=sf.unserved[1:])
    assert any("vehicles available" in f for f in check_workday_shortfall(
        day, too_many, plan.certificate, fixed, limit))
