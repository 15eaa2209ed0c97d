"""The main window end to end: open, solve, edit, undo, select, prove, save, close."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from PySide6.QtCore import QMimeData, QPointF, Qt, QUrl
from PySide6.QtGui import QDropEvent
from PySide6.QtWidgets import QFileDialog, QMessageBox

from shipgui.core import Settings
from shipgui.core.demo import demo_files
from shipgui.gui import file_actions
from shipgui.gui.main_window import CAUTION, MainWindow
from shipgui.gui.models.jobs_model import Column
from tests.support.documents import small_document
from tests.support.gui import WAIT_MS, load_and_wait, wait_for_export


def _edit(qtbot, window, row: int, column: Column, text: str) -> bool:
    model = window.jobs_model
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS, raising=False):
        return model.setData(model.index(row, column), text)


def test_demo_day_is_solved_and_answered(demo_window):
    w = demo_window
    assert w.plan is not None and w.plan_is_current
    assert w.answer.vehicles.value.text() == str(w.plan.vehicles)
    assert w.answer.deadhead.value.text().endswith("min")
    assert not w.answer.verified.isHidden()
    assert "jobs.csv" in w.windowTitle() and not w.isWindowModified()
    assert w.jobs_model.rowCount() == 150
    assert w.caution.text() == CAUTION


def test_edit_marks_modified_resolves_and_undoes(qtbot, small_window):
    w = small_window
    assert w.answer.vehicles.value.text() == "2"
    # J3 moved after J4 (end first: a start after the old end is refused)
    assert _edit(qtbot, w, 2, Column.END, "13:00")
    assert _edit(qtbot, w, 2, Column.START, "12:30")
    assert w.isWindowModified()
    assert w.answer.vehicles.value.text() == "1"
    assert w.undo_action.text() == "Undo Set start of J3 to 12:30"
    with qtbot.waitSignal(w.plan_shown, timeout=WAIT_MS):
        w.undo_action.trigger()
    with qtbot.waitSignal(w.plan_shown, timeout=WAIT_MS):
        w.undo_action.trigger()
    assert w.answer.vehicles.value.text() == "2"
    assert not w.isWindowModified()


def test_bad_time_is_refused_with_a_visible_message(small_window):
    w = small_window
    assert not w.jobs_model.setData(w.jobs_model.index(0, Column.END), "7 o'clock")
    assert not w.jobs_panel.message.isHidden()
    assert "not a time" in w.jobs_panel.message.text()
    assert w.undo_stack.count() == 0


def test_input_problems_are_listed_and_the_answer_is_cleared(qtbot, small_window):
    w = small_window
    _edit(qtbot, w, 0, Column.ORIGIN, "NOWHERE")
    assert w.plan is None and not w.problem_box.isHidden()
    assert any("NOWHERE" in t for t in w.problem_list.problem_texts())
    assert w.answer.vehicles.value.text() == "–" and w.answer.verified.isHidden()
    assert all(not a.isEnabled() for a in w.files.export_actions())


def test_add_and_delete_jobs(qtbot, small_window):
    w = small_window
    with qtbot.waitSignal(w.plan_shown, timeout=WAIT_MS):
        w.add_job_action.trigger()
    assert w.jobs_model.rowCount() == 5 and w.document.jobs[-1].id == "N1"
    w.jobs_panel.select_job("N1")
    with qtbot.waitSignal(w.plan_shown, timeout=WAIT_MS):
        w.delete_jobs_action.trigger()
    assert [j.id for j in w.document.jobs] == ["J1", "J2", "J3", "J4"]
    assert w.undo_stack.undoText() == "Delete job N1"


def test_table_and_timeline_select_each_other(qtbot, small_window):
    w = small_window
    w.jobs_panel.select_job("J2")
    w.jobs_panel.job_selected.emit("J2")
    assert w.timeline.selected_job() == "J2"
    w.timeline.job_bar("J4").setSelected(True)
    w.timeline.scene().clearSelection()
    w.timeline.job_bar("J4").setSelected(True)
    assert w.jobs_panel.current_job() == "J4"


def test_proof_view(demo_window):
    w = demo_window
    w.show()
    w.proof_action.trigger()
    assert w.certificate.isVisible()
    n = len(w.plan.certificate)
    assert w.certificate.summary.text().startswith(
        f"No vehicle can do two of these {n} jobs, so at least {n} vehicles are needed; "
        f"this plan uses {w.plan.vehicles}.")
    w.certificate.table.selectRow(0)
    first, second = w.certificate.model.pair(0)
    assert w.jobs_panel.current_job() == first
    assert {b.job_id for b in w.timeline.scene().selectedItems()} == {first, second}
    w.proof_action.trigger()
    assert not w.certificate.isVisible()


def test_settings_panel_change_is_one_undo_step(qtbot, small_window):
    w = small_window
    w.left_tabs.setCurrentWidget(w.inputs_panel)
    with qtbot.waitSignal(w.plan_shown, timeout=WAIT_MS):
        w.inputs_panel.turnaround.setValue(45)
    assert w.document.settings.turnaround == 45 * 60
    assert w.undo_stack.undoText() == "Set turnaround to 45 min"
    w.inputs_panel.day_start.setText("25:99")
    w.inputs_panel.day_start.editingFinished.emit()
    assert "day start was not changed" in w.jobs_panel.message.text()
    with qtbot.waitSignal(w.plan_shown, timeout=WAIT_MS):
        w.undo_stack.undo()
    assert w.inputs_panel.turnaround.value() == 10


def test_save_and_reopen(qtbot, small_window, tmp_path, monkeypatch):
    w = small_window
    _edit(qtbot, w, 0, Column.NOTES, "ring first")
    target = tmp_path / "monday"
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(target), ""))
    assert w.files.save_action.trigger() is None
    saved = tmp_path / "monday.shipgui"
    assert saved.exists() and not w.isWindowModified()
    assert w.windowTitle().startswith("monday.shipgui")
    assert w.settings.recent_files()[0] == str(saved.resolve())
    other = MainWindow(w.settings, solve_delay_ms=0)
    qtbot.addWidget(other)
    with qtbot.waitSignal(other.plan_shown, timeout=WAIT_MS):
        assert other.files.open_paths([saved])
    assert other.document.jobs[0].notes == "ring first"
    assert other.answer.vehicles.value.text() == "2"


def test_close_asks_about_unsaved_changes(qtbot, small_window, monkeypatch):
    w = small_window
    w.show()
    _edit(qtbot, w, 0, Column.NOTES, "changed")
    asked = []

    def answer(choice):
        def question(*args, **kwargs):
            asked.append(args[1])
            return choice
        return question

    monkeypatch.setattr(QMessageBox, "question", answer(QMessageBox.StandardButton.Cancel))
    assert not w.close() and w.isVisible()
    monkeypatch.setattr(QMessageBox, "question", answer(QMessageBox.StandardButton.Discard))
    assert w.close()
    assert asked == ["Unsaved changes", "Unsaved changes"]


def test_open_bad_csv_lists_problems_and_keeps_the_day(qtbot, small_window, tmp_path,
                                                        monkeypatch):
    w = small_window
    bad = tmp_path / "jobs.csv"
    bad.write_text("job,origin,start,end\nJ1,A,08:00,09:00\nJ2,A,8h,09:00\nJ3,A,10:00,09:00\n")
    monkeypatch.setattr(QFileDialog, "getOpenFileNames", lambda *a, **k: ([str(bad)], ""))
    w.files.open_action.trigger()
    dialog = w.files.problem_dialog
    assert dialog is not None and dialog.isVisible()
    rows = [(dialog.list.item(r, 0).text(), dialog.list.item(r, 1).text(),
             dialog.list.item(r, 2).text()) for r in range(dialog.list.rowCount())]
    assert rows == [("jobs.csv", "3", "start"), ("jobs.csv", "4", "end")]
    assert [j.id for j in w.document.jobs] == ["J1", "J2", "J3", "J4"]
    assert w.plan is not None and "small-jobs.csv" in w.windowTitle()
    dialog.close()


def test_drop_jobs_csv_opens_it_with_companions(qtbot, window):
    files = demo_files()
    mime = QMimeData()
    mime.setUrls([QUrl.fromLocalFile(str(files["jobs"]))])
    event = QDropEvent(QPointF(10, 10), Qt.DropAction.CopyAction, mime,
                       Qt.MouseButton.LeftButton, Qt.KeyboardModifier.NoModifier)
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS):
        window.dropEvent(event)
    assert len(window.document.jobs) == 150
    assert set(window.document.sources) == {"jobs", "sites", "travel"}
    assert window.plan is not None


def test_attach_and_remove_companion_files(qtbot, tmp_path, window, monkeypatch):
    jobs = tmp_path / "day.csv"
    jobs.write_text("job,origin,destination,start,end\nK1,P,Q,08:00,09:00\nK2,Q,P,09:30,10:00\n")
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS):
        window.files.open_paths([jobs])
    assert window.plan is None and window.problems  # no travel times yet
    travel = tmp_path / "times.csv"
    travel.write_text("from,to,minutes\nP,Q,20\nQ,P,20\n")
    monkeypatch.setattr(QFileDialog, "getOpenFileName", lambda *a, **k: (str(travel), ""))
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS):
        window.inputs_panel.travel_row.attach.click()
    assert window.plan is not None and window.plan.vehicles == 1
    assert window.undo_stack.undoText() == "Attach travel file times.csv"
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS):
        window.inputs_panel.travel_row.remove.click()
    assert window.plan is None


def test_export_plan_json(qtbot, small_window, tmp_path, monkeypatch):
    w = small_window
    monkeypatch.setattr(QFileDialog, "getSaveFileName",
                        lambda *a, **k: (str(tmp_path / "out"), ""))
    wait_for_export(qtbot, w, w.files.export_json)
    data = json.loads((tmp_path / "out.json").read_text())
    assert {"vehicles", "routes", "certificate", "verified"} <= set(data)
    assert data["vehicles"] == 2 and data["verified"] is True


def test_pdf_action_only_when_the_writer_exists(qtbot, app_settings, tmp_path, monkeypatch):
    monkeypatch.setattr(file_actions, "find_pdf_writer", lambda: None)
    without = MainWindow(app_settings)
    qtbot.addWidget(without)
    texts = [a.text() for a in without.toolbar.actions()]
    assert "Export PDF…" not in texts and without.files.export_pdf_action is None

    written = []

    def fake_writer(plan, path, driver_names=None, progress=None):
        written.append((plan.vehicles, Path(path).name, driver_names))

    monkeypatch.setattr(file_actions, "find_pdf_writer", lambda: fake_writer)
    monkeypatch.setattr(QFileDialog, "getSaveFileName",
                        lambda *a, **k: (str(tmp_path / "sheets.pdf"), ""))
    with_pdf = MainWindow(app_settings, solve_delay_ms=0)
    qtbot.addWidget(with_pdf)
    assert "Export PDF…" in [a.text() for a in with_pdf.toolbar.actions()]
    load_and_wait(qtbot, with_pdf, small_document())
    wait_for_export(qtbot, with_pdf, with_pdf.files.export_pdf)
    assert written == [(2, "sheets.pdf", {})]
    with_pdf.undo_stack.setClean()


def test_cancel_keeps_the_old_plan_marked_out_of_date(qtbot, small_window):
    w = small_window
    old = w.plan
    w.solver._timer.setInterval(10_000)  # noqa: SLF001 - hold the next solve back
    w.document.set_settings(Settings(turnaround=1200))
    assert w.cancel_action.isEnabled()
    with qtbot.waitSignal(w.solver.solve_cancelled, timeout=1000):
        w.cancel_action.trigger()
    assert w.plan is old and not w.plan_is_current
    assert "out of date" in w.answer.status.text()
    assert not w.files.export_json_action.isEnabled()


def test_about_box_has_the_cautions(small_window, monkeypatch):
    shown = []
    monkeypatch.setattr(QMessageBox, "about", lambda parent, title, text: shown.append(text))
    small_window.about_action.trigger()
    assert "Drivers' hours and rest rules are set by local law" in shown[0]
    assert "The dispatcher decides and is responsible" in shown[0]


def test_screenshot_of_the_main_window(demo_window, tmp_path):
    demo_window.resize(1200, 700)
    demo_window.show()
    path = tmp_path / "main.png"
    assert demo_window.grab().save(str(path))
    assert path.stat().st_size > 10_000


@pytest.mark.parametrize("jobs", [0])
def test_deleting_every_job_says_so(qtbot, small_window, jobs):
    w = small_window
    w.jobs_panel.table.selectAll()
    w.delete_jobs_action.trigger()
    assert w.jobs_model.rowCount() == jobs
    assert "No jobs" in w.answer.status.text()


def test_clicking_a_problem_selects_its_job(qtbot, demo_window):
    w = demo_window
    row = w.document.row_of("J050")
    _edit(qtbot, w, row, Column.START, "04:00")  # before the yard opens at 05:00
    assert any("J050" in t for t in w.problem_list.problem_texts())
    w.problem_list.cellClicked.emit(0, 3)
    assert w.jobs_panel.current_job() == "J050"


def test_recent_menu_reopens_and_reports_a_missing_file(window, tmp_path):
    window.settings.add_recent_file(tmp_path / "gone.shipgui")
    window.files._fill_recent()  # noqa: SLF001 - what aboutToShow does
    actions = window.files.recent_menu.actions()
    assert [a.text() for a in actions] == ["gone.shipgui"]
    actions[0].trigger()
    assert "the file does not exist" in window.files.problem_dialog.list.problem_texts()[0]
    window.files.problem_dialog.close()


def test_export_pdf_with_the_real_writer(qtbot, small_window, tmp_path, monkeypatch):
    from pypdf import PdfReader
    w = small_window
    monkeypatch.setattr(QFileDialog, "getSaveFileName",
                        lambda *a, **k: (str(tmp_path / "sheets.pdf"), ""))
    wait_for_export(qtbot, w, w.files.export_pdf)
    text = "".join(p.extract_text() for p in PdfReader(tmp_path / "sheets.pdf").pages)
    assert "Vehicle 2" in text and "J4" in text and "local law" in text


def test_double_click_vehicle_names_its_driver(qtbot, small_window, monkeypatch):
    from PySide6.QtCore import QPoint
    from PySide6.QtTest import QTest
    from PySide6.QtWidgets import QInputDialog

    from shipgui.gui.panels.timeline import AXIS_HEIGHT, ROW_HEIGHT
    w = small_window
    w.show()
    monkeypatch.setattr(QInputDialog, "getText", lambda *a, **k: ("Ada Fenwick", True))
    point = QPoint(20, AXIS_HEIGHT + ROW_HEIGHT + ROW_HEIGHT // 2)  # vehicle 2's name
    QTest.mouseDClick(w.timeline.viewport(), Qt.MouseButton.LeftButton, pos=point)
    assert [d.name for d in w.document.drivers] == ["Ada Fenwick"]
    assert w.document.drivers[0].jobs == frozenset(w.plan.route_ids()[1])
    assert w.undo_stack.undoText() == "Name vehicle 2 'Ada Fenwick'"
    assert w.timeline._label(1) == "Vehicle 2 · Ada Fenwick"  # noqa: SLF001
    w.undo_stack.undo()
    assert w.document.drivers == []


def test_companions_are_found_by_their_header_not_their_name(tmp_path):
    from shipgui.core.io.day_files import companion_files, read_day_files
    (tmp_path / "jobs.csv").write_text("Job,Origin,Start,Duration\nJ1,A,07:00,30\n")
    (tmp_path / "sites.csv").write_text("site,lat,lon\nA,50,10\n")
    (tmp_path / "travel.csv").write_text("a,b\n")  # not a travel table: left out
    assert set(companion_files(tmp_path / "jobs.csv")) == {"sites", "travel"}
    files = read_day_files([tmp_path / "jobs.csv"])
    assert set(files.paths) == {"jobs", "sites"} and files.sites[0].lat == 50


def test_undo_and_redo_read_as_undo_and_redo_not_as_navigation(qtbot, small_window):
    from PySide6.QtWidgets import QStyle
    w = small_window
    _edit(qtbot, w, 0, Column.NOTES, "ring first")
    sp = QStyle.StandardPixmap
    arrows = [w.style().standardIcon(p).pixmap(16).toImage()
              for p in (sp.SP_ArrowBack, sp.SP_ArrowForward)]
    for action, word in ((w.undo_action, "Undo"), (w.redo_action, "Redo")):
        button = w.toolbar.widgetForAction(action)
        assert button.toolButtonStyle() == Qt.ToolButtonStyle.ToolButtonTextBesideIcon
        assert button.text() == word  # the toolbar says the word, the menu says what
        assert not action.icon().isNull()
        assert action.icon().pixmap(16).toImage() not in arrows
    assert w.undo_action.text() == "Undo Set notes of J1 to 'ring first'"


def test_at_1400_pixels_the_jobs_table_shows_the_customers(qtbot, demo_window):
    w = demo_window
    w.resize(1400, 820)
    w.show()
    qtbot.waitUntil(lambda: not w._fit_when_shown)  # noqa: SLF001 - sized after the layout
    table = w.jobs_panel.table
    right = table.columnViewportPosition(Column.CUSTOMER) + table.columnWidth(Column.CUSTOMER)
    assert right <= table.viewport().width()
    widest = max(table.fontMetrics().horizontalAdvance(j.customer) for j in w.document.jobs)
    assert table.columnWidth(Column.CUSTOMER) >= widest
    assert w.timeline.width() >= 1400 // 2 - 40  # the timeline keeps most of the room


def test_day_start_and_end_show_their_whole_hint(small_window):
    for edit in (small_window.inputs_panel.day_start, small_window.inputs_panel.day_end):
        hint = edit.fontMetrics().horizontalAdvance(edit.placeholderText())
        assert edit.width() >= hint + 12  # frame and text margins of a line edit


def test_folded_notes_leave_no_empty_band_above_the_timeline(qtbot, window):
    # The demo's 76 shortened travel times are a folded note: the box above the
    # timeline is as tall as its heading, and the splitter gives it no more.
    from shipgui.core.demo import DEMO_SETTINGS, demo_files
    from shipgui.core.document import DayDocument
    from shipgui.core.io.readers import read_inputs
    from tests.support.gui import load_and_wait
    files = demo_files()
    window.resize(1400, 860)
    window.show()
    load_and_wait(qtbot, window, DayDocument.from_inputs(read_inputs(
        files["jobs"], files["sites"], files["travel"], settings=DEMO_SETTINGS)))
    qtbot.wait(50)
    box = window.problem_box
    assert box.isVisible() and box.list.isHidden()
    assert window.right_splitter.sizes()[0] == box.height() < 80
