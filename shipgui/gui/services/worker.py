"""Solving off the GUI thread.

A :class:`SolveWorker` builds the day from a snapshot of the inputs and solves
it; progress and the outcome come back as signals (never raised in the
thread), and the worker never touches a widget.  :class:`SolveController`
starts one worker per change, numbers them (the generation), cancels the one
running, and forwards only the newest outcome, so a stale result is never
shown as current.
"""

from __future__ import annotations

import threading
import time
import traceback
from collections.abc import Callable
from functools import partial

from PySide6.QtCore import QObject, QRunnable, QThreadPool, QTimer, Signal

from shipgui.core import Cancelled, Day, InputError, Plan, Problem, solve_day
from shipgui.core.day import build_inputs
from shipgui.core.document import DayDocument

__all__ = ["WorkerSignals", "SolveWorker", "SolveController", "STAGE_NAMES"]

STAGE_NAMES = {
    "checking": "Checking the inputs",
    "relation": "Working out which jobs can follow which",
    "matching": "Pairing jobs onto vehicles",
    "least deadhead": "Finding the routes with the least empty driving",
    "serving the most": "Choosing the jobs the vehicles available can serve",
    "routes": "Writing the routes",
    "verification": "Checking the plan independently",
    "working-day search": "Searching for fewer vehicles within the working day",
}
SEARCH_STAGE = "working-day search"


class WorkerSignals(QObject):
    """Signals of one worker; every one carries the worker's generation."""

    started = Signal(int)
    progress = Signal(int, str)
    finished = Signal(int, object, float)  # generation, Plan, seconds taken
    errored = Signal(int, str, object)  # generation, kind, detail
    # generation, vehicles planned, vehicles proven needed, seconds: each improvement
    # of a working-day search
    found = Signal(int, int, int, float)


class SolveWorker(QRunnable):
    """Build the day and solve it.

    ``errored`` kinds: ``"input"`` (detail: list of Problem), ``"cancelled"``
    (detail: None) and ``"failure"`` (detail: a short text and the traceback).
    """

    def __init__(self, generation: int, build: Callable[[], Day],
                 cancel_flag: threading.Event) -> None:
        super().__init__()
        self.generation = generation
        self.signals = WorkerSignals()
        self._build = build
        self._cancel_flag = cancel_flag
        self.setAutoDelete(True)

    def run(self) -> None:
        g = self.generation
        signals = self.signals
        t0 = time.perf_counter()
        try:
            signals.started.emit(g)
            signals.progress.emit(g, "checking")
            day = self._build()
            if self._cancel_flag.is_set():
                raise Cancelled()
            plan = solve_day(day, progress=partial(signals.progress.emit, g),
                             cancelled=self._cancel_flag.is_set,
                             on_progress=lambda p: signals.found.emit(
                                 g, p.vehicles, p.lower_bound, p.seconds))
        except Cancelled:
            signals.errored.emit(g, "cancelled", None)
        except InputError as exc:
            more = getattr(exc, "more", 0)
            signals.errored.emit(g, "input", list(exc.problems) + (
                [Problem(f"… and {more} more problems (fix these first)")] if more else []))
        except Exception as exc:  # noqa: BLE001 - reported to the user, never raised here
            signals.errored.emit(g, "failure", (f"{type(exc).__name__}: {exc}",
                                                traceback.format_exc()))
        else:
            signals.finished.emit(g, plan, time.perf_counter() - t0)


def snapshot(document: DayDocument) -> Callable[[], Day]:
    """A call that builds the day from a copy of the current inputs, so the
    worker never reads the document while the user goes on editing."""
    return partial(build_inputs, document.inputs())


class SolveController(QObject):
    """Re-solves after each change and reports only the newest outcome."""

    busy_changed = Signal(bool)
    stage_changed = Signal(str)  # a readable stage text
    plan_ready = Signal(object, float)  # Plan, seconds
    problems_found = Signal(object)  # list of Problem
    solve_failed = Signal(str, str)  # short text, details
    solve_cancelled = Signal()
    # vehicles planned, vehicles proven needed, seconds: a working-day search improved
    search_progress = Signal(int, int, float)

    def __init__(self, parent: QObject | None = None, *, delay_ms: int = 80,
                 pool: QThreadPool | None = None) -> None:
        super().__init__(parent)
        self._pool = pool or QThreadPool.globalInstance()
        self._generation = 0
        self._flag: threading.Event | None = None
        self._pending: Callable[[], Day] | None = None
        self._workers: dict[int, SolveWorker] = {}  # keep signal objects alive
        self._searching = False  # the current worker is in a working-day search
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(delay_ms)
        self._timer.timeout.connect(self._start)

    @property
    def generation(self) -> int:
        return self._generation

    @property
    def busy(self) -> bool:
        return self._flag is not None or self._timer.isActive()

    def request(self, build: Callable[[], Day]) -> None:
        """Solve again soon; quick bursts of edits are solved once."""
        self._cancel_running()
        self._pending = build
        self._timer.start()
        self.busy_changed.emit(True)

    def cancel(self, *, keep_search: bool = True) -> None:
        """Stop the solve in progress (the last shown plan stays, marked out of date).

        A working-day search stops and hands back its best plan: that outcome is
        still the current one and arrives as ``plan_ready`` (status "stopped"),
        unless ``keep_search`` is false (the inputs changed: nothing may arrive)."""
        was_busy = self.busy
        self._timer.stop()
        self._pending = None
        if keep_search and self._searching and self._flag is not None:
            self._flag.set()
            self.stage_changed.emit("Stopping the search; the best plan found is kept…")
            return
        self._cancel_running()
        self._generation += 1  # whatever still arrives is stale
        if was_busy:
            self.busy_changed.emit(False)
            self.solve_cancelled.emit()

    def _cancel_running(self) -> None:
        if self._flag is not None:
            self._flag.set()
            self._flag = None

    def _start(self) -> None:
        build, self._pending = self._pending, None
        if build is None:
            return
        self._generation += 1
        self._flag = threading.Event()
        self._searching = False
        worker = SolveWorker(self._generation, build, self._flag)
        worker.signals.progress.connect(self._on_progress)
        worker.signals.found.connect(self._on_found)
        worker.signals.finished.connect(self._on_finished)
        worker.signals.errored.connect(self._on_errored)
        self._workers[self._generation] = worker
        self._pool.start(worker)

    def _is_current(self, generation: int) -> bool:
        return generation == self._generation and not self._timer.isActive()

    def _done(self, generation: int) -> bool:
        """Forget the worker; True when its outcome is the current one."""
        self._workers.pop(generation, None)
        if not self._is_current(generation):
            return False
        self._flag = None
        self._searching = False
        self.busy_changed.emit(False)
        return True

    def _on_progress(self, generation: int, stage: str) -> None:
        if self._is_current(generation) and not (self._flag and self._flag.is_set()):
            # From the search on, a cancel keeps the best plan (also while it is verified).
            self._searching = self._searching or stage == SEARCH_STAGE
            self.stage_changed.emit(STAGE_NAMES.get(stage, stage))

    def _on_found(self, generation: int, vehicles: int, bound: int, seconds: float) -> None:
        if self._is_current(generation):
            self.search_progress.emit(vehicles, bound, seconds)

    def _on_finished(self, generation: int, plan: Plan, seconds: float) -> None:
        if self._done(generation):
            self.plan_ready.emit(plan, seconds)

    def _on_errored(self, generation: int, kind: str, detail) -> None:
        if not self._done(generation):
            return
        if kind == "input":
            self.problems_found.emit(detail)
        elif kind == "cancelled":
            self.solve_cancelled.emit()
        else:
            self.solve_failed.emit(*detail)
