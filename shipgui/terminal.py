"""Progress of a long solve on the command line: one line on a terminal.

The line shows what the solver is doing and for how long, redrawn every
second from a thread of its own (the kernels run without the GIL, so it keeps
time while they work).  It appears only on a terminal (never in a pipe or a
log file) and only once a solve has taken a second, so quick solves print
nothing more.
"""

from __future__ import annotations

import sys
import threading
import time
from typing import TextIO

__all__ = ["ProgressLine"]

# What runs after each stage solve_day reports (its names say what finished).
NEXT = {
    "reading": "reading and checking the input",
    "preparing": "preparing the solver for this computer (first start only)",
    "solving": "working out which jobs can follow which",
    "relation": "pairing jobs onto vehicles",
    "matching": "finding the routes with the least empty driving",
    "least deadhead": "finding the routes with the least empty driving",
    "routes": "checking the plan independently",
    "verification": "writing the routes",
}
SHOW_AFTER_S = 1.0


class ProgressLine:
    """``stage(name)`` after each step; ``close()`` clears the line."""

    def __init__(self, stream: TextIO | None = None, *, limit_note: str = "",
                 show_after: float = SHOW_AFTER_S) -> None:
        self.stream = stream if stream is not None else sys.stderr
        self.show_after = show_after
        self.enabled = bool(getattr(self.stream, "isatty", lambda: False)())
        self.limit_note = limit_note  # e.g. "stops after 120 s"
        self._text = ""
        self._started = time.perf_counter()
        self._shown = False
        self._lock = threading.Lock()
        self._end = threading.Event()
        self._thread: threading.Thread | None = None
        if self.enabled:
            self._thread = threading.Thread(target=self._tick, daemon=True,
                                            name="shipgui-progress")
            self._thread.start()

    def stage(self, name: str) -> None:
        with self._lock:
            self._text = NEXT.get(name, name)
            if name in ("matching", "least deadhead") and self.limit_note:
                self._text += f" ({self.limit_note})"
        self._draw()

    def close(self) -> None:
        self._end.set()
        if self._thread is not None:
            self._thread.join()
        with self._lock:
            if self._shown:
                self.stream.write("\r\033[K")
                self.stream.flush()
            self._shown = False

    def _tick(self) -> None:
        while not self._end.wait(1.0):
            self._draw()

    def _draw(self) -> None:
        if not self.enabled:
            return
        with self._lock:
            seconds = time.perf_counter() - self._started
            if seconds < self.show_after or self._end.is_set() or not self._text:
                return
            self.stream.write(f"\r\033[KSolving, {seconds:.0f} s: {self._text}...")
            self.stream.flush()
            self._shown = True
