"""A vehicle's day, worked out by hand: drives, depot times, working day, long waits."""

from __future__ import annotations

import pytest

from shipgui.core import Job, Settings, Site, build_day, solve_day
from shipgui.core.fleet.schedule import LONG_WAIT, class_counts, route_km, vehicle_days

MIN, HOUR = 60, 3600


def _plan(jobs, *, depot="YARD", sites=None, far=False):
    sites = sites or [Site("YARD", x_km=0, y_km=0), Site("A", x_km=10, y_km=0),
                      Site("B", x_km=10, y_km=20)]
    travel = {("YARD", "A"): (20 * MIN, 0), ("A", "YARD"): (20 * MIN, 0),
              ("YARD", "B"): ((70 if far else 40) * MIN, 0),
              ("B", "YARD"): ((70 if far else 40) * MIN, 0),
              ("A", "B"): ((60 if far else 30) * MIN, 0),
              ("B", "A"): ((60 if far else 30) * MIN, 0)}
    settings = Settings(turnaround=10 * MIN, depot=depot)
    return solve_day(build_day(jobs, sites, travel, settings=settings))


def test_one_vehicle_with_a_depot():
    plan = _plan([Job("J1", "A", "B", 8 * HOUR, 9 * HOUR),
                  Job("J2", "A", "A", 13 * HOUR, 14 * HOUR)])
    (v,) = vehicle_days(plan)
    # Leaves at 07:40 (20 min to A), back at 14:20 (20 min from A): 6 h 40 min.
    assert (v.leave, v.back) == (7 * HOUR + 40 * MIN, 14 * HOUR + 20 * MIN)
    assert v.working_day == 6 * HOUR + 40 * MIN
    assert v.deadhead == (20 + 30 + 20) * MIN == plan.route_deadhead_seconds[0]
    assert [(d.kind, d.origin, d.destination, d.start, d.end) for d in v.drives] == [
        ("out", "YARD", "A", 7 * HOUR + 40 * MIN, 8 * HOUR),
        ("between", "B", "A", 12 * HOUR + 30 * MIN, 13 * HOUR),
        ("back", "A", "YARD", 14 * HOUR, 14 * HOUR + 20 * MIN)]
    # Free at 09:10, drives on at 12:30: a wait of 3 h 20 min.  Via the depot:
    # 40 min there (09:50), 20 min to A before 13:00 -> 2 h 50 min at the depot.
    (wait,) = v.waits
    assert (wait.after, wait.start, wait.end) == (0, 9 * HOUR + 10 * MIN, 12 * HOUR + 30 * MIN)
    assert wait.depot_time == 2 * HOUR + 50 * MIN


def test_without_a_depot_the_day_is_first_start_to_last_end():
    plan = _plan([Job("J1", "A", "B", 8 * HOUR, 9 * HOUR),
                  Job("J2", "A", "A", 10 * HOUR, 11 * HOUR)], depot=None)
    (v,) = vehicle_days(plan)
    assert v.leave is None and v.back is None
    assert v.working_day == 3 * HOUR
    assert v.waits == ()  # 09:10 to 09:30 is short
    assert [d.kind for d in v.drives] == ["between"]


def test_a_wait_of_exactly_two_hours_is_not_long():
    plan = _plan([Job("J1", "A", "A", 8 * HOUR, 9 * HOUR),
                  Job("J2", "A", "A", 9 * HOUR + 10 * MIN + LONG_WAIT, 12 * HOUR)])
    assert vehicle_days(plan)[0].waits == ()


def test_no_depot_time_when_the_round_trip_does_not_fit():
    plan = _plan([Job("J1", "B", "B", 8 * HOUR, 9 * HOUR),
                  Job("J2", "B", "B", 11 * HOUR + 40 * MIN, 12 * HOUR)])
    # Free 09:10, 40 min to the depot and 40 min back before 11:40: 70 min there.
    (wait,) = vehicle_days(plan)[0].waits
    assert wait.depot_time == 70 * MIN
    plan = _plan([Job("J1", "B", "B", 8 * HOUR, 9 * HOUR),
                  Job("J2", "B", "B", 11 * HOUR + 20 * MIN, 12 * HOUR)], far=True)
    # With 70 min each way the 2 h 10 min wait cannot hold a round trip of 2 h 20 min.
    (wait,) = vehicle_days(plan)[0].waits
    assert wait.depot_time is None


def test_route_km_from_coordinates_times_circuity():
    plan = _plan([Job("J1", "A", "B", 8 * HOUR, 9 * HOUR)])
    # YARD -> A 10 km, A -> B 20 km, B -> YARD sqrt(10^2 + 20^2) km; times 1.2.
    expected = (10 + 20 + (10 ** 2 + 20 ** 2) ** 0.5) * 1.2
    assert route_km(plan, 1) == pytest.approx(expected)
    no_coords = _plan([Job("J1", "A", "B", 8 * HOUR, 9 * HOUR)],
                      sites=[Site("YARD"), Site("A", x_km=0, y_km=0), Site("B", x_km=1, y_km=1)])
    assert route_km(no_coords, 1) is None


def test_class_counts():
    plan = _plan([Job("J1", "A", "A", 8 * HOUR, 9 * HOUR, vehicle_class="reefer"),
                  Job("J2", "A", "A", 8 * HOUR, 9 * HOUR, vehicle_class="reefer"),
                  Job("J3", "A", "A", 8 * HOUR, 9 * HOUR, vehicle_class="rigid")])
    assert class_counts(plan) == [("reefer", 2), ("rigid", 1)]
