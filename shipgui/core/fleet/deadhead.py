"""Empty driving (deadhead) of routes: pull-out from the depot, the legs between
jobs, and pull-in to the depot when a depot is set.  Seconds throughout."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..clock import shown_minutes
from ..model import Day, Plan

__all__ = ["RouteLegs", "route_legs", "plan_deadhead", "TradeoffRow", "tradeoff_rows",
           "TRADEOFF_SHOWN"]

# The one trade-off depth: a solve prices this many vehicles beyond the minimum
# by default (solve_day, the command line's --tradeoff), and screens and sheets
# list the minimum fleet and up to this many more.
TRADEOFF_SHOWN = 5


@dataclass(frozen=True)
class RouteLegs:
    """Empty driving of one route: ``before[k]`` is the empty drive to job k of the
    route (from the depot for k = 0, else from the previous job's destination);
    ``pull_in`` the drive back to the depot (0 without a depot)."""

    before: tuple[int, ...]
    pull_in: int

    @property
    def total(self) -> int:
        return sum(self.before) + self.pull_in


def route_legs(day: Day, route) -> RouteLegs:
    r = np.asarray(route, dtype=np.int64)
    t = day.travel
    between = t[day.destination[r[:-1]], day.origin[r[1:]]]
    depot = day.settings.depot
    if depot is None:
        return RouteLegs((0, *map(int, between)), 0)
    d = day.site_index[depot]
    return RouteLegs((int(t[d, day.origin[r[0]]]), *map(int, between)),
                     int(t[day.destination[r[-1]], d]))


def plan_deadhead(day: Day, routes) -> tuple[int, tuple[int, ...]]:
    """Total and per-route empty driving in seconds."""
    per_route = tuple(route_legs(day, r).total for r in routes)
    return sum(per_route), per_route


@dataclass(frozen=True)
class TradeoffRow:
    """One fleet size of a plan's trade-off, as screens and sheets list it (seconds)."""

    vehicles: int
    at_most: int  # least empty driving with at most this many vehicles
    exactly: int  # least empty driving with exactly this many out
    saving_minutes: int  # against the plan, in the whole minutes the figures show

    @property
    def exactly_differs(self) -> bool:
        """Whether "exactly" shows differently from "at most"."""
        return shown_minutes(self.exactly) != shown_minutes(self.at_most)


def tradeoff_rows(plan: Plan, extra: int = TRADEOFF_SHOWN) -> list[TradeoffRow]:
    """The minimum fleet and up to ``extra`` vehicles more; none without a trade-off.

    Savings are differences of the shown (rounded-up) minutes, so the figures
    a reader sees add up.
    """
    if not plan.least_deadhead or not plan.tradeoff:
        return []
    exact = dict(plan.tradeoff_exact)
    base = shown_minutes(plan.tradeoff[0][1])
    return [TradeoffRow(vehicles, at_most, exact.get(vehicles, at_most),
                        base - shown_minutes(at_most))
            for vehicles, at_most in plan.tradeoff[:extra + 1]]
