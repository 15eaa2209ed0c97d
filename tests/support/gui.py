"""Helpers for the desktop tests: waiting for the window's answer."""

from __future__ import annotations

from shipgui.core.document import DayDocument

WAIT_MS = 20_000  # the longest a test waits for a solve or an export


def load_and_wait(qtbot, window, document: DayDocument):
    """Show ``document`` in ``window`` and return the plan it shows (or None)."""
    with qtbot.waitSignal(window.plan_shown, timeout=WAIT_MS) as blocker:
        window.load_document(document)
    return blocker.args[0]


def wait_for_export(qtbot, window, start) -> None:
    """Call ``start()`` (an export action) and wait until the file is written."""
    with qtbot.waitSignal(window.files.exports.finished, timeout=WAIT_MS):
        assert start()
