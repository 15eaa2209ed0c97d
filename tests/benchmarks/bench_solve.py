"""Benchmark of the planning engine (not run by the test suite).

    python tests/benchmarks/bench_solve.py [--sizes 1000 10000 20000 50000] [--no-networkx]
    python tests/benchmarks/bench_solve.py --least-deadhead [1000 10000 20000]
    python tests/benchmarks/bench_solve.py --whole [50000 200000]

Each size runs in its own process so the peak memory (max RSS) is that size's
alone.  The first form prints per-stage seconds of the default solve (fleet +
certificate + verification, and the least-empty-driving stage), then the
straightforward networkx route for the fleet side by side, then the whole
`shipgui solve` process on a 10 000-job day written to CSV.  The second form
times the least-empty-driving plan against scipy's sparse assignment on all
compatible pairs (same optimum asserted), with and without the trade-off.
The third times the whole `shipgui solve` process (seconds and peak memory)
on days written to CSV, with the default options.
"""

from __future__ import annotations

import argparse
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

SITES = {1000: 100, 2000: 120, 500: 60, 10000: 200, 20000: 300, 50000: 300, 200000: 200}


def one_size(n: int) -> dict:
    """The default solve: fleet, certificate, least empty driving with a trade-off
    of 5 extra vehicles, verification."""
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
            **{f"{k.replace(' ', '_')}_s": v for k, v in plan.timings.items()}}


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


def least_deadhead_size(n: int) -> dict:
    """The least-empty-driving plan alone, then with the trade-off, then bare."""
    from shipgui.core import solve_day
    from tests.support.days import regional_day
    solve_day(regional_day(50, 5))
    day = regional_day(n, SITES.get(n, 200), seed=n)
    t = time.perf_counter()
    plan = solve_day(day, tradeoff=0)
    total = time.perf_counter() - t
    peak = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    t = time.perf_counter()
    with_tradeoff = solve_day(day, tradeoff=5)
    tradeoff_s = time.perf_counter() - t
    assert with_tradeoff.deadhead_seconds == plan.deadhead_seconds
    bare = solve_day(day, least_deadhead=False)
    return {"n": n, "total_s": total, "stage_s": plan.timings["least deadhead"],
            "tradeoff_total_s": tradeoff_s, "vehicles": plan.vehicles,
            "deadhead_min": plan.deadhead_seconds / 60, "bare_min": bare.deadhead_seconds / 60,
            "peak_mb": peak}


def straightforward_assignment(n: int) -> dict:
    """scipy min_weight_full_bipartite_matching on all compatible pairs."""
    import numpy as np
    import scipy.sparse as sp
    from scipy.sparse.csgraph import min_weight_full_bipartite_matching

    from shipgui.core import can_follow_matrix
    from tests.support.days import regional_day
    day = regional_day(n, SITES.get(n, 200), seed=n)
    t = time.perf_counter()
    m = can_follow_matrix(day).tocoo()
    w = day.travel[day.destination[m.row], day.origin[m.col]].astype(float) + 1
    big = float(w.max() * n + 1)
    rows = np.concatenate([m.row, np.arange(n)])
    cols = np.concatenate([m.col, n + np.arange(n)])
    data = np.concatenate([w, np.full(n, big)])
    graph = sp.csr_matrix((data, (rows, cols)), shape=(n, 2 * n))
    r, c = min_weight_full_bipartite_matching(graph)
    links = c < n
    dead = day.travel[day.destination[r[links]], day.origin[c[links]]].sum()
    return {"n": n, "total_s": time.perf_counter() - t, "vehicles": int(n - links.sum()),
            "deadhead_min": float(dead) / 60,
            "peak_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024}


def _write_day(n: int, folder: Path) -> tuple[Path, Path]:
    from tests.support.days import write_regional_csv
    return write_regional_csv(folder, n, SITES.get(n, 200))


# The whole `shipgui solve` process, reporting its own peak memory at the end.
_SOLVE = ("import resource, sys; from shipgui.cli import main; code = main(sys.argv[1:]); "
          "print('PEAK_KB', resource.getrusage(resource.RUSAGE_SELF).ru_maxrss, "
          "file=sys.stderr); sys.exit(code)")


def whole_process(n: int = 10000, *extra: str) -> dict:
    """Seconds and peak memory of `shipgui solve` on an n-job day written to CSV
    (kernels compiled beforehand, as after the first start)."""
    with tempfile.TemporaryDirectory() as tmp:
        jobs, sites = _write_day(n, Path(tmp))
        cmd = [sys.executable, "-c", _SOLVE, "solve", str(jobs), "--sites", str(sites),
               "--turnaround", "10", "--json", str(Path(tmp, "plan.json")), "--verbose", *extra]
        env = dict(os.environ, PYTHONPATH=str(ROOT))
        subprocess.run([sys.executable, "-m", "shipgui", "demo"], check=True,
                       capture_output=True, env=env)  # compiled kernels in the cache
        t = time.perf_counter()
        out = subprocess.run(cmd, check=True, capture_output=True, env=env, text=True)
        seconds = time.perf_counter() - t
        plan = json.loads(Path(tmp, "plan.json").read_text())
    peak = int(out.stderr.split("PEAK_KB")[-1].split()[0]) / 1024
    stages = {line[:30].strip(): float(line.split()[-2]) / 1000
              for line in out.stdout.splitlines()
              if line.startswith("  ") and line.rstrip().endswith(" ms")}
    return {"n": n, "seconds": seconds, "peak_mb": peak, "vehicles": plan["vehicles"],
            "least_deadhead": plan["least_deadhead"], "verified": plan["verified"],
            "stages": stages}


def print_whole(sizes: list[int]) -> None:
    print("whole `shipgui solve` process (CSV in, JSON out, default options: least empty "
          "driving with a trade-off of 5, stopped after 120 s):")
    for n in sizes:
        r = whole_process(n)
        st = r["stages"]
        fleet = sum(v for k, v in st.items() if k in ("relation", "matching", "routes",
                                                       "verification"))
        print(f"{n:>7} jobs: {r['seconds']:7.1f} s, peak {r['peak_mb']:6.0f} MB, "
              f"{r['vehicles']} vehicles; reading {st.get('reading and checking input', 0):.1f}"
              f" s, fleet {fleet:.1f} s, least empty driving "
              f"{st.get('least deadhead', 0):.1f} s"
              + ("" if r["least_deadhead"] else " (stopped at the time limit)")
              + ("" if r["verified"] else "  NOT VERIFIED"), flush=True)


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--sizes", type=int, nargs="*", default=[1000, 10000, 20000, 50000])
    ap.add_argument("--no-networkx", action="store_true")
    ap.add_argument("--networkx-timeout", type=float, default=900)
    ap.add_argument("--least-deadhead", type=int, nargs="*", default=None, metavar="N",
                    help="only benchmark the least-empty-driving plan at these sizes")
    ap.add_argument("--whole", type=int, nargs="*", default=None, metavar="N",
                    help="only time the whole `shipgui solve` process at these sizes "
                    "(default 50000 200000)")
    ap.add_argument("--assignment-limit", type=int, default=20000, metavar="N",
                    help="run the all-pairs scipy reference up to this size (default 20000; "
                    "it needs about 6 GB at 20 000 jobs)")
    args = ap.parse_args()
    if args.whole is not None:
        print_whole(args.whole or [50000, 200000])
        return
    if args.least_deadhead is not None:
        bench_least_deadhead(args.least_deadhead or [1000, 10000, 20000], args.assignment_limit)
        return
    print("default solve; the fleet is relation + matching + routes + verify, then the "
          "least-empty-driving stage (with a trade-off of 5 vehicles)")
    print(f"{'jobs':>6} {'sites':>5} {'vehicles':>8} {'relation':>9} {'matching':>9} "
          f"{'routes':>7} {'verify':>7} {'fleet s':>8} {'least dh':>9} {'total s':>8} "
          f"{'peak MB':>8}  kernel")
    results = {}
    for n in args.sizes:
        r = in_child("one_size", n, 3600)
        results[n] = r
        fleet = r["total_s"] - r["least_deadhead_s"]
        print(f"{n:>6} {r['sites']:>5} {r['vehicles']:>8} {r['relation_s']:>9.3f} "
              f"{r['matching_s']:>9.3f} {r['routes_s']:>7.3f} {r['verification_s']:>7.3f} "
              f"{fleet:>8.3f} {r['least_deadhead_s']:>9.3f} "
              f"{r['total_s']:>8.3f} {r['peak_mb']:>8.0f}  {r['kernel']}"
              + ("" if r["verified"] else "  NOT VERIFIED"), flush=True)
    if not args.no_networkx:
        print("\nnetworkx route (closure + hopcroft_karp_matching + to_vertex_cover):")
        for n in (500, 2000):
            ours = in_child("one_size", n, 600)
            ref = in_child("networkx_route", n, args.networkx_timeout)
            ours["total_s"] -= ours["least_deadhead_s"]  # the fleet alone, like networkx
            if ref is None:
                print(f"{n:>6} jobs: networkx > {args.networkx_timeout:.0f} s (stopped), "
                      f"shipgui {ours['total_s']:.3f} s, ratio > "
                      f"{args.networkx_timeout / ours['total_s']:.0f}x")
                continue
            assert ref["vehicles"] == ours["vehicles"] == ref["antichain"]
            print(f"{n:>6} jobs: networkx {ref['total_s']:.2f} s, shipgui "
                  f"{ours['total_s']:.4f} s, ratio {ref['total_s'] / ours['total_s']:.0f}x "
                  f"(both {ours['vehicles']} vehicles)", flush=True)
    print()
    print_whole([10000])


def bench_least_deadhead(sizes: list[int], assignment_limit: int) -> None:
    print("least-empty-driving plan (whole solve, no trade-off) against scipy "
          "min_weight_full_bipartite_matching on all compatible pairs; then the "
          "solve with a trade-off of 5 extra vehicles")
    print(f"{'jobs':>6} {'ours s':>7} {'stage s':>8} {'peak MB':>8} {'assign-all s':>13} "
          f"{'peak MB':>8} {'+trade-off s':>12} {'vehicles':>8} {'deadhead h':>10} "
          f"{'bare h':>8}")
    for n in sizes:
        ours = in_child("least_deadhead_size", n, 3600)
        ref = in_child("straightforward_assignment", n, 1800) if n <= assignment_limit else None
        ref_s = f"{ref['total_s']:>13.2f} {ref['peak_mb']:>8.0f}" if ref else f"{'-':>13} {'-':>8}"
        if ref:
            assert abs(ref["deadhead_min"] - ours["deadhead_min"]) < 1e-6
            assert ref["vehicles"] == ours["vehicles"]
        print(f"{n:>6} {ours['total_s']:>7.2f} {ours['stage_s']:>8.2f} {ours['peak_mb']:>8.0f} "
              f"{ref_s} {ours['tradeoff_total_s']:>12.2f} {ours['vehicles']:>8} "
              f"{ours['deadhead_min'] / 60:>10.1f} {ours['bare_min'] / 60:>8.1f}", flush=True)


if __name__ == "__main__":
    main()
