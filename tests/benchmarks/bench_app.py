"""What a dispatcher waits for in the desktop app (run by hand; Qt offscreen).

    python tests/benchmarks/bench_app.py [--first-start] [--stall 10000] [--resolve 1000]

--first-start  a fresh install: an empty numba cache (a temporary NUMBA_CACHE_DIR),
               then the first `shipgui demo` (whole process), then the app on the
               demo day: window shown and usable, fleet and proof on screen, the
               routes with the least empty driving on screen, and the event
               loop's longest stall; then the same once more with the cache warm.
--stall N      the event loop's longest stall while the app solves an N-job day
               and draws its plan, with the timeline scrolled a screen every
               100 ms meanwhile; and the time to each screen.
--resolve N    after an edit of an N-job day: the new fleet and proof on screen,
               then the routes (five edits).

Every app measurement runs in its own process.  Stalls are measured with a
timer that should fire every 5 ms: the longest gap between two firings, minus
5 ms, is the longest time the window could not react.  Not collected by pytest.
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
TICK_MS = 5


def _child_env(**extra: str) -> dict[str, str]:
    env = {k: v for k, v in os.environ.items() if k not in ("DISPLAY", "NUMBA_DISABLE_JIT")}
    env.update(QT_QPA_PLATFORM="offscreen", PYTHONPATH=str(ROOT), **extra)
    return env


def _child(mode: str, n: int, env: dict[str, str]) -> dict:
    """Run ``app_child(mode, n)`` in a fresh process; times are from its spawn."""
    spawned = time.time()
    out = subprocess.run([sys.executable, str(Path(__file__).resolve()), "--child", mode,
                          str(n)], capture_output=True, text=True, env=env, timeout=1800,
                         cwd=ROOT)
    if out.returncode != 0:
        raise RuntimeError(out.stderr)
    result = json.loads(out.stdout.strip().splitlines()[-1])
    for key in [k for k in result if k.startswith("at_")]:
        result[key] = result[key] - spawned
    return result


def app_child(mode: str, n: int) -> dict:
    """In the child: open the app, measure, print one JSON line."""
    from PySide6.QtCore import QElapsedTimer, QEventLoop, QTimer
    from PySide6.QtWidgets import QApplication

    from shipgui.gui.app import make_application
    from shipgui.gui.main_window import MainWindow
    from shipgui.gui.services.settings import AppSettings

    app = make_application()
    folder = tempfile.mkdtemp()
    # the app's own debounce of edits (80 ms): what a dispatcher waits for
    window = MainWindow(AppSettings.at_path(Path(folder, "settings.ini")))
    window.resize(1400, 820)
    window.show()
    result: dict = {}
    QTimer.singleShot(0, lambda: result.setdefault("at_usable", time.time()))
    QApplication.processEvents()
    result["at_shown"] = time.time()
    stalls = _StallMeter(QTimer, QElapsedTimer)
    if mode == "demo":
        _wait(window, lambda: window.files.open_demo(), QEventLoop, QTimer, result)
    elif mode == "stall":
        # Opening the day fills the jobs table on the GUI thread (measured on its
        # own); the stall meter then runs for the solve and the drawing of its plan.
        document = _document(n)
        window.solver.request = _deferred(window.solver.request, QTimer)
        t = time.perf_counter()
        window.load_document(document)
        result["open_ms"] = round((time.perf_counter() - t) * 1000, 1)
        QApplication.processEvents()
        stalls = _StallMeter(QTimer, QElapsedTimer)
        scroller = _Scroller(window.timeline, QTimer)  # a dispatcher looking around
        _wait(window, lambda: None, QEventLoop, QTimer, result)
        scroller.timer.stop()
    elif mode == "resolve":
        document = _document(n)
        _wait(window, lambda: window.load_document(document), QEventLoop, QTimer, {})
        stalls = _StallMeter(QTimer, QElapsedTimer)
        result["fleet_ms"], result["routes_ms"] = [], []
        for k in range(5):
            job = window.document.jobs[k]
            marks: dict = {}
            t0 = time.time()
            _wait(window, lambda job=job, k=k: window.document.set_job_field(
                k, "end", job.end + 60), QEventLoop, QTimer, marks)
            result["fleet_ms"].append(round((marks.get("at_fleet", marks["at_plan"]) - t0)
                                            * 1000, 1))
            result["routes_ms"].append(round((marks["at_plan"] - t0) * 1000, 1))
    result["longest_stall_ms"] = round(stalls.longest_ms(), 1)
    result["vehicles"] = window.plan.vehicles if window.plan else None
    result["least_deadhead"] = bool(window.plan and window.plan.least_deadhead)
    window.undo_stack.setClean()
    window.close()
    app.processEvents()
    return result


class _StallMeter:
    """A timer due every TICK_MS; the longest gap between firings shows how long
    the event loop was kept from running."""

    def __init__(self, qtimer, qelapsed) -> None:
        self.clock = qelapsed()
        self.clock.start()
        self.last = 0
        self.longest = 0
        self.timer = qtimer()
        self.timer.setInterval(TICK_MS)
        self.timer.timeout.connect(self._tick)
        self.timer.start()

    def _tick(self) -> None:
        now = self.clock.elapsed()
        self.longest = max(self.longest, now - self.last)
        self.last = now

    def longest_ms(self) -> float:
        self._tick()
        return max(0.0, self.longest - TICK_MS)


class _Scroller:
    """Scrolls the timeline a screen down every 100 ms (and back to the top at
    the end), so that rows are drawn and painted while the solver works."""

    def __init__(self, timeline, qtimer) -> None:
        self.timeline = timeline
        self.timer = qtimer()
        self.timer.setInterval(100)
        self.timer.timeout.connect(self._step)
        self.timer.start()

    def _step(self) -> None:
        bar = self.timeline.verticalScrollBar()
        bar.setValue(0 if bar.value() >= bar.maximum() else bar.value() + bar.pageStep())


def _deferred(request, qtimer):
    """The solver's request, started from the event loop rather than at once."""
    return lambda build: qtimer.singleShot(0, lambda: request(build))


def _wait(window, action, qeventloop, qtimer, marks: dict) -> None:
    """Do ``action`` and run the event loop until the plan is on screen."""
    loop = qeventloop()

    def fleet(_plan, _seconds) -> None:  # after the window's own slot: on screen
        marks.setdefault("at_fleet", time.time())

    def plan(_plan) -> None:
        marks.setdefault("at_plan", time.time())
        loop.quit()

    window.solver.fleet_plan_ready.connect(fleet)
    window.plan_shown.connect(plan)
    qtimer.singleShot(600_000, loop.quit)
    action()
    loop.exec()
    window.solver.fleet_plan_ready.disconnect(fleet)
    window.plan_shown.disconnect(plan)


def _document(n: int):
    from shipgui.core.document import DayDocument
    from tests.support.days import regional_day
    day = regional_day(n, 200 if n >= 5000 else 100, seed=n)
    return DayDocument(list(day.jobs), list(day.sites.values()), {}, day.settings)


def _demo_process(env: dict[str, str]) -> tuple[float, str]:
    t = time.perf_counter()
    out = subprocess.run([sys.executable, "-m", "shipgui", "demo"], capture_output=True,
                         text=True, env=env, cwd=ROOT, timeout=600, check=True)
    return time.perf_counter() - t, out.stderr.strip()


def first_start() -> None:
    with tempfile.TemporaryDirectory() as cache:
        env = _child_env(NUMBA_CACHE_DIR=cache)
        seconds, said = _demo_process(env)
        print(f"first `shipgui demo` (empty cache): {seconds:.2f} s in all"
              + (f"  [{said}]" if said else ""))
        seconds, _ = _demo_process(env)
        print(f"next `shipgui demo`: {seconds:.2f} s")
    for label, fresh in (("first start (empty cache)", True), ("next start", False)):
        with tempfile.TemporaryDirectory() as cache:
            env = _child_env(NUMBA_CACHE_DIR=cache)
            if not fresh:
                _demo_process(env)
            r = _child("demo", 0, env)
            print(f"app --demo, {label}: window shown {r['at_shown']:.2f} s, usable "
                  f"{r['at_usable']:.2f} s, fleet and proof {r.get('at_fleet', r['at_plan']):.2f}"
                  f" s, routes {r['at_plan']:.2f} s; longest stall "
                  f"{r['longest_stall_ms']:.0f} ms ({r['vehicles']} vehicles)")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--first-start", action="store_true")
    ap.add_argument("--stall", type=int, nargs="?", const=10000, default=None, metavar="N")
    ap.add_argument("--resolve", type=int, nargs="?", const=1000, default=None, metavar="N")
    ap.add_argument("--child", nargs=2, help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.child:
        sys.path.insert(0, str(ROOT))
        print(json.dumps(app_child(args.child[0], int(args.child[1]))))
        return
    if not (args.first_start or args.stall or args.resolve):
        args.first_start, args.stall, args.resolve = True, 10000, 1000
    if args.first_start:
        first_start()
    if args.stall:
        r = _child("stall", args.stall, _child_env())
        fleet = r.get("at_fleet", r["at_plan"]) - r["at_usable"]
        print(f"app, {args.stall}-job day: opening it (jobs table filled) {r['open_ms']:.0f} ms;"
              f" then fleet and proof on screen {fleet:.2f} s after the window, routes "
              f"{r['at_plan'] - r['at_usable']:.2f} s; longest event-loop stall during the "
              f"solve {r['longest_stall_ms']:.0f} ms ({r['vehicles']} vehicles)")
    if args.resolve:
        r = _child("resolve", args.resolve, _child_env())
        print(f"app, edit of a {args.resolve}-job day: fleet and proof on screen after "
              f"{', '.join(f'{t:.0f}' for t in r['fleet_ms'])} ms; routes after "
              f"{', '.join(f'{t:.0f}' for t in r['routes_ms'])} ms; longest stall "
              f"{r['longest_stall_ms']:.0f} ms")


if __name__ == "__main__":
    main()
