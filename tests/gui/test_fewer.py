"""Fewer vehicles and slot moves in the app: the jobs table, the panels, undo."""

from __future__ import annotations

import dataclasses

import pytest
from PySide6.QtCore import Qt, QThreadPool
from PySide6.QtGui import QUndoStack
from PySide6.QtTest import QAbstractItemModelTester

from shipgui.core import Job, Settings, solve_day
from shipgui.core.document import DayDocument
from shipgui.gui.models.commands import ChangeSettings, MoveSlots
from shipgui.gui.models.jobs_model import NOT_SERVED, Column, JobsModel
from shipgui.gui.panels.timeline import COLOURS
from tests.support.documents import small_document
from tests.support.gui import WAIT_MS, load_and_wait

FATAL = QAbstractItemModelTester.FailureReportingMode.Fatal
HOUR = 3600


def _short_document() -> DayDocument:
    """Three overlapping jobs and one vehicle: J2 (priority 5) is served."""
    jobs = [Job(f"J{k}", "A", "A", 8 * HOUR, 9 * HOUR, priority=p, row=k + 2)
            for k, p in enumerate((2, 5, 1))]
    return DayDocument(jobs, [], {}, Settings(vehicles=1))


def _near_miss_document() -> DayDocument:
    """Moving LATE 20 minutes later lets one vehicle do EARLY and LATE."""
    jobs = [Job("EARLY", "Y", "Y", 8 * HOUR, 10 * HOUR, movable=False, row=2),
            Job("LATE", "Y", "Y", 9 * HOUR + 40 * 60, 12 * HOUR, row=3)]
    return DayDocument(jobs, [], {}, Settings())


def test_jobs_model_marks_jobs_not_served(qapp):
    doc = _short_document()
    model = JobsModel(doc, QUndoStack())
    QAbstractItemModelTester(model, FATAL)
    model.set_plan(solve_day(doc.build()))
    vehicle = [model.index(r, Column.VEHICLE).data() for r in range(3)]
    assert vehicle == [NOT_SERVED, "1", NOT_SERVED]
    assert model.index(0, Column.JOB).data(Qt.ItemDataRole.BackgroundRole) is not None
    assert model.index(1, Column.JOB).data(Qt.ItemDataRole.BackgroundRole) is None
    assert "can share a vehicle" in model.index(0, Column.NOTES).data(Qt.ItemDataRole.ToolTipRole)
    assert not model.is_served("J0") and model.is_served("J1")
    assert model.index(1, Column.PRIORITY).data() == "5"


def test_priority_and_movable_edits_are_checked_and_undoable(qapp):
    doc, stack = small_document(), QUndoStack()
    model = JobsModel(doc, stack)
    refused = []
    model.edit_refused.connect(refused.append)
    assert not model.setData(model.index(0, Column.PRIORITY), "-2")
    assert not model.setData(model.index(0, Column.MOVABLE), "perhaps")
    assert len(refused) == 2 and "more than 0" in refused[0] and "yes or no" in refused[1]
    assert model.setData(model.index(0, Column.PRIORITY), "2,5")
    assert model.setData(model.index(0, Column.MOVABLE), "no")
    assert doc.jobs[0].priority == 2.5 and doc.jobs[0].movable is False
    assert stack.undoText() == "Set movable of J1 to no"
    stack.undo()
    stack.undo()
    assert doc.jobs[0].priority == 1 and doc.jobs[0].movable is True


def test_move_slots_is_one_undo_step(qapp):
    doc, stack = small_document(), QUndoStack()
    before = [(j.start, j.end) for j in doc.jobs]
    stack.push(MoveSlots(doc, [("J2", 20 * 60), ("J3", -15 * 60)]))
    assert stack.count() == 1 and stack.undoText() == "Move J2 +20 min, J3 −15 min"
    assert (doc.jobs[1].start, doc.jobs[1].end) == (before[1][0] + 1200, before[1][1] + 1200)
    assert (doc.jobs[2].start, doc.jobs[2].end) == (before[2][0] - 900, before[2][1] - 900)
    stack.undo()
    assert [(j.start, j.end) for j in doc.jobs] == before


def test_window_lists_jobs_not_served(qtbot, window):
    plan = load_and_wait(qtbot, window, _short_document())
    assert plan.shortfall.unserved
    assert not window.fleet.unserved.isHidden()
    assert window.fleet.unserved.model.rowCount() == 2
    assert "2 of 3 jobs" in window.fleet.unserved.summary.text()
    assert "not served" in window.answer.vehicles.caption.text()
    # More vehicles: everything served, the panel goes away (one undoable setting).
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS):
        window.inputs_panel.vehicles.boxes[None].setValue(3)
    assert window.plan.shortfall.unserved == () and window.fleet.unserved.isHidden()
    assert window.undo_stack.undoText() == "Set vehicles available to 3"
    assert window.answer.vehicles.caption.text() == "vehicles needed"


def test_vehicles_available_per_class(qtbot, window):
    doc = small_document()
    doc.jobs[0] = dataclasses.replace(doc.jobs[0], vehicle_class="van")
    load_and_wait(qtbot, window, doc)
    boxes = window.inputs_panel.vehicles.boxes
    assert set(boxes) == {"", "van"}
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS):
        boxes[""].setValue(1)
    assert window.document.settings.class_vehicles == (("", 1),)
    assert window.plan.shortfall is not None and window.plan.verified


def test_save_a_vehicle_shows_applies_and_undoes(qtbot, window):
    load_and_wait(qtbot, window, _near_miss_document())
    assert window.plan.vehicles == 2
    panel = window.fleet.savings
    with qtbot.waitSignal(window.fleet.suggester.found, timeout=WAIT_MS):
        panel.find.click()
    assert panel.table.rowCount() >= 1 and "LATE" in panel.table.item(0, 0).text()
    panel.table.selectRow(0)
    bar = window.timeline.job_bar("LATE")
    assert bar.base_brush.color() == COLOURS["moved"]  # shown on the timeline
    assert "customer" in panel.agree.text()
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS):
        panel.apply.click()
    assert window.plan.vehicles == 1
    assert window.document.jobs[1].start == 10 * HOUR
    assert panel.table.rowCount() == 0  # the list no longer applies
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS):
        window.undo_action.trigger()
    assert window.plan.vehicles == 2
    QThreadPool.globalInstance().waitForDone(WAIT_MS)


@pytest.mark.parametrize("vehicles", [None, 2])
def test_settings_command_round_trip(qapp, vehicles):
    doc, stack = small_document(), QUndoStack()
    stack.push(ChangeSettings(doc, dataclasses.replace(doc.settings, vehicles=vehicles), "x"))
    assert doc.settings.vehicles == vehicles
    stack.undo()
    assert doc.settings.vehicles is None
