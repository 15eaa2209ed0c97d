"""The document and its undo commands, tested on a bare QUndoStack (no widgets)."""

from __future__ import annotations

import dataclasses

import pytest
from PySide6.QtGui import QUndoStack

from shipgui.core import InputError, Job, Settings, Site
from shipgui.core.document import Change, DayDocument
from shipgui.core.drivers import Driver
from shipgui.gui.models.commands import (
    AddJob,
    AttachSites,
    AttachTravel,
    ChangeSettings,
    DeleteJobs,
    EditJobField,
    NameDriver,
)
from tests.support.documents import small_document


def test_document_builds_a_valid_day():
    day = small_document().build()
    assert day.n == 4
    assert day.estimated_pairs > 0


def test_listeners_hear_before_and_after():
    doc = small_document()
    heard: list[tuple[Change, bool]] = []
    doc.subscribe(lambda change, done: heard.append((change, done)))
    doc.set_job_field(0, "notes", "back door")
    assert heard == [(Change("job", 0, "notes"), False), (Change("job", 0, "notes"), True)]
    assert doc.jobs[0].notes == "back door"


def test_new_job_id_is_unused():
    doc = small_document()
    doc.insert_job(0, dataclasses.replace(doc.jobs[0], id="N1"))
    assert doc.new_job_id() == "N2"


def test_unknown_field_is_rejected():
    with pytest.raises(KeyError):
        small_document().set_job_field(0, "colour", "red")


def test_edit_job_field_undo_redo_on_bare_stack():
    doc, stack = small_document(), QUndoStack()
    stack.push(EditJobField(doc, 1, "start", 9 * 3600 + 2400))
    assert doc.jobs[1].start == 9 * 3600 + 2400
    assert stack.undoText() == "Set start of J2 to 09:40"
    stack.undo()
    assert doc.jobs[1].start == 9 * 3600 + 1800
    stack.redo()
    assert doc.jobs[1].start == 9 * 3600 + 2400


def test_add_and_delete_jobs_undo():
    doc, stack = small_document(), QUndoStack()
    ids = [j.id for j in doc.jobs]
    stack.push(AddJob(doc, 4, Job("N1", "A", "A", 3600, 7200)))
    assert [j.id for j in doc.jobs] == [*ids, "N1"]
    assert stack.undoText() == "Add job N1"
    stack.push(DeleteJobs(doc, [3, 0, 1]))
    assert [j.id for j in doc.jobs] == ["J3", "N1"]
    assert stack.undoText() == "Delete 3 jobs (J1, J2, J4)"
    stack.undo()
    assert [j.id for j in doc.jobs] == [*ids, "N1"]
    stack.undo()
    assert [j.id for j in doc.jobs] == ids


def test_settings_and_companion_files_undo():
    doc, stack = small_document(), QUndoStack()
    stack.push(ChangeSettings(doc, Settings(turnaround=900), "Set turnaround to 15 min"))
    stack.push(AttachSites(doc, [Site("A")], "/invented/sites.csv"))
    stack.push(AttachTravel(doc, {("A", "B"): (60, 2)}, "/invented/travel.csv"))
    assert doc.sources["travel"] == "/invented/travel.csv"
    assert stack.undoText() == "Attach travel file travel.csv"
    for _ in range(3):
        stack.undo()
    assert doc.settings.turnaround == 600
    assert len(doc.sites) == 3 and doc.travel == {}
    assert "sites" not in doc.sources and "travel" not in doc.sources


def test_name_driver_undo():
    doc, stack = small_document(), QUndoStack()
    stack.push(NameDriver(doc, 2, frozenset({"J3"}), None, "Driver B"))
    assert doc.drivers == [Driver("Driver B", frozenset({"J3"}))]
    assert stack.undoText() == "Name vehicle 2 'Driver B'"
    stack.push(NameDriver(doc, 2, frozenset({"J3"}), doc.drivers[0], "Driver C"))
    assert doc.drivers == [Driver("Driver C", frozenset({"J3"}))]
    stack.undo()
    stack.undo()
    assert doc.drivers == []


def test_an_edit_that_breaks_the_day_is_reported_by_build():
    doc, stack = small_document(), QUndoStack()
    stack.push(EditJobField(doc, 0, "origin", "NOWHERE"))
    with pytest.raises(InputError) as info:
        doc.build()
    assert any("NOWHERE" in p.message for p in info.value.problems)
    stack.undo()
    doc.build()


def test_replace_all_keeps_listeners():
    doc = small_document()
    heard = []
    doc.subscribe(lambda change, done: heard.append(change.kind))
    doc.replace_all(DayDocument(jobs=[Job("X", "A", "A", 0, 60)]))
    assert [j.id for j in doc.jobs] == ["X"]
    assert heard == ["reset", "reset"]
