"""Autosave of unsaved work to a recovery file, offered back after a crash.

Every minute, while the day has changes that are not saved, the plan document
is written (atomically) to ``<data folder>/recovery/<id>.shipgui``.  A clean
save or a clean close removes it.  A lock file beside it (QLockFile) tells a
running window's recovery file from one left behind by a crash: only files
whose lock is stale are offered on the next start.

Nothing in the recovery folder is ever deleted unread: a file that cannot be
read (damaged, or not a file at all) is set aside under a new name with the
reason said, and a file from a newer shipgui is left where it is.  A failed
autosave is reported (``failed``) so the user knows the work is not protected.
"""

from __future__ import annotations

import json
import uuid
from dataclasses import dataclass, field
from datetime import datetime
from pathlib import Path

from PySide6.QtCore import QLockFile, QObject, QStandardPaths, QTimer, Signal

from shipgui.core import InputError
from shipgui.core.document import DayDocument
from shipgui.core.io.files import write_bytes_atomic
from shipgui.core.io.plan_file import (
    PLAN_SUFFIX,
    SCHEMA_VERSION,
    inputs_from_json,
    inputs_to_json,
    plan_file_bytes,
    read_plan_json,
)

from ..wording import os_error_text

__all__ = ["Autosaver", "Recovery", "RecoveryScan", "AUTOSAVE_MS", "SET_ASIDE_SUFFIX",
           "default_data_directory", "find_recoveries"]

AUTOSAVE_MS = 60_000
RECOVERY_FOLDER = "recovery"
SET_ASIDE_SUFFIX = ".unreadable"  # recovery.shipgui -> recovery.shipgui.unreadable


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


@dataclass
class RecoveryScan:
    """What the recovery folder held: work to offer back, and files that could not
    be offered, each with what was done and why (sentences for the user)."""

    found: list[Recovery] = field(default_factory=list)
    set_aside: list[str] = field(default_factory=list)  # renamed, kept
    kept: list[str] = field(default_factory=list)  # left in place (a newer shipgui's)


def _set_aside(path: Path, reason: str) -> str:
    """Rename an unreadable recovery file (or folder) so it is never offered again."""
    target = path.with_name(path.name + SET_ASIDE_SUFFIX)
    k = 1
    while target.exists():
        k += 1
        target = path.with_name(f"{path.name}{SET_ASIDE_SUFFIX}-{k}")
    try:
        path.rename(target)
    except OSError as exc:
        return (f"{path} could not be read ({reason}) and could not be set aside "
                f"({os_error_text(exc)}); it was left as it is.")
    return f"{path.name} could not be read ({reason}); it was kept as {target}."


def _newer(data) -> int | None:
    version = data.get("schema_version") if isinstance(data, dict) else None
    if isinstance(version, int) and not isinstance(version, bool) and version > SCHEMA_VERSION:
        return version
    return None


def _read(path: Path) -> tuple[dict, DayDocument]:
    """The recovery file's JSON and day; raises InputError, or anything else that a
    damaged file provokes (the caller sets it aside)."""
    data = read_plan_json(path)
    document = DayDocument.from_inputs(inputs_from_json(data, str(path)), path)
    plan_file_bytes(document.inputs())  # it must be possible to save it again
    return data, document


def _recovery(path: Path, data: dict, document: DayDocument, lock: QLockFile) -> Recovery:
    meta = data.get("recovery", {}) if isinstance(data.get("recovery"), dict) else {}
    original = meta.get("original")
    document.path = Path(original) if isinstance(original, str) and original else None
    return Recovery(path, document, str(meta.get("saved_at", "")),
                    document.path and str(document.path), lock)


def find_recoveries(directory: Path) -> RecoveryScan:
    """Recovery files of windows that are gone, each locked for the caller.

    A file that cannot be read is set aside (renamed, never deleted); a file
    from a newer shipgui is kept where it is.  No file stops the app starting.
    """
    scan = RecoveryScan()
    for path in sorted((directory / RECOVERY_FOLDER).glob(f"*{PLAN_SUFFIX}")):
        lock = _lock(path)
        if not lock.tryLock(0):
            continue  # another window is running and owns it
        try:
            data, document = _read(path)
        except Exception as exc:  # noqa: BLE001 - a damaged file must not stop the app
            version = _newer(_json_or_none(path))
            lock.unlock()
            if version is not None:
                scan.kept.append(f"{path} was written by a newer shipgui (plan format "
                                 f"version {version}); it was kept: open it with that "
                                 "version.")
            else:
                reason = str(exc) if isinstance(exc, InputError) else "the file is damaged"
                scan.set_aside.append(_set_aside(path, reason))
            continue
        scan.found.append(_recovery(path, data, document, lock))
    return scan


def _json_or_none(path: Path):
    try:
        return read_plan_json(path)
    except Exception:  # noqa: BLE001 - only asked to tell a newer version's file
        return None


class Autosaver(QObject):
    """Writes the document to this window's recovery file while it has unsaved changes.

    ``is_dirty`` says whether there is unsaved work (the undo stack is not clean).
    ``failed(reason)`` is sent when writing fails, ``succeeded`` when it works again.
    """

    failed = Signal(str)
    succeeded = Signal()

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

    def _write(self) -> None:
        data = inputs_to_json(self.document.inputs())
        data["recovery"] = {"saved_at": datetime.now().isoformat(timespec="seconds"),
                            "original": str(self.document.path) if self.document.path else ""}
        self.folder.mkdir(parents=True, exist_ok=True)
        if self._lock is None:
            lock = _lock(self.path)
            if not lock.tryLock(0):
                raise OSError(f"the recovery file {self.path.name} is locked by another "
                              "program")
            self._lock = lock
        text = json.dumps(data, indent=1, ensure_ascii=False) + "\n"
        write_bytes_atomic(self.path, text.encode("utf-8"))

    def autosave(self) -> bool:
        """Write the recovery file if there is unsaved work (else remove it)."""
        if not self.is_dirty():
            self.discard()
            return False
        try:
            self._write()
        except (OSError, ValueError) as exc:  # autosave must never disturb the user's work
            reason = os_error_text(exc) if isinstance(exc, OSError) else (
                f"the day holds text that cannot be written ({exc})")
            self.last_error = reason
            self.failed.emit(reason)
            return False
        if self.last_error:
            self.last_error = ""
            self.succeeded.emit()
        return True

    def discard(self) -> None:
        """Remove the recovery file: the work is saved or deliberately dropped."""
        self.path.unlink(missing_ok=True)
        if self._lock is not None:
            self._lock.unlock()
            self._lock = None
        if self.last_error:  # nothing left to protect
            self.last_error = ""
            self.succeeded.emit()

    def stop(self) -> None:
        self.timer.stop()
        self.discard()
