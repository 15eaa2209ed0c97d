"""Offering back, at start, the work a crashed window autosaved."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

from PySide6.QtWidgets import QMessageBox, QWidget

from .services.autosave import Recovery, RecoveryScan, find_recoveries

__all__ = ["offer_recovery"]


def _tell_what_was_kept(parent: QWidget, scan: RecoveryScan) -> None:
    """One message for recovery files that cannot be offered (none was deleted)."""
    lines = scan.set_aside + scan.kept
    if lines:
        QMessageBox.warning(parent, "Recovery files not offered",
                            "Some unsaved work from an earlier session cannot be offered "
                            "back. Nothing was deleted.\n\n" + "\n\n".join(lines))


def offer_recovery(parent: QWidget, directory: Path,
                   take: Callable[[Recovery], None]) -> bool:
    """Offer each recovery file in ``directory``; True if one was taken.

    Recover hands it to ``take`` (one day per window), Discard deletes it, Later
    keeps it for the next start.  Files that cannot be read were set aside by
    :func:`find_recoveries`; the user is told which, and where they are.
    """
    scan = find_recoveries(directory)
    _tell_what_was_kept(parent, scan)
    recovered = False
    buttons = QMessageBox.StandardButton
    for found in scan.found:
        if recovered:
            found.lock.unlock()  # one day per window; the rest wait for the next start
            continue
        answer = QMessageBox.question(
            parent, "Recover unsaved work?",
            f"shipgui did not close properly. Unsaved work on {found.document.title} "
            f"was kept (autosaved {found.saved_at.replace('T', ' ')}). Recover it?",
            buttons.Yes | buttons.Discard | buttons.Cancel, buttons.Yes)
        if answer == buttons.Yes:
            take(found)
            found.discard()
            recovered = True
        elif answer == buttons.Discard:
            found.discard()
        else:
            found.lock.unlock()
    return recovered
