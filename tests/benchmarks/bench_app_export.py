"""How long the app's window freezes while it writes the PDF of a large day.

Run by hand (offscreen is fine):

    QT_QPA_PLATFORM=offscreen python tests/benchmarks/bench_app_export.py [JOBS]

A 10 ms timer runs in the window's event loop while the export writes in the
background; the longest gap between its ticks is the longest freeze a user
would feel.  Not collected by pytest (tests/benchmarks is ignored).
"""

from __future__ import annotations

import os
import sys
import tempfile
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
if str(ROOT) not in sys.path:
    sys.path.insert(0, str(ROOT))
os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

from PySide6.QtCore import QEventLoop, QTimer  # noqa: E402
from PySide6.QtWidgets import QFileDialog  # noqa: E402

from shipgui.core import solve_day  # noqa: E402
from shipgui.gui.app import make_application  # noqa: E402
from shipgui.gui.main_window import MainWindow  # noqa: E402
from shipgui.gui.services.settings import AppSettings  # noqa: E402
from tests.support.days import regional_day  # noqa: E402


def main(jobs: int = 3050) -> None:
    make_application()
    folder = tempfile.mkdtemp(prefix="shipgui-bench-")
    window = MainWindow(AppSettings.at_path(Path(folder) / "settings.ini"), solve_delay_ms=0)
    window.show()
    plan = solve_day(regional_day(jobs, 150))
    window.plan, window.plan_is_current = plan, True
    target = Path(folder) / "plan.pdf"
    QFileDialog.getSaveFileName = staticmethod(lambda *a, **k: (str(target), ""))
    gaps: list[float] = []
    last = [time.perf_counter()]

    def tick() -> None:
        now = time.perf_counter()
        gaps.append(now - last[0])
        last[0] = now

    timer = QTimer()
    timer.setInterval(10)
    timer.timeout.connect(tick)
    timer.start()
    loop = QEventLoop()
    window.files.exports.finished.connect(loop.quit)
    started = time.perf_counter()
    assert window.files.export_pdf()
    returned = time.perf_counter() - started
    loop.exec()
    total = time.perf_counter() - started
    gaps.sort()
    print(f"{jobs} jobs, {plan.vehicles} vehicles: Export PDF returned to the window in "
          f"{returned * 1000:.0f} ms; the PDF ({target.stat().st_size / 1e6:.1f} MB) was "
          f"written in {total:.1f} s; longest event-loop gap {gaps[-1] * 1000:.0f} ms "
          f"(99th percentile {gaps[int(len(gaps) * 0.99)] * 1000:.0f} ms)")
    window.close()


if __name__ == "__main__":
    main(*(int(a) for a in sys.argv[1:2]))
