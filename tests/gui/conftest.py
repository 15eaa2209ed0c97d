"""Fixtures for the desktop tests: every window uses a temporary settings file and
every dialog is patched per test, so nothing blocks and nothing touches the
user's own preferences."""

from __future__ import annotations

import pytest
from PySide6.QtCore import QThreadPool

from shipgui.core import Job, Settings, Site
from shipgui.gui.document import PlanDocument
from shipgui.gui.main_window import MainWindow
from shipgui.gui.settings import AppSettings

WAIT_MS = 20_000


def small_document() -> PlanDocument:
    """Four jobs on three invented sites, 6 km apart on a line (about 9 min by road)."""
    sites = [Site("A", "North stop", x_km=0.0, y_km=0.0),
             Site("B", "Middle stop", x_km=6.0, y_km=0.0),
             Site("C", "South stop", x_km=12.0, y_km=0.0)]
    hour = 3600
    jobs = [Job("J1", "A", "B", 8 * hour, 9 * hour, row=2),
            Job("J2", "B", "C", 9 * hour + 1800, 10 * hour, row=3),
            Job("J3", "A", "A", 8 * hour + 1800, 11 * hour, row=4),
            Job("J4", "C", "A", 10 * hour + 1800, 12 * hour, row=5)]
    return PlanDocument(jobs, sites, {}, Settings(turnaround=600),
                        sources={"jobs": "/invented/small-jobs.csv"})


@pytest.fixture
def app_settings(tmp_path) -> AppSettings:
    return AppSettings.at_path(tmp_path / "settings.ini")


@pytest.fixture
def window(qtbot, app_settings):
    w = MainWindow(app_settings, solve_delay_ms=0)
    yield w
    # Closed here rather than by qtbot, whose teardown runs first and would meet the
    # unsaved-changes question of a test that left edits behind.
    w.solver.cancel()
    QThreadPool.globalInstance().waitForDone(WAIT_MS)
    w.undo_stack.setClean()
    w.close()
    w.deleteLater()


def load_and_wait(qtbot, window: MainWindow, document: PlanDocument):
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS) as blocker:
        window.load_document(document)
    return blocker.args[0]


@pytest.fixture
def small_window(qtbot, window):
    load_and_wait(qtbot, window, small_document())
    return window


@pytest.fixture
def demo_window(qtbot, window):
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS):
        window.files.open_demo()
    return window
