"""Benchmark of the planning engine (not run by the test suite).

    python tests/benchmarks/bench_solve.py [--sizes 1000 10000 20000 50000] [--no-networkx]

Each size runs in its own process so the peak memory (max RSS) is that size's
alone.  Prints per-stage seconds for fleet + certificate + verification, then
the straightforward networkx route side by side, then the whole
`shipgui solve` process on a 10 000-job day written to CSV.
"""

from __future__ import annotations

import argparse
import csv
import json
import os
import resource
import subprocess
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
sys.path.insert(0, str(ROOT))

SITES = {1000: 100, 2000: 120, 500: 60, 10000: 200, 20000: 300, 50000: 300}


def one_size(n: int) -> dict:
    from shipgui.core import solve_day
    from tests.support.days import regional_day
    solve_day(regional_day(50, 5))  # load compiled kernels before timing
    t = time.perf_counter()
    day = regional_day(n, SITES.get(n, 200), seed=n)
    build = time.perf_counter() - t
    t = time.perf_counter()
    plan = solve_day(day)
    total = time.perf_counter() - t
    peak_mb = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    return {"n": n, "sites": SITES.get(n, 200), "vehicles": plan.vehicles,
            "verified": plan.verified, "kernel": plan.kernel, "total_s": total,
            "build_day_s": build, "peak_mb": peak_mb,
            **{f"{k}_s": v for k, v in plan.timings.items()}}


def networkx_route(n: int) -> dict:
    """Closure + networkx Hopcroft-Karp + König vertex cover on all pairs."""
    import networkx as nx

    from shipgui.core import can_follow_matrix
    from tests.support.days import regional_day
    day = regional_day(n, SITES.get(n, 200), seed=n)
    t = time.perf_counter()
    from shipgui.core.travel import close_travel
    close_travel(day.travel)
    m = can_follow_matrix(day)
    g = nx.Graph()
    g.add_nodes_from(range(2 * n))
    r, c = m.nonzero()
    g.add_edges_from(zip(r.tolist(), (c + n).tolist()))
    top = range(n)
    matching = nx.bipartite.hopcroft_karp_matching(g, top_nodes=top)
    cover = nx.bipartite.to_vertex_cover(g, matching, top_nodes=top)
    antichain = [x for x in range(n) if x not in cover and x + n not in cover]
    return {"n": n, "vehicles": n - len(matching) // 2, "antichain": len(antichain),
            "total_s": time.perf_counter() - t}


def in_child(func: str, n: int, timeout: float) -> dict | None:
    code = (f"import json,sys; sys.path.insert(0,{str(ROOT)!r}); "
            f"from tests.benchmarks.bench_solve import {func}; print(json.dumps({func}({n})))")
    try:
        out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                             timeout=timeout, check=True)
    except subprocess.TimeoutExpired:
        return None
    return json.loads(out.stdout.strip().splitlines()[-1])


def whole_process(n: int = 10000) -> float:
    from tests.support.days import regional_day
    day = regional_day(n, SITES[n], seed=n)
    with tempfile.TemporaryDirectory() as tmp:
        jobs, sites = Path(tmp, "jobs.csv"), Path(tmp, "sites.csv")
        with open(jobs, "w", newline="") as f:
            w = csv.writer(f)
            w.writerow(["job", "origin", "destination", "start", "end"])
            for j in day.jobs:
                w.writerow([j.id, j.origin, j.destination, f"{j.start // 3600:02d}:"
                            f"{j.start % 3600 // 60:02d}", f"{j.end // 3600:02d}:"
                            f"{j.end % 3600 // 60:02d}"])
        with open(sites, "w", newline="") as f:
            w = csv.writer(f)
            w.writerow(["site", "x_km", "y_km"])
            for s in day.sites.values():
                w.writerow([s.id, s.x_km, s.y_km])
        cmd = [sys.executable, "-m", "shipgui", "solve", str(jobs), "--sites", str(sites),
               "--turnaround", "10", "--json", str(Path(tmp, "plan.json"))]
        env = dict(os.environ, PYTHONPATH=str(ROOT))
        subprocess.run(cmd, check=True, capture_output=True, env=env)  # warm the caches
        t = time.perf_counter()
        subprocess.run(cmd, check=True, capture_output=True, env=env)
        return time.perf_counter() - t


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--sizes", type=int, nargs="*", default=[1000, 10000, 20000, 50000])
    ap.add_argument("--no-networkx", action="store_true")
    ap.add_argument("--networkx-timeout", type=float, default=900)
    args = ap.parse_args()
    print(f"{'jobs':>6} {'sites':>5} {'vehicles':>8} {'relation':>9} {'matching':>9} "
          f"{'routes':>7} {'verify':>7} {'total s':>8} {'peak MB':>8}  kernel")
    results = {}
    for n in args.sizes:
        r = in_child("one_size", n, 3600)
        results[n] = r
        print(f"{n:>6} {r['sites']:>5} {r['vehicles']:>8} {r['relation_s']:>9.3f} "
              f"{r['matching_s']:>9.3f} {r['routes_s']:>7.3f} {r['verification_s']:>7.3f} "
              f"{r['total_s']:>8.3f} {r['peak_mb']:>8.0f}  {r['kernel']}"
              + ("" if r["verified"] else "  NOT VERIFIED"), flush=True)
    if not args.no_networkx:
        print("\nnetworkx route (closure + hopcroft_karp_matching + to_vertex_cover):")
        for n in (500, 2000):
            ours = in_child("one_size", n, 600)
            ref = in_child("networkx_route", n, args.networkx_timeout)
            if ref is None:
                print(f"{n:>6} jobs: networkx > {args.networkx_timeout:.0f} s (stopped), "
                      f"shipgui {ours['total_s']:.3f} s, ratio > "
                      f"{args.networkx_timeout / ours['total_s']:.0f}x")
                continue
            assert ref["vehicles"] == ours["vehicles"] == ref["antichain"]
            print(f"{n:>6} jobs: networkx {ref['total_s']:.2f} s, shipgui "
                  f"{ours['total_s']:.4f} s, ratio {ref['total_s'] / ours['total_s']:.0f}x "
                  f"(both {ours['vehicles']} vehicles)", flush=True)
    print(f"\nwhole `shipgui solve` process, 10 000 jobs: {whole_process():.2f} s")


if __name__ == "__main__":
    main()
