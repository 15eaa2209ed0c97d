"""The summary's "what more vehicles would save" table: the fleet / empty-driving
trade-off of a least-empty-driving plan, printed only when the plan carries one."""

from __future__ import annotations

import dataclasses
import math

import pytest

from shipgui.core import solve_day
from shipgui.core.clock import format_duration
from shipgui.core.demo import load_demo
from shipgui.core.fleet.deadhead import TRADEOFF_SHOWN as EXTRA_VEHICLES_SHOWN
from shipgui.core.model import Job
from shipgui.report import build_pdf_bytes
from tests.support.pdf import HOUR, make_day, page_texts, small_day, two_site_travel

HEADING = "What more vehicles would save"
EXACT = "Exactly this many out"


def _flat(text: str) -> str:
    return " ".join(text.split())


def _summary_text(plan) -> str:
    """The first page, whitespace collapsed (table cells come out one per line)."""
    return _flat(page_texts(build_pdf_bytes(plan))[0])


def _row(k: int, fewest: int, deadhead: int, least: int) -> str:
    """A printed row: vehicles, least empty driving, saving in printed minutes."""
    if k == fewest:
        return f"{k} (this plan) {format_duration(deadhead)} \u2014"
    saving = math.ceil(least / 60) - math.ceil(deadhead / 60)
    return f"{k} {format_duration(deadhead)} {format_duration(saving * 60)}"


def test_demo_section_shows_the_tradeoff(demo_plan, demo_pages):
    plan = demo_plan
    assert plan.least_deadhead
    assert plan.tradeoff[0] == (plan.vehicles, plan.deadhead_seconds)
    assert plan.tradeoff == plan.tradeoff_exact  # the demo: exactly k never costs more
    text = _flat(demo_pages[0])
    assert HEADING in text
    assert (f"Total empty driving {format_duration(plan.deadhead_seconds)} "
            f"the least possible with {plan.vehicles} vehicles") in text
    assert f"\u201cAt most {plan.vehicles + 1}\u201d means the best plan" in text
    assert f"Saving vs {plan.vehicles} vehicles" in text
    fewest, least = plan.tradeoff[0]
    shown = [(k, d) for k, d in plan.tradeoff if k <= fewest + EXTRA_VEHICLES_SHOWN]
    assert [k for k, _ in shown] == list(range(fewest, fewest + EXTRA_VEHICLES_SHOWN + 1))
    for k, deadhead in shown:
        assert _row(k, fewest, deadhead, least) in text, k
    # The printed saving is the difference of the printed figures, within a minute
    # of the true saving, and it grows with the fleet.
    savings = [math.ceil(least / 60) - math.ceil(d / 60) for _, d in shown]
    assert savings == sorted(savings) and savings[1] > 0
    assert all(abs(s * 60 - (least - d)) < 60 for s, (_, d) in zip(savings, shown))
    assert EXACT not in text
    assert "single job" not in text
    # The section sits after the facts and warnings, before the timeline, on page 1.
    assert text.index("Warnings") < text.index(HEADING) < text.index("Timeline of all vehicles")


def test_demo_numbers_as_the_command_line_prints_them(demo_plan, demo_pages):
    text = _flat(demo_pages[0])
    assert "28 (this plan) 41 h 34 min \u2014" in text
    assert "29 40 h 55 min 39 min" in text
    assert "33 39 h 45 min 1 h 49 min" in text


def test_no_section_without_least_deadhead():
    plan = solve_day(load_demo(), least_deadhead=False)
    assert plan.tradeoff == () and plan.tradeoff_exact == ()
    text = _summary_text(plan)
    assert "Total empty driving" in text
    for absent in (HEADING, "least possible", "At most", EXACT, "Saving vs"):
        assert absent not in text


def test_no_table_when_the_solve_priced_no_extra_vehicles():
    plan = solve_day(load_demo(), tradeoff=0)
    assert plan.least_deadhead and plan.tradeoff == ()
    text = _summary_text(plan)
    assert f"the least possible with {plan.vehicles} vehicles" in text
    assert HEADING not in text and "Saving vs" not in text


def test_exact_column_when_extra_vehicles_cost_more():
    """The small day has a depot: each extra vehicle out also drives out and back."""
    plan = solve_day(small_day())
    assert plan.tradeoff == ((3, 8100), (4, 8100), (5, 8100))
    assert plan.tradeoff_exact == ((3, 8100), (4, 10500), (5, 13500))
    text = _summary_text(plan)
    assert ("Vehicles (at most) Least empty driving Saving vs 3 vehicles "
            f"{EXACT}") in text
    assert "3 (this plan) 2 h 15 min \u2014 2 h 15 min" in text
    assert "4 2 h 15 min 0 min 2 h 55 min" in text
    assert "5 2 h 15 min 0 min 3 h 45 min" in text
    assert (f"\u201c{EXACT}\u201d is the least empty driving when all of them are used; "
            "it can be more than with fewer vehicles, because each vehicle that goes out "
            "also drives from the depot and back.") in text
    # Five jobs: with five vehicles each does one job, so the table stops there.
    assert "More than 5 vehicles would change nothing" in text


def test_exact_column_only_when_it_prints_differently(demo_plan):
    fewest = demo_plan.vehicles
    at_most = dict(demo_plan.tradeoff)
    # Within the same printed minute: no column.
    k = next(k for k, d in demo_plan.tradeoff[1:] if d % 60)
    same_minute = dataclasses.replace(demo_plan, tradeoff_exact=tuple(
        (v, math.ceil(d / 60) * 60 if v == k else d) for v, d in demo_plan.tradeoff))
    assert same_minute.tradeoff_exact != demo_plan.tradeoff
    assert EXACT not in _summary_text(same_minute)
    # A visible difference in one row: the column, with every row filled in.
    raised = dataclasses.replace(demo_plan, tradeoff_exact=tuple(
        (v, d + 600 if v == fewest + 2 else d) for v, d in demo_plan.tradeoff))
    text = _summary_text(raised)
    assert EXACT in text
    least = demo_plan.tradeoff[0][1]
    for v in (fewest + 1, fewest + 2):
        exact = at_most[v] + (600 if v == fewest + 2 else 0)
        assert f"{_row(v, fewest, at_most[v], least)} {format_duration(exact)}" in text
    assert "from the depot and back" in text  # the demo has a depot: the reason is given


def test_only_five_extra_vehicles_are_shown(demo_plan):
    fewest, least = demo_plan.tradeoff[0]
    longer = tuple((fewest + t, least - 100 * t) for t in range(9))
    plan = dataclasses.replace(demo_plan, tradeoff=longer, tradeoff_exact=longer)
    text = _summary_text(plan)
    assert f"{fewest + EXTRA_VEHICLES_SHOWN} {format_duration(longer[5][1])}" in text
    assert f"{fewest + EXTRA_VEHICLES_SHOWN + 1} {format_duration(longer[6][1])}" not in text


def test_one_vehicle_wording():
    jobs = [Job("A1", "A", "B", 8 * HOUR, 9 * HOUR), Job("A2", "B", "A", 10 * HOUR, 11 * HOUR)]
    plan = solve_day(make_day(jobs, travel=two_site_travel()))
    assert plan.vehicles == 1
    text = _summary_text(plan)
    assert "1 vehicle covers all 2 jobs." in text
    assert "the least possible with 1 vehicle " in text
    assert "Saving vs 1 vehicle " in text
    assert "1 (this plan)" in text
    assert EXACT not in text  # no depot: an extra vehicle never drives more
    # Were it to differ anyway, the note would not give the depot as the reason.
    odd = dataclasses.replace(plan, tradeoff_exact=((1, 0), (2, 3600)))
    text = _summary_text(odd)
    assert f"\u201c{EXACT}\u201d is the least empty driving when all of them are used; it " \
           "can be more than with fewer vehicles." in text
    assert "from the depot and back" not in text


@pytest.mark.parametrize("least_deadhead", [True, False])
def test_same_bytes_every_time(least_deadhead):
    first = build_pdf_bytes(solve_day(small_day(), least_deadhead=least_deadhead))
    again = build_pdf_bytes(solve_day(small_day(), least_deadhead=least_deadhead))
    assert first == again
