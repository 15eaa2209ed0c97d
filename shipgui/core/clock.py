"""Clock times and minute values, parsed exactly into whole seconds.

Times are seconds after midnight of the plan day.  ``HH:MM`` may go past 23
(``25:30`` is 01:30 next morning, as transit timetables write it).  Minute
values are parsed as decimals, never as binary floats, so ``12.3`` minutes is
exactly 738 seconds; anything finer than a second is rounded *up*.

Every number a dispatcher types (minutes, coordinates, settings) is read by
:func:`parse_decimal`, so all of them accept the same forms: a decimal point or
a decimal comma (``12.5`` or ``12,5``, as spreadsheets write it where the comma
is the decimal mark), an optional sign and exponent; never a thousands
separator, so ``1,000`` is one and ``1.000,5`` is refused.
"""

from __future__ import annotations

import math
import re
from datetime import date, datetime, time, timedelta
from decimal import Decimal, InvalidOperation

__all__ = ["ClockValue", "parse_clock", "parse_minutes", "parse_decimal", "NUMBER_FORMS",
           "parse_length", "MAX_WORKING_DAY", "format_clock", "format_clock_or_none",
           "format_day_clock", "day_mark", "format_minutes", "format_duration", "shown_minutes",
           "minutes_value", "resolve_clock"]

_HHMM = re.compile(r"^(\d{1,2}):(\d{2})(?::(\d{2}))?$")
_NUMBER = re.compile(r"[+-]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][+-]?\d{1,6})?")
NUMBER_FORMS = "write numbers like 12.5 or 12,5"
MAX_HOURS = 48  # a plan day plus the following night; more is almost surely a typo


class ClockValue:
    """A parsed time: either seconds after the plan day's midnight, or a date-time.

    A date-time cannot be turned into seconds until the plan date is known
    (the earliest date among the file's date-times), hence this small holder.
    """

    __slots__ = ("seconds", "moment")

    def __init__(self, seconds: int | None = None, moment: datetime | None = None):
        self.seconds = seconds
        self.moment = moment


def parse_clock(text: str) -> ClockValue:
    """Parse ``HH:MM[:SS]`` (hours 0-47) or an ISO 8601 date-time.

    Raises ``ValueError`` with a dispatcher-readable reason.
    """
    text = text.strip()
    m = _HHMM.match(text)
    if m:
        hours, minutes, seconds = int(m[1]), int(m[2]), int(m[3] or 0)
        if minutes > 59 or seconds > 59:
            raise ValueError(f"'{text}' is not a clock time (minutes and seconds go up to 59)")
        if hours >= MAX_HOURS:
            raise ValueError(f"'{text}' is too late: hours go up to {MAX_HOURS - 1} "
                             "(24-47 mean the next day)")
        return ClockValue(seconds=hours * 3600 + minutes * 60 + seconds)
    if len(text) >= 16 and text[:4].isdigit() and text[4] == "-" and text[10] in "T ":
        try:
            moment = datetime.fromisoformat(text)
        except ValueError:
            pass
        else:
            return ClockValue(moment=moment)
    raise ValueError(f"'{text}' is not a time; write HH:MM (e.g. 07:45, or 25:30 for "
                     "01:30 next day) or an ISO date-time (2026-12-02T07:45)")


def resolve_clock(value: ClockValue, plan_date: date | None) -> int:
    """Seconds after the plan day's midnight for a parsed value."""
    if value.moment is None:
        return int(value.seconds)  # type: ignore[arg-type]
    assert plan_date is not None
    midnight = datetime.combine(plan_date, time(0), tzinfo=value.moment.tzinfo)
    delta = value.moment - midnight
    return math.ceil(delta / timedelta(seconds=1))


def parse_decimal(text: str) -> Decimal:
    """A number as a dispatcher writes it (see the module note), exactly.

    Raises ``ValueError`` (no message: the caller says what was expected).
    """
    text = text.strip()
    if not _NUMBER.fullmatch(text):
        raise ValueError
    try:
        return Decimal(text.replace(",", "."))
    except InvalidOperation:  # pragma: no cover - the pattern admits only numbers
        raise ValueError from None


def parse_minutes(text: str, *, allow_zero: bool = True) -> int:
    """Minutes as written (decimals allowed) to whole seconds, rounded up."""
    text = text.strip()
    try:
        value = parse_decimal(text)
    except ValueError:
        raise ValueError(f"'{text}' is not a number of minutes ({NUMBER_FORMS})") from None
    if value < 0 or (value == 0 and not allow_zero):
        raise ValueError(f"'{text}' minutes: must be {'zero or ' if allow_zero else ''}"
                         "more than zero")
    if value > 100_000:
        raise ValueError(f"'{text}' minutes is more than two months; check the value")
    return int(math.ceil(value * 60))


_LENGTH = re.compile(r"^(\d{1,2}):(\d{2})$")
MAX_WORKING_DAY = 24 * 3600  # one driver cannot work longer than a day


def parse_length(text: str) -> int:
    """A length of time as ``H:MM`` (11:00) or minutes (660, 612.5): whole seconds.

    For the longest working day; from more than 0 up to 24 hours.  Raises
    ``ValueError`` with a dispatcher-readable reason.
    """
    text = text.strip()
    m = _LENGTH.match(text)
    if m:
        if int(m[2]) > 59:
            raise ValueError(f"'{text}': minutes go up to 59")
        seconds = int(m[1]) * 3600 + int(m[2]) * 60
    else:
        try:
            seconds = parse_minutes(text, allow_zero=False)
        except ValueError:
            raise ValueError(f"'{text}' is not a length of time; write H:MM (11:00) or "
                             "minutes (660)") from None
    if not 0 < seconds <= MAX_WORKING_DAY:
        raise ValueError(f"'{text}': a working day is more than 0 and at most 24 hours")
    return seconds


def format_clock(seconds: int | float) -> str:
    """``HH:MM`` (hours past 23 for the next day); seconds are shown only if set."""
    seconds = int(seconds)
    sign = "-" if seconds < 0 else ""
    seconds = abs(seconds)
    h, rest = divmod(seconds, 3600)
    m, s = divmod(rest, 60)
    return f"{sign}{h:02d}:{m:02d}" + (f":{s:02d}" if s else "")


def day_mark(seconds: int | float) -> str:
    """'' on the plan day, '+1' the day after, '-1' the day before (and so on)."""
    days = int(seconds) // 86_400
    return "" if days == 0 else f"{days:+d}"


def format_day_clock(seconds: int | float) -> str:
    """A clock time as people read it: ``HH:MM`` of the day it falls on, with a
    day mark when that is not the plan day ('00:55 +1' for 24:55, '23:30 -1'
    for half an hour before the plan day).  Seconds are shown only if set.
    For files, :func:`format_clock` keeps the input form (hours past 23)."""
    seconds = int(seconds)
    mark = day_mark(seconds)
    text = format_clock(seconds % 86_400)
    return f"{text} {mark}" if mark else text


def format_clock_or_none(seconds: int | None) -> str | None:
    """:func:`format_clock`, or None for an unset time."""
    return None if seconds is None else format_clock(seconds)


def shown_minutes(seconds: int | float) -> int:
    """Whole minutes, rounded up, as :func:`format_duration` shows a duration."""
    return math.ceil(seconds / 60)


def format_duration(seconds: int | float) -> str:
    """A duration a person reads at a glance: '45 min', '3 h 05 min' (whole minutes,
    rounded up: estimates of driving and lateness should never look better than they are)."""
    minutes = shown_minutes(seconds)
    if minutes < 60:
        return f"{minutes} min"
    return f"{minutes // 60} h {minutes % 60:02d} min"


def minutes_value(seconds: int) -> int | float:
    """Minutes as a number for data files: whole when exact, else two decimals."""
    value = seconds / 60
    return int(value) if value.is_integer() else round(value, 2)


def format_minutes(seconds: int | float) -> str:
    """Minutes for display: whole minutes when exact, else one decimal."""
    minutes = seconds / 60
    if float(minutes).is_integer():
        return str(int(minutes))
    return f"{minutes:.1f}"
