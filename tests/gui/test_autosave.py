"""Autosave to a recovery file, offered back after a crash; export of routes; plan
file versions.  Every dialog is patched; recovery files live in tmp_path."""

from __future__ import annotations

import csv
import json
import re
from pathlib import Path

import pytest
from PySide6.QtWidgets import QFileDialog, QMessageBox

from shipgui.core import InputError
from shipgui.core.document import DayDocument
from shipgui.core.io.plan_file import SCHEMA_VERSION
from shipgui.gui.app import open_window
from shipgui.gui.main_window import MainWindow
from shipgui.gui.models.commands import DeleteJobs
from shipgui.gui.services.autosave import AUTOSAVE_MS, find_recoveries
from tests.support.documents import small_document
from tests.support.gui import WAIT_MS, load_and_wait, wait_for_export

ROOT = Path(__file__).resolve().parents[2]
Yes, Discard, Cancel = (QMessageBox.StandardButton.Yes, QMessageBox.StandardButton.Discard,
                        QMessageBox.StandardButton.Cancel)


def recovery_files(folder: Path) -> list[Path]:
    return sorted((folder / "recovery").glob("*.shipgui"))


def edit(window) -> None:
    window.undo_stack.push(DeleteJobs(window.document, [0]))


def crash(window) -> None:
    """What a crash leaves: the recovery file, and no living owner of its lock."""
    window.autosaver.timer.stop()
    if window.autosaver._lock is not None:
        window.autosaver._lock.unlock()
    window.autosaver._lock = None
    window.autosaver.path = Path("/nonexistent/forgotten.shipgui")  # teardown removes nothing


def crashed_window(qtbot, app_settings) -> MainWindow:
    """A window with unsaved, autosaved edits that then "crashed"."""
    window = MainWindow(app_settings, solve_delay_ms=0)
    qtbot.addWidget(window)
    load_and_wait(qtbot, window, small_document())
    edit(window)
    window.autosaver.autosave()
    crash(window)
    return window


def test_autosave_runs_every_minute_only_with_unsaved_work(qtbot, small_window, tmp_path):
    saver = small_window.autosaver
    assert saver.timer.interval() == AUTOSAVE_MS == 60_000 and saver.timer.isActive()
    assert saver.path.parent == tmp_path / "recovery"
    saver.timer.timeout.emit()
    assert recovery_files(tmp_path) == []  # nothing unsaved yet
    edit(small_window)
    saver.timer.timeout.emit()
    [path] = recovery_files(tmp_path)
    data = json.loads(path.read_text(encoding="utf-8"))
    assert data["schema_version"] == SCHEMA_VERSION
    assert [j["job"] for j in data["inputs"]["jobs"]] == ["J2", "J3", "J4"]
    small_window.undo_stack.undo()  # back to the saved state: nothing to recover
    assert recovery_files(tmp_path) == []


def test_clean_save_and_clean_close_remove_the_recovery_file(qtbot, small_window, tmp_path,
                                                             monkeypatch):
    edit(small_window)
    small_window.autosaver.autosave()
    assert recovery_files(tmp_path)
    target = tmp_path / "day.shipgui"
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(target), ""))
    assert small_window.files.save_as()
    assert recovery_files(tmp_path) == []
    edit(small_window)
    small_window.autosaver.autosave()
    monkeypatch.setattr(QMessageBox, "question", lambda *a, **k: Discard)
    assert small_window.close()
    assert recovery_files(tmp_path) == []


def test_after_a_crash_the_work_is_offered_back(qtbot, app_settings, tmp_path, monkeypatch):
    first = crashed_window(qtbot, app_settings)
    asked = []
    monkeypatch.setattr(QMessageBox, "question",
                        lambda *a, **k: asked.append(a[2]) or Yes)
    second = open_window([], demo=False, settings=app_settings)
    qtbot.addWidget(second)
    assert asked and "Recover it?" in asked[0]
    assert [j.id for j in second.document.jobs] == ["J2", "J3", "J4"]
    assert not second.undo_stack.isClean()  # recovered work is still unsaved
    [kept] = recovery_files(tmp_path)  # now owned by the second window
    assert kept == second.autosaver.path
    with qtbot.waitSignal(second.plan_shown, timeout=WAIT_MS):
        pass
    second.undo_stack.setClean()
    second.close()
    first.undo_stack.setClean()
    first.close()
    assert recovery_files(tmp_path) == []


@pytest.mark.parametrize("answer, left", [(Discard, 0), (Cancel, 1)])
def test_a_recovery_can_be_discarded_or_kept_for_later(qtbot, app_settings, tmp_path,
                                                       monkeypatch, answer, left):
    first = crashed_window(qtbot, app_settings)
    monkeypatch.setattr(QMessageBox, "question", lambda *a, **k: answer)
    second = open_window([], demo=False, settings=app_settings)
    qtbot.addWidget(second)
    assert second.document.jobs == []
    assert len(recovery_files(tmp_path)) == left
    first.undo_stack.setClean()
    first.close()
    second.close()


def test_a_running_windows_recovery_file_is_not_offered(qtbot, small_window, tmp_path):
    edit(small_window)
    small_window.autosaver.autosave()
    assert find_recoveries(tmp_path).found == []


def test_export_routes_action_writes_neutralised_csv(qtbot, small_window, tmp_path,
                                                     monkeypatch):
    small_window.document.jobs[0] = small_window.document.jobs[0].__class__(
        **{**vars(small_window.document.jobs[0]), "customer": "=1+1"})
    with qtbot.waitSignal(small_window.plan_shown, timeout=WAIT_MS):
        small_window.request_solve()
    target = tmp_path / "routes"
    monkeypatch.setattr(QFileDialog, "getSaveFileName",
                        lambda *a, **k: (str(target), "CSV for spreadsheets (*.csv)"))
    assert small_window.files.export_routes_action in small_window.files.export_actions()
    wait_for_export(qtbot, small_window, small_window.files.export_routes)
    rows = list(csv.DictReader(open(tmp_path / "routes.csv", encoding="utf-8-sig")))
    assert len(rows) == 4 and {r["customer"] for r in rows} >= {"'=1+1"}


def test_a_plan_from_a_newer_version_gets_a_clear_error(tmp_path):
    path = tmp_path / "future.shipgui"
    path.write_text(json.dumps({"format": "shipgui-plan", "schema_version": 7}))
    with pytest.raises(InputError, match="newer version of shipgui") as info:
        DayDocument.open(path)
    assert "version 7" in str(info.value) and "Update shipgui" in str(info.value)
    path.write_text(json.dumps({"format": "shipgui-plan", "schema_version": "1"}))
    with pytest.raises(InputError, match="damaged"):
        DayDocument.open(path)


@pytest.mark.parametrize("content", ["[" * 100_000, '{"a": ' + "9" * 5000 + "}",
                                     '{"format": "shipgui-plan", "schema_version": 1, '
                                     '"inputs": {"jobs": [{"job": "J1", "origin": "A", '
                                     '"start": "08:00", "end": "09:00"}]}, '
                                     '"driver_names": {"\\u00b2": "x"}, '
                                     '"settings": {"turnaround_seconds": 1e400}}'])
def test_absurd_plan_documents_are_input_errors(tmp_path, content):
    path = tmp_path / "odd.shipgui"
    path.write_text(content)
    with pytest.raises(InputError):
        DayDocument.open(path)


def test_plan_files_are_never_pickled_or_evaluated():
    # Qt's app.exec() is an event loop, hence the look-behind for a dot.
    pattern = re.compile(r"(?<![.\w])(eval|exec)\s*\(|^\s*(import|from)\s+(pickle|marshal|shelve)",
                         re.MULTILINE)
    for source in (ROOT / "shipgui").rglob("*.py"):
        assert not pattern.search(source.read_text(encoding="utf-8")), source
