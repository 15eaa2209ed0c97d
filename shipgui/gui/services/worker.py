"""Solving off the GUI thread.

A :class:`SolveWorker` builds the day from a snapshot of the inputs and solves
it; progress and the outcome come back as signals (never raised in the
thread), and the worker never touches a widget.  The fleet and its proof come
first (``fleet_ready``), the routes with the least empty driving follow
(``finished``); both carry whole plans, so the screens never mix two.
:class:`SolveController` starts one worker per change, numbers them (the
generation), cancels the one running, and forwards only the newest outcome,
so a stale result is never shown as current.

On the first start on a computer the kernels are not compiled yet: the first
worker starts their preparation in child processes
(:func:`shipgui.core.prepare.shared_preparation`), finds the fleet and
proof meanwhile with the pure numpy/scipy matching, and waits for the
preparation before the least-empty-driving stage.
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
from shipgui.core.fleet.solve import LEAST_DEADHEAD_SECONDS
from shipgui.core.prepare import Preparation, shared_preparation

__all__ = ["WorkerSignals", "SolveWorker", "SolveController", "STAGE_NAMES"]

STAGE_NAMES = {
    "checking": "Checking the inputs",
    "preparing": "Preparing the solver for this computer (first start only)",
    "relation": "Working out which jobs can follow which",
    "matching": "Pairing jobs onto vehicles",
    "least deadhead": "Finding the routes with the least empty driving",
    "improving": "Finding the routes with the least empty driving",
    "serving the most": "Choosing the jobs the vehicles available can serve",
    "routes": "Writing the routes",
    "verification": "Checking the plan independently",
    "working-day search": "Searching for fewer vehicles within the working day",
}
SEARCH_STAGE = "working-day search"
# How often a worker waiting for the kernels' preparation looks at its cancel flag.
PREPARATION_POLL_S = 0.05
# Longest a worker waits for the window to draw the fleet before it goes on.
FLEET_DRAWN_WAIT_S = 0.5


class WorkerSignals(QObject):
    """Signals of one worker; every one carries the worker's generation."""

    started = Signal(int)
    progress = Signal(int, str)
    fleet_ready = Signal(int, object, float)  # generation, fleet-and-proof Plan, seconds
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
                 cancel_flag: threading.Event, *,
                 preparation: Callable[[], Preparation | None] = shared_preparation,
                 fleet_drawn: threading.Event | None = None) -> None:
        super().__init__()
        self.generation = generation
        self.signals = WorkerSignals()
        self._build = build
        self._cancel_flag = cancel_flag
        self._preparation = preparation
        # Set by the window once the fleet is drawn: the least-empty-driving stage
        # waits for it, since drawing and the stage's Python parts share the GIL
        # and would slow each other (the window would stutter).
        self._fleet_drawn = fleet_drawn
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
            plan = self._solve(day, t0)
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


    def _solve(self, day: Day, t0: float) -> Plan:
        g, signals, flag = self.generation, self.signals, self._cancel_flag

        def fleet_first(plan: Plan) -> None:
            signals.fleet_ready.emit(g, plan, time.perf_counter() - t0)
            signals.progress.emit(g, "improving")
            if self._fleet_drawn is not None:
                self._fleet_drawn.wait(FLEET_DRAWN_WAIT_S)

        preparation = self._preparation()
        if preparation is not None and not preparation.done():
            signals.progress.emit(g, "preparing")
            if day.settings.max_day is None:  # the fleet at once, without kernels
                fleet_first(solve_day(day, kernel="dinic", least_deadhead=False,
                                      cancelled=flag.is_set))
                signals.progress.emit(g, "preparing")
            while not preparation.wait(PREPARATION_POLL_S):
                if flag.is_set():
                    raise Cancelled()
            fleet_first = None
        return solve_day(day, progress=partial(signals.progress.emit, g),
                         cancelled=flag.is_set, fleet_first=fleet_first,
                         least_deadhead_seconds=LEAST_DEADHEAD_SECONDS,
                         on_progress=lambda p: signals.found.emit(
                             g, p.vehicles, p.lower_bound, p.seconds))


def snapshot(document: DayDocument) -> Callable[[], Day]:
    """A call that builds the day from a copy of the current inputs, so the
    worker never reads the document while the user goes on editing."""
    return partial(build_inputs, document.inputs())


class SolveController(QObject):
    """Re-solves after each change and reports only the newest outcome."""

    busy_changed = Signal(bool)
    stage_changed = Signal(str)  # a readable stage text
    fleet_plan_ready = Signal(object, float)  # fleet and proof Plan, seconds; routes follow
    plan_ready = Signal(object, float)  # Plan, seconds
    problems_found = Signal(object)  # list of Problem
    solve_failed = Signal(str, str)  # short text, details
    solve_cancelled = Signal()
    # vehicles planned, vehicles proven needed, seconds: a working-day search improved
    search_progress = Signal(int, int, float)

    def __init__(self, parent: QObject | None = None, *, delay_ms: int = 80,
                 pool: QThreadPool | None = None,
                 preparation: Callable[[], Preparation | None] = shared_preparation) -> None:
        super().__init__(parent)
        self._pool = pool or QThreadPool.globalInstance()
        self._preparation = preparation
        self._generation = 0
        self._flag: threading.Event | None = None
        self._fleet_drawn: dict[int, threading.Event] = {}  # per generation
        self._pending: Callable[[], Day] | None = None
        self._workers: dict[int, SolveWorker] = {}  # keep signal objects alive
        self._searching = False  # the current worker is in a working-day search
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(delay_ms)
        self._timer.timeout.connect(self._start)
        self._last_request = -1e9  # perf_counter() of the last request
        # A long solve says how long it has been at its stage, every second.
        self._stage_text = ""
        self._started_at = 0.0
        self._clock = QTimer(self)
        self._clock.setInterval(1000)
        self._clock.timeout.connect(self._tick)

    @property
    def generation(self) -> int:
        return self._generation

    @property
    def busy(self) -> bool:
        return self._flag is not None or self._timer.isActive()

    def request(self, build: Callable[[], Day]) -> None:
        """Solve again: at once after a quiet spell, else when the burst of edits
        pauses (a burst is solved once).  Starting at once, before the window
        repaints for the edit, saves the 20-40 ms a repaint of a large day takes."""
        self._cancel_running()
        self._pending = build
        quiet = not self._timer.isActive() and \
            time.perf_counter() - self._last_request > self._timer.interval() / 1000
        self._last_request = time.perf_counter()
        self.busy_changed.emit(True)
        if quiet:
            self._start()
        else:
            self._timer.start()

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
        drawn = self._fleet_drawn[self._generation] = threading.Event()
        worker = SolveWorker(self._generation, build, self._flag,
                             preparation=self._preparation, fleet_drawn=drawn)
        worker.signals.progress.connect(self._on_progress)
        worker.signals.found.connect(self._on_found)
        worker.signals.fleet_ready.connect(self._on_fleet_ready)
        worker.signals.finished.connect(self._on_finished)
        worker.signals.errored.connect(self._on_errored)
        self._workers[self._generation] = worker
        self._started_at, self._stage_text = time.perf_counter(), ""
        self._clock.start()
        self._pool.start(worker)

    def _is_current(self, generation: int) -> bool:
        return generation == self._generation and not self._timer.isActive()

    def _done(self, generation: int) -> bool:
        """Forget the worker; True when its outcome is the current one."""
        self._workers.pop(generation, None)
        self._fleet_drawn.pop(generation, None)
        if not self._is_current(generation):
            return False
        self._flag = None
        self._searching = False
        self._clock.stop()
        self.busy_changed.emit(False)
        return True

    def _on_progress(self, generation: int, stage: str) -> None:
        if self._is_current(generation) and not (self._flag and self._flag.is_set()):
            # From the search on, a cancel keeps the best plan (also while it is verified).
            self._searching = self._searching or stage == SEARCH_STAGE
            self._stage_text = STAGE_NAMES.get(stage, stage)
            self._tick()

    def _tick(self) -> None:
        if self._flag is None or self._flag.is_set():
            self._clock.stop()
            return
        seconds = time.perf_counter() - self._started_at
        self.stage_changed.emit(f"{self._stage_text} ({seconds:.0f} s)" if seconds >= 2
                                else self._stage_text)

    def _on_fleet_ready(self, generation: int, plan: Plan, seconds: float) -> None:
        if self._is_current(generation):
            self.fleet_plan_ready.emit(plan, seconds)
        drawn = self._fleet_drawn.pop(generation, None)
        if drawn is not None:  # once the window has painted (paint events come before
            QTimer.singleShot(1, drawn.set)  # timers), the worker goes on

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
