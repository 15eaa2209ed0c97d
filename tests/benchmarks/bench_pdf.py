"""Time the printed plan for a 2 000-job day (run by hand: python tests/benchmarks/bench_pdf.py).

Not collected by pytest (tests/benchmarks is ignored in the pytest settings).
"""

from __future__ import annotations

import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))

from shipgui.core import solve_day  # noqa: E402
from shipgui.report import write_plan_pdf  # noqa: E402
from tests.support.days import regional_day  # noqa: E402


def main(jobs: int = 2000, sites: int = 150) -> None:
    day = regional_day(jobs, sites)
    started = time.perf_counter()
    plan = solve_day(day)
    solved = time.perf_counter()
    with tempfile.TemporaryDirectory() as folder:
        target = Path(folder) / "plan.pdf"
        write_plan_pdf(plan, target)
        written = time.perf_counter()
        size = target.stat().st_size
    print(f"{jobs} jobs, {plan.vehicles} vehicles: solve {solved - started:.2f} s, "
          f"PDF {written - solved:.2f} s, {size / 1e6:.2f} MB")


if __name__ == "__main__":
    main(*(int(a) for a in sys.argv[1:3]))
