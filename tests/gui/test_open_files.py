"""Opening files in the app: every file the command line opens, refused with the
command line's words otherwise; nothing raised into Qt, nothing frozen; the day
settings remembered per folder; problems that name a job select it."""

from __future__ import annotations

import json
import os
import threading
from datetime import date
from pathlib import Path

import pytest
from PySide6.QtCore import QMimeData, QThreadPool, QUrl
from PySide6.QtWidgets import QMessageBox

from shipgui.cli import main as cli_main
from shipgui.core import Settings
from shipgui.gui import file_actions
from shipgui.gui.app import run
from shipgui.gui.main_window import MainWindow
from shipgui.gui.services.settings import AppSettings
from tests.support.documents import small_document
from tests.support.gui import WAIT_MS, load_and_wait

JOBS = [["job", "origin", "destination", "start", "end", "vehicle_class"],
        ["K1", "P", "Q", "08:00", "09:00", "van"], ["K2", "Q", "P", "09:30", "10:00", "Van "]]
SITES = [["site", "x_km", "y_km"], ["P", 0, 0], ["Q", 10, 0]]


def _workbook(path: Path) -> Path:
    import openpyxl
    book = openpyxl.Workbook()
    book.active.title = "Jobs"
    for row in JOBS:
        book.active.append(row)
    sites = book.create_sheet("Sites")
    for row in SITES:
        sites.append(row)
    book.save(path)
    return path


def _csv(path: Path, rows, delimiter=",") -> Path:
    path.write_text("".join(delimiter.join(str(v) for v in row) + "\n" for row in rows),
                    encoding="utf-8")
    return path


def _open(qtbot, window: MainWindow, paths) -> bool:
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS, raising=False):
        return window.files.open_paths(paths)


@pytest.mark.parametrize("make", ["xlsx", "semicolon", "txt"])
def test_the_app_opens_what_the_command_line_opens(qtbot, window, tmp_path, make):
    if make == "xlsx":
        paths = [_workbook(tmp_path / "day.xlsx")]  # sites come from its "Sites" sheet
    else:
        name = "jobs.txt" if make == "txt" else "jobs.csv"
        paths = [_csv(tmp_path / name, JOBS, ";" if make == "semicolon" else ","),
                 _csv(tmp_path / "places.csv", SITES, ";" if make == "semicolon" else ",")]
    assert _open(qtbot, window, paths)
    assert [j.id for j in window.document.jobs] == ["K1", "K2"]
    assert window.plan is not None and window.plan.vehicles == 1  # "van" is "Van "
    assert set(window.document.sources) == {"jobs", "sites"}


def test_a_workbook_on_the_command_line_opens_in_the_app(qapp, tmp_path, app_settings):
    out = tmp_path / "day.png"
    assert run([str(_workbook(tmp_path / "day.xlsx"))], screenshot=str(out),
               settings=app_settings) == 0
    QThreadPool.globalInstance().waitForDone(WAIT_MS)


def test_a_workbook_can_be_dropped_and_attached(qtbot, window, tmp_path, monkeypatch):
    book = _workbook(tmp_path / "day.xlsx")
    mime = QMimeData()
    mime.setUrls([QUrl.fromLocalFile(str(book)), QUrl.fromLocalFile(str(tmp_path / "a.ods"))])
    assert window.files.droppable(mime) == [book, tmp_path / "a.ods"]
    window.load_document(small_document())
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS):
        assert window.files.attach_file("sites", book)
    assert [s.id for s in window.document.sites] == ["P", "Q"]


def _cli_lines(capsys, path: Path) -> list[str]:
    assert cli_main(["solve", str(path)]) == 2
    err = capsys.readouterr().err.removeprefix("shipgui: input error: ")
    return err.strip().splitlines()


@pytest.mark.parametrize("content", [
    None,  # the file does not exist
    "job,origin,start,end\nJ1,A,07:00,08:00\n".encode("utf-16"),
    b"job;origin;start;end\nJ1;A;7h;08:00\n",
    b"name,colour\nx,red\n",  # no kind of day file: read as a jobs file, as the CLI does
])
def test_refusals_read_as_on_the_command_line(window, tmp_path, capsys, content):
    path = tmp_path / "jobs.csv"
    if content is not None:
        path.write_bytes(content)
    assert not window.files.open_paths([path])
    dialog = window.files.problem_dialog
    assert dialog.list.problem_texts() == _cli_lines(capsys, path)
    assert "could not be opened; nothing was changed" in dialog.heading.text()
    dialog.close()


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="needs named pipes")
def test_a_named_pipe_is_refused_without_waiting(window, tmp_path):
    pipe = tmp_path / "pipe.csv"
    os.mkfifo(pipe)
    unblocked = []

    def unblock() -> None:  # if the app waits on the pipe, end the wait and say so
        unblocked.append(True)
        fd = os.open(pipe, os.O_RDWR)
        os.close(fd)

    timer = threading.Timer(5.0, unblock)
    timer.start()
    try:
        assert not window.files.open_paths([pipe])
    finally:
        timer.cancel()
    assert not unblocked
    assert "not an ordinary file" in window.files.problem_dialog.list.problem_texts()[0]
    window.files.problem_dialog.close()


@pytest.mark.parametrize("text, words", [
    ('{"format": "shipgui-plan", "schema_version": 1, "inputs": {"jobs": [{"job": "J1", '
     '"origin": "A", "start": "08:00", "end": "09:00"}], "sites": [{"site": "A", "lat": 1'
     + "0" * 400 + ', "lon": 1}]}}', "number from -90 to 90"),
    ('{"format": "shipgui-plan", "schema_version": 1, "inputs": {"jobs": [{"job": "J\\ud800",'
     ' "origin": "A", "start": "08:00", "end": "09:00"}]}}', "broken character"),
    ('{"format": "shipgui-plan", "schema_version": 1, "settings": {"speed_kmh": 1e400}}',
     "number from 0.1 to 1000"),
])
def test_a_bad_plan_file_is_listed_and_the_day_kept(qtbot, small_window, tmp_path, text,
                                                     words):
    path = tmp_path / "bad.shipgui"
    path.write_text(text, encoding="utf-8")
    assert not small_window.files.open_paths([path])
    assert any(words in t for t in small_window.files.problem_dialog.list.problem_texts())
    assert [j.id for j in small_window.document.jobs] == ["J1", "J2", "J3", "J4"]
    small_window.files.problem_dialog.close()


def test_an_unexpected_failure_is_shown_not_raised(window, tmp_path, monkeypatch):
    shown = []
    monkeypatch.setattr(QMessageBox, "critical", lambda *a, **k: shown.append(a[2]))

    def broken(_paths):
        raise RuntimeError("disk on fire")

    monkeypatch.setattr(file_actions, "read_day_files", broken)
    assert window.files.open_paths([tmp_path / "jobs.csv"]) is False
    assert "RuntimeError: disk on fire" in shown[0] and "nothing was changed" in shown[0]


def test_a_plan_file_with_a_byte_order_mark_opens(qtbot, window, tmp_path):
    path = tmp_path / "day.shipgui"
    small_document().save(path)
    path.write_bytes(b"\xef\xbb\xbf" + path.read_bytes())
    assert _open(qtbot, window, [path]) and len(window.document.jobs) == 4


def test_fifty_problems_and_a_count_of_the_rest(window, tmp_path):
    path = tmp_path / "jobs.csv"
    path.write_text("job,origin,start,end\n" + "".join(f"J{k},A,x,08:00\n" for k in range(80)))
    assert not window.files.open_paths([path])
    texts = window.files.problem_dialog.list.problem_texts()
    assert len(texts) == 51 and texts[-1].startswith("… and 30 more problems")
    window.files.problem_dialog.close()


# ---------------------------------------------------------------- day settings

def _set(qtbot, window: MainWindow, **changes) -> None:
    import dataclasses
    new = dataclasses.replace(window.document.settings, **changes)
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS, raising=False):
        window.inputs_panel.settings_edited.emit(new, "Set settings")


def test_day_settings_are_remembered_per_folder(qtbot, tmp_path, app_settings):
    monday = tmp_path / "monday"
    monday.mkdir()
    _csv(monday / "jobs.csv", JOBS)
    _csv(monday / "sites.csv", SITES)
    first = MainWindow(app_settings, solve_delay_ms=0)
    assert _open(qtbot, first, [monday / "jobs.csv"])
    assert first.document.settings == Settings()
    assert "No day settings remembered" in first.inputs_panel.origin.text()
    _set(qtbot, first, depot="P", turnaround=600, day_start=6 * 3600)
    assert "changed here" in first.inputs_panel.origin.text()
    assert "depot P, day 06:00–open, turnaround 10 min" in first.answer.status.text()
    tuesday = monday / "tuesday.csv"
    _csv(tuesday, JOBS)
    second = MainWindow(app_settings, solve_delay_ms=0)
    assert _open(qtbot, second, [tuesday])
    assert second.document.settings == Settings(turnaround=600, depot="P", day_start=6 * 3600)
    assert "last used for a day in this folder" in second.inputs_panel.origin.text()
    assert "Planned with depot P" in second.answer.status.text()
    for w in (first, second):
        w.undo_stack.setClean()
        w.close()


def test_the_vehicles_available_are_not_carried_to_the_next_day(tmp_path, app_settings):
    # A limit carried over silently would leave jobs of another day unserved.
    app_settings.remember_day_settings(tmp_path, Settings(depot="P", vehicles=3,
                                                          class_vehicles=(("van", 2),)))
    settings, origin = app_settings.day_settings_for(tmp_path)
    assert settings == Settings(depot="P") and origin == "folder"


def test_a_default_for_new_folders(qtbot, tmp_path, app_settings):
    window = MainWindow(app_settings, solve_delay_ms=0)
    load_and_wait(qtbot, window, small_document())
    window.document.settings = Settings(turnaround=900, depot="A")
    window.inputs_panel.make_default.click()
    assert "your default" in window.inputs_panel.origin.text()
    fresh = tmp_path / "new-folder"
    fresh.mkdir()
    _csv(fresh / "jobs.csv", [["job", "origin", "start", "end"], ["J1", "A", "08:00", "09:00"]])
    again = MainWindow(AppSettings.at_path(tmp_path / "settings.ini"), solve_delay_ms=0)
    assert _open(qtbot, again, [fresh / "jobs.csv"])
    assert again.document.settings == Settings(turnaround=900, depot="A")
    assert "from your default" in again.inputs_panel.origin.text()
    for w in (window, again):
        w.undo_stack.setClean()
        w.close()


def test_the_plan_date_field_is_one_undo_step_and_kept_in_the_plan_file(qtbot, small_window,
                                                                         tmp_path):
    w = small_window
    w.inputs_panel.plan_date.setText("2026-12-02")
    w.inputs_panel.plan_date.editingFinished.emit()
    assert w.document.plan_date == date(2026, 12, 2)
    assert w.undo_stack.undoText() == "Set plan date to 2026-12-02"
    w.document.save(tmp_path / "day.shipgui")
    assert json.loads((tmp_path / "day.shipgui").read_text())["plan_date"] == "2026-12-02"
    w.inputs_panel.plan_date.setText("2.12.2026")
    w.inputs_panel.plan_date.editingFinished.emit()
    assert w.document.plan_date == date(2026, 12, 2)
    assert "not a date" in w.jobs_panel.message.text()
    w.undo_stack.undo()
    assert w.document.plan_date is None and w.inputs_panel.plan_date.text() == ""


# ---------------------------------------------------------------- problems on screen

def test_clicking_a_problem_selects_the_job_it_names(qtbot, window, tmp_path):
    doc = small_document()
    path = tmp_path / "day.shipgui"
    doc.save(path)
    assert _open(qtbot, window, [path])
    row = window.document.row_of("J3")
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS):
        window.jobs_model.setData(window.jobs_model.index(row, 1), "Z")  # no such site
    texts = window.problem_list.problem_texts()
    # The row is J3's row in the jobs file the day was first read from.
    assert texts == ["small-jobs.csv, row 4, column 'origin', job J3: the site 'Z' is not in "
                     "the sites file"]
    window.problem_list.cellClicked.emit(0, 4)
    assert window.jobs_panel.current_job() == "J3"


def test_shortened_travel_times_are_listed_under_the_answer(qtbot, window):
    doc = small_document()
    doc.travel = {("A", "C"): (3 * 3600, 7)}  # via B it is about 17 minutes
    doc.sources["travel"] = "/invented/travel.csv"
    load_and_wait(qtbot, window, doc)
    box = window.problem_box
    assert window.plan is not None and not box.isHidden() and box.list.isHidden()
    assert "check the 1 from the travel file" in box.heading.text()
    box.toggle.setChecked(True)
    assert not box.list.isHidden()
    [note] = box.list.problem_texts()
    assert note.startswith("travel.csv, row 7, column 'minutes': A -> C: 180 min given, "
                           "17.3 min used")


def test_a_drivers_name_follows_the_rules_of_the_day_files(qtbot, small_window, monkeypatch):
    from PySide6.QtWidgets import QInputDialog
    monkeypatch.setattr(QInputDialog, "getText", lambda *a, **k: ("Ada\x1b[2J", True))
    small_window.ask_driver_name(1)
    assert not small_window.document.drivers
    assert "control character" in small_window.jobs_panel.message.text()
