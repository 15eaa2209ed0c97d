"""Writing exports (PDF, JSON, routes) off the GUI thread, with progress and cancel.

An export is a call ``write(progress, cancelled)`` that renders and writes one
file all or nothing: ``progress(done, total)`` reports how far it is and
``cancelled()`` turns true when the user gave up (the writer then raises
:class:`~shipgui.core.Cancelled` and leaves no file behind).  The writer works
on a plan snapshot, so the user can go on editing meanwhile.
"""

from __future__ import annotations

import gc
import threading
from collections.abc import Callable
from pathlib import Path

from PySide6.QtCore import QObject, QRunnable, QThreadPool, Signal

from shipgui.core import Cancelled

from ..wording import os_error_text

__all__ = ["ExportSignals", "ExportJob", "ExportController", "Writer"]

# write(progress, cancelled): renders and writes the file, all or nothing
Writer = Callable[[Callable[[int, int], None], Callable[[], bool]], None]


class ExportSignals(QObject):
    progress = Signal(int, int)  # done, total (total 0: unknown)
    finished = Signal()
    failed = Signal(str)  # a sentence for the user
    cancelled = Signal()


class ExportJob(QRunnable):
    """Runs one writer; every outcome comes back as a signal, never raised."""

    def __init__(self, write: Writer, flag: threading.Event) -> None:
        super().__init__()
        self.signals = ExportSignals()
        self._write = write
        self._flag = flag
        self.setAutoDelete(True)

    def _progress(self, done: int, total: int) -> None:
        if self._flag.is_set():
            raise Cancelled()
        self.signals.progress.emit(done, total)

    def _outcome(self) -> tuple[str, str]:
        """Run the writer: ("finished" | "cancelled" | "failed", reason)."""
        # A full garbage collection walks every object the PDF builder made while
        # holding the interpreter lock: 0.4-0.6 s frozen window, every 2 s, at 3 000
        # jobs.  Collection waits until the export is done (cyclic garbage only).
        collecting = gc.isenabled()
        gc.disable()
        try:
            self._write(self._progress, self._flag.is_set)
        except Cancelled:
            return "cancelled", ""
        except OSError as exc:
            return "failed", os_error_text(exc)
        except Exception as exc:  # noqa: BLE001 - shown to the user, never raised here
            return "failed", str(exc) or type(exc).__name__
        finally:
            if collecting:
                gc.enable()
        return "finished", ""

    def run(self) -> None:
        kind, reason = self._outcome()
        if kind == "finished":
            self.signals.finished.emit()
        elif kind == "cancelled":
            self.signals.cancelled.emit()
        else:
            self.signals.failed.emit(reason)


class ExportController(QObject):
    """One export at a time; says what it writes, how far it is, and how it ended."""

    started = Signal(str)  # what is being written, e.g. "the PDF day.pdf"
    progress = Signal(int, int)
    finished = Signal(object)  # Path written
    failed = Signal(str, str)  # title of the export, reason
    cancelled = Signal(str)
    busy_changed = Signal(bool)

    def __init__(self, parent: QObject | None = None, *,
                 pool: QThreadPool | None = None) -> None:
        super().__init__(parent)
        self._pool = pool or QThreadPool.globalInstance()
        self._flag: threading.Event | None = None
        self._job: ExportJob | None = None
        self._path: Path | None = None
        self._what = ""

    @property
    def busy(self) -> bool:
        return self._job is not None

    @property
    def what(self) -> str:
        return self._what

    def start(self, what: str, path: Path, write: Writer) -> bool:
        """Start writing ``path``; False if another export is still running."""
        if self.busy:
            return False
        self._flag = threading.Event()
        self._job = ExportJob(write, self._flag)
        self._path, self._what = path, what
        signals = self._job.signals
        signals.progress.connect(self.progress)
        signals.finished.connect(self._on_finished)
        signals.failed.connect(self._on_failed)
        signals.cancelled.connect(self._on_cancelled)
        self.busy_changed.emit(True)
        self.started.emit(what)
        self._pool.start(self._job)
        return True

    def cancel(self) -> None:
        """Ask the running export to stop; nothing is written."""
        if self._flag is not None:
            self._flag.set()

    def _end(self) -> tuple[Path | None, str]:
        path, what = self._path, self._what
        self._job, self._flag, self._path, self._what = None, None, None, ""
        self.busy_changed.emit(False)
        return path, what

    def _on_finished(self) -> None:
        path, _what = self._end()
        self.finished.emit(path)

    def _on_failed(self, reason: str) -> None:
        _path, what = self._end()
        self.failed.emit(what, reason)

    def _on_cancelled(self) -> None:
        _path, what = self._end()
        self.cancelled.emit(what)
