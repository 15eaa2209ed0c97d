"""Exports from the app: written in the background with progress and cancel, and
never for a plan that failed its independent check."""

from __future__ import annotations

import dataclasses
import gc
import threading
import time

import pytest
from PySide6.QtWidgets import QFileDialog, QMessageBox

from tests.support.gui import WAIT_MS, wait_for_export


def _save_to(monkeypatch, path):
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(path), ""))


def test_pdf_export_leaves_the_window_working_and_can_be_cancelled(qtbot, small_window,
                                                                    tmp_path, monkeypatch):
    w = small_window
    release = threading.Event()
    calls = []

    def slow_writer(plan, path, driver_names=None, progress=None):
        # Stands in for a 3 000-job PDF: reports progress until told to stop.
        for step in range(500):
            if release.wait(0.01):
                break
            if progress is not None:
                progress(step, 500)
        calls.append(path)
        path.write_bytes(b"%PDF-")

    w.files.pdf_writer = slow_writer
    _save_to(monkeypatch, tmp_path / "sheets.pdf")
    started = time.perf_counter()
    with qtbot.waitSignal(w.files.exports.progress, timeout=WAIT_MS):
        assert w.files.export_pdf()
    assert time.perf_counter() - started < 2.0  # the window did not wait for the writer
    assert w.files.exports.busy and not w.export_progress.isHidden()
    assert "sheets.pdf" in w.export_progress.label.text()
    assert not w.files.export_json_action.isEnabled()  # one export at a time
    with qtbot.waitSignal(w.files.exports.cancelled, timeout=WAIT_MS):
        w.export_progress.cancel.click()
    release.set()
    assert calls == [] and not (tmp_path / "sheets.pdf").exists()
    assert gc.isenabled()
    assert w.export_progress.isHidden() and w.files.export_json_action.isEnabled()
    assert "nothing was written" in w.statusBar().currentMessage()


def test_real_pdf_export_reports_progress(qtbot, small_window, tmp_path, monkeypatch):
    w = small_window
    seen = []
    w.files.exports.progress.connect(lambda done, total: seen.append((done, total)))
    _save_to(monkeypatch, tmp_path / "day.pdf")
    wait_for_export(qtbot, w, w.files.export_pdf)
    assert (tmp_path / "day.pdf").read_bytes().startswith(b"%PDF-")
    assert seen and all(total == seen[0][1] for _, total in seen)
    assert [d for d, _ in seen] == sorted(d for d, _ in seen)  # it only moves forward
    assert w.statusBar().currentMessage() == "Exported day.pdf"
    assert gc.isenabled()  # paused while the PDF was built (long pauses freeze the window)


def test_a_failed_export_says_why(qtbot, small_window, tmp_path, monkeypatch):
    w = small_window
    warned = []
    monkeypatch.setattr(QMessageBox, "warning", lambda *a, **k: warned.append(a[2]))
    _save_to(monkeypatch, tmp_path / "no-such-folder" / "plan.json")
    with qtbot.waitSignal(w.files.exports.failed, timeout=WAIT_MS):
        assert w.files.export_json()
    assert warned == ["The plan JSON plan.json was not written: the folder does not exist "
                      "(any more)."]


@pytest.mark.parametrize("export", ["export_json", "export_routes", "export_pdf"])
def test_a_plan_that_failed_its_check_is_not_exported(qtbot, small_window, tmp_path,
                                                      monkeypatch, export):
    w = small_window
    w.plan = dataclasses.replace(w.plan, verified=False,
                                 verification_failures=("J2 cannot follow J1",))
    warned = []
    monkeypatch.setattr(QMessageBox, "warning", lambda *a, **k: warned.append(a[2]))
    _save_to(monkeypatch, tmp_path / "out.csv")
    started = []
    w.files.exports.started.connect(started.append)
    assert not getattr(w.files, export)()
    assert started == [] and list(tmp_path.iterdir()) == []
    assert "did not pass its independent check" in warned[0]


def test_closing_during_an_export_asks_first(qtbot, small_window, tmp_path, monkeypatch):
    w = small_window
    release = threading.Event()

    def slow_writer(plan, path, driver_names=None, progress=None):
        while not release.wait(0.01):
            progress(1, 2)

    w.files.pdf_writer = slow_writer
    _save_to(monkeypatch, tmp_path / "sheets.pdf")
    assert w.files.export_pdf()
    asked = []
    answers = iter([QMessageBox.StandardButton.No, QMessageBox.StandardButton.Yes])
    monkeypatch.setattr(QMessageBox, "question",
                        lambda *a, **k: asked.append(a[1]) or next(answers))
    w.show()
    assert not w.close() and w.files.exports.busy  # "wait": the export goes on
    with qtbot.waitSignal(w.files.exports.cancelled, timeout=WAIT_MS):
        assert w.close()
    release.set()
    assert asked == ["Export still running"] * 2 and not (tmp_path / "sheets.pdf").exists()
