"""Empty driving (deadhead) of routes: pull-out from the depot, the legs between
jobs, and pull-in to the depot when a depot is set.  Seconds throughout."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from .model import Day

__all__ = ["RouteLegs", "route_legs", "plan_deadhead"]


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
