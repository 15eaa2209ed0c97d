"""Recovery files that cannot be offered never stop the app and are never deleted;
a failed autosave is said (status bar while it lasts, one dialog)."""

from __future__ import annotations

import errno
import json

import pytest
from PySide6.QtWidgets import QMessageBox

from shipgui.gui.app import open_window
from shipgui.gui.models.commands import DeleteJobs
from shipgui.gui.services import autosave

JOB = {"job": "J1", "origin": "A", "start": "08:00", "end": "09:00"}


def _plan_text(*, version=1, job=JOB, site=None) -> str:
    data = {"format": "shipgui-plan", "schema_version": version,
            "inputs": {"jobs": [job], "sites": [site] if site else []}}
    return json.dumps(data)


BAD = {
    "huge number": _plan_text(site={"site": "A", "lat": 1}).replace(
        '"lat": 1', '"lat": 1' + "0" * 400),
    "lone surrogate": _plan_text(job={**JOB, "job": "J\ud800"}),
    "not JSON": '{"format": "shipgui-plan", "schema',
}


@pytest.fixture
def warnings(monkeypatch):
    shown = []
    monkeypatch.setattr(QMessageBox, "warning", lambda *a, **k: shown.append(a[2]))
    monkeypatch.setattr(QMessageBox, "question",
                        lambda *a, **k: QMessageBox.StandardButton.Yes)
    return shown


def _start(qtbot, app_settings):
    window = open_window([], demo=False, settings=app_settings)
    qtbot.addWidget(window)
    return window


@pytest.mark.parametrize("case", sorted(BAD))
def test_an_unreadable_recovery_file_is_set_aside_and_the_app_starts(
        qtbot, app_settings, tmp_path, warnings, case):
    folder = tmp_path / "recovery"
    folder.mkdir()
    bad = folder / "0123abcd.shipgui"
    bad.write_text(BAD[case], encoding="utf-8", errors="surrogatepass")
    content = bad.read_bytes()
    window = _start(qtbot, app_settings)
    assert window.document.jobs == []  # nothing was recovered, and nothing crashed
    kept = folder / "0123abcd.shipgui.unreadable"
    assert not bad.exists() and kept.read_bytes() == content  # renamed, never deleted
    assert len(warnings) == 1 and str(kept) in warnings[0] and "Nothing was deleted" in warnings[0]
    again = _start(qtbot, app_settings)  # set aside once: the next start says nothing
    assert len(warnings) == 1 and again.document.jobs == []


def test_a_folder_named_like_a_recovery_file_is_set_aside(qtbot, app_settings, tmp_path,
                                                          warnings):
    odd = tmp_path / "recovery" / "feed.shipgui"
    odd.mkdir(parents=True)
    (odd / "inside.txt").write_text("not ours")
    _start(qtbot, app_settings)
    assert (tmp_path / "recovery" / "feed.shipgui.unreadable" / "inside.txt").exists()
    assert "feed.shipgui could not be read" in warnings[0]


def test_a_recovery_file_from_a_newer_shipgui_is_kept_and_said(qtbot, app_settings, tmp_path,
                                                               warnings):
    newer = tmp_path / "recovery" / "beef.shipgui"
    newer.parent.mkdir()
    newer.write_text(_plan_text(version=3))
    content = newer.read_bytes()
    for start in (1, 2):
        _start(qtbot, app_settings)
        assert newer.read_bytes() == content  # kept where a newer shipgui finds it
        assert len(warnings) == start and "newer shipgui" in warnings[-1]
        assert str(newer) in warnings[-1]


def test_a_failed_autosave_is_said_once_in_a_dialog_and_in_the_status_bar(
        small_window, warnings, monkeypatch):
    w = small_window

    def disk_full(path, data):
        raise OSError(errno.ENOSPC, "Writing canceled by application", str(path) + ".tmp")

    monkeypatch.setattr(autosave, "write_bytes_atomic", disk_full)
    w.undo_stack.push(DeleteJobs(w.document, [0]))
    assert not w.autosaver.autosave()
    assert not w.autosave_status.isHidden()
    assert w.autosave_status.text() == "Autosave failed: the disk is full"
    assert len(warnings) == 1 and "the disk is full" in warnings[0]
    assert not w.autosaver.autosave()
    assert len(warnings) == 1  # once
    monkeypatch.undo()
    monkeypatch.setattr(QMessageBox, "warning", lambda *a, **k: warnings.append(a[2]))
    assert w.autosaver.autosave()
    assert w.autosave_status.isHidden()
    w.undo_stack.setClean()


def test_a_save_on_a_full_disk_says_the_disk_is_full(small_window, warnings, monkeypatch,
                                                     tmp_path):
    from PySide6.QtWidgets import QFileDialog

    from shipgui.core.io import plan_file

    def disk_full(path, data):
        raise OSError(errno.ENOSPC, "Writing canceled by application", str(path))

    monkeypatch.setattr(plan_file, "write_bytes_atomic", disk_full)
    monkeypatch.setattr(QFileDialog, "getSaveFileName",
                        lambda *a, **k: (str(tmp_path / "day.shipgui"), ""))
    assert not small_window.files.save_as()
    assert warnings == ["day.shipgui was not saved: the disk is full."]
