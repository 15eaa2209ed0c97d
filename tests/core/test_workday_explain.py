"""Why two jobs do not fit one working day, and how weights are printed.

Checked against the contract's formulas (sections 1 and 5) written out by hand
in each test, and the whole-set array function against brute force over pairs.
"""

from __future__ import annotations

import dataclasses
import itertools
from fractions import Fraction

import numpy as np
import pytest

from shipgui.core import Job, Settings, Site, build_day, solve_day
from shipgui.core.model import Day, WorkdayInfo
from shipgui.core.workday.explain import (
    a_working_day,
    closest_fits,
    explain_fit,
    fit_label,
    fit_reason,
    format_limit,
    limit_cost_text,
    pair_kind_counts,
    proof_statement,
    weight_text,
    weights_total_text,
)
from tests.support.days import depot_day, random_day

MIN, HOUR = 60, 3600


def _depot_day(jobs, limit_h=11, turnaround=10 * MIN):
    """Depot D; 30 min from D to A and back, 20 min between A and B (invented)."""
    sites = [Site("D", "Lowfield yard"), Site("A", "Quarry gate"), Site("B", "Millbank site")]
    travel = {("D", "A"): (30 * MIN, 0), ("A", "D"): (30 * MIN, 0),
              ("D", "B"): (40 * MIN, 0), ("B", "D"): (40 * MIN, 0),
              ("A", "B"): (20 * MIN, 0), ("B", "A"): (20 * MIN, 0)}
    settings = Settings(turnaround=turnaround, depot="D", max_day=limit_h * HOUR)
    return build_day(jobs, sites, travel, settings=settings)


def test_a_pair_that_can_follow_but_makes_too_long_a_day():
    # J1 06:00-08:00 at A; J2 17:00-18:10 A -> B.  J2 can follow J1 (by hand: 08:00 +
    # 10 min turnaround, same site, 08:10 <= 17:00).  One vehicle doing both leaves D
    # at 05:30 (30 min before 06:00) and is back at 18:50 (B -> D 40 min): 13 h 20 min.
    day = _depot_day([Job("J1", "A", "A", 6 * HOUR, 8 * HOUR),
                      Job("J2", "A", "B", 17 * HOUR, 18 * HOUR + 10 * MIN)])
    reason = fit_reason(day, 1, 0, day.settings.max_day)  # either order of the arguments
    assert (reason.follow.first, reason.follow.second, reason.kind) == (0, 1, "too long")
    assert reason.day_minutes == 13 * 60 + 20
    assert fit_label(reason) == "together a 13 h 20 min day, limit 11 h"
    text = explain_fit(day, 0, 1, day.settings.max_day)
    assert "J2 can follow J1 (8 h 50 min to spare)" in text
    assert "would leave Lowfield yard at 05:30 and be back at 18:50" in text
    assert "a 13 h 20 min working day, longer than the 11 h limit" in text
    # With a 14 h limit they fit one working day (said only for a failed check).
    assert fit_reason(day, 0, 1, 14 * HOUR).kind == "fits"


def test_a_pair_that_cannot_follow_is_said_as_without_a_limit():
    # J1 ends 08:00 at B; turnaround 10 min + 20 min to A: there 08:30, J2 starts
    # 08:18 -> 12 min short (the contract's formula by hand).
    day = _depot_day([Job("J1", "A", "B", 7 * HOUR, 8 * HOUR),
                      Job("J2", "A", "A", 8 * HOUR + 18 * MIN, 9 * HOUR)])
    reason = fit_reason(day, 0, 1, day.settings.max_day)
    assert reason.kind == "short"
    assert fit_label(reason) == "cannot follow: 12 min short"
    assert "12 min after J2 starts (08:18)" in explain_fit(day, 0, 1, day.settings.max_day)


def test_a_day_seconds_over_the_limit_never_reads_as_within_it():
    # Leaves 05:30:00, back 16:30:30 with an 11 h limit: 11 h 00 min 30 s.
    day = _depot_day([Job("J1", "A", "A", 6 * HOUR, 7 * HOUR),
                      Job("J2", "A", "D", 15 * HOUR, 16 * HOUR + 30 * MIN + 30)])
    reason = fit_reason(day, 0, 1, day.settings.max_day)
    assert reason.kind == "too long"
    assert fit_label(reason) == "together an 11 h 01 min day, limit 11 h"


def test_without_a_depot_the_day_runs_from_first_start_to_last_end():
    day = build_day([Job("J1", "A", "A", 6 * HOUR, 8 * HOUR),
                     Job("J2", "A", "A", 16 * HOUR, 18 * HOUR)], [], {},
                    settings=Settings(max_day=10 * HOUR))
    reason = fit_reason(day, 0, 1, 10 * HOUR)
    assert reason.kind == "too long" and reason.day_minutes == 12 * 60
    assert "would start at 06:00 (J1) and finish at 18:00 (J2)" in explain_fit(day, 0, 1,
                                                                                 10 * HOUR)


def _fits_by_contract(day: Day, limit: int, i: int, j: int) -> bool:
    """Contract section 5 written out: j can follow i, and the route i, j is within D."""
    a, b = day.jobs[i], day.jobs[j]
    follows = (i != j and a.vehicle_class == b.vehicle_class and a.end
               + day.settings.turnaround + day.travel_between(a.destination, b.origin)
               <= b.start)
    depot = day.settings.depot
    leave = a.start - (day.travel_between(depot, a.origin) if depot else 0)
    back = b.end + (day.travel_between(b.destination, depot) if depot else 0)
    return follows and back - leave <= limit


@pytest.mark.parametrize("seed", range(6))
def test_reasons_agree_with_the_contract_on_every_pair(seed):
    day = depot_day(14, 5, seed=seed, span_h=(5, 15)) if seed % 2 else \
        random_day(14, 4, seed=seed, classes=2, horizon_min=600)
    limit = 9 * HOUR
    for i, j in itertools.combinations(range(day.n), 2):
        fits = _fits_by_contract(day, limit, i, j) or _fits_by_contract(day, limit, j, i)
        kind = fit_reason(day, i, j, limit).kind
        assert (kind == "fits") == fits, (i, j, kind)
        label = fit_label(fit_reason(day, i, j, limit))
        assert label and ("limit 9 h" in label) == (kind == "too long")


def _miss_by_brute_force(day: Day, limit: int, i: int, j: int) -> float:
    """Seconds late or over the limit (the larger), in the better order; inf across classes."""
    if day.jobs[i].vehicle_class != day.jobs[j].vehicle_class:
        return float("inf")
    best = float("inf")
    for a, b in ((i, j), (j, i)):
        x, y = day.jobs[a], day.jobs[b]
        late = x.end + day.settings.turnaround + day.travel_between(x.destination, y.origin) \
            - y.start
        depot = day.settings.depot
        leave = x.start - (day.travel_between(depot, x.origin) if depot else 0)
        back = y.end + (day.travel_between(y.destination, depot) if depot else 0)
        best = min(best, max(late, back - leave - limit))
    return best


@pytest.mark.parametrize("seed", range(4))
def test_closest_fits_against_brute_force(seed):
    day = random_day(25, 5, seed=seed, classes=2) if seed % 2 else depot_day(25, 6, seed=seed)
    jobs = list(range(0, day.n, 2))
    limit = 8 * HOUR
    partners = closest_fits(day, jobs, limit)
    for p, k in enumerate(jobs):
        misses = [_miss_by_brute_force(day, limit, k, other) if other != k else float("inf")
                  for other in jobs]
        if min(misses) == float("inf"):
            assert partners[p] == -1
        else:
            assert misses[partners[p]] == min(misses)


@pytest.mark.parametrize("weight, text", [
    (1.0, "1"), (0.5, "1/2"), (1 / 3, "1/3"), (2 / 3, "2/3"), (0.25, "1/4"), (5 / 12, "5/12"),
    (0.0, "0"), (0.123456789, "0.1234"), (0.99999, "0.9999"),
])
def test_weights_are_printed_as_simple_fractions_where_exact(weight, text):
    assert weight_text(weight) == text


def test_the_weights_total_is_exact_where_the_weights_are_simple():
    assert weights_total_text([(0, 0.5), (1, 1.0), (2, 0.5)]) == "2"
    assert weights_total_text([(0, 0.5), (1, 1.0), (2, 1 / 3)]) == "11/6 = 1.8333…"
    assert weights_total_text([(0, 0.5)] * 13) == "13/2 = 6.5"
    assert weights_total_text([(0, 0.123456789), (1, 1.0)]) == "1.1234"
    assert Fraction(11, 6) > 1.8333  # the mark says the decimal is cut, never rounded up


def test_limit_words():
    assert format_limit(11 * HOUR) == "11 h" and format_limit(10 * HOUR + 30 * MIN) == \
        "10 h 30 min"
    assert a_working_day(11 * HOUR) == "an 11 h working day"
    assert a_working_day(8 * HOUR) == "an 8 h working day"
    assert a_working_day(12 * HOUR) == "a 12 h working day"


def _plan_with(plan, *, vehicles_extra=0, **info):
    routes = plan.routes + tuple((k,) for k in range(vehicles_extra))
    return dataclasses.replace(plan, routes=routes,
                               workday=dataclasses.replace(plan.workday, **info))


def test_what_the_limit_costs_and_what_is_proven_are_said_honestly():
    day = _depot_day([Job("J1", "A", "A", 6 * HOUR, 8 * HOUR),
                      Job("J2", "A", "B", 17 * HOUR, 18 * HOUR + 10 * MIN)])
    plan = solve_day(day)
    assert (plan.vehicles, plan.lower_bound, plan.workday.unlimited_vehicles) == (2, 2, 1)
    assert limit_cost_text(plan) == "Without the limit: 1 vehicle; the limit costs 1 more"
    assert proof_statement(plan).startswith(
        "No vehicle can do two of these 2 jobs within an 11 h working day")
    assert proof_statement(plan).endswith("This plan uses 2, so it is the minimum.")
    # A plan one vehicle above its bound, the search stopped: both figures, a range.
    stopped = _plan_with(plan, vehicles_extra=1, status="stopped")
    assert stopped.vehicles == 3 and not stopped.proven_minimum
    assert limit_cost_text(stopped) == "Without the limit: 1 vehicle; the limit costs 1 to 2 more"
    assert "This plan uses 3: the minimum is 2 to 3 (the search was stopped)." in \
        proof_statement(stopped)
    by_search = _plan_with(plan, vehicles_extra=1, status="proven", minimum_by_search=True)
    assert "so 3 is the minimum, though this proof reaches 2" in proof_statement(by_search)
    assert limit_cost_text(by_search).endswith("costs 2 more")


def test_weights_statement_uses_the_printed_sum():
    day = depot_day(20, 5, seed=23, span_h=(5, 13))
    day = Day(day.jobs, day.site_ids, day.sites, day.travel,
              dataclasses.replace(day.settings, max_day=6 * HOUR))
    plan = solve_day(day, time_limit=20)
    assert plan.certificate_weights and plan.proven_minimum
    total = sum(w for _, w in plan.certificate_weights)
    text = proof_statement(plan)
    assert weights_total_text(plan.certificate_weights) in text
    assert f"so at least {plan.lower_bound} vehicles are needed" in text
    assert plan.lower_bound == int(np.ceil(total - 1e-6))
    assert isinstance(plan.workday, WorkdayInfo)


@pytest.mark.parametrize("seed", range(4))
def test_pair_kind_counts_agree_with_each_pair_said(seed):
    day = random_day(30, 5, seed=seed, classes=2) if seed % 2 else depot_day(30, 6, seed=seed)
    jobs = list(range(1, day.n, 2))
    limit = 7 * HOUR
    expected = dict.fromkeys(("class", "overlap", "short", "too long", "fits"), 0)
    for i, j in itertools.combinations(jobs, 2):
        expected[fit_reason(day, i, j, limit).kind] += 1
    assert pair_kind_counts(day, jobs, limit) == expected
    assert sum(expected.values()) == len(jobs) * (len(jobs) - 1) // 2
