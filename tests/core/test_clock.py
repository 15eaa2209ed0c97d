import pytest

from shipgui.core.clock import format_clock, parse_clock, parse_minutes, resolve_clock


@pytest.mark.parametrize("text, seconds", [
    ("07:45", 7 * 3600 + 45 * 60), ("7:05", 7 * 3600 + 300), ("00:00", 0),
    ("25:30", 25 * 3600 + 1800),  # 01:30 next morning, as timetables write it
    ("23:59:30", 23 * 3600 + 59 * 60 + 30),
])
def test_clock_times(text, seconds):
    assert parse_clock(text).seconds == seconds


@pytest.mark.parametrize("text", ["7.45", "24:60", "48:00", "", "noon", "12:5", "-01:00"])
def test_bad_clock_times_are_refused(text):
    with pytest.raises(ValueError):
        parse_clock(text)


def test_iso_datetimes_resolve_against_plan_date():
    from datetime import date
    value = parse_clock("2026-12-03T01:30")
    assert resolve_clock(value, date(2026, 12, 2)) == 25 * 3600 + 1800


@pytest.mark.parametrize("text, seconds", [
    ("12.3", 738),   # exact decimal: 12.3 min is 738 s, not 739
    ("0.1", 6), ("1", 60), ("0", 0),
    ("0.001", 1),    # finer than a second rounds up, never optimistic
    ("12.345", 741),
])
def test_minutes_exact_and_rounded_up(text, seconds):
    assert parse_minutes(text) == seconds


@pytest.mark.parametrize("text", ["-1", "abc", "nan", "inf", "1e9"])
def test_bad_minutes(text):
    with pytest.raises(ValueError):
        parse_minutes(text)


def test_format_clock_past_midnight():
    assert format_clock(25 * 3600 + 1800) == "25:30"
    assert format_clock(7 * 3600 + 5 * 60) == "07:05"
