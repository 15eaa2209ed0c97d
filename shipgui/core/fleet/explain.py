"""Why two jobs need two vehicles, in one set of words for the app and the printout.

For a pair of jobs, the earlier-starting one (``first``) can only ever come
first on a shared vehicle: the later one starts after it, so it cannot end
before ``first`` starts.  So one order decides, and the reason is one of:

* ``class``: the jobs need different vehicle classes;
* ``overlap``: the second job starts while the first is still running;
* ``short``: after the first job, the turnaround and the drive bring the
  vehicle to the second job's start site too late, by so many minutes.

Minutes are shown rounded **up** (at least 1), so a shortfall never looks
smaller than it is and never reads "0 min short".  The array functions
(:func:`nearest_misses`, :func:`closest_partners`) work on whole certificates
in vectorised row blocks, never in a Python loop over pairs.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..clock import format_day_clock, format_duration, shown_minutes
from ..model import Day

__all__ = ["PairReason", "pair_reason", "reason_label", "reason_sentence", "explain_pair",
           "nearest_misses", "closest_partners", "peak_moment"]

_BLOCK_CELLS = 1 << 22  # pairs per vectorised block (32 MB of int64)


@dataclass(frozen=True)
class PairReason:
    """Why jobs ``first`` and ``second`` (day indices; ``first`` starts no later)
    cannot share a vehicle, or, for a plan that failed its check, that they can."""

    first: int
    second: int
    kind: str  # "class", "overlap", "short" or "fits"
    arrive: int = 0  # when the vehicle could be at the second job's start site
    drive: int = 0  # the empty drive between them, seconds
    late: int = 0  # seconds the vehicle would be late ("short"; negative: to spare)

    @property
    def short_minutes(self) -> int:
        """Minutes the vehicle would be late (``short``), rounded up, at least 1."""
        return 0 if self.kind != "short" else max(1, shown_minutes(self.late))


def pair_reason(day: Day, i: int, j: int) -> PairReason:
    """The reason jobs ``i`` and ``j`` need two vehicles (order of ``i``, ``j`` free)."""
    first, second = (i, j) if (int(day.start[i]), i) <= (int(day.start[j]), j) else (j, i)
    if day.vclass[first] != day.vclass[second]:
        return PairReason(first, second, "class")
    if day.start[second] < day.end[first]:
        return PairReason(first, second, "overlap")
    drive = int(day.travel[day.destination[first], day.origin[second]])
    arrive = int(day.end[first]) + day.settings.turnaround + drive
    late = arrive - int(day.start[second])
    return PairReason(first, second, "short" if late > 0 else "fits", arrive, drive, late)


def reason_label(reason: PairReason) -> str:
    """The short form for a table cell: 'cannot follow: 12 min short'."""
    if reason.kind == "class":
        return "different vehicle classes"
    if reason.kind == "overlap":
        return "overlap"
    if reason.kind == "short":
        return f"cannot follow: {format_duration(reason.short_minutes * 60)} short"
    return "can follow"  # only in a plan that failed its independent check


def reason_sentence(day: Day, reason: PairReason) -> str:
    """The reason in one plain sentence (plain text, not markup)."""
    a, b = day.jobs[reason.first], day.jobs[reason.second]
    if reason.kind == "class":
        return (f"{a.id} needs {_class_text(a.vehicle_class)} and {b.id} "
                f"{_class_text(b.vehicle_class)}.")
    if reason.kind == "overlap":
        return (f"They overlap: {b.id} starts at {format_day_clock(b.start)}, while {a.id} "
                f"is still running (until {format_day_clock(a.end)}).")
    steps = []
    turnaround = day.settings.turnaround
    if turnaround:
        steps.append(f"the {format_duration(turnaround)} turnaround")
    if a.destination != b.origin:
        steps.append(f"the {format_duration(reason.drive)} drive to "
                     f"{day.site_label(b.origin)}")
    verb = "brings" if len(steps) == 1 else "bring"
    how = f", {' and '.join(steps)} {verb} the vehicle there" if steps \
        else ", the vehicle is there"
    arrive = _minute_up(reason.arrive)
    if reason.kind == "short":
        result = (f"at {format_day_clock(arrive)}: {format_duration(reason.short_minutes * 60)} "
                  f"after {b.id} starts ({format_day_clock(b.start)}).")
    else:
        result = (f"at {format_day_clock(arrive)}, in time for {b.id} "
                  f"({format_day_clock(b.start)}).")
    return (f"After {a.id} ends at {format_day_clock(a.end)} at "
            f"{day.site_label(a.destination)}{how} {result}")


def explain_pair(day: Day, i: int, j: int) -> str:
    """Why jobs ``i`` and ``j`` need two vehicles, as the app and the printout say it:
    the reason for the only possible order, and why the other order is out."""
    reason = pair_reason(day, i, j)
    text = reason_sentence(day, reason)
    if reason.kind == "short":
        a, b = day.jobs[reason.first], day.jobs[reason.second]
        text += f" The other order is out too: {b.id} starts after {a.id}."
    return text


def nearest_misses(day: Day, jobs, count: int) -> list[PairReason]:
    """Up to ``count`` pairs among ``jobs`` (day indices) that miss sharing a vehicle
    by the fewest minutes ("short" pairs only), nearest first."""
    idx = np.asarray(jobs, dtype=np.int64)
    found: list[tuple[int, int, int]] = []  # (seconds late, first, second)
    for rows, late in _late_blocks(day, idx):
        a, b = np.nonzero(late > 0)
        if not len(a):
            continue
        values = late[a, b]
        keep = np.argsort(values, kind="stable")[:count]
        found += zip(values[keep].tolist(), idx[rows[a[keep]]].tolist(),
                     idx[b[keep]].tolist())
        found = sorted(found)[:count]
    return [pair_reason(day, first, second) for _, first, second in found]


def closest_partners(day: Day, jobs) -> np.ndarray:
    """For each of ``jobs``, the position (in ``jobs``) of the other job it comes
    closest to sharing a vehicle with, by the better of the two orders; -1 when
    every other job needs a different vehicle class."""
    idx = np.asarray(jobs, dtype=np.int64)
    best = np.full(len(idx), -1, dtype=np.int64)
    for rows, late in _late_blocks(day, idx, both_orders=True):
        late = np.where(late == _NEVER, np.iinfo(np.int64).max, late)
        late[np.arange(len(rows)), rows] = np.iinfo(np.int64).max  # not with itself
        choice = np.argmin(late, axis=1)
        usable = late[np.arange(len(rows)), choice] < np.iinfo(np.int64).max
        best[rows[usable]] = choice[usable]
    return best


def peak_moment(day: Day, jobs) -> tuple[int, np.ndarray]:
    """The moment most of ``jobs`` run at once, and which of them run then
    (positions in ``jobs``).  Sweeps the start and end times: O(k log k)."""
    idx = np.asarray(jobs, dtype=np.int64)
    if not len(idx):
        return 0, np.zeros(0, dtype=np.int64)
    start, end = day.start[idx], day.end[idx]
    times = np.concatenate([start, end])
    steps = np.concatenate([np.ones(len(idx), np.int64), -np.ones(len(idx), np.int64)])
    order = np.lexsort((steps, times))  # an end before a start at the same moment
    running = np.cumsum(steps[order])
    moment = int(times[order][int(np.argmax(running))])
    return moment, np.flatnonzero((start <= moment) & (end > moment))


# ------------------------------------------------------------------- internals

_NEVER = np.iinfo(np.int64).min  # marks pairs of different classes


def _late_blocks(day: Day, idx: np.ndarray, *, both_orders: bool = False):
    """Blocks of rows of the matrix late[a, b]: seconds the vehicle would be late at
    job idx[b] after job idx[a], for a starting first; 0 or less is in time;
    overlaps count as late by (end a - start b + drive) too; ``_NEVER`` for
    different classes and for pairs in the wrong order (unless ``both_orders``,
    which gives the better order of each pair)."""
    k = len(idx)
    step = max(1, _BLOCK_CELLS // max(k, 1))
    start, end = day.start[idx], day.end[idx]
    ready = end + day.settings.turnaround
    first = np.lexsort((idx, start))
    rank = np.empty(k, np.int64)
    rank[first] = np.arange(k)
    for a in range(0, k, step):
        rows = np.arange(a, min(k, a + step))
        drive = day.travel[day.destination[idx[rows]][:, None], day.origin[idx][None, :]]
        late = ready[rows, None] + drive - start[None, :]
        if both_orders:
            back = day.travel[day.destination[idx][None, :], day.origin[idx[rows]][:, None]]
            late = np.minimum(late, ready[None, :] + back - start[rows, None])
        else:
            late = np.where(rank[rows, None] < rank[None, :], late, _NEVER)
            late = np.where(start[None, :] < end[rows, None], _NEVER, late)
        same = day.vclass[idx[rows]][:, None] == day.vclass[idx][None, :]
        yield rows, np.where(same, late, _NEVER)


def _minute_up(seconds: int) -> int:
    return -(-seconds // 60) * 60


def _class_text(name: str) -> str:
    return f"a '{name}' vehicle" if name else "a vehicle of no particular class"
