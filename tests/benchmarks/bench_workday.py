"""Benchmark of the working-day search (not run by the test suite).

    python tests/benchmarks/bench_workday.py                 # everything below
    python tests/benchmarks/bench_workday.py --only demo 300 # some parts

Parts:
* demo: the whole `shipgui demo --max-day 11:00` process (median of 5 runs);
* 300: ten generated regional days of 300 jobs, limits 10 h and 12 h;
* 1000: three days of 1 000 jobs; 10000: one day of 10 000 jobs;
* mip: a general MIP (a compact arc formulation in scipy's milp, HiGHS, with a
  time limit) side by side at 100 and 300 jobs, the anchor a user might try.

Each day runs in its own process (peak memory = max RSS of that process) and
prints: time to the first plan, time to proven (the first moment the plan met
the bound) or the final gap, plan, bound, the plain minimum without the limit,
and peak memory.  Days: tests/support/days.py:depot_day (invented; a depot at
the centre of a 60 km square, jobs starting 05:00-20:00).
"""

from __future__ import annotations

import argparse
import json
import resource
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

SITES = {100: 20, 300: 30, 1000: 40, 10000: 60}
TIME_LIMIT = {100: 30, 300: 30, 1000: 30, 10000: 120}


def one_day(n: int, seed: int, hours: int) -> dict:
    """Solve one generated day in this process; times from the solver's own events."""
    import dataclasses

    from shipgui.core import solve_day
    from shipgui.core.model import Day
    from tests.support.days import depot_day
    warm = depot_day(40, 5, seed=99)
    solve_day(Day(warm.jobs, warm.site_ids, warm.sites, warm.travel,
                  dataclasses.replace(warm.settings, max_day=8 * 3600)), time_limit=5)
    day = depot_day(n, SITES[n], seed=seed)
    day = Day(day.jobs, day.site_ids, day.sites, day.travel,
              dataclasses.replace(day.settings, max_day=hours * 3600))
    events = []
    t = time.perf_counter()
    plan = solve_day(day, time_limit=TIME_LIMIT[n], on_progress=events.append)
    total = time.perf_counter() - t
    proven_at = next((e.seconds for e in events if e.vehicles == e.lower_bound), None)
    return {"n": n, "seed": seed, "hours": hours, "vehicles": plan.vehicles,
            "bound": plan.lower_bound, "unlimited": plan.workday.unlimited_vehicles,
            "first_plan_s": events[0].seconds if events else None, "proven_s": proven_at,
            "total_s": total, "status": plan.workday.status, "verified": plan.verified,
            "deadhead": plan.workday.deadhead_status,
            "peak_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024}


def compact_mip(n: int, seed: int, hours: int, time_limit: float = 60.0) -> dict:
    """The compact arc formulation a user might write, in scipy's milp (HiGHS).

    x_ij = 1 when j follows i directly (pairs that fit one working day only);
    s_j = the leave time of the first job of j's route: s_j = leave_j for a
    route's first job and passed along every arc (big-M), and back_j - s_j <=
    limit.  Fewest vehicles = jobs - arcs used.
    """
    import dataclasses

    import numpy as np
    import scipy.sparse as sp
    from scipy.optimize import Bounds, LinearConstraint, milp

    from shipgui.core.model import Day
    from shipgui.core.workday.problem import leave_and_back
    from tests.support.days import depot_day
    day = depot_day(n, SITES[n], seed=seed)
    limit = hours * 3600
    day = Day(day.jobs, day.site_ids, day.sites, day.travel,
              dataclasses.replace(day.settings, max_day=limit))
    leave, back = leave_and_back(day)
    ready = day.end + day.settings.turnaround
    arrive = ready[:, None] + day.travel[day.destination[:, None], day.origin[None, :]]
    fits = (arrive <= day.start[None, :]) & (back[None, :] - leave[:, None] <= limit)
    np.fill_diagonal(fits, False)
    tail, head = np.nonzero(fits)
    arcs = len(tail)
    big = float(back.max() - leave.min() + limit)
    rows, lo, hi = [], [], []
    # each job: at most one arc out, at most one arc in
    out_rows = sp.csr_matrix((np.ones(arcs), (tail, np.arange(arcs))), shape=(n, arcs + n))
    in_rows = sp.csr_matrix((np.ones(arcs), (head, np.arange(arcs))), shape=(n, arcs + n))
    rows += [out_rows, in_rows]
    lo += [np.zeros(n), np.zeros(n)]
    hi += [np.ones(n), np.ones(n)]
    # +-(s_j - s_i) + M x_ij <= M: an arc used passes the route's start on
    k = np.arange(arcs)
    for sign in (1, -1):
        m = sp.csr_matrix((np.concatenate([sign * np.ones(arcs), -sign * np.ones(arcs),
                                           big * np.ones(arcs)]),
                           (np.concatenate([k, k, k]),
                            np.concatenate([arcs + head, arcs + tail, k]))),
                          shape=(arcs, arcs + n))
        rows.append(m)
        lo.append(np.full(arcs, -np.inf))
        hi.append(np.full(arcs, big))
    # s_j >= leave_j - M * (arcs into j): a route's first job starts its own day
    m = sp.hstack([big * in_rows[:, :arcs], sp.identity(n)]).tocsr()
    rows.append(m)
    lo.append(leave.astype(float))
    hi.append(np.full(n, np.inf))
    a = sp.vstack(rows).tocsr()
    c = np.concatenate([-np.ones(arcs), np.zeros(n)])
    bounds = Bounds(np.concatenate([np.zeros(arcs), back - limit]),
                    np.concatenate([np.ones(arcs), leave.astype(float)]))
    t = time.perf_counter()
    result = milp(c, constraints=LinearConstraint(a, np.concatenate(lo), np.concatenate(hi)),
                  integrality=np.concatenate([np.ones(arcs), np.zeros(n)]), bounds=bounds,
                  options={"time_limit": time_limit})
    plan = None if result.x is None else n - int(round(-result.fun))
    bound = getattr(result, "mip_dual_bound", None)
    return {"n": n, "seed": seed, "hours": hours, "arcs": arcs, "vehicles": plan,
            "bound": None if bound is None else max(0, n + int(np.ceil(bound - 1e-6))),
            "status": result.message, "total_s": time.perf_counter() - t}


def in_child(func: str, *args, timeout: float = 900) -> dict | None:
    code = (f"import json,sys; sys.path.insert(0,{str(ROOT)!r}); "
            f"from tests.benchmarks.bench_workday import {func}; "
            f"print(json.dumps({func}(*{list(args)!r})))")
    try:
        out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                             timeout=timeout, check=True)
    except subprocess.TimeoutExpired:
        return None
    return json.loads(out.stdout.strip().splitlines()[-1])


def _show(r: dict) -> str:
    gap = r["vehicles"] - r["bound"]
    proven = f"proven at {r['proven_s']:.2f} s" if r["proven_s"] is not None \
        else f"gap {gap} ({100 * gap / r['bound']:.1f} %)"
    return (f"  n={r['n']:>5} seed={r['seed']:>2} {r['hours']} h: plan {r['vehicles']:>5} "
            f"bound {r['bound']:>5} (no limit {r['unlimited']})  first plan "
            f"{r['first_plan_s']:.2f} s, {proven}, all done {r['total_s']:.2f} s "
            f"[{r['status']}; empty driving {r['deadhead']}], peak {r['peak_mb']:.0f} MB")


def demo_process(runs: int = 5) -> None:
    times = []
    for _ in range(runs):
        t = time.perf_counter()
        subprocess.run([sys.executable, "-m", "shipgui", "demo", "--max-day", "11:00"],
                       check=True, capture_output=True, cwd=ROOT)
        times.append(time.perf_counter() - t)
    print(f"demo day, --max-day 11:00, whole process: median {statistics.median(times):.2f} s "
          f"(min {min(times):.2f}, max {max(times):.2f}; {runs} runs after one warm-up)")


def sizes(n: int, seeds: range) -> None:
    for hours in (10, 12):
        results = [r for r in (in_child("one_day", n, s, hours) for s in seeds) if r]
        for r in results:
            print(_show(r), flush=True)
        proven = [r["proven_s"] for r in results if r["proven_s"] is not None]
        if proven:
            print(f"  -> {n} jobs, {hours} h: {len(proven)} of {len(results)} proven; median "
                  f"time to proven {statistics.median(proven):.2f} s", flush=True)


def mip_side_by_side() -> None:
    for n in (100, 300):
        ours = in_child("one_day", n, 1, 10)
        theirs = in_child("compact_mip", n, 1, 10)
        print(f"  {n} jobs, 10 h: shipgui plan {ours['vehicles']} bound {ours['bound']} in "
              f"{ours['total_s']:.2f} s; compact MIP ({theirs['arcs']} arcs) plan "
              f"{theirs['vehicles']} bound {theirs['bound']} in {theirs['total_s']:.1f} s "
              f"({theirs['status']})", flush=True)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--only", nargs="*", default=["demo", "300", "1000", "10000", "mip"])
    args = parser.parse_args()
    if "demo" in args.only:
        subprocess.run([sys.executable, "-m", "shipgui", "demo", "--max-day", "11:00"],
                       check=True, capture_output=True, cwd=ROOT)  # warm the kernel cache
        demo_process()
    if "300" in args.only:
        sizes(300, range(1, 11))
    if "1000" in args.only:
        sizes(1000, range(1, 4))
    if "10000" in args.only:
        sizes(10000, range(1, 2))
    if "mip" in args.only:
        mip_side_by_side()


if __name__ == "__main__":
    main()
