"""Why two jobs need two vehicles under a working-day limit, and how to print weights.

One set of words for the app and the printout, as :mod:`shipgui.core.fleet.explain`
is without a limit (whose wording and rounding the "cannot follow" part reuses).
Two jobs fit one working day when one can follow the other and a vehicle doing
just those two is back within the limit (contract section 5).  Only the
earlier-starting job can come first (the later one starts after it, so cannot
end before it starts), so one order decides, and the reason is one of
``class``, ``overlap``, ``short`` (as without a limit) or ``too long``: the
second can follow the first, but the day from leaving for the first to being
back after the second is longer than the limit.

A working day is printed as the route sheets print it: from the leaving time
rounded down to the minute to the time back rounded up, so a day over the
limit never reads as within it.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from fractions import Fraction

import numpy as np

from ..clock import format_day_clock, format_duration
from ..fleet.explain import PairReason, explain_pair, pair_reason, reason_label
from ..model import Day, Plan, WorkdayInfo
from .problem import leave_and_back

__all__ = ["FitReason", "fit_reason", "fit_label", "explain_fit", "closest_fits",
           "pair_kind_counts", "format_limit", "a_working_day", "shown_day_minutes", "weight_text",
           "weights_total_text", "search_text", "limit_cost_text", "proof_statement",
           "weights_reading", "SIMPLE_DENOMINATORS"]

_BLOCK_CELLS = 1 << 22  # pairs per vectorised block (32 MB of int64)
# Weights are printed as fractions with these denominators when exact (LP duals of
# covering problems are often halves, thirds, quarters ...), else as decimals.
SIMPLE_DENOMINATORS = 12


@dataclass(frozen=True)
class FitReason:
    """Why jobs ``follow.first`` and ``follow.second`` do not fit one working day."""

    follow: PairReason  # the "can follow" part (kind "fits" when the second can follow)
    leave: int  # when a vehicle doing both would leave (the depot, or the first job)
    back: int  # when it would be back (the depot, or the end of the second job)
    limit: int  # the longest working day, seconds

    @property
    def kind(self) -> str:
        """'class', 'overlap', 'short', 'too long' or 'fits' (a failed check only)."""
        if self.follow.kind != "fits":
            return self.follow.kind
        return "too long" if self.back - self.leave > self.limit else "fits"

    @property
    def day_minutes(self) -> int:
        """The two jobs' working day in whole minutes, as a route sheet prints it."""
        return shown_day_minutes(self.leave, self.back)


def shown_day_minutes(leave: int, back: int) -> int:
    """Minutes from ``leave`` rounded down to ``back`` rounded up (never shorter)."""
    return math.ceil(back / 60) - math.floor(leave / 60)


def format_limit(seconds: int) -> str:
    """The limit as a dispatcher says it: '11 h', '10 h 30 min', '45 min'."""
    if seconds % 3600 == 0:
        return f"{seconds // 3600} h"
    return format_duration(seconds)


def _a(length: str) -> str:
    """'a 12 h', 'an 11 h', 'an 8 h 30 min': the article as the figure is said aloud."""
    return ("an " if length.startswith(("8", "11 ", "18 ")) else "a ") + length


def a_working_day(limit: int) -> str:
    """'an 11 h working day', 'a 10 h 30 min working day'."""
    return f"{_a(format_limit(limit))} working day"


def fit_reason(day: Day, i: int, j: int, limit: int) -> FitReason:
    """Why jobs ``i`` and ``j`` (order free) cannot share a vehicle within ``limit``."""
    follow = pair_reason(day, i, j)
    leave, back = leave_and_back(day)
    return FitReason(follow, int(leave[follow.first]), int(back[follow.second]), int(limit))


def fit_label(reason: FitReason) -> str:
    """The short form for a table cell: 'cannot follow: 12 min short', or
    'together a 12 h 40 min day, limit 11 h'."""
    if reason.kind == "too long":
        return (f"together {_a(format_duration(reason.day_minutes * 60))} day, "
                f"limit {format_limit(reason.limit)}")
    if reason.kind == "fits":
        return "fit one working day"  # only in a plan that failed its independent check
    return reason_label(reason.follow)


def explain_fit(day: Day, i: int, j: int, limit: int) -> str:
    """Why jobs ``i`` and ``j`` need two vehicles within the limit, in one or two
    plain sentences (the "cannot follow" sentences are those without a limit)."""
    reason = fit_reason(day, i, j, limit)
    if reason.kind not in ("too long", "fits"):
        return explain_pair(day, i, j)
    a, b = day.jobs[reason.follow.first], day.jobs[reason.follow.second]
    spare = -reason.follow.late
    follows = (f"{b.id} can follow {a.id}" + (f" ({format_duration(spare)} to spare)"
                                               if spare >= 60 else ""))
    leave, back = format_day_clock(reason.leave - reason.leave % 60), \
        format_day_clock(math.ceil(reason.back / 60) * 60)
    depot = day.settings.depot
    if depot is not None:
        span = (f"would leave {day.site_label(depot)} at {leave} and be back at {back}")
    else:
        span = f"would start at {leave} ({a.id}) and finish at {back} ({b.id})"
    length = format_duration(reason.day_minutes * 60)
    if reason.kind == "fits":
        return (f"{follows}, and one vehicle doing both {span}: {_a(length)} day, within "
                "the limit.")
    return (f"{follows}, but one vehicle doing both {span}: {_a(length)} working day, "
            f"longer than the {format_limit(reason.limit)} limit. The other order is out: "
            f"{b.id} starts after {a.id}.")


def closest_fits(day: Day, jobs, limit: int) -> np.ndarray:
    """For each of ``jobs`` (day indices), the position in ``jobs`` of the other job
    it comes nearest to fitting one working day with: the fewest seconds either
    late for it or over the limit (the larger of the two counts); -1 when every
    other job needs another vehicle class.  Vectorised in row blocks."""
    idx = np.asarray(jobs, dtype=np.int64)
    k = len(idx)
    best = np.full(k, -1, dtype=np.int64)
    if k < 2:
        return best
    leave, back = leave_and_back(day)
    start, ready = day.start[idx], day.end[idx] + day.settings.turnaround
    lv, bk = leave[idx], back[idx]
    never = np.iinfo(np.int64).max
    step = max(1, _BLOCK_CELLS // k)
    for a in range(0, k, step):
        rows = np.arange(a, min(k, a + step))
        # rows first, then every job; and every job first, then rows.
        late = ready[rows, None] + day.travel[day.destination[idx[rows]][:, None],
                                              day.origin[idx][None, :]] - start[None, :]
        miss = np.maximum(late, bk[None, :] - lv[rows, None] - limit)
        late_back = ready[None, :] + day.travel[day.destination[idx][None, :],
                                                day.origin[idx[rows]][:, None]] \
            - start[rows, None]
        miss = np.minimum(miss, np.maximum(late_back, bk[rows, None] - lv[None, :] - limit))
        same = day.vclass[idx[rows]][:, None] == day.vclass[idx][None, :]
        miss = np.where(same, miss, never)
        miss[np.arange(len(rows)), rows] = never  # not with itself
        choice = np.argmin(miss, axis=1)
        usable = miss[np.arange(len(rows)), choice] < never
        best[rows[usable]] = choice[usable]
    return best


def pair_kind_counts(day: Day, jobs, limit: int) -> dict[str, int]:
    """How many pairs of ``jobs`` (day indices) have each :attr:`FitReason.kind`, as
    :func:`fit_reason` would say for every pair; vectorised in row blocks."""
    idx = np.asarray(jobs, dtype=np.int64)
    k = len(idx)
    counts = dict.fromkeys(("class", "overlap", "short", "too long", "fits"), 0)
    if k < 2:
        return counts
    leave, back = leave_and_back(day)
    start, end = day.start[idx], day.end[idx]
    ready = end + day.settings.turnaround
    rank = np.empty(k, np.int64)
    rank[np.lexsort((idx, start))] = np.arange(k)  # the earlier-starting job comes first
    step = max(1, _BLOCK_CELLS // k)
    for a in range(0, k, step):
        rows = np.arange(a, min(k, a + step))
        pair = rank[rows, None] < rank[None, :]  # each pair once, in its only order
        other = day.vclass[idx[rows]][:, None] != day.vclass[idx][None, :]
        overlap = ~other & (start[None, :] < end[rows, None])
        late = ready[rows, None] + day.travel[day.destination[idx[rows]][:, None],
                                              day.origin[idx][None, :]] > start[None, :]
        short = ~other & ~overlap & late
        follows = ~other & ~overlap & ~late
        long_day = follows & (back[idx][None, :] - leave[idx[rows]][:, None] > limit)
        for kind, mask in (("class", other), ("overlap", overlap), ("short", short),
                           ("too long", long_day), ("fits", follows & ~long_day)):
            counts[kind] += int(np.count_nonzero(mask & pair))
    return counts


def weight_text(weight: float) -> str:
    """A certificate weight as printed: '1', '1/2', '2/3' where that is exact
    (within 1e-9), else four decimals rounded down (never more than it is)."""
    simple = Fraction(weight).limit_denominator(SIMPLE_DENOMINATORS)
    if abs(float(simple) - weight) <= 1e-9:
        return str(simple.numerator) if simple.denominator == 1 \
            else f"{simple.numerator}/{simple.denominator}"
    return f"{math.floor(weight * 10_000) / 10_000:.4f}"


def weights_total_text(weights) -> str:
    """The weights' sum as printed: '13/2 = 6.5' when every weight is a simple
    fraction, else the sum to four decimals (rounded down)."""
    values = [w for _, w in weights]
    parts = [Fraction(w).limit_denominator(SIMPLE_DENOMINATORS) for w in values]
    if all(abs(float(f) - w) <= 1e-9 for f, w in zip(parts, values)):
        total = sum(parts, Fraction(0))
        if total.denominator == 1:
            return str(total.numerator)
        return f"{total.numerator}/{total.denominator} = {_decimal(float(total))}"
    return f"{math.floor(sum(values) * 10_000) / 10_000:.4f}"


def _decimal(value: float) -> str:
    text = f"{math.floor(value * 10_000) / 10_000:.4f}".rstrip("0").rstrip(".")
    return text + ("…" if abs(float(text) - value) > 1e-12 else "")


def search_text(info: WorkdayInfo) -> str:
    """How the search ended, as the command line, the app and the printout say it."""
    if info.status == "time limit":
        return f"the search stopped at the time limit ({info.seconds:.0f} s)"
    if info.status == "stopped":
        return "the search was stopped"
    if info.status == "proven":
        return ("the search went through every possibility" if info.minimum_by_search
                else "the plan meets the proven bound")
    if info.status == "too large":
        return "a day this large gets a fast plan and bound only, without the full search"
    return f"the search ended ({info.status})"


def limit_cost_text(plan: Plan) -> str:
    """'Without the limit: 28 vehicles; the limit costs 11 more' ('costs none'; for a
    plan not proven minimum, 'costs 17 to 18 more')."""
    info = plan.workday
    base = info.unlimited_vehicles
    noun = "vehicle" if base == 1 else "vehicles"
    most = plan.vehicles - base
    least = most if plan.proven_minimum or info.minimum_by_search else plan.lower_bound - base
    if most <= 0:
        cost = "costs none"
    elif least >= most:
        cost = f"costs {most} more"
    elif least <= 0:
        cost = f"costs at most {most} more"
    else:
        cost = f"costs {least} to {most} more"
    return f"Without the limit: {base} {noun}; the limit {cost}"


def proof_statement(plan: Plan) -> str:
    """What the proof of a plan under a working-day limit (``plan.workday`` set)
    says, in plain sentences (the app's proof view and the printed proof open with it)."""
    info = plan.workday
    limit = format_limit(info.limit)
    n, used, bound = len(plan.certificate), plan.vehicles, plan.lower_bound
    if plan.certificate_weights:
        total = weights_total_text(plan.certificate_weights)
        text = (f"The {len(plan.certificate_weights)} jobs of the weights table carry weights "
                f"that add up to {total}. No working day within the {limit} limit carries "
                f"more than 1 of them, so at least {bound} vehicles are needed.")
    elif n == 1:
        text = "There is work to do, so at least 1 vehicle is needed."
    else:
        text = (f"No vehicle can do two of these {n} jobs within {a_working_day(info.limit)} (one "
                "cannot follow the other, or together they make too long a day), so at "
                f"least {n} vehicles are needed.")
    if bound >= used:
        return text + f" This plan uses {used}, so it is the minimum."
    text += f" This plan uses {used}: the minimum is {bound} to {used}"
    if info.minimum_by_search:
        return (text + f". The search went through every possibility and found no plan with "
                f"fewer than {used}, so {used} is the minimum, though this proof reaches "
                f"{bound}.")
    return text + f" ({search_text(info)})."


def weights_reading(plan: Plan) -> str:
    """How to read the weights, in one paragraph."""
    limit = format_limit(plan.workday.limit)
    total = weights_total_text(plan.certificate_weights)
    return (f"How to read the weights: add up the weights of the jobs one vehicle does. No "
            f"working day within the {limit} limit carries more than 1 (an independent check "
            "finds the heaviest possible working day and confirms it). Every job is on some "
            f"vehicle, so the vehicles together carry the whole sum, {total}; as each carries "
            f"at most 1, at least \u2308{total.split(' = ')[-1]}\u2309 = {plan.lower_bound} "
            "vehicles are needed. A fraction such as 1/2 means that job can only share a "
            "working day with jobs whose weights make up the other half at most.")
