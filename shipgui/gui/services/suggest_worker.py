"""Looking for slot moves that save a vehicle, off the GUI thread.

Same pattern as :mod:`.worker`: a :class:`QRunnable` whose outcome comes back as
a signal carrying its generation, a cancel flag the search checks, and a
controller that forwards only the newest outcome.
"""

from __future__ import annotations

import threading
import traceback

from PySide6.QtCore import QObject, QRunnable, QThreadPool, Signal

from shipgui.core import Cancelled, Day
from shipgui.core.fleet.suggest import suggest_moves

__all__ = ["SuggestSignals", "SuggestWorker", "SuggestController"]


class SuggestSignals(QObject):
    finished = Signal(int, object, object)  # generation, SuggestionSearch, Day
    errored = Signal(int, str)  # generation, text ("" when cancelled)


class SuggestWorker(QRunnable):
    def __init__(self, generation: int, day: Day, count: int, max_move: int,
                 flag: threading.Event) -> None:
        super().__init__()
        self.generation = generation
        self.signals = SuggestSignals()
        self._day, self._count, self._max_move, self._flag = day, count, max_move, flag
        self.setAutoDelete(True)

    def run(self) -> None:
        def check() -> None:
            if self._flag.is_set():
                raise Cancelled()
        try:
            search = suggest_moves(self._day, self._count, max_move=self._max_move, check=check)
        except Cancelled:
            self.signals.errored.emit(self.generation, "")
        except Exception as exc:  # noqa: BLE001 - reported to the user, never raised here
            self.signals.errored.emit(self.generation, f"{type(exc).__name__}: {exc}\n"
                                      + traceback.format_exc(limit=3))
        else:
            self.signals.finished.emit(self.generation, search, self._day)


class SuggestController(QObject):
    """Runs one search at a time; a new request or :meth:`cancel` drops the old one."""

    found = Signal(object, object)  # SuggestionSearch, the Day it is for
    failed = Signal(str)
    busy_changed = Signal(bool)

    def __init__(self, parent: QObject | None = None, pool: QThreadPool | None = None) -> None:
        super().__init__(parent)
        self._pool = pool or QThreadPool.globalInstance()
        self._generation = 0
        self._flag: threading.Event | None = None
        self._workers: dict[int, SuggestWorker] = {}

    @property
    def busy(self) -> bool:
        return self._flag is not None

    def request(self, day: Day, count: int, max_move: int) -> None:
        self.cancel()
        self._generation += 1
        self._flag = threading.Event()
        worker = SuggestWorker(self._generation, day, count, max_move, self._flag)
        worker.signals.finished.connect(self._on_finished)
        worker.signals.errored.connect(self._on_errored)
        self._workers[self._generation] = worker
        self.busy_changed.emit(True)
        self._pool.start(worker)

    def cancel(self) -> None:
        if self._flag is not None:
            self._flag.set()
            self._flag = None
            self._generation += 1
            self.busy_changed.emit(False)

    def _current(self, generation: int) -> bool:
        self._workers.pop(generation, None)
        if generation != self._generation:
            return False
        self._flag = None
        self.busy_changed.emit(False)
        return True

    def _on_finished(self, generation: int, search, day) -> None:
        if self._current(generation):
            self.found.emit(search, day)

    def _on_errored(self, generation: int, text: str) -> None:
        if self._current(generation) and text:
            self.failed.emit(text)
