"""The working-day limit in the app: the setting (one undo step, the caution beside
it, kept in the plan file), the answer while the search runs and after it, Cancel
keeping the best plan, the timeline's working days and the proof view."""

from __future__ import annotations

import dataclasses
import re

import pytest
from PySide6.QtCore import QThreadPool
from PySide6.QtTest import QAbstractItemModelTester
from PySide6.QtWidgets import QGraphicsRectItem

from shipgui.core import solve_day
from shipgui.core.demo import load_demo
from shipgui.core.document import DayDocument
from shipgui.core.model import Day
from shipgui.core.workday.explain import explain_fit, fit_label, fit_reason, weight_text
from shipgui.gui.panels.answer_bar import (
    fleet_caption,
    fleet_tooltip,
    limit_cost_line,
    search_caption,
)
from shipgui.gui.panels.certificate_panel import (
    CertificatePanel,
    PairColumn,
    PairsModel,
    WeightColumn,
    WeightsModel,
)
from shipgui.gui.panels.timeline import COLOURS, TimelineView
from tests.support.days import depot_day
from tests.support.gui import WAIT_MS

HOUR = 3600


def _with_limit(day: Day, hours: float) -> Day:
    settings = dataclasses.replace(day.settings, max_day=int(hours * HOUR))
    return Day(day.jobs, day.site_ids, day.sites, day.travel, settings)


@pytest.fixture(scope="module")
def demo_11h():
    return solve_day(_with_limit(load_demo(), 11), time_limit=60)


@pytest.fixture(scope="module")
def weights_plan():
    # An invented day where job weights prove one vehicle more than the pairwise set
    # found (as in tests/core/test_workday.py).
    plan = solve_day(_with_limit(depot_day(20, 5, seed=23, span_h=(5, 13)), 6), time_limit=20)
    assert plan.certificate_weights and plan.proven_minimum
    return plan


def _set_limit(qtbot, window, text: str, *, wait: bool = True):
    """Type a longest working day and wait for the plan it gives (returned)."""
    window.left_tabs.setCurrentWidget(window.inputs_panel)
    window.inputs_panel.max_day.setText(text)
    if not wait:
        window.inputs_panel.max_day.editingFinished.emit()
        return None
    with qtbot.waitSignal(window.plan_shown, timeout=3 * WAIT_MS) as blocker:
        window.inputs_panel.max_day.editingFinished.emit()
    return blocker.args[0]


# ------------------------------------------------------------------ the setting

def test_the_setting_is_one_undo_step_with_the_caution_beside_it(qtbot, small_window):
    w = small_window
    before = w.undo_stack.count()
    plan = _set_limit(qtbot, w, "3:30")
    assert w.document.settings.max_day == 3 * HOUR + 1800
    assert w.undo_stack.count() == before + 1
    assert w.undo_stack.undoText() == "Set longest working day to 3:30"
    assert plan is not None and plan.workday is not None and plan.workday.limit == 12_600
    caution = w.inputs_panel.max_day_caution
    assert caution.isVisibleTo(w.inputs_panel)
    assert "not a legal default" in caution.text() and "local law" in caution.text()
    assert "breaks" in caution.text() and "Empty: no limit" in caution.text()
    # Minutes are accepted too and shown as H:MM.
    _set_limit(qtbot, w, "240")
    assert w.document.settings.max_day == 4 * HOUR
    assert w.inputs_panel.max_day.text() == "4:00"
    with qtbot.waitSignal(w.plan_shown, timeout=WAIT_MS):
        w.undo_stack.undo()
    assert w.document.settings.max_day == 12_600 and w.inputs_panel.max_day.text() == "3:30"
    plan = _set_limit(qtbot, w, "")
    assert w.document.settings.max_day is None and plan.workday is None
    assert w.undo_stack.undoText() == "Plan without a working-day limit"


@pytest.mark.parametrize("typed", ["25:00", "11:75", "soon", "0"])
def test_a_bad_limit_is_refused_and_nothing_changes(qtbot, small_window, typed):
    w = small_window
    before = w.undo_stack.count()
    _set_limit(qtbot, w, typed, wait=False)
    assert "longest working day was not changed" in w.jobs_panel.message.text()
    assert w.document.settings.max_day is None and w.undo_stack.count() == before
    assert w.inputs_panel.max_day.text() == ""


def test_the_limit_is_kept_with_the_plan_file(qtbot, small_window, tmp_path):
    w = small_window
    _set_limit(qtbot, w, "10:45")
    path = tmp_path / "day.shipgui"
    w.document.save(path)
    assert DayDocument.open(path).settings.max_day == 10 * HOUR + 45 * 60
    with qtbot.waitSignal(w.plan_shown, timeout=WAIT_MS):
        w.load_document(DayDocument.open(path))
    assert w.inputs_panel.max_day.text() == "10:45"


# ------------------------------------------------------------------ the answer

def test_the_answer_says_proven_minimum_and_what_the_limit_costs(qtbot, demo_window):
    w = demo_window
    improvements, captions = [], []

    def seen(vehicles, bound, _seconds):
        improvements.append((vehicles, bound))
        captions.append(w.answer.vehicles.caption.text())  # the window's slot ran first

    w.solver.search_progress.connect(seen)
    plan = _set_limit(qtbot, w, "11:00")
    bar = w.answer
    # The demo's calibration: 39 vehicles, proven, 28 without the limit.
    assert (plan.vehicles, plan.lower_bound, plan.workday.unlimited_vehicles) == (39, 39, 28)
    assert bar.vehicles.value.text() == "39"
    assert bar.vehicles.caption.text() == "vehicles — proven minimum\nfor an 11 h working day"
    assert bar.limit_cost.text() == "28 without the limit (+11)"
    assert "Without the limit: 28 vehicles; the limit costs 11 more." in bar.vehicles.toolTip()
    assert not bar.limit_cost.isHidden() and not bar.verified.isHidden()
    assert "within the working-day limit" in bar.verified.toolTip()
    status = plan.workday.deadhead_status
    assert bar.deadhead.caption.text() == {
        "proven least": "empty driving, least possible with 39 vehicles",
        "searched": "empty driving, searched for less\n(not proven least)"}.get(
        status, "empty driving\n(not optimised: no time left)")
    # Each improvement was shown as it came, ending at the plan shown.
    assert improvements and improvements[-1] == (39, 39)
    assert captions == [search_caption(v, b, 11 * HOUR) for v, b in improvements]
    assert all(b <= v for v, b in improvements)
    # Without the limit again: the plain answer, no limit line.
    with qtbot.waitSignal(w.plan_shown, timeout=WAIT_MS):
        w.undo_stack.undo()
    assert bar.vehicles.caption.text() == "vehicles needed" and bar.limit_cost.isHidden()


def test_not_proven_plans_say_both_figures(demo_11h):
    stopped = dataclasses.replace(demo_11h, bound=37,
                                  workday=dataclasses.replace(demo_11h.workday,
                                                              status="stopped"))
    assert fleet_caption(stopped) == "planned, at least 37\nsearch stopped · 11 h day"
    assert limit_cost_line(stopped) == "28 without the limit (+9 to +11)"
    timed = dataclasses.replace(stopped, workday=dataclasses.replace(
        stopped.workday, status="time limit"))
    assert fleet_caption(timed) == "planned, at least 37\ntime limit reached · 11 h day"
    searched = dataclasses.replace(stopped, workday=dataclasses.replace(
        stopped.workday, status="proven", minimum_by_search=True))
    assert fleet_caption(searched) == "vehicles — the minimum\nfor an 11 h working day"
    assert "so 39 is the minimum, though the written proof reaches 37" in \
        fleet_tooltip(searched)
    assert limit_cost_line(searched) == "28 without the limit (+11)"
    assert search_caption(34, 32, 11 * HOUR) == "planned, at least 32\nsearching… · 11 h day"


def test_cancel_stops_the_search_and_keeps_the_best_plan(qtbot, demo_window):
    w = demo_window
    shown = []
    w.plan_shown.connect(shown.append)

    def cancel_at_first(_vehicles, _bound, _seconds):
        if not shown and w.solver.busy:
            w.cancel_action.trigger()

    w.solver.search_progress.connect(cancel_at_first)
    plan = _set_limit(qtbot, w, "10:00")
    # The best plan found is shown as the current one, verified, with what is proven.
    assert plan is not None and plan is w.plan and w.plan_is_current
    assert plan.verified and plan.workday.limit == 10 * HOUR
    assert plan.workday.status in ("stopped", "proven")  # the search may just have ended
    if plan.workday.status == "stopped" and not plan.proven_minimum:
        assert "search stopped" in w.answer.vehicles.caption.text()
    assert w.answer.status.text().replace("\xa0", " ").startswith("Up to date")
    assert not w.cancel_action.isEnabled() and w.files.current_plan() is plan


def test_an_edit_during_the_search_discards_its_result(qtbot, demo_window):
    w = demo_window
    shown = []
    w.plan_shown.connect(shown.append)
    edited = []

    def edit_at_first(_vehicles, _bound, _seconds):
        if not edited:
            edited.append(True)
            w.inputs_panel.max_day.setText("12:00")
            w.inputs_panel.max_day.editingFinished.emit()

    w.solver.search_progress.connect(edit_at_first)
    _set_limit(qtbot, w, "9:00", wait=False)
    qtbot.waitUntil(lambda: bool(shown) and not w.solver.busy, timeout=3 * WAIT_MS)
    assert edited
    assert [p.day.settings.max_day for p in shown] == [12 * HOUR]  # never the 9 h search
    assert w.plan.day.settings.max_day == 12 * HOUR and w.plan_is_current


# ------------------------------------------------------------------ the timeline

def test_the_timeline_shows_each_working_day_against_the_limit(qtbot, demo_11h):
    from shipgui.core.fleet.schedule import vehicle_days
    view = TimelineView(pixels_per_hour=40)
    qtbot.addWidget(view)
    view.set_plan(demo_11h)
    for job in demo_11h.day.jobs:  # rows are drawn as they are needed: draw them all
        view.job_bar(job.id)
    days = vehicle_days(demo_11h)
    limit = demo_11h.day.settings.max_day
    items = [i for i in view.scene().items() if isinstance(i, QGraphicsRectItem)]
    used = [i for i in items if i.brush().color() == COLOURS["workday"]]
    marks = [i for i in items if i.brush().color() == COLOURS["limit"]]
    assert len(used) == demo_11h.vehicles
    # A mark where the limit would end each day, unless that is past the hours drawn.
    last = view._span()[1]
    marked = [v for v in days if v.day_start + limit <= last]
    assert len(marks) == len(marked) >= 1
    for day, band in zip(days,
                         sorted(used, key=lambda i: i.rect().y())):
        assert band.rect().x() == pytest.approx(view._x(day.day_start))
        assert band.rect().right() == pytest.approx(view._x(day.day_end))
        assert band.toolTip().startswith(f"Vehicle {day.vehicle}: working day ")
        assert "limit 11 h" in band.toolTip()
        assert day.working_day <= limit
    for day, mark in zip(marked, sorted(marks, key=lambda i: i.rect().y())):
        assert mark.rect().center().x() == pytest.approx(view._x(day.day_start + limit))
    # Without a limit nothing of it is drawn.
    view.set_plan(solve_day(load_demo()))
    assert not [i for i in view.scene().items() if isinstance(i, QGraphicsRectItem)
                and i.brush().color() in (COLOURS["workday"], COLOURS["limit"])]


# ------------------------------------------------------------------ the proof view

def test_the_proof_lists_each_pair_with_its_reason_under_the_limit(qapp, demo_11h):
    model = PairsModel()
    QAbstractItemModelTester(model, QAbstractItemModelTester.FailureReportingMode.Fatal)
    model.set_plan(demo_11h)
    n = len(demo_11h.certificate)
    assert model.rowCount() == n * (n - 1) // 2
    index = {j.id: k for k, j in enumerate(demo_11h.day.jobs)}
    limit = demo_11h.day.settings.max_day
    labels = []
    for row in range(model.rowCount()):
        a, b = (index[x] for x in model.pair(row))
        label = model.index(row, PairColumn.SHORT_BY).data()
        assert label == fit_label(fit_reason(demo_11h.day, a, b, limit))
        assert re.fullmatch(r"overlap|different vehicle classes|"
                            r"cannot follow: (\d+ h )?\d+ min short|"
                            r"together an? \d+ h \d\d min day, limit 11 h", label), label
        assert model.index(row, PairColumn.REASON).data() == explain_fit(demo_11h.day, a, b,
                                                                         limit)
        labels.append(label)
    # The limit, not only "cannot follow", keeps some of these pairs apart.
    assert any(label.startswith("together") for label in labels)


def test_the_proof_view_shows_weights_and_how_to_read_them(qtbot, weights_plan):
    panel = CertificatePanel()
    qtbot.addWidget(panel)
    QAbstractItemModelTester(panel.weights_model,
                             QAbstractItemModelTester.FailureReportingMode.Fatal)
    panel.set_plan(weights_plan)
    model = panel.weights_model
    assert model.rowCount() == len(weights_plan.certificate_weights)
    for row, (k, weight) in enumerate(weights_plan.certificate_weights):
        assert model.index(row, WeightColumn.JOB).data() == weights_plan.day.jobs[k].id
        assert model.index(row, WeightColumn.WEIGHT).data() == weight_text(weight)
    assert any("/" in model.index(r, WeightColumn.WEIGHT).data() for r in range(model.rowCount()))
    assert not panel.weights_box.isHidden()
    reading = panel.weights_note.text()
    assert "No working day within the 6 h limit carries more than 1" in reading
    assert f"= {weights_plan.lower_bound} vehicles are needed" in reading
    assert f"at least {weights_plan.lower_bound} vehicles are needed" in panel.summary.text()
    assert panel.pairs_heading.text().startswith(
        f"Alone, these {len(weights_plan.certificate)} jobs prove at least")
    # A plan without weights hides them.
    panel.set_plan(solve_day(load_demo()))
    assert panel.weights_box.isHidden() and panel.pairs_heading.isHidden()
    assert isinstance(WeightsModel().rowCount(), int)


def test_the_longer_answer_fits_a_narrow_window(qtbot, demo_window):
    w, bar = demo_window, demo_window.answer
    w.resize(900, 600)
    w.show()
    _set_limit(qtbot, w, "11:00")
    for busy in (False, True):
        bar.set_busy(busy, "Searching for fewer vehicles within the working day")
        qtbot.wait(10)
        assert w.width() == 900
        assert bar.deadhead.geometry().right() < bar.status.geometry().left()
        assert bar.vehicles.width() >= bar.vehicles.sizeHint().width()
    bar.set_busy(False)


def test_an_empty_day_during_the_search_shows_no_old_plan(qtbot, demo_window):
    # The inputs change at once to a day without jobs (one change, no new solve):
    # the stopped search's plan must not come back as the answer.
    w = demo_window
    shown = []
    w.plan_shown.connect(shown.append)

    def empty_day(_vehicles, _bound, _seconds):
        if w.document.jobs:
            w.load_document(DayDocument())

    w.solver.search_progress.connect(empty_day)
    _set_limit(qtbot, w, "10:00", wait=False)
    qtbot.waitUntil(lambda: not w.document.jobs, timeout=3 * WAIT_MS)
    QThreadPool.globalInstance().waitForDone(3 * WAIT_MS)
    qtbot.wait(50)  # let any outcome of the stopped search arrive
    assert shown == [] and w.plan is None and not w.solver.busy
