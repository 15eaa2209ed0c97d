"""The answer bar: least empty driving for the fleet, what more vehicles would save."""

from __future__ import annotations

import dataclasses
import math
from functools import partial

from PySide6.QtWidgets import QApplication

from shipgui.core import solve_day
from shipgui.core.clock import format_duration
from shipgui.gui.panels.answer_bar import saving_text, tradeoff_cells, tradeoff_html
from shipgui.gui.services import worker
from tests.support.documents import small_document
from tests.support.gui import load_and_wait


def _minutes(seconds: int) -> int:
    return math.ceil(seconds / 60)  # as the bar shows a duration


def test_demo_day_says_least_empty_driving_and_what_one_more_vehicle_saves(demo_window):
    bar, plan = demo_window.answer, demo_window.plan
    assert plan.least_deadhead and len(plan.tradeoff) >= 2
    (vehicles, least), (more, fewer) = plan.tradeoff[:2]
    assert (vehicles, least) == (plan.vehicles, plan.deadhead_seconds) and more == vehicles + 1
    assert fewer < least  # the demo day does gain from one more vehicle
    assert bar.deadhead.caption.text() == (
        f"empty driving, least possible with {plan.vehicles} vehicles")
    assert not bar.saving.isHidden()
    saved = format_duration((_minutes(least) - _minutes(fewer)) * 60)
    assert f"1 more vehicle: −{saved} empty driving" in bar.saving.text()
    # The list (tooltip and popup): minimum .. minimum + 5, as in plan.tradeoff.
    rows = tradeoff_cells(plan)
    assert [r[0] for r in rows] == [k for k, _ in plan.tradeoff[:6]]
    assert rows[0][0] == plan.vehicles and len(rows) == min(6, len(plan.tradeoff))
    for (_k, seconds), row in zip(plan.tradeoff, rows):
        assert row[1] == format_duration(seconds)
        assert row[2] == ("" if seconds == least
                          else "−" + format_duration((_minutes(least) - _minutes(seconds)) * 60))
    assert bar.deadhead.toolTip() == tradeoff_html(plan)
    for row in rows:
        assert row[1] in bar.deadhead.toolTip()


def test_the_saving_line_opens_the_whole_list(qtbot, demo_window):
    bar = demo_window.answer
    demo_window.show()
    bar.saving.linkActivated.emit("tradeoff")
    popup = bar.tradeoff_popup
    assert popup is not None
    qtbot.waitUntil(popup.isVisible)
    assert bar.tradeoff_text == tradeoff_html(demo_window.plan)
    assert "Less empty driving with more vehicles" in bar.tradeoff_text
    popup.close()


def test_exactly_k_is_listed_only_where_it_differs(demo_window):
    plan = demo_window.plan
    v, d = plan.vehicles, plan.deadhead_seconds
    bumped = dataclasses.replace(plan, tradeoff=((v, d), (v + 1, d - 600), (v + 2, d - 600)),
                                 tradeoff_exact=((v, d), (v + 1, d - 600), (v + 2, d + 900)))
    rows = tradeoff_cells(bumped)
    assert [r[3] for r in rows] == ["", "", format_duration(d + 900)]
    assert "Exactly this many out" in tradeoff_html(bumped)
    assert "Exactly this many out" not in tradeoff_html(
        dataclasses.replace(bumped, tradeoff_exact=bumped.tradeoff))


def test_no_saving_says_so(demo_window):
    bar, plan = demo_window.answer, demo_window.plan
    v, d = plan.vehicles, plan.deadhead_seconds
    flat = dataclasses.replace(plan, tradeoff=((v, d), (v + 1, d)),
                               tradeoff_exact=((v, d), (v + 1, d + 1200)))
    bar.show_plan(flat, 0.1)
    assert "more vehicles would not reduce it" in bar.saving.text()
    assert "least possible" in bar.deadhead.caption.text()


def test_nothing_new_for_a_plan_without_a_trade_off(qtbot, window, monkeypatch):
    monkeypatch.setattr(worker, "solve_day", partial(solve_day, least_deadhead=False))
    plan = load_and_wait(qtbot, window, small_document())
    assert plan.tradeoff == () and not plan.least_deadhead
    bar = window.answer
    assert bar.deadhead.caption.text() == "empty driving"
    assert bar.saving.isHidden() and bar.deadhead.toolTip() == ""
    bar.show_tradeoff()
    assert bar.tradeoff_popup is None


def test_the_line_goes_when_the_answer_is_cleared(qtbot, demo_window):
    bar = demo_window.answer
    assert not bar.saving.isHidden()
    bar.show_nothing("No jobs in this day yet: use Add job.")
    assert bar.saving.isHidden() and bar.deadhead.caption.text() == "empty driving"
    assert bar.deadhead.toolTip() == ""


def test_a_plan_with_nothing_to_trade_has_no_line(small_window):
    bar, plan = small_window.answer, small_window.plan
    single = dataclasses.replace(plan, tradeoff=plan.tradeoff[:1],
                                 tradeoff_exact=plan.tradeoff_exact[:1])
    bar.show_plan(single, 0.1)
    assert "least possible with 2 vehicles" in bar.deadhead.caption.text()
    assert bar.saving.isHidden()


def test_saving_text():
    assert saving_text(149_617, 147_285) == "−39 min"  # 41 h 34 min to 40 h 55 min
    assert saving_text(7_200, 3_000) == "−1 h 10 min"
    assert saving_text(600, 590) == "−<1 min"  # both show as 10 min
    assert saving_text(600, 600) == "" and saving_text(600, 700) == ""


def test_fits_a_narrow_window_also_while_solving(demo_window):
    w, bar = demo_window, demo_window.answer
    w.resize(900, 600)
    w.show()
    QApplication.processEvents()
    assert w.width() == 900
    for busy in (False, True):
        bar.set_busy(busy, "Pairing jobs onto vehicles")
        QApplication.processEvents()
        assert w.width() == 900
        assert bar.deadhead.geometry().right() < bar.status.geometry().left()
        assert bar.saving.width() >= bar.saving.sizeHint().width()
        assert bar.deadhead.width() >= bar.deadhead.sizeHint().width()
    bar.set_busy(False)
