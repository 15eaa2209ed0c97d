"""The timeline: bars, empty-driving legs, selection, zoom, certificate colours."""

from __future__ import annotations

import pytest
from PySide6.QtCore import QPoint, QPointF, Qt
from PySide6.QtGui import QWheelEvent
from PySide6.QtWidgets import QGraphicsRectItem

from shipgui.core import Settings, solve_day
from shipgui.core.demo import load_demo
from shipgui.gui.panels.timeline import COLOURS, JobBar, TimelineView
from tests.support.documents import small_document


@pytest.fixture(scope="module")
def demo_plan():
    return solve_day(load_demo())


@pytest.fixture
def view(qtbot):
    v = TimelineView()
    v.resize(900, 500)
    qtbot.addWidget(v)
    return v


def test_one_bar_per_job_with_its_id(view, demo_plan):
    view.set_plan(demo_plan)
    for job in demo_plan.day.jobs:
        bar = view.job_bar(job.id)
        assert bar.job_id == job.id and job.id in bar.toolTip()
    bars = [i for i in view.scene().items() if isinstance(i, JobBar)]
    assert sorted(b.job_id for b in bars) == sorted(j.id for j in demo_plan.day.jobs)


def test_rows_are_drawn_as_they_come_into_view(view):
    # A day of many vehicles shows at once: only the rows in view (and a screen
    # more each way) have items; scrolling down draws the rest.
    from tests.support.days import regional_day
    plan = solve_day(regional_day(1500, 60, seed=5), least_deadhead=False)
    view.set_plan(plan)
    drawn = {i.job_id for i in view.scene().items() if isinstance(i, JobBar)}
    assert 0 < len(drawn) < plan.day.n / 2
    last = plan.route_ids()[-1][0]
    assert last not in drawn
    view.verticalScrollBar().setValue(view.verticalScrollBar().maximum())
    assert last in {i.job_id for i in view.scene().items() if isinstance(i, JobBar)}
    texts = {i.text() for i in view.scene().items() if hasattr(i, "text")}
    assert f"Vehicle {plan.vehicles}" in texts


def test_empty_driving_legs_are_drawn(view):
    doc = small_document()
    doc.settings = Settings(turnaround=600, depot="B")
    plan = solve_day(doc.build())
    view.set_plan(plan)
    legs = [i for i in view.scene().items() if isinstance(i, QGraphicsRectItem)
            and i.toolTip().startswith("Empty drive")]
    assert legs, "expected empty-driving bars"
    assert any("back to the depot" in leg.toolTip() for leg in legs)


def test_rows_are_labelled_with_vehicle_and_name(view):
    plan = solve_day(small_document().build())
    view.set_plan(plan, {2: "Driver B"})
    texts = {i.text() for i in view.scene().items() if hasattr(i, "text")}
    assert "Vehicle 1" in texts and any(t.startswith("Vehicle 2 · Driver") for t in texts)


def test_clicking_a_bar_emits_its_id(qtbot, view):
    plan = solve_day(small_document().build())
    view.set_plan(plan)
    bar = view.job_bar("J3")
    point = view.mapFromScene(bar.sceneBoundingRect().center())
    with qtbot.waitSignal(view.job_selected, timeout=1000) as blocker:
        qtbot.mouseClick(view.viewport(), Qt.MouseButton.LeftButton, pos=point)
    assert blocker.args == ["J3"]


def test_select_job_is_quiet_and_survives_a_new_plan(qtbot, view):
    plan = solve_day(small_document().build())
    view.set_plan(plan)
    with qtbot.assertNotEmitted(view.job_selected):
        view.select_job("J2")
    assert view.selected_job() == "J2"
    view.set_plan(plan)
    assert view.selected_job() == "J2"


def test_zoom_buttons_and_ctrl_wheel(view, demo_plan):
    view.set_plan(demo_plan)
    start = view.pixels_per_hour
    view.zoom_in()
    assert view.pixels_per_hour > start
    view.zoom_out()
    view.zoom_out()
    assert view.pixels_per_hour < start
    before = view.pixels_per_hour
    event = QWheelEvent(QPointF(300, 100), QPointF(300, 100), QPoint(0, 0), QPoint(0, 120),
                        Qt.MouseButton.NoButton, Qt.KeyboardModifier.ControlModifier,
                        Qt.ScrollPhase.NoScrollPhase, False)
    view.wheelEvent(event)
    assert view.pixels_per_hour > before
    view.zoom_to_fit()
    assert view.scene().sceneRect().width() <= view.viewport().width() + 5


def test_certificate_highlight(view, demo_plan):
    view.set_plan(demo_plan)
    view.set_certificate_highlight(True)
    cert = set(demo_plan.certificate_ids())
    for job_id, bar in ((j.id, view.job_bar(j.id)) for j in demo_plan.day.jobs):
        expected = COLOURS["certificate"] if job_id in cert else COLOURS["muted"]
        assert bar.base_brush.color() == expected
    view.set_certificate_highlight(False)
    assert all(view.job_bar(i).base_brush.color() == COLOURS["job"] for i in cert)


def test_no_plan_shows_the_reason(view):
    view.set_plan(None, message="Fix the problems first.")
    texts = [i.text() for i in view.scene().items() if hasattr(i, "text")]
    assert texts == ["Fix the problems first."]


def test_long_ids_show_their_end_when_narrow_and_whole_when_zoomed_in(view):
    # Seven-character ids, one-hour jobs: at 40 px an hour no whole id fits a bar.
    import dataclasses

    day = load_demo()
    jobs = [dataclasses.replace(j, id=f"DL-{k:04d}") for k, j in enumerate(day.jobs)]
    plan = solve_day(dataclasses.replace(day, jobs=tuple(jobs)))
    view.set_plan(plan)
    view.set_pixels_per_hour(40)
    bars = [view.job_bar(j.id) for j in jobs]
    hour_long = [b for b in bars if b.rect().width() >= 40]
    assert hour_long and all(b.label == b.job_id or (
        b.label.startswith("…") and len(b.label) >= 4 and b.job_id.endswith(b.label[1:]))
        for b in hour_long)
    assert any(b.label.startswith("…") for b in hour_long)
    assert all(b.job_id in b.toolTip() for b in bars)
    view.set_pixels_per_hour(400)
    bars = [view.job_bar(j.id) for j in jobs]
    assert sum(b.label == b.job_id for b in bars) >= 0.9 * len(bars)
