"""The jobs table model, tested without any widget."""

from __future__ import annotations

import pytest
from PySide6.QtCore import QModelIndex, Qt
from PySide6.QtGui import QUndoStack
from PySide6.QtTest import QAbstractItemModelTester

from shipgui.core import Job, solve_day
from shipgui.gui.models.commands import AddJob, DeleteJobs
from shipgui.gui.models.jobs_model import Column, JobRole, JobsFilterModel, JobsModel, check_field
from tests.support.documents import small_document

FATAL = QAbstractItemModelTester.FailureReportingMode.Fatal


@pytest.fixture
def setup(qapp):
    doc, stack = small_document(), QUndoStack()
    model = JobsModel(doc, stack)
    proxy = JobsFilterModel()
    proxy.setSourceModel(model)
    testers = [QAbstractItemModelTester(model, FATAL), QAbstractItemModelTester(proxy, FATAL)]
    return doc, stack, model, proxy, testers


def test_shape_and_display(setup):
    doc, _stack, model, _proxy, _t = setup
    assert model.rowCount() == 4 and model.columnCount() == len(Column)
    assert model.headerData(Column.START, Qt.Orientation.Horizontal) == "Start"
    assert model.index(1, Column.START).data() == "09:30"
    assert model.index(1, Column.START).data(JobRole.SORT) == 9 * 3600 + 1800
    assert model.index(2, Column.JOB).data(JobRole.JOB_ID) == "J3"
    assert not model.flags(model.index(0, Column.VEHICLE)) & Qt.ItemFlag.ItemIsEditable
    assert model.flags(model.index(0, Column.END)) & Qt.ItemFlag.ItemIsEditable


def test_edit_pushes_one_undo_command(setup):
    doc, stack, model, _proxy, _t = setup
    assert model.setData(model.index(0, Column.END), "09:15")
    assert doc.jobs[0].end == 9 * 3600 + 900
    assert stack.count() == 1 and stack.undoText() == "Set end of J1 to 09:15"
    stack.undo()
    assert model.index(0, Column.END).data() == "09:00"


@pytest.mark.parametrize("column, text, words", [
    (Column.START, "8h30", "not a time"),
    (Column.END, "07:00", "before or when it starts"),
    (Column.START, "08:75", "minutes and seconds go up to 59"),
    (Column.JOB, "J2", "already a job J2"),
    (Column.JOB, "  ", "'job' is empty"),
    (Column.ORIGIN, "", "'origin' is empty"),
    # The rules of the day files (issue: cell edits accepted what files refuse).
    (Column.NOTES, "gate\nfour", "control character"),
    (Column.CUSTOMER, "Acme\x00", "control character"),
    (Column.REFERENCE, "\x1b[31mred", "control character"),
    (Column.NOTES, "n" * 20_000, "20000 characters long"),
    (Column.JOB, "J" * 101, "not an id"),
    (Column.JOB, "J\u200b2", "invisible character (U+200B)"),
    (Column.JOB, "\uff2a2", "looks the same as job J2"),
    (Column.ORIGIN, "A\u00a0B", "invisible character (U+00A0)"),
    (Column.START, "2026-12-02T07:00", "set the plan date"),
])
def test_bad_values_are_refused_with_a_message(qtbot, setup, column, text, words):
    doc, stack, model, _proxy, _t = setup
    before = doc.jobs[0]
    with qtbot.waitSignal(model.edit_refused, timeout=1000) as blocker:
        assert not model.setData(model.index(0, column), text)
    assert words in blocker.args[0]
    assert doc.jobs[0] == before and stack.count() == 0


def test_empty_destination_means_origin(setup):
    doc, _stack, _model, _proxy, _t = setup
    assert check_field(doc, 0, "destination", "") == "A"


def test_insert_and_remove_keep_model_consistent(setup):
    doc, stack, model, proxy, _t = setup
    stack.push(AddJob(doc, 2, Job("N1", "A", "A", 3600, 7200)))
    assert model.rowCount() == 5 and proxy.rowCount() == 5
    assert model.index(2, Column.JOB).data() == "N1"
    stack.push(DeleteJobs(doc, [0, 2]))
    assert model.rowCount() == 3
    stack.undo()
    stack.undo()
    assert [model.index(r, Column.JOB).data() for r in range(4)] == ["J1", "J2", "J3", "J4"]


def test_reset_from_document(setup):
    doc, _stack, model, _proxy, _t = setup
    other = small_document()
    other.jobs = other.jobs[:2]
    doc.replace_all(other)
    assert model.rowCount() == 2


def test_vehicle_column_follows_the_plan(setup):
    doc, _stack, model, _proxy, _t = setup
    plan = solve_day(doc.build())
    model.set_plan(plan)
    vehicles = {model.index(r, Column.JOB).data(): model.index(r, Column.VEHICLE).data()
                for r in range(4)}
    assert vehicles["J1"] == vehicles["J2"] == vehicles["J4"]
    assert vehicles["J3"] != vehicles["J1"]
    model.set_plan(None)
    assert model.index(0, Column.VEHICLE).data() == ""


def test_a_new_plan_re_sorts_and_re_filters_by_vehicle(setup):
    # set_plan names the roles it changes (so a 10 000-job plan shows in
    # milliseconds); sorting and filtering by the vehicle column still follow it.
    doc, _stack, model, proxy, _t = setup
    plan = solve_day(doc.build())
    proxy.sort(Column.VEHICLE, Qt.SortOrder.DescendingOrder)
    model.set_plan(plan)
    shown = [proxy.index(r, Column.VEHICLE).data() for r in range(4)]
    assert shown == sorted(shown, key=int, reverse=True) and shown[0] == "2"
    lonely = next(r for r in range(4) if model.index(r, Column.JOB).data() == "J3")
    proxy.setFilterFixedString(model.index(lonely, Column.VEHICLE).data())
    assert "J3" in {proxy.index(r, Column.JOB).data() for r in range(proxy.rowCount())}


def test_filter_and_sort(setup):
    _doc, _stack, _model, proxy, _t = setup
    proxy.setFilterFixedString("j3")
    assert proxy.rowCount() == 1
    proxy.setFilterFixedString("")
    proxy.sort(Column.START, Qt.SortOrder.DescendingOrder)
    first = proxy.index(0, Column.JOB).data()
    assert first == "J4"
    assert proxy.rowCount(QModelIndex()) == 4
