"""Solving in a worker: signals, cancelling, stale results, and the 1 000-job re-solve."""

from __future__ import annotations

import threading
import time

from PySide6.QtCore import QThreadPool

from shipgui.core import Job
from shipgui.gui.services.worker import SolveController, SolveWorker, snapshot
from tests.support.days import regional_day
from tests.support.documents import small_document
from tests.support.gui import WAIT_MS


def test_worker_reports_a_plan(qtbot):
    worker = SolveWorker(7, snapshot(small_document()), threading.Event())
    stages = []
    worker.signals.progress.connect(lambda g, s: stages.append((g, s)))
    with qtbot.waitSignal(worker.signals.finished, timeout=WAIT_MS) as blocker:
        QThreadPool.globalInstance().start(worker)
    generation, plan, seconds = blocker.args
    assert generation == 7 and plan.vehicles == 2 and plan.verified and seconds >= 0
    qtbot.waitUntil(lambda: ("verification" in {s for _, s in stages}), timeout=WAIT_MS)
    assert stages[0] == (7, "checking")


def test_every_stage_the_solver_reports_has_words():
    from shipgui.core import solve_day
    from shipgui.gui.services.worker import STAGE_NAMES
    stages = ["checking"]  # the worker's own first stage
    solve_day(regional_day(60, 6), progress=stages.append)
    assert "least deadhead" in stages
    assert [s for s in stages if s not in STAGE_NAMES] == []


def test_worker_reports_input_problems_as_a_signal(qtbot):
    doc = small_document()
    doc.jobs[0] = Job("J1", "NOWHERE", "B", 8 * 3600, 9 * 3600)
    worker = SolveWorker(1, snapshot(doc), threading.Event())
    with qtbot.waitSignal(worker.signals.errored, timeout=WAIT_MS) as blocker:
        QThreadPool.globalInstance().start(worker)
    assert blocker.args[1] == "input"
    assert "NOWHERE" in blocker.args[2][0].message


def test_worker_stops_when_the_flag_is_set(qtbot):
    flag = threading.Event()
    flag.set()
    worker = SolveWorker(3, snapshot(small_document()), flag)
    with qtbot.waitSignal(worker.signals.errored, timeout=WAIT_MS) as blocker:
        QThreadPool.globalInstance().start(worker)
    assert blocker.args[:2] == [3, "cancelled"]


def test_worker_failure_is_a_signal_not_an_exception(qtbot):
    def broken():
        raise RuntimeError("disk on fire")

    worker = SolveWorker(4, broken, threading.Event())
    with qtbot.waitSignal(worker.signals.errored, timeout=WAIT_MS) as blocker:
        QThreadPool.globalInstance().start(worker)
    assert blocker.args[1] == "failure" and "disk on fire" in blocker.args[2][0]


def test_only_the_newest_request_is_reported(qtbot):
    controller = SolveController(delay_ms=0)
    plans = []
    controller.plan_ready.connect(lambda plan, s: plans.append(plan))
    slow_started = threading.Event()
    release = threading.Event()
    first = small_document()

    def slow_build():
        slow_started.set()
        release.wait(5)
        return first.build()

    second = small_document()
    second.jobs = second.jobs[:1]
    controller.request(slow_build)
    qtbot.waitUntil(slow_started.is_set, timeout=WAIT_MS)
    with qtbot.waitSignal(controller.plan_ready, timeout=WAIT_MS):
        controller.request(snapshot(second))
    release.set()
    QThreadPool.globalInstance().waitForDone(WAIT_MS)
    qtbot.wait(50)
    assert [p.day.n for p in plans] == [1]  # the older, slower result was dropped
    assert not controller.busy


def test_cancel_sets_the_flag_and_reports(qtbot):
    controller = SolveController(delay_ms=0)
    started = threading.Event()
    seen_flag = []

    def build():
        started.set()
        time.sleep(0.2)
        return small_document().build()

    controller.request(build)
    qtbot.waitUntil(started.is_set, timeout=WAIT_MS)
    flag = controller._flag  # noqa: SLF001 - the flag handed to the worker
    with qtbot.waitSignal(controller.solve_cancelled, timeout=1000):
        controller.cancel()
    seen_flag.append(flag.is_set())
    plans = []
    controller.plan_ready.connect(lambda p, s: plans.append(p))
    QThreadPool.globalInstance().waitForDone(WAIT_MS)
    qtbot.wait(50)
    assert seen_flag == [True] and plans == [] and not controller.busy


def test_resolve_of_a_1000_job_day(qtbot, capsys):
    """Measure what a dispatcher waits for after an edit of a 1 000-job day: the
    fleet and proof first, then the routes with the least empty driving
    (tests/benchmarks/bench_app.py measures it with the window drawn)."""
    day = regional_day(1000, 100)
    from shipgui.core.document import DayDocument
    doc = DayDocument(list(day.jobs), list(day.sites.values()), {}, day.settings)
    controller = SolveController(delay_ms=0)
    with qtbot.waitSignal(controller.plan_ready, timeout=60_000):  # first: compiles kernels
        controller.request(snapshot(doc))
    fleet, routes = [], []
    for k in range(3):
        doc.jobs[k] = Job(doc.jobs[k].id, doc.jobs[k].origin, doc.jobs[k].destination,
                          doc.jobs[k].start, doc.jobs[k].end + 60)
        t0 = time.perf_counter()
        first = []
        controller.fleet_plan_ready.connect(
            lambda p, s, first=first, t0=t0: first.append((p, time.perf_counter() - t0)))
        with qtbot.waitSignal(controller.plan_ready, timeout=WAIT_MS) as blocker:
            controller.request(snapshot(doc))
        routes.append(time.perf_counter() - t0)
        controller.fleet_plan_ready.disconnect()
        plan = blocker.args[0]
        assert plan.verified and plan.least_deadhead
        (early, seconds), = first  # once, before the routes, the same fleet and proof
        fleet.append(seconds)
        assert early.verified and not early.least_deadhead
        assert early.vehicles == plan.vehicles and early.certificate == plan.certificate
    with capsys.disabled():
        print(f"\n1000-job re-solve: fleet and proof {', '.join(f'{t * 1000:.0f}' for t in fleet)}"
              f" ms, routes {', '.join(f'{t * 1000:.0f}' for t in routes)} ms")
    assert min(fleet) < min(routes) < 5.0


class _PendingPreparation:
    """Kernels being compiled elsewhere, until ``finish`` is set."""

    def __init__(self) -> None:
        self.finish = threading.Event()

    def done(self) -> bool:
        return self.finish.is_set()

    def wait(self, timeout=None) -> bool:
        return self.finish.wait(timeout)


def test_first_start_shows_the_fleet_while_the_solver_is_prepared(qtbot):
    # First start on a computer: the fleet and proof come from the numpy/scipy
    # matching at once; the least-empty-driving routes wait for the kernels.
    pending = _PendingPreparation()
    controller = SolveController(delay_ms=0, preparation=lambda: pending)
    stages, finals = [], []
    controller.stage_changed.connect(stages.append)
    controller.plan_ready.connect(lambda p, s: finals.append(p))
    with qtbot.waitSignal(controller.fleet_plan_ready, timeout=WAIT_MS) as blocker:
        controller.request(snapshot(small_document()))
    fleet = blocker.args[0]
    assert fleet.kernel == "dinic" and fleet.verified and not fleet.least_deadhead
    qtbot.wait(200)
    assert finals == [] and controller.busy  # waiting for the kernels, window free
    assert any("Preparing the solver" in s for s in stages)
    with qtbot.waitSignal(controller.plan_ready, timeout=WAIT_MS) as blocker:
        pending.finish.set()
    plan = blocker.args[0]
    assert plan.least_deadhead and plan.vehicles == fleet.vehicles


def test_cancel_while_the_solver_is_prepared(qtbot):
    pending = _PendingPreparation()
    controller = SolveController(delay_ms=0, preparation=lambda: pending)
    with qtbot.waitSignal(controller.fleet_plan_ready, timeout=WAIT_MS):
        controller.request(snapshot(small_document()))
    with qtbot.waitSignal(controller.solve_cancelled, timeout=1000):
        controller.cancel()
    assert QThreadPool.globalInstance().waitForDone(2000)  # the worker stopped waiting
    pending.finish.set()


def test_an_edit_after_a_quiet_spell_is_solved_at_once_and_a_burst_once(qtbot):
    # The debounce merges a burst of edits, but the first edit after a pause
    # does not wait for it: the solve starts before the window repaints.
    controller = SolveController(delay_ms=200)
    with qtbot.waitSignal(controller.plan_ready, timeout=WAIT_MS):
        controller.request(snapshot(small_document()))
        assert not controller._timer.isActive()  # started at once, not after 200 ms
    plans = []
    controller.plan_ready.connect(lambda plan, _s: plans.append(plan))
    time.sleep(0.25)  # a quiet spell longer than the debounce
    controller.request(snapshot(small_document()))
    controller.request(snapshot(small_document()))  # within the burst: waits
    assert controller._timer.isActive()
    qtbot.waitUntil(lambda: len(plans) == 1, timeout=WAIT_MS)
    qtbot.wait(300)
    assert len(plans) == 1  # the burst was solved once
