"""Fixtures for the desktop tests: every window uses a temporary settings file and
every dialog is patched per test, so nothing blocks and nothing touches the
user's own preferences."""

from __future__ import annotations

import pytest
from PySide6.QtCore import QThreadPool

from shipgui.gui.main_window import MainWindow
from shipgui.gui.services.settings import AppSettings
from tests.support.documents import small_document
from tests.support.gui import WAIT_MS, load_and_wait


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


@pytest.fixture
def small_window(qtbot, window):
    load_and_wait(qtbot, window, small_document())
    return window


@pytest.fixture
def demo_window(qtbot, window):
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS):
        window.files.open_demo()
    return window
