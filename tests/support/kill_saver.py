"""Child process for the kill test: saves two plans in turn, forever, until killed.

Run as ``python kill_saver.py MODE PATH``.  It imports everything once, then for
each "go" line on stdin forks a saver (printing its pid) that writes plan A,
plan B, plan A ... to PATH with the real save function of MODE ("plan": a plan
file saved by ``DayDocument.save``, "bytes": ``files.write_bytes_atomic``).  The parent kills
the saver with SIGKILL and writes "reap"; this process reaps it and says so.
Forking keeps each round cheap (no fresh interpreter and Qt import per kill).
"""

from __future__ import annotations

import os
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from shipgui.core import Job, Settings, Site  # noqa: E402
from shipgui.core.document import DayDocument  # noqa: E402


def documents() -> tuple[DayDocument, DayDocument]:
    """Two invented days of 1 500 jobs (big enough for a kill to land mid-write)."""
    sites = [Site(f"S{k}", f"Stop {k}", x_km=float(k), y_km=0.0) for k in range(40)]

    def day(version: str, shift: int) -> DayDocument:
        jobs = [Job(f"J{k:05d}", f"S{k % 40}", f"S{(k * 7) % 40}", 6 * 3600 + k * 5 + shift,
                    9 * 3600 + k * 5, customer=f"Customer {k % 17}", notes=f"{version} plan")
                for k in range(1500)]
        return DayDocument(jobs, sites, {("S1", "S2"): (600, 2)}, Settings(turnaround=600))

    return day("old", 0), day("new", 60)


def plan_bytes(mode: str) -> tuple[bytes, bytes]:
    """What a save of each plan writes, byte for byte."""
    from shipgui.core.io.plan_file import plan_file_bytes
    if mode == "plan":
        return tuple(plan_file_bytes(d.inputs()) for d in documents())  # type: ignore
    return tuple(f'{{"plan": "{name}", "filler": "{name * 200_000}"}}\n'.encode()
                 for name in ("A", "B"))  # type: ignore[return-value]


def saver(mode: str, path: str, docs, blobs) -> None:
    from shipgui.core.io.files import write_bytes_atomic
    k = 0
    while True:
        if mode == "plan":
            docs[k % 2].save(path)
        else:
            write_bytes_atomic(path, blobs[k % 2])
        k += 1


def main() -> None:
    mode, path = sys.argv[1], sys.argv[2]
    docs, blobs = documents(), plan_bytes(mode)  # everything imported before the forks
    print("ready", flush=True)
    for line in sys.stdin:
        if line.strip() != "go":
            break
        pid = os.fork()
        if pid == 0:
            try:
                saver(mode, path, docs, blobs)
            finally:
                os._exit(3)
        print(pid, flush=True)
        sys.stdin.readline()  # "reap": the parent has killed the saver
        os.waitpid(pid, 0)
        print("reaped", flush=True)


if __name__ == "__main__":
    main()
