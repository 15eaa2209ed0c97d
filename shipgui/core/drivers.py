"""Drivers tied to routes by their jobs, so a name stays with its work when a
re-solve renumbers the vehicles.

A dispatcher names the driver of a route; the name is kept with the jobs that
route had at that moment.  On every new plan each name goes to the route that
now holds most of those jobs.  When an edit splits a named route, merges two
of them, or removes all of its jobs, the placement says so in a sentence, and
the dispatcher names the driver again to tie the name to the new route.
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Mapping, Sequence
from dataclasses import dataclass

__all__ = ["Driver", "DriverPlace", "place_drivers", "names_by_vehicle", "drivers_from_numbers"]


@dataclass(frozen=True)
class Driver:
    """A driver's name and the jobs of the route it was given.

    ``vehicle`` is set only for names read from old plan files, which kept a
    vehicle number instead of jobs; the first plan ties them to that route's jobs.
    """

    name: str
    jobs: frozenset[str] = frozenset()
    vehicle: int | None = None


@dataclass(frozen=True)
class DriverPlace:
    """Where a driver is in a plan: ``vehicle`` (1-based) or None, and a note for
    the dispatcher when the named route was split, merged or emptied ('' if not)."""

    driver: Driver
    vehicle: int | None
    note: str = ""


def drivers_from_numbers(names: Mapping[int, str]) -> tuple[Driver, ...]:
    """Drivers from an old plan file's {vehicle number: name}."""
    return tuple(Driver(name, vehicle=number) for number, name in sorted(names.items()) if name)


def _claims(drivers: Sequence[Driver], route_of: dict[str, int],
            routes: int) -> list[Counter[int]]:
    """For each driver, how many of its jobs each route holds now."""
    claims = []
    for driver in drivers:
        if not driver.jobs and driver.vehicle is not None and 1 <= driver.vehicle <= routes:
            claims.append(Counter({driver.vehicle - 1: 1}))
        else:
            claims.append(Counter(route_of[j] for j in driver.jobs if j in route_of))
    return claims


def _assign(claims: list[Counter[int]]) -> list[int | None]:
    """Most jobs first; a route goes to one driver only (earlier names win ties)."""
    offers = sorted(((-held, d, route) for d, claim in enumerate(claims)
                     for route, held in claim.items()))
    route_of_driver: list[int | None] = [None] * len(claims)
    taken: set[int] = set()
    for _held, d, route in offers:
        if route_of_driver[d] is None and route not in taken:
            route_of_driver[d] = route
            taken.add(route)
    return route_of_driver


def _vehicles(numbers: list[int]) -> str:
    shown = [str(k + 1) for k in sorted(numbers)]
    return shown[0] if len(shown) == 1 else ", ".join(shown[:-1]) + " and " + shown[-1]


def _note(d: int, drivers: Sequence[Driver], claims: list[Counter[int]],
          placed: list[int | None]) -> str:
    name, claim, route = drivers[d].name, claims[d], placed[d]
    if not claim:
        return f"None of the jobs of {name}'s route are planned any more; {name} has no vehicle."
    others = [drivers[e].name for e in range(len(drivers))
              if e != d and route is not None and claims[e].get(route)]
    if route is None:
        winner = next(drivers[e].name for e in range(len(drivers)) if placed[e] in claim)
        return (f"{name}'s route was merged into {winner}'s (vehicle "
                f"{_vehicles([r for r in claim if r in placed])}); {name} has no vehicle "
                "now: name a driver again to place them.")
    if len(claim) > 1:
        return (f"An edit split {name}'s route: its jobs are now on vehicles "
                f"{_vehicles(list(claim))}; {name} stays with vehicle {route + 1}, which has "
                "most of them.")
    if others:
        return (f"{name}'s route (vehicle {route + 1}) now also does jobs of "
                f"{' and '.join(others)}'s route.")
    return ""


def place_drivers(drivers: Sequence[Driver],
                  routes: Sequence[Sequence[str]]) -> list[DriverPlace]:
    """Place each driver on the route (a list of job ids) holding most of its jobs.

    Two drivers never share a route; a driver whose jobs are spread over several
    routes, whose route took another named route's jobs, or who lost the route to
    another name gets a note.  Time O(jobs of the plan + jobs of the drivers).
    """
    route_of = {job: k for k, route in enumerate(routes) for job in route}
    claims = _claims(drivers, route_of, len(routes))
    placed = _assign(claims)
    return [DriverPlace(driver, None if route is None else route + 1,
                        _note(d, drivers, claims, placed))
            for d, (driver, route) in enumerate(zip(drivers, placed))]


def names_by_vehicle(places: Sequence[DriverPlace]) -> dict[int, str]:
    """{vehicle number: driver name} for the placed drivers (what sheets print)."""
    return {p.vehicle: p.driver.name for p in places if p.vehicle is not None}
