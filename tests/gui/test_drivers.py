"""A driver's name stays with the route's jobs when a re-solve numbers the vehicles
differently, and the window says when an edit splits or merges a named route."""

from __future__ import annotations

import json

from PySide6.QtWidgets import QInputDialog

from shipgui.core.document import DayDocument
from shipgui.gui.models.jobs_model import Column
from tests.support.gui import WAIT_MS, load_and_wait


def _name(window, monkeypatch, vehicle: int, name: str) -> None:
    monkeypatch.setattr(QInputDialog, "getText", lambda *a, **k: (name, True))
    window.ask_driver_name(vehicle)


def _edit(qtbot, window, job: str, column: Column, text: str) -> None:
    model = window.jobs_model
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS):
        assert model.setData(model.index(window.document.row_of(job), column), text)


def _vehicle_of(window, job: str) -> int:
    return next(k for k, r in enumerate(window.plan.route_ids(), start=1) if job in r)


def test_a_name_stays_with_its_jobs_when_the_routes_are_renumbered(qtbot, small_window,
                                                                   monkeypatch):
    w = small_window
    assert _vehicle_of(w, "J3") == 2  # J3 has a vehicle of its own, second by start
    _name(w, monkeypatch, 2, "Ada Fenwick")
    _edit(qtbot, w, "J3", Column.START, "07:30")  # now the earliest route: vehicle 1
    assert _vehicle_of(w, "J3") == 1
    assert w.timeline._label(0) == "Vehicle 1 · Ada Fenwick"  # noqa: SLF001
    assert w.timeline._label(1) == "Vehicle 2"  # noqa: SLF001
    assert w.files._names(w.plan) == {1: "Ada Fenwick"}  # noqa: SLF001 - what exports print
    assert w.driver_notice.isHidden()


def test_splitting_a_named_route_is_said(qtbot, small_window, monkeypatch):
    w = small_window
    _name(w, monkeypatch, 1, "Bo Marsh")  # J1, J2, J4
    _edit(qtbot, w, "J4", Column.START, "09:45")  # J4 can no longer follow J2
    assert w.plan.vehicles == 3
    assert not w.driver_notice.isHidden()
    assert "An edit split Bo Marsh's route" in w.driver_notice.text()
    _name(w, monkeypatch, _vehicle_of(w, "J1"), "Bo Marsh")  # named again: settled
    assert w.driver_notice.isHidden()


def test_merging_two_named_routes_is_said(qtbot, small_window, monkeypatch):
    w = small_window
    _name(w, monkeypatch, 1, "Bo Marsh")
    _name(w, monkeypatch, 2, "Ada Fenwick")
    _edit(qtbot, w, "J3", Column.END, "13:00")
    _edit(qtbot, w, "J3", Column.START, "12:30")  # J3 after J4: one vehicle does all
    assert w.plan.vehicles == 1
    assert "Ada Fenwick's route was merged into Bo Marsh's" in w.driver_notice.text()
    assert w.timeline._label(0) == "Vehicle 1 · Bo Marsh"  # noqa: SLF001


def test_names_are_saved_with_their_jobs_and_old_files_still_open(qtbot, small_window,
                                                                  monkeypatch, tmp_path):
    w = small_window
    _name(w, monkeypatch, 2, "Ada Fenwick")
    path = tmp_path / "day.shipgui"
    w.document.save(path)
    data = json.loads(path.read_text(encoding="utf-8"))
    assert data["drivers"] == [{"name": "Ada Fenwick", "jobs": ["J3"]}]
    # A plan file from before: names by vehicle number.
    del data["drivers"]
    data["driver_names"] = {"2": "Ada Fenwick"}
    old = tmp_path / "old.shipgui"
    old.write_text(json.dumps(data), encoding="utf-8")
    plan = load_and_wait(qtbot, w, DayDocument.open(old))
    assert plan is not None and w.timeline._label(1) == "Vehicle 2 · Ada Fenwick"  # noqa: SLF001
    assert [(d.name, d.jobs) for d in w.document.drivers] == [("Ada Fenwick",
                                                               frozenset({"J3"}))]

