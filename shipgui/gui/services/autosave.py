"""Autosave of unsaved work to a recovery file, offered back after a crash.

Every minute, while the day has changes that are not saved, the plan document
is written (atomically) to ``<data folder>/recovery/<id>.shipgui``.  A clean
save or a clean close removes it.  A lock file beside it (QLockFile) tells a
running window's recovery file from one left behind by a crash: only files
whose lock is stale are offered on the next start.
"""

from __future__ import annotations

import json
import uuid
from dataclasses import dataclass
from datetime import datetime
from pathlib import Path

from PySide6.QtCore import QLockFile, QObject, QStandardPaths, QTimer

from shipgui.core import InputError
from shipgui.core.document import DayDocument
from shipgui.core.io.files import write_bytes_atomic
from shipgui.core.io.plan_file import (
    PLAN_SUFFIX,
    inputs_from_json,
    inputs_to_json,
    read_plan_json,
)

__all__ = ["Autosaver", "Recovery", "AUTOSAVE_MS", "default_data_directory",
           "find_recoveries"]

AUTOSAVE_MS = 60_000
RECOVERY_FOLDER = "recovery"


def default_data_directory() -> Path:
    """The user's application data folder (QStandardPaths.AppDataLocation)."""
    location = QStandardPaths.StandardLocation.AppDataLocation
    return Path(QStandardPaths.writableLocation(location))


def _lock(path: Path) -> QLockFile:
    lock = QLockFile(str(path.with_suffix(".lock")))
    lock.setStaleLockTime(0)  # stale only when its process is gone, however old it is
    return lock


@dataclass
class Recovery:
    """A recovery file left by a window that did not close cleanly."""

    path: Path
    document: DayDocument
    saved_at: str
    original: str | None
    lock: QLockFile

    def discard(self) -> None:
        self.path.unlink(missing_ok=True)
        self.lock.unlock()


def find_recoveries(directory: Path) -> list[Recovery]:
    """Recovery files of windows that are gone, each locked for the caller.

    Unreadable recovery files are removed: they cannot be offered anyway.
    """
    folder = directory / RECOVERY_FOLDER
    found = []
    for path in sorted(folder.glob(f"*{PLAN_SUFFIX}")):
        lock = _lock(path)
        if not lock.tryLock(0):
            continue  # another window is running and owns it
        try:
            data = read_plan_json(path)
            document = DayDocument.from_inputs(inputs_from_json(data, str(path)), path)
        except InputError:
            path.unlink(missing_ok=True)
            lock.unlock()
            continue
        meta = data.get("recovery", {}) if isinstance(data.get("recovery"), dict) else {}
        original = meta.get("original")
        document.path = Path(original) if isinstance(original, str) and original else None
        found.append(Recovery(path, document, str(meta.get("saved_at", "")),
                              document.path and str(document.path), lock))
    return found


class Autosaver(QObject):
    """Writes the document to this window's recovery file while it has unsaved changes.

    ``is_dirty`` says whether there is unsaved work (the undo stack is not clean).
    """

    def __init__(self, document: DayDocument, is_dirty, directory: Path,
                 parent: QObject | None = None, *, interval_ms: int = AUTOSAVE_MS) -> None:
        super().__init__(parent)
        self.document = document
        self.is_dirty = is_dirty
        self.folder = directory / RECOVERY_FOLDER
        self.path = self.folder / f"{uuid.uuid4().hex}{PLAN_SUFFIX}"
        self._lock: QLockFile | None = None
        self.last_error = ""
        self.timer = QTimer(self)
        self.timer.setInterval(interval_ms)
        self.timer.timeout.connect(self.autosave)
        self.timer.start()

    def autosave(self) -> bool:
        """Write the recovery file if there is unsaved work (else remove it)."""
        if not self.is_dirty():
            self.discard()
            return False
        data = inputs_to_json(self.document.inputs())
        data["recovery"] = {"saved_at": datetime.now().isoformat(timespec="seconds"),
                            "original": str(self.document.path) if self.document.path else ""}
        try:
            self.folder.mkdir(parents=True, exist_ok=True)
            if self._lock is None:
                lock = _lock(self.path)
                if not lock.tryLock(0):
                    raise OSError(f"cannot lock {lock.error()}")
                self._lock = lock
            text = json.dumps(data, indent=1, ensure_ascii=False) + "\n"
            write_bytes_atomic(self.path, text.encode("utf-8"))
        except OSError as exc:  # autosave must never disturb the user's work
            self.last_error = str(exc)
            return False
        return True

    def discard(self) -> None:
        """Remove the recovery file: the work is saved or deliberately dropped."""
        self.path.unlink(missing_ok=True)
        if self._lock is not None:
            self._lock.unlock()
            self._lock = None

    def stop(self) -> None:
        self.timer.stop()
        self.discard()
