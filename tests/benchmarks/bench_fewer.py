"""Benchmark of the fleet-you-have features (not run by the test suite).

    python tests/benchmarks/bench_fewer.py [--sizes 1000 10000] [--suggest-sizes 1000 3000]

Each measurement runs in its own process, so "cold" includes starting Python,
importing shipgui and loading the compiled kernels (as a `shipgui solve` run
does), and the peak memory (max RSS) is that measurement's alone.  Printed:

* suggestions (5, moves of at most 60 minutes, then 15): the demo day and
  generated regional days; targets 2 s on the demo day and 10 s at 1 000 jobs;
* the plan with fewer vehicles than needed (90 % and 75 % of the minimum fleet):
  seconds for the whole solve and for the flow stages, with the proof checked.
"""

from __future__ import annotations

import argparse
import json
import resource
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

SITES = {1000: 100, 3000: 150, 10000: 200, 20000: 300}


def _day(n: int):
    if n == 0:
        from shipgui.core.demo import load_demo
        return load_demo()
    from tests.support.days import regional_day
    return regional_day(n, SITES.get(n, 200), seed=n)


def suggest(n: int, max_minutes: int) -> dict:
    """Five suggestions, cold (first search in a fresh process) and warm."""
    t0 = time.perf_counter()
    from shipgui.core.fleet.suggest import suggest_moves
    day = _day(n)
    t1 = time.perf_counter()
    cold = suggest_moves(day, 5, max_move=max_minutes * 60)
    t2 = time.perf_counter()
    warm = suggest_moves(day, 5, max_move=max_minutes * 60)
    t3 = time.perf_counter()
    return {"jobs": day.n, "max_move_min": max_minutes, "vehicles": cold.vehicles,
            "found": len(cold.suggestions),
            "moved_min": [s.moved_seconds // 60 for s in cold.suggestions],
            "checked": cold.checked, "complete": cold.complete,
            "import_and_day_s": t1 - t0, "cold_s": t2 - t1, "warm_s": t3 - t2,
            "same": warm.suggestions == cold.suggestions,
            "peak_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024}


def short(n: int, share: float) -> dict:
    """The plan with ``share`` of the minimum fleet available."""
    import dataclasses

    from shipgui.core import solve_day
    from tests.support.days import rebuild
    solve_day(_day(50))  # load the compiled kernels before timing
    day = _day(n)
    fleet = solve_day(day, least_deadhead=False).vehicles
    limited = rebuild(day, settings=dataclasses.replace(
        day.settings, vehicles=max(1, int(fleet * share))))
    t = time.perf_counter()
    plan = solve_day(limited)
    total = time.perf_counter() - t
    sf = plan.shortfall
    return {"jobs": day.n, "needed": fleet, "available": limited.settings.vehicles,
            "unserved": len(sf.unserved), "exact": sf.exact, "verified": plan.verified,
            "total_s": total, **{f"{k.replace(' ', '_')}_s": v for k, v in plan.timings.items()},
            "peak_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024}


def _in_process(call: str) -> dict:
    code = (f"import json, sys; sys.path.insert(0, {str(ROOT)!r}); "
            f"from tests.benchmarks.bench_fewer import *; print(json.dumps({call}))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, cwd=ROOT)
    return json.loads(out.stdout.strip().splitlines()[-1])


def main() -> None:
    p = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    p.add_argument("--sizes", type=int, nargs="*", default=[1000, 10000])
    p.add_argument("--suggest-sizes", type=int, nargs="*", default=[1000, 3000])
    args = p.parse_args()
    print("What would save a vehicle: 5 suggestions (0 jobs = the demo day)")
    print(f"{'jobs':>6} {'max':>4} {'fleet':>5} {'found':>5} {'checked':>7} {'cold s':>7} "
          f"{'warm s':>7} {'MB':>6}  minutes moved")
    for n in [0, *args.suggest_sizes]:
        for minutes in (60, 15):
            r = _in_process(f"suggest({n}, {minutes})")
            target = 2.0 if n == 0 else (10.0 if r["jobs"] <= 1000 else None)
            flag = "" if target is None else (" ok" if r["cold_s"] <= target
                                              else f" OVER {target:g} s")
            print(f"{r['jobs']:>6} {minutes:>4} {r['vehicles']:>5} {r['found']:>5} "
                  f"{r['checked']:>7} {r['cold_s']:>7.2f} {r['warm_s']:>7.2f} "
                  f"{r['peak_mb']:>6.0f}  {r['moved_min']}{flag}")
    print("\nFewer vehicles than needed: the most priority served, with the proof checked")
    print(f"{'jobs':>6} {'needed':>6} {'avail':>5} {'unserved':>8} {'total s':>8} "
          f"{'flow s':>7} {'check s':>7} {'MB':>6} exact verified")
    for n in [0, *args.sizes]:
        for share in (0.9, 0.75):
            r = _in_process(f"short({n}, {share})")
            print(f"{r['jobs']:>6} {r['needed']:>6} {r['available']:>5} {r['unserved']:>8} "
                  f"{r['total_s']:>8.2f} {r.get('serving_the_most_s', 0):>7.2f} "
                  f"{r.get('verification_s', 0):>7.2f} {r['peak_mb']:>6.0f} {r['exact']} "
                  f"{r['verified']}")


if __name__ == "__main__":
    main()
