"""Long solves on the command line: the time limit of the least-empty-driving
stage, and the progress line on a terminal."""

import io
import json

import pytest

from shipgui.cli import main
from shipgui.terminal import ProgressLine
from tests.support.days import write_regional_csv


def test_time_limit_keeps_the_minimum_fleet_with_a_note(tmp_path, capsys):
    jobs, sites = write_regional_csv(tmp_path, 6000, 150)
    out = tmp_path / "plan.json"
    code = main(["solve", str(jobs), "--sites", str(sites), "--turnaround", "10",
                 "--least-deadhead-time", "0.001", "--json", str(out)])
    assert code == 0
    text = capsys.readouterr().out
    assert "Vehicles needed:" in text and "(minimum; independently verified)" in text
    assert "Note: The search for the least empty driving stopped at its time limit" in text
    assert "the least possible with" not in text
    plan = json.loads(out.read_text())
    assert plan["verified"] is True and plan["least_deadhead"] is False
    assert "not the least possible" in plan["least_deadhead_note"]
    assert "tradeoff" not in plan


@pytest.mark.parametrize("value", ["-1", "nan", "inf"])
def test_time_limit_must_be_a_number_of_seconds(value, capsys):
    assert main(["demo", "--least-deadhead-time", value]) == 2
    assert "--least-deadhead-time" in capsys.readouterr().err


class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


def test_progress_line_only_on_a_terminal_and_only_when_slow():
    screen = _Terminal()
    fast = ProgressLine(screen)  # a quick solve: nothing shown
    fast.stage("matching")
    fast.close()
    assert screen.getvalue() == ""
    line = ProgressLine(screen, limit_note="stops after 120 s", show_after=0.0)
    line.stage("matching")
    shown = screen.getvalue()
    line.close()
    assert "Solving, 0 s: finding the routes with the least empty driving (stops after 120 s)" \
        in shown
    assert screen.getvalue().endswith("\r\033[K")  # the line is cleared at the end
    pipe = io.StringIO()  # not a terminal: nothing at all
    quiet = ProgressLine(pipe)
    quiet.stage("matching")
    quiet.close()
    assert pipe.getvalue() == ""
