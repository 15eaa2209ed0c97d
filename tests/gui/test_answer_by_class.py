"""The answer counts vehicles per class when the day has classes."""

from __future__ import annotations

from PySide6.QtGui import QAction

from shipgui.core import Job, build_day, solve_day
from shipgui.gui.panels.answer_bar import AnswerBar

HOUR = 3600


def _plan(classes):
    jobs = [Job(f"J{k}", "A", "A", 8 * HOUR, 9 * HOUR, vehicle_class=c)
            for k, c in enumerate(classes)]
    return solve_day(build_day(jobs, [], {}))


def test_vehicles_per_class_on_the_answer(qtbot, tmp_path):
    bar = AnswerBar(QAction("Cancel"))
    qtbot.addWidget(bar)
    bar.show()
    bar.show_plan(_plan(["reefer", "reefer", "rigid"]), 0.01)
    assert bar.vehicles.value.text() == "3"
    assert not bar.by_class.isHidden() and bar.by_class.text() == "reefer 2 · rigid 1"
    bar.grab().save(str(tmp_path / "answer.png"))
    bar.show_plan(_plan(["", ""]), 0.01)  # no classes: nothing to split
    assert bar.by_class.isHidden()
    bar.show_plan(_plan(["<b>x</b>", ""]), 0.01)
    assert bar.by_class.text() == "(no class) 1 · <b>x</b> 1"  # shown as typed, not markup
    bar.show_nothing("No jobs")
    assert bar.by_class.isHidden()
