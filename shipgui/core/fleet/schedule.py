"""What each vehicle does when: one builder for every output and screen.

The JSON, the routes table, the printed route sheets and timeline, and the
app's timeline all read a vehicle's day from :func:`vehicle_days`: its jobs,
the empty drives (pull-out, between jobs, pull-in), when it leaves and is back
at the depot, its working day and its long waits.

An empty drive is placed to end when the job it leads to starts (the latest
the driver can leave); the drive back to the depot starts when the last job
ends.  A vehicle's working day runs from leaving the depot to being back with
a depot, else from its first job's start to its last job's end (contract
section 5).
"""

from __future__ import annotations

from dataclasses import dataclass

from ..model import Day, Plan
from ..travel import site_distance_km
from .deadhead import route_legs

__all__ = ["Drive", "Wait", "VehicleDay", "vehicle_day", "vehicle_days", "route_km",
           "LONG_WAIT", "class_counts"]

# Waits longer than this are shown on the driver's sheet (common practice: a
# gap of more than two hours is when a driver plans a break or a return).
LONG_WAIT = 2 * 3600


@dataclass(frozen=True)
class Drive:
    """An empty drive from site ``origin`` to site ``destination`` (seconds)."""

    start: int
    end: int
    origin: str
    destination: str
    kind: str  # "out" (from the depot), "between" (jobs) or "back" (to the depot)

    @property
    def seconds(self) -> int:
        return self.end - self.start


@dataclass(frozen=True)
class Wait:
    """A long wait between job ``after`` and the next one (positions in the route).

    ``start`` is when the vehicle is free (the job's end plus the turnaround),
    ``end`` when it must drive on.  ``depot_time`` is how long it could stay at
    the depot if it drove there and back in between (None without a depot or
    when the round trip does not fit).
    """

    after: int
    start: int
    end: int
    depot_time: int | None

    @property
    def seconds(self) -> int:
        return self.end - self.start


@dataclass(frozen=True)
class VehicleDay:
    """One vehicle's day; job numbers are indices into ``day.jobs``."""

    vehicle: int  # 1-based, as printed
    jobs: tuple[int, ...]
    vehicle_class: str
    drives: tuple[Drive, ...]
    before: tuple[int, ...]  # empty driving before each job, seconds
    pull_in: int
    first_start: int
    last_end: int
    leave: int | None  # leaves the depot (None without a depot)
    back: int | None  # back at the depot
    waits: tuple[Wait, ...]

    @property
    def deadhead(self) -> int:
        """Empty driving of the whole day, seconds."""
        return sum(self.before) + self.pull_in

    @property
    def day_start(self) -> int:
        return self.first_start if self.leave is None else self.leave

    @property
    def day_end(self) -> int:
        return self.last_end if self.back is None else self.back

    @property
    def working_day(self) -> int:
        """Depot to depot with a depot, first start to last end without (seconds)."""
        return self.day_end - self.day_start


def vehicle_day(plan: Plan, vehicle: int) -> VehicleDay:
    """The day of vehicle ``vehicle`` (1-based, as printed)."""
    day = plan.day
    route = plan.routes[vehicle - 1]
    legs = route_legs(day, route)
    jobs = [day.jobs[k] for k in route]
    depot = day.settings.depot
    drives = []
    for pos, (job, empty) in enumerate(zip(jobs, legs.before, strict=True)):
        if empty:
            origin = depot if pos == 0 else jobs[pos - 1].destination
            drives.append(Drive(job.start - empty, job.start, origin or job.origin, job.origin,
                                "out" if pos == 0 else "between"))
    if legs.pull_in and depot is not None:
        drives.append(Drive(jobs[-1].end, jobs[-1].end + legs.pull_in, jobs[-1].destination,
                            depot, "back"))
    leave = back = None
    if depot is not None:
        leave, back = jobs[0].start - legs.before[0], jobs[-1].end + legs.pull_in
    return VehicleDay(vehicle, tuple(route), jobs[0].vehicle_class, tuple(drives),
                      legs.before, legs.pull_in, jobs[0].start, jobs[-1].end, leave, back,
                      _long_waits(day, route, legs.before))


def vehicle_days(plan: Plan) -> list[VehicleDay]:
    """Every vehicle's day, in the plan's order."""
    return [vehicle_day(plan, number) for number in range(1, plan.vehicles + 1)]


def _long_waits(day: Day, route, before: tuple[int, ...]) -> tuple[Wait, ...]:
    turnaround = day.settings.turnaround
    depot = day.settings.depot
    waits = []
    for pos in range(len(route) - 1):
        job, nxt = day.jobs[route[pos]], day.jobs[route[pos + 1]]
        free, leave = job.end + turnaround, nxt.start - before[pos + 1]
        if leave - free <= LONG_WAIT:
            continue
        depot_time = None
        if depot is not None:
            there = day.travel_between(job.destination, depot)
            again = day.travel_between(depot, nxt.origin)
            spare = nxt.start - again - (free + there)
            depot_time = spare if spare > 0 else None
        waits.append(Wait(pos, free, leave, depot_time))
    return tuple(waits)


def route_km(plan: Plan, vehicle: int) -> float | None:
    """Estimated road distance of the vehicle's day (loaded and empty), from site
    coordinates times the circuity factor; None when a site has no coordinates."""
    day = plan.day
    stops: list[str] = []
    depot = day.settings.depot
    if depot is not None:
        stops.append(depot)
    for k in plan.routes[vehicle - 1]:
        stops += [day.jobs[k].origin, day.jobs[k].destination]
    if depot is not None:
        stops.append(depot)
    total = 0.0
    for a, b in zip(stops, stops[1:]):
        km = site_distance_km(day.sites.get(a), day.sites.get(b), day.settings.circuity) \
            if a != b else 0.0
        if km is None:
            return None
        total += km
    return total


def class_counts(plan: Plan) -> list[tuple[str, int]]:
    """(vehicle class, vehicles) in the order of the day's classes; one entry with
    the class '' when the day has no classes."""
    counts = dict.fromkeys(plan.day.class_names, 0)
    for route in plan.routes:
        counts[plan.day.jobs[route[0]].vehicle_class] += 1
    return list(counts.items())
