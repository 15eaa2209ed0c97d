"""Compiling the kernels before the first solve needs them.

On a fresh install numba compiles the kernels on their first call and caches
the machine code (:mod:`shipgui.core._jit`); every later start loads them.
:func:`warm` runs every compiled kernel of one family once on a small
invented day, so that they compile and land in the cache.
:func:`kernels_ready` tells whether that has been done on this computer.
:class:`Preparation` compiles families in child processes at once (the
processor's cores work in parallel, and a waiting window stays free): the
minimum fleet's three families first, the working-day family after them (it
uses theirs).  A day without limits needs only the first three.
"""

from __future__ import annotations

import os
import subprocess
import sys
import threading
import time
from collections.abc import Callable

import numpy as np

from ._jit import COMPILED
from .model import Day, Job, Settings, Site

__all__ = ["FAMILIES", "LATER", "CHILD_FLAG", "warm", "kernels_ready", "Preparation",
           "shared_preparation", "needs_later"]

# Families of kernels, each compiled in its own child process; about the same
# compile time each, so the children keep two cores busy to the end.  The
# working-day family (a limit on the working day or on the vehicles) starts
# once the others are done: it calls them too.
FAMILIES = ("matching", "cost scaling", "shortest paths")
LATER = ("working day",)
# Command-line flag of the program's entry point (shipgui/__main__.py) that
# runs one family's warm-up in a child process.
CHILD_FLAG = "--prepare-kernels"


def _small_day() -> Day:
    """An invented day (48 jobs, 6 sites on a line, a depot) on which every
    kernel runs: several matching phases, pricing rounds, trade-off steps."""
    from .day import build_day
    rng = np.random.default_rng(7)
    sites = [Site(f"P{k}", x_km=12.0 * k, y_km=0.0) for k in range(6)]
    jobs = []
    for k in range(48):
        o, d = (int(x) for x in rng.integers(0, 6, 2))
        start = int(rng.integers(6 * 60, 18 * 60)) * 60
        jobs.append(Job(f"W{k}", f"P{o}", f"P{d}", start, start + 3600 + 900 * abs(o - d)))
    return build_day(jobs, sites, {}, settings=Settings(turnaround=300, depot="P0"))


def warm(family: str) -> None:
    """Run every compiled kernel of ``family`` once (see :data:`FAMILIES`), with
    arguments built the way the solver builds them, so that the types (and
    hence the cached machine code) are the ones a solve needs."""
    from .fleet import least_deadhead as least
    from .fleet._flow_kernel import SETTLE, cost_scaling, repair, tighten_prices, violated_links
    from .fleet.matching import maximum_matching
    from .fleet.precedence import class_indexes
    if family not in FAMILIES + LATER:
        raise ValueError(f"unknown kernel family {family!r}")
    day = _small_day()
    if family == "working day":
        _warm_limits(day)
        return
    index = class_indexes(day)[0]
    if family == "matching":
        maximum_matching(index, kernel="hopcroft-karp", day=day)  # greedy start
        maximum_matching(index, kernel="hopcroft-karp")  # phases from nothing
        return
    costs = least.class_costs(day, index)
    net = least._network(costs, costs.index.latest >= 0, least._fixed_arcs(index))
    cap, price = net.cap.copy(), np.zeros(net.nodes, dtype=np.int64)
    excess = np.zeros(net.nodes, dtype=np.int64)
    stop = np.zeros(1, dtype=np.int64)
    if family == "cost scaling":
        cost_scaling(net.residual, cap, excess, price, 0, least._ALPHA, least._ALPHA, stop,
                     np.ones(1, dtype=np.int64), net.scale // SETTLE)
    else:
        tighten_prices(net.residual, cap, price)
        repair(net.residual, cap, price, excess, stop)
        violated_links(costs.links, costs.index.latest < 0, price, net.scale,
                       least._MARGIN_PERCENT)


def _warm_limits(day: Day) -> None:
    """Plan the small day under a working-day limit and with too few vehicles."""
    from dataclasses import replace

    from .planner import solve_day
    needed = solve_day(day, least_deadhead=False).vehicles
    solve_day(replace(day, settings=replace(day.settings, max_day=8 * 3600)), time_limit=10)
    solve_day(replace(day, settings=replace(day.settings, vehicles=max(1, needed - 2))))


def _entry_kernels(families: tuple[str, ...]) -> list:
    """The compiled kernels called from Python (the others are compiled into them)."""
    from .fleet import _flow_kernel as flow
    from .fleet import _hk_kernel as hk
    from .fleet import _level_kernel as level
    from .workday import _pricing_kernel as pricing
    from .workday import greedy, verify
    kernels = {"matching": [hk.greedy_start, hk._bfs, hk._dfs_phase],
               "cost scaling": [flow.residual_slots, flow.cost_scaling],
               "shortest paths": [flow.tighten_prices, flow.repair, flow.violated_links],
               "working day": [level.heaviest_ending, pricing.price_routes,
                               greedy._best_fit, verify._heaviest]}
    return [k for family in families for k in kernels[family]]


def needs_later(day: Day) -> bool:
    """Whether solving ``day`` uses the working-day family (a limit on the
    working day or on the vehicles)."""
    return day.settings.max_day is not None or day.settings.vehicle_limit


def _cached(kernel) -> bool:
    """True when numba's cache holds machine code of this kernel's source for
    this computer.  Reads numba's own index (no public call answers this)."""
    cache = kernel._cache
    index = cache._cache_file._load_index()
    wanted = cache._index_key(None, kernel.targetctx.codegen())[1:]
    return any(key[1:] == wanted for key in index)


def kernels_ready(families: tuple[str, ...] = FAMILIES) -> bool:
    """True when no kernel of ``families`` needs compiling before a solve: they
    are in the cache, or they run as plain Python, or numba cannot cache them
    here (then they compile in the solving process, and preparing ahead would
    not help)."""
    if not COMPILED:
        return True
    kernels = _entry_kernels(families)
    try:
        if not all(hasattr(k._cache, "_cache_file") for k in kernels):
            return True  # caching is off
        return all(_cached(k) for k in kernels)
    except Exception:  # noqa: BLE001 - numba internals changed: prepare (harmless)
        return False


def _child_command(family: str) -> list[str]:
    """The command that warms one family in a child process; a frozen app
    (PyInstaller) is its own interpreter."""
    if getattr(sys, "frozen", False):
        return [sys.executable, CHILD_FLAG, family]
    return [sys.executable, "-m", "shipgui", CHILD_FLAG, family]


def child_main(argv: list[str]) -> int:
    """Entry of a child process: ``--prepare-kernels FAMILY``."""
    if len(argv) != 1 or argv[0] not in FAMILIES + LATER:
        print(f"usage: {CHILD_FLAG} {{{','.join(FAMILIES + LATER)}}}", file=sys.stderr)
        return 2
    warm(argv[0])
    return 0


class Preparation:
    """Kernel families compiled in child processes, in parallel.

    ``done()`` and ``wait()`` never raise: when a child fails (no processes
    allowed, a broken install), the kernels simply compile in the solving
    process on first use, as they would without preparation.
    """

    def __init__(self, families: tuple[str, ...] = FAMILIES, *,
                 popen: Callable[..., subprocess.Popen] = subprocess.Popen) -> None:
        self.started = time.perf_counter()
        self.families = families
        self._children: list[subprocess.Popen] = []
        env = dict(os.environ)
        env.pop("NUMBA_DISABLE_JIT", None)
        for family in families:
            try:
                self._children.append(popen(
                    _child_command(family), stdin=subprocess.DEVNULL,
                    stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, env=env))
            except OSError:
                continue

    def done(self) -> bool:
        return all(child.poll() is not None for child in self._children)

    def wait(self, timeout: float | None = None) -> bool:
        """Wait for the children; True when they have all ended."""
        deadline = None if timeout is None else time.perf_counter() + timeout
        for child in self._children:
            left = None if deadline is None else max(0.0, deadline - time.perf_counter())
            try:
                child.wait(left)
            except subprocess.TimeoutExpired:
                return False
        return True

    def succeeded(self) -> bool:
        return self.done() and all(child.returncode == 0 for child in self._children)

    def stop(self) -> None:
        """End the children (the app is closing); a half-written cache entry is
        never used (numba writes through a temporary file)."""
        for child in self._children:
            if child.poll() is None:
                child.terminate()
        for child in self._children:
            try:
                child.wait(5)
            except subprocess.TimeoutExpired:
                child.kill()


_shared_lock = threading.Lock()
_shared: Preparation | None = None
_later: Preparation | bool | None = None
_known_ready = False


def shared_preparation() -> Preparation | None:
    """The process's one preparation, for solves that may run in several
    threads: None when the minimum fleet's kernels are ready (asked once per
    process), else the preparation, started by the first caller and shared by
    the others.  Once they are ready, the working-day family is prepared in
    the background (nobody waits for it; a solve that needs it meanwhile
    compiles what it uses)."""
    global _shared, _known_ready
    with _shared_lock:
        if not _known_ready and _shared is None and kernels_ready():
            _known_ready = True
        if not _known_ready and _shared is None:
            _shared = Preparation()
        if _known_ready or _shared.done():
            _known_ready = True
            _prepare_later()
            return None
        return _shared


def _prepare_later() -> None:
    global _later
    if _later is None and COMPILED:
        _later = False if kernels_ready(LATER) else Preparation(LATER)
