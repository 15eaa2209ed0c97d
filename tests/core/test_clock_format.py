"""Clock times as people read them: the day a time falls on is marked, never 24:55."""

import pytest

from shipgui.core.clock import day_mark, format_clock, format_day_clock


@pytest.mark.parametrize("seconds, shown", [
    (7 * 3600 + 45 * 60, "07:45"),
    (24 * 3600 + 55 * 60, "00:55 +1"),  # the example: not "24:55"
    (27 * 3600 + 49 * 60, "03:49 +1"),
    (24 * 3600, "00:00 +1"),
    (23 * 3600 + 59 * 60 + 30, "23:59:30"),
    (-30 * 60, "23:30 -1"),  # leaving the depot before the plan day's midnight
    (48 * 3600 + 60, "00:01 +2"),
])
def test_day_clock(seconds, shown):
    assert format_day_clock(seconds) == shown


def test_file_form_keeps_hours_past_23():
    # Data files keep the input form, which the readers accept back.
    assert format_clock(24 * 3600 + 55 * 60) == "24:55"


@pytest.mark.parametrize("seconds, mark", [(0, ""), (86_399, ""), (86_400, "+1"), (-1, "-1")])
def test_day_mark(seconds, mark):
    assert day_mark(seconds) == mark
