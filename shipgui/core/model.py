"""The records of a planning day: jobs, sites, settings, the validated day, the plan."""

from __future__ import annotations

from dataclasses import dataclass, field
from datetime import date
from typing import NamedTuple

import numpy as np

from .drivers import Driver

__all__ = ["Job", "Site", "Settings", "DayInputs", "Day", "Plan", "WorkdayInfo",
           "DEFAULT_SPEED_KMH", "DEFAULT_CIRCUITY", "TravelPairs", "SITE_DETAILS",
           "PRIORITY_UNIT", "priority_units", "ServiceProof", "Shortfall",
           "ShortenedTravel"]

# Straight-line distance times a circuity factor gives road distance.  1.20 is
# the mean road circuity measured for the USA in Ballou, Rahardja & Sakai,
# "Selected country circuity factors for road travel distance estimation",
# Transportation Research Part A 36(9), 2002, Table 1.
DEFAULT_CIRCUITY = 1.20
# Average door-to-door speed of a loaded truck on regional mixed roads: an
# assumption (common practice for first estimates), to be set per region.
DEFAULT_SPEED_KMH = 50.0
# Priorities are kept exactly as whole thousandths (a priority has at most three
# decimals), so sums and comparisons never suffer from floating point.
PRIORITY_UNIT = 1000


@dataclass(frozen=True)
class Job:
    """One booked job: the vehicle is busy from ``start`` at ``origin`` until
    ``end`` at ``destination``.  Times are seconds after the plan day's midnight."""

    id: str
    origin: str
    destination: str
    start: int
    end: int
    vehicle_class: str = ""
    customer: str = ""
    reference: str = ""
    notes: str = ""
    row: int = 0  # row in the jobs file (header is row 1), for messages
    # How much serving the job matters when vehicles are short (positive, at most
    # three decimals); and whether its slot may be moved to save a vehicle.
    priority: float = 1.0
    movable: bool = True


def priority_units(job: Job) -> int:
    """The job's priority in whole thousandths (exact: a priority has at most three
    decimals)."""
    return round(job.priority * PRIORITY_UNIT)


# Optional sites columns printed for the driver beside the site (text as given).
SITE_DETAILS = ("contact", "phone", "opening_hours", "access_notes")


@dataclass(frozen=True)
class Site:
    """A place jobs start or end at; coordinates and the details are optional."""

    id: str
    name: str = ""
    address: str = ""
    lat: float | None = None
    lon: float | None = None
    x_km: float | None = None
    y_km: float | None = None
    contact: str = ""
    phone: str = ""
    opening_hours: str = ""
    access_notes: str = ""
    row: int = field(default=0, compare=False)  # row in the sites file, for messages

    @property
    def has_latlon(self) -> bool:
        return self.lat is not None and self.lon is not None

    @property
    def has_xy(self) -> bool:
        return self.x_km is not None and self.y_km is not None

    @property
    def label(self) -> str:
        return self.name or self.id


@dataclass(frozen=True)
class Settings:
    """Planning settings a dispatcher chooses.  Times in seconds."""

    turnaround: int = 0
    depot: str | None = None
    day_start: int | None = None
    day_end: int | None = None
    speed_kmh: float = DEFAULT_SPEED_KMH
    circuity: float = DEFAULT_CIRCUITY
    # Longest working day of one vehicle (pull-out to pull-in with a depot, first
    # start to last end without); None: no limit.
    max_day: int | None = None
    # Vehicles available: one number for all classes, or per vehicle class
    # ((class, vehicles), ...; classes not named have no limit).  None / (): no limit.
    vehicles: int | None = None
    class_vehicles: tuple[tuple[str, int], ...] = ()

    @property
    def vehicle_limit(self) -> bool:
        """Whether the vehicles available are limited."""
        return self.vehicles is not None or bool(self.class_vehicles)


# (from site, to site) -> (seconds, row in the travel file)
TravelPairs = dict[tuple[str, str], tuple[int, int]]


class ShortenedTravel(NamedTuple):
    """A travel time the shortest-path closure lowered: driving via other sites is
    quicker than the time given (or estimated).  Seconds; ``row`` is the pair's
    row in the travel file, 0 for an estimate from coordinates."""

    origin: str
    destination: str
    given: int
    used: int
    row: int = 0


@dataclass(frozen=True)
class DayInputs:
    """Everything a day is planned from, checked record by record but not yet as a
    whole (:func:`shipgui.core.day.build_day` does that): what the files, a plan
    file or the app's editor hold.  ``drivers`` are the names a dispatcher gave
    routes, each tied to its route's jobs (kept with a plan file)."""

    jobs: tuple[Job, ...]
    sites: tuple[Site, ...] = ()
    travel: TravelPairs = field(default_factory=dict)
    settings: Settings = field(default_factory=Settings)
    plan_date: date | None = None
    sources: dict[str, str] = field(default_factory=dict)
    drivers: tuple[Driver, ...] = ()


def _frozen(a: np.ndarray) -> np.ndarray:
    a = np.ascontiguousarray(a)
    a.setflags(write=False)
    return a


@dataclass(frozen=True, eq=False)
class Day:
    """A validated planning day: every job checked, travel closed under shortest paths.

    Array views (``start``, ``end``, ``origin``, ``destination``, ``vclass``)
    are indexed like ``jobs``; ``travel[a, b]`` is seconds from site index a to b.
    """

    jobs: tuple[Job, ...]
    site_ids: tuple[str, ...]
    sites: dict[str, Site]
    travel: np.ndarray
    settings: Settings
    warnings: tuple[str, ...] = ()
    shortened_pairs: int = 0
    estimated_pairs: int = 0
    plan_date: date | None = None
    sources: dict[str, str] = field(default_factory=dict)
    fingerprint: str = ""
    # Every pair the closure shortened (``shortened_pairs`` of them), largest cut first.
    shortened: tuple[ShortenedTravel, ...] = ()

    def __post_init__(self) -> None:
        index = {s: k for k, s in enumerate(self.site_ids)}
        classes = sorted({j.vehicle_class for j in self.jobs})
        class_index = {c: k for k, c in enumerate(classes)}
        n = len(self.jobs)
        arrays = {
            "start": np.fromiter((j.start for j in self.jobs), np.int64, n),
            "end": np.fromiter((j.end for j in self.jobs), np.int64, n),
            "origin": np.fromiter((index[j.origin] for j in self.jobs), np.int64, n),
            "destination": np.fromiter((index[j.destination] for j in self.jobs), np.int64, n),
            "vclass": np.fromiter((class_index[j.vehicle_class] for j in self.jobs), np.int64, n),
        }
        for name, value in arrays.items():
            object.__setattr__(self, name, _frozen(value))
        object.__setattr__(self, "class_names", tuple(classes))
        object.__setattr__(self, "site_index", index)
        object.__setattr__(self, "travel", _frozen(np.asarray(self.travel, dtype=np.int64)))

    # Declared for type checkers; set in __post_init__.
    start: np.ndarray = field(init=False, repr=False)
    end: np.ndarray = field(init=False, repr=False)
    origin: np.ndarray = field(init=False, repr=False)
    destination: np.ndarray = field(init=False, repr=False)
    vclass: np.ndarray = field(init=False, repr=False)
    class_names: tuple[str, ...] = field(init=False, repr=False)
    site_index: dict[str, int] = field(init=False, repr=False)

    @property
    def n(self) -> int:
        return len(self.jobs)

    def travel_between(self, a: str, b: str) -> int:
        """Seconds from site ``a`` to site ``b`` (after the closure)."""
        return int(self.travel[self.site_index[a], self.site_index[b]])

    def site_label(self, site_id: str) -> str:
        site = self.sites.get(site_id)
        return site.label if site else site_id


@dataclass(frozen=True)
class WorkdayInfo:
    """How a plan under a working-day limit was found and what is proven about it."""

    limit: int  # the longest working day, seconds
    unlimited_vehicles: int  # the minimum fleet without the limit (proven)
    lp_bound: float | None  # the covering LP's proven bound in vehicles (None: not run)
    # "proven"; "time limit"; "stopped" (cancelled); "too large" (a class has more
    # jobs than the LP search takes: fast plan and split-day bound only)
    status: str
    minimum_by_search: bool = False  # the search proved the plan minimum beyond the bound
    nodes: int = 0  # branch-and-price nodes explored
    routes_generated: int = 0
    first_plan_seconds: float = 0.0
    seconds: float = 0.0
    # "proven least" (for this many vehicles), "searched" (less was looked for in
    # the time given, not proven least) or "not optimised" (no time was left)
    deadhead_status: str = "not optimised"


@dataclass(frozen=True, eq=False)
class ServiceProof:
    """Why no plan with the vehicles available serves more priority.

    Arrays per job, in priority thousandths: ``conceded`` >= 0, and a level span
    ``(low, high]`` with ``high - low >= priority - conceded``, such that whenever
    job j can follow job i (both in one pool), ``high_i <= low_j``.  Along any
    route the spans are disjoint, so a route collects at most one job per level
    t, and the jobs whose span covers t pairwise cannot share a vehicle.  ``pools``
    lists (vehicles, classes) of each group of vehicles: a pool of K vehicles
    serves at most K of the jobs covering each level, so no plan serves more than

        sum(conceded) + sum over pools of the integral over t of min(K, jobs covering t).

    With equal priorities and nothing conceded the levels are groups of jobs no
    two of which can share a vehicle, each giving at most K jobs: the form of the
    theorem that the largest union of K chains equals the least sum of min(K, |A|)
    over partitions into antichains A (Greene & Kleitman, "The structure of
    Sperner k-families", J. Combinatorial Theory A 20, 1976, and Greene, "Some
    partitions associated with a partially ordered set", same volume; the split
    between the two papers recalled from memory).
    """

    conceded: np.ndarray
    low: np.ndarray
    high: np.ndarray
    pools: tuple[tuple[int, tuple[str, ...]], ...]


@dataclass(frozen=True, eq=False)
class Shortfall:
    """The answer when vehicles are limited (contract section 6).

    ``unserved`` holds job indices; priorities are in thousandths
    (:data:`PRIORITY_UNIT`).  ``served_upper_bound`` is proven by ``proof`` (None
    when a bound comes from elsewhere); ``needed_for_all`` is the fleet that would
    serve every job.
    """

    unserved: tuple[int, ...]
    served_priority: int
    served_upper_bound: int
    needed_for_all: int
    proof: ServiceProof | None = None
    # With a working-day limit the bound is proven by job weights instead: a valid
    # route of pool p carries at most ``heaviest[p]`` of them, so no plan serves
    # more than sum(K_p * heaviest[p]) + sum(max(0, priority - weight)).
    weights: np.ndarray | None = None
    heaviest: tuple[float, ...] = ()

    @property
    def exact(self) -> bool:
        """Whether the plan provably serves the most priority possible."""
        return self.served_priority >= self.served_upper_bound


@dataclass(frozen=True, eq=False)
class Plan:
    """A minimum-fleet plan with its certificate.

    ``routes`` and ``certificate`` hold job indices into ``day.jobs``.
    """

    day: Day
    routes: tuple[tuple[int, ...], ...]
    certificate: tuple[int, ...]
    verified: bool
    timings: dict[str, float] = field(default_factory=dict)
    kernel: str = ""
    deadhead_seconds: int = 0
    route_deadhead_seconds: tuple[int, ...] = ()
    # (vehicles, least empty driving with at most that many vehicles), from the
    # minimum fleet up; and the same with exactly that many vehicles out (it can
    # rise with a depot, where each vehicle also drives out and back).
    tradeoff: tuple[tuple[int, int], ...] = ()
    tradeoff_exact: tuple[tuple[int, int], ...] = ()
    least_deadhead: bool = False  # routes chosen for least empty driving
    verification_failures: tuple[str, ...] = ()
    # Proven: no plan under the same rules has fewer vehicles (None: the fleet
    # itself, proven by the certificate's size).  With a working-day limit the
    # bound may stay below the plan; ``certificate_weights`` (job index ->
    # weight, no valid route carrying more than 1) then prove ceil(sum).
    bound: int | None = None
    certificate_weights: tuple[tuple[int, float], ...] = ()
    workday: WorkdayInfo | None = None
    # With a limit on the vehicles available: which jobs are not served and the
    # proof that no plan serves more (None without a limit).  The routes and the
    # certificate then concern the served jobs.
    shortfall: Shortfall | None = None
    # Why the routes are not the least empty driving although that was asked
    # for (the stage reached its time limit); "" otherwise.
    deadhead_note: str = ""

    @property
    def vehicles(self) -> int:
        return len(self.routes)

    @property
    def lower_bound(self) -> int:
        return self.vehicles if self.bound is None else self.bound

    @property
    def proven_minimum(self) -> bool:
        return self.lower_bound >= self.vehicles

    def route_ids(self) -> list[list[str]]:
        return [[self.day.jobs[k].id for k in route] for route in self.routes]

    def certificate_ids(self) -> list[str]:
        return [self.day.jobs[k].id for k in self.certificate]
