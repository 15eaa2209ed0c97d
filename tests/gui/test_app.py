"""The entry function in screenshot mode (never enters the event loop)."""

from __future__ import annotations

from PySide6.QtCore import QThreadPool
from PySide6.QtGui import QImage

from shipgui.gui.app import run


def test_screenshot_of_the_demo(qapp, tmp_path, app_settings):
    out = tmp_path / "demo.png"
    assert run([], demo=True, screenshot=str(out), settings=app_settings) == 0
    image = QImage(str(out))
    assert image.width() >= 1000 and image.height() >= 600
    QThreadPool.globalInstance().waitForDone(20_000)


def test_screenshot_of_a_bad_file_returns_2(qapp, tmp_path, app_settings):
    bad = tmp_path / "jobs.csv"
    bad.write_text("job,origin,start\nJ1,A,08:00\n")
    out = tmp_path / "bad.png"
    assert run([str(bad)], screenshot=str(out), settings=app_settings) == 2
    assert out.exists()
