"""Starting the desktop app: ``run(files, demo=..., screenshot=...)``."""

from __future__ import annotations

import gc
import os
import sys
from pathlib import Path

from PySide6.QtCore import QEventLoop, QTimer
from PySide6.QtGui import QIcon
from PySide6.QtWidgets import QApplication

from shipgui.resources import resource_path

from .main_window import MainWindow
from .services.settings import APPLICATION, ORGANISATION, AppSettings

__all__ = ["run", "make_application", "open_window", "save_screenshot"]

SCREENSHOT_TIMEOUT_MS = 60_000


def make_application() -> QApplication:
    """The QApplication (created once) with the names QSettings uses."""
    app = QApplication.instance()
    if app is None:
        app = QApplication([sys.argv[0] if sys.argv else "shipgui"])
        _keep_the_window_responsive()
    app.setOrganizationName(ORGANISATION)
    app.setApplicationName(APPLICATION)
    app.setApplicationDisplayName("shipgui")
    icon = resource_path("icons", "shipgui.svg")
    if icon.exists():
        app.setWindowIcon(QIcon(str(icon)))
    return app


def _keep_the_window_responsive() -> None:
    """The window shares Python's interpreter lock with the solver's thread.
    Hand the lock over every millisecond instead of every 5 (Python's default),
    so that drawing waits less while the solver runs Python code; and take
    everything loaded so far (Qt, numpy, numba: long-lived) out of the garbage
    collector's full passes, which would otherwise pause the window for tens
    of milliseconds now and then."""
    sys.setswitchinterval(0.001)
    gc.collect()
    gc.freeze()


def open_window(files: list[str], *, demo: bool,
                settings: AppSettings | None = None, recover: bool = True) -> MainWindow:
    """A main window showing recovered work, the demo day, the given files, or nothing yet."""
    window = MainWindow(settings)
    geometry = window.settings.get("window/geometry")
    if not geometry.isEmpty():
        window.restoreGeometry(geometry)
    if recover and window.offer_recovery():
        return window
    if demo:
        window.files.open_demo()
    elif files:
        window.files.open_paths(files)
    return window


def wait_for_plan(window: MainWindow, timeout_ms: int = SCREENSHOT_TIMEOUT_MS) -> bool:
    """Run the event loop until the solver has reported (True) or the time is up."""
    if not window.solver.busy:
        return True
    loop = QEventLoop()
    window.plan_shown.connect(loop.quit)
    window.solver.solve_cancelled.connect(loop.quit)
    timer = QTimer()
    timer.setSingleShot(True)
    timer.timeout.connect(loop.quit)
    timer.start(timeout_ms)
    loop.exec()
    return timer.isActive()


def save_screenshot(window: MainWindow, path: str | Path) -> bool:
    window.show()
    QApplication.processEvents()
    window.timeline.zoom_to_fit()
    QApplication.processEvents()
    return window.grab().save(str(path))


def run(argv_files: list[str], *, demo: bool = False, screenshot: str | None = None,
        settings: AppSettings | None = None) -> int:
    """Open the main window; returns the process exit status.

    With ``screenshot`` the window is drawn offscreen once the solve has
    finished, saved as PNG and the function returns at once: 0 when the plan
    was drawn, 2 when the inputs could not be planned (the picture then shows
    the problems), 1 when the picture could not be written.  ``settings``
    replaces the user's stored preferences (tests pass a temporary file).
    """
    if screenshot and QApplication.instance() is None:
        os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
    app = make_application()
    window = open_window(list(argv_files), demo=demo, settings=settings,
                         recover=not screenshot)
    if screenshot:
        window.resize(1400, 820)
        finished = wait_for_plan(window)
        if not save_screenshot(window, screenshot):
            print(f"shipgui: cannot write the screenshot {screenshot}", file=sys.stderr)
            code = 1
        else:
            code = 0 if finished and window.plan is not None else 2
        window.undo_stack.setClean()
        window.close()
        return code
    window.show()
    return app.exec()
