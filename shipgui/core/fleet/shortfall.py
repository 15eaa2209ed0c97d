"""Fewer vehicles than needed: the jobs to serve with the vehicles available.

With K vehicles (per class, or one number for all), the plan serves the jobs
of the most total priority; ties go to more jobs served, then fewer vehicles
out, then less empty driving.  Without a working-day limit this is exact and
polynomial: a minimum-cost flow of K paths on the split order in which each
job's "served" arc earns its priority (Arkin & Silverberg, "Scheduling jobs
with fixed start and end times", Discrete Applied Mathematics 18(1), 1987).
The order is kept in prefix form (:mod:`.precedence`), as in
:mod:`.least_deadhead`, so the network has O(n * sites) arcs:

    pool -> j'            a vehicle of the pool starts with job j (pull-out)
    j' -> position of j   job j is served (capacity 1; earns its priority)
    position -> next      waiting at j's destination site
    latest[k, g] -> k'    the vehicle goes on to job k (the drive)
    group end -> sink     the vehicle goes home (pull-in)
    pool -> sink          a vehicle stays in the yard

Each pool supplies its K vehicles.  The four aims are met one after the other,
exactly and without large lexicographic weights (which could overflow int64):
each stage is solved by cost scaling (:mod:`._flow_kernel`), exact duals are
computed, and before the next stage every arc is fixed as complementary
slackness demands (a positive reduced cost: no flow; a negative one: full),
which leaves exactly the optimal flows of the stages so far (Ahuja, Magnanti &
Orlin, Network Flows, 1993, section 9.4, optimality conditions).

The duals of the first stage prove the bound (:class:`~shipgui.core.model.ServiceProof`):
``conceded[j]`` is minus the reduced cost of j's served arc, and the levels are
the heaviest chain ending at each job under priority minus conceded
(:mod:`._level_kernel`).  Their bound equals the served priority: the flow's
dual value (linear programming duality).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..model import PRIORITY_UNIT, Day, ServiceProof, Shortfall, priority_units
from ._flow_kernel import DONE, SETTLE, Residual, cost_scaling, residual_slots, tighten_prices
from ._level_kernel import heaviest_ending
from .precedence import PrefixIndex

__all__ = ["Pool", "vehicle_pools", "ServedPlan", "serve_most", "service_levels",
           "Level", "proof_bound", "priority_value", "priority_text", "unserved_reasons"]

_ALPHA = 32  # cost-scaling factor between phases
# Cost scaling keeps prices within about (nodes + 1) * (largest scaled cost); the
# costs are scaled by nodes + 1 and reduced costs add two prices, so
# 3 * (nodes + 1)^2 * (largest cost) must stay below 2^62 (INF of the kernels).
_ROOM = 1 << 62

START, SERVE, WAIT, FINISH, LINK, IDLE = range(6)


@dataclass(frozen=True)
class Pool:
    """Vehicles that can serve the jobs of ``classes`` (class indices of the day)."""

    vehicles: int
    classes: tuple[int, ...]
    limited: bool = True


def vehicle_pools(day: Day) -> list[Pool]:
    """The pools of the day's settings: one for all classes, or one per class
    (a class without a number has as many vehicles as jobs: no limit)."""
    s = day.settings
    classes = range(len(day.class_names))
    if s.vehicles is not None:
        return [Pool(s.vehicles, tuple(classes))]
    named = dict(s.class_vehicles)
    counts = np.bincount(day.vclass, minlength=len(day.class_names))
    return [Pool(named[name], (c,)) if name in named else
            Pool(int(counts[c]), (c,), limited=False)
            for c, name in zip(classes, day.class_names)]


@dataclass(frozen=True, eq=False)
class ServedPlan:
    """Routes (job indices) of the served jobs, the rest, and the proof."""

    routes: list[tuple[int, ...]]
    unserved: tuple[int, ...]
    proof: ServiceProof
    stages: int


@dataclass(frozen=True, eq=False)
class _Arcs:
    """The network's forward arcs and what each one is."""

    tail: np.ndarray
    head: np.ndarray
    kind: np.ndarray
    job: np.ndarray  # the job of START, SERVE and LINK arcs (the successor for LINK)
    site: np.ndarray  # the waiting site of LINK and FINISH arcs
    cap: np.ndarray
    supply: np.ndarray  # per node
    nodes: int


def _arcs(day: Day, indexes: list[PrefixIndex], pools: list[Pool]) -> _Arcs:
    n = day.n
    sink = 2 * n + len(pools)
    pool_of = np.empty(len(indexes), dtype=np.int64)
    for p, pool in enumerate(pools):
        pool_of[list(pool.classes)] = 2 * n + p
    big = sum(p.vehicles for p in pools) + 1
    parts = []  # (tail, head, kind, job, site)
    offset = 0
    for c, index in enumerate(indexes):
        m, jobs = index.m, index.jobs
        if m == 0:
            continue
        position = np.empty(m, dtype=np.int64)
        position[index.order] = np.arange(m)
        gpos = index.group_of_position()
        step = np.flatnonzero(gpos[:-1] == gpos[1:])
        last = index.group_start[1:] - 1
        js, gs = np.nonzero(index.latest >= 0)
        parts += [
            (np.full(m, pool_of[c]), n + jobs, START, jobs, _none(m)),
            (n + jobs, offset + position, SERVE, jobs, _none(m)),
            (offset + step, offset + step + 1, WAIT, _none(len(step)), _none(len(step))),
            (offset + last, np.full(len(last), sink), FINISH, _none(len(last)),
             index.group_site),
            (offset + index.latest[js, gs], n + jobs[js], LINK, jobs[js], index.group_site[gs]),
        ]
        offset += m
    idle = 2 * n + np.arange(len(pools))
    parts.append((idle, np.full(len(pools), sink), IDLE, _none(len(pools)),
                  _none(len(pools))))
    tail = np.concatenate([p[0] for p in parts]).astype(np.int64)
    kind = np.concatenate([np.full(len(p[0]), p[2], dtype=np.int8) for p in parts])
    cap = np.where(kind == SERVE, 1, big).astype(np.int64)
    cap[kind == IDLE] = [p.vehicles for p in pools]
    supply = np.zeros(sink + 1, dtype=np.int64)
    supply[idle] = [p.vehicles for p in pools]
    supply[sink] = -supply[idle].sum()
    return _Arcs(tail, np.concatenate([p[1] for p in parts]).astype(np.int64), kind,
                 np.concatenate([p[3] for p in parts]).astype(np.int64),
                 np.concatenate([p[4] for p in parts]).astype(np.int64), cap, supply, sink + 1)


def _none(count: int) -> np.ndarray:
    return np.full(count, -1, dtype=np.int64)


class _Flow:
    """The flow on the network, improved stage by stage within the optimal face."""

    def __init__(self, arcs: _Arcs) -> None:
        self.arcs = arcs
        count = len(arcs.tail)
        all_tail = np.concatenate([arcs.tail, arcs.head])
        self.first, slot, self.rev = residual_slots(arcs.tail.astype(np.int64),
                                                    arcs.head.astype(np.int64), arcs.nodes)
        order = np.empty(2 * count, dtype=np.int64)  # what each slot holds
        order[slot] = np.arange(2 * count)
        self.order = order
        self.slot = slot[:count]  # residual slot of each forward arc
        self.head = np.concatenate([arcs.head, arcs.tail])[order]
        self.slot_tail = all_tail[order]
        self.cap = np.concatenate([arcs.cap, np.zeros(count, dtype=np.int64)])[order]
        self.scale = arcs.nodes + 1  # a 1-optimal flow of scaled costs is optimal
        self.started = False
        self.fixed = np.full(count, -1, dtype=np.int64)  # flow of arcs fixed so far

    def residual(self, cost: np.ndarray, scale: int) -> Residual:
        return Residual(self.first, self.head, self.rev,
                        np.concatenate([cost, -cost])[self.order] * scale)

    def optimise(self, cost: np.ndarray) -> np.ndarray:
        """Least-cost flow for ``cost`` (per forward arc) within the face so far;
        returns the exact prices (scaled costs)."""
        largest = int(np.abs(cost).max()) if len(cost) else 0
        if 3 * self.scale ** 2 * max(largest, 1) >= _ROOM:
            raise OverflowError("costs too large for exact integer flow")
        res = self.residual(cost, self.scale)
        price = np.zeros(self.arcs.nodes, dtype=np.int64)
        excess = np.zeros(self.arcs.nodes, dtype=np.int64) if self.started \
            else self.arcs.supply.copy()
        self.started = True
        never = np.zeros(1, dtype=np.int64)  # no stop flag: this stage is not bounded
        optimal = np.ones(1, dtype=np.int64)  # down to eps 1: optimal
        if cost_scaling(res, self.cap, excess, price, 0, _ALPHA, _ALPHA, never,
                        optimal, self.scale // SETTLE) != DONE:
            raise RuntimeError("vehicle-limit flow: the vehicles could not be routed")
        if not tighten_prices(res, self.cap, price):
            raise RuntimeError("vehicle-limit flow is not optimal (negative cycle)")
        return price

    def keep_optimal(self, cost: np.ndarray, price: np.ndarray) -> None:
        """Fix every arc as complementary slackness demands, so later stages only
        choose among the flows optimal for ``cost``."""
        reduced = cost * self.scale + price[self.arcs.tail] - price[self.arcs.head]
        free = self.fixed < 0
        flow = self.flow()
        empty = np.flatnonzero(free & (reduced > 0))
        full = np.flatnonzero(free & (reduced < 0))
        if np.any(flow[empty] != 0) or np.any(flow[full] != self.arcs.cap[full]):
            raise RuntimeError("vehicle-limit flow breaks complementary slackness")
        for arcs in (empty, full):
            self.fixed[arcs] = flow[arcs]
            self.cap[self.slot[arcs]] = 0
            self.cap[self.rev[self.slot[arcs]]] = 0

    def exact_duals(self, cost: np.ndarray, price: np.ndarray) -> np.ndarray:
        """Integer prices for the unscaled ``cost`` (no residual arc negative)."""
        unscaled = price // self.scale
        if not tighten_prices(self.residual(cost, 1), self.cap, unscaled):
            raise RuntimeError("vehicle-limit flow is not optimal (negative cycle)")
        return unscaled

    def flow(self) -> np.ndarray:
        """Flow on each forward arc (the reverse slot's capacity, or as fixed)."""
        return np.where(self.fixed >= 0, self.fixed, self.cap[self.rev[self.slot]])


def serve_most(day: Day, indexes: list[PrefixIndex], pools: list[Pool], *,
               every_pool_short: bool = False,
               check: Callable[[], None] | None = None) -> ServedPlan:
    """The routes that serve the most priority with the pools' vehicles (see the
    module docstring), with the proof of the bound.  ``check`` is called between
    stages (it may raise to stop).

    Four flow solves at most, each on O(n * sites) arcs: the jobs stage only
    when priorities differ, the vehicles stage only when some pool has enough
    vehicles (``every_pool_short`` false): in a pool with fewer than it needs,
    every plan serving the most uses all its vehicles (one more job could
    always go on an idle one).
    """
    check = check or (lambda: None)
    arcs = _arcs(day, indexes, pools)
    flow = _Flow(arcs)
    weight, unit = _weights(day)
    stages = _stage_costs(day, arcs, weight, fewest_vehicles=not every_pool_short)
    conceded = None
    for number, cost in enumerate(stages):
        check()
        try:
            price = flow.optimise(cost)
        except OverflowError:
            if number == 0:
                raise InputError(f"the priorities range too widely to be compared exactly on "
                                 f"a day of {day.n} jobs; round them (to whole numbers, say)",
                                 file=day.sources.get("jobs"), column="priority") from None
            raise
        if number == 0:
            conceded = _conceded(arcs, flow.exact_duals(cost, price), weight)
        if number < len(stages) - 1:
            flow.keep_optimal(cost, price)
    used = flow.flow()
    routes, served = _routes(day, arcs, used)
    proof = _proof(day, indexes, pools, weight, conceded, unit)
    unserved = tuple(int(k) for k in np.flatnonzero(~served))
    return ServedPlan(routes, unserved, proof, len(stages))


def _weights(day: Day) -> tuple[np.ndarray, int]:
    """Priorities in the smallest whole unit they share (thousandths divided by
    their greatest common divisor), and that unit in thousandths."""
    units = np.fromiter((priority_units(j) for j in day.jobs), np.int64, day.n)
    unit = math.gcd(*units.tolist()) if day.n else 1
    return units // max(unit, 1), max(unit, 1)


def _stage_costs(day: Day, arcs: _Arcs, weight: np.ndarray, *,
                 fewest_vehicles: bool) -> list[np.ndarray]:
    """Priority served; jobs served (when priorities differ); vehicles out (when
    asked); empty driving (pull-out, drives, pull-in): costs per forward arc."""
    kind, job = arcs.kind, arcs.job
    serve, start = kind == SERVE, kind == START
    stages = []
    cost = np.zeros(len(kind), dtype=np.int64)
    cost[serve] = -weight[job[serve]]
    stages.append(cost)
    if np.any(weight != weight[0]):
        cost = np.zeros(len(kind), dtype=np.int64)
        cost[serve] = -1
        stages.append(cost)
    if fewest_vehicles:
        cost = np.zeros(len(kind), dtype=np.int64)
        cost[start] = 1
        stages.append(cost)
    t = day.travel
    cost = np.zeros(len(kind), dtype=np.int64)
    link, finish = kind == LINK, kind == FINISH
    cost[link] = t[arcs.site[link], day.origin[job[link]]]
    if day.settings.depot is not None:
        d = day.site_index[day.settings.depot]
        cost[start] = t[d, day.origin[job[start]]]
        cost[finish] = t[arcs.site[finish], d]
    stages.append(cost)
    return stages


def _conceded(arcs: _Arcs, price: np.ndarray, weight: np.ndarray) -> np.ndarray:
    """Minus the reduced cost of each job's served arc under exact duals, capped at
    its priority (a larger value proves nothing more)."""
    serve = np.flatnonzero(arcs.kind == SERVE)
    job = arcs.job[serve]
    reduced = -weight[job] + price[arcs.tail[serve]] - price[arcs.head[serve]]
    conceded = np.zeros(len(weight), dtype=np.int64)
    conceded[job] = np.clip(-reduced, 0, weight[job])
    return conceded


def _routes(day: Day, arcs: _Arcs, used: np.ndarray) -> tuple[list[tuple[int, ...]], np.ndarray]:
    """Routes from the flow, and which jobs are served.

    At each site the k-th vehicle to arrive takes the k-th departure (first in,
    first out); positions are sorted by site, then ready time, so sorting all
    arrivals and all departures by position pairs them within each site, and
    the flow on the waiting arcs guarantees every vehicle is ready in time.
    """
    kind = arcs.kind
    served = np.zeros(day.n, dtype=bool)
    enter = np.flatnonzero((kind == SERVE) & (used > 0))
    served[arcs.job[enter]] = True
    arrive_job = arcs.job[enter][np.argsort(arcs.head[enter], kind="stable")]
    link = np.flatnonzero((kind == LINK) & (used > 0))
    finish = np.flatnonzero((kind == FINISH) & (used > 0))
    leave_pos = np.concatenate([arcs.tail[link], np.repeat(arcs.tail[finish], used[finish])])
    leave_job = np.concatenate([arcs.job[link], np.full(int(used[finish].sum()), -1)])
    order = np.lexsort((leave_job, leave_pos))
    if len(order) != len(arrive_job):
        raise RuntimeError("vehicle-limit flow is not balanced")
    succ = np.full(day.n, -1, dtype=np.int64)
    succ[arrive_job] = leave_job[order]
    starts = arcs.job[(kind == START) & (used > 0)]
    routes = []
    follow = succ.tolist()
    for head in starts.tolist():
        route, k = [], head
        while k >= 0:
            route.append(k)
            k = follow[k]
        routes.append(tuple(route))
    routes.sort(key=lambda r: (int(day.start[r[0]]), r[0]))
    return routes, served


def _proof(day: Day, indexes: list[PrefixIndex], pools: list[Pool], weight: np.ndarray,
           conceded: np.ndarray, unit: int) -> ServiceProof:
    """Conceded priority and level spans (in thousandths) from the first stage's duals."""
    rest = weight - conceded
    high = np.zeros(day.n, dtype=np.int64)
    for index in indexes:
        if index.m == 0:
            continue
        position = np.empty(index.m, dtype=np.int64)
        position[index.order] = np.arange(index.m)
        by_start = np.argsort(day.start[index.jobs], kind="stable")
        out = np.zeros(index.m, dtype=np.int64)
        heaviest_ending(index.group_start, index.latest, position, by_start,
                        rest[index.jobs], out)
        high[index.jobs] = out
    names = day.class_names
    return ServiceProof(_frozen(conceded * unit), _frozen((high - rest) * unit),
                        _frozen(high * unit),
                        tuple((p.vehicles, tuple(names[c] for c in p.classes)) for p in pools))


def _frozen(a: np.ndarray) -> np.ndarray:
    a = np.ascontiguousarray(a, dtype=np.int64)
    a.setflags(write=False)
    return a


@dataclass(frozen=True)
class Level:
    """Jobs whose level span covers a stretch ``thickness`` thick (thousandths of
    priority): no two can share a vehicle, so a pool of ``vehicles`` serves at most
    that many of them; ``counts`` says how much such a level can add to the bound."""

    thickness: int
    jobs: tuple[int, ...]
    vehicles: int

    @property
    def counts(self) -> int:
        return self.thickness * min(self.vehicles, len(self.jobs))


def service_levels(day: Day, proof: ServiceProof) -> list[Level]:
    """The proof's levels, pool by pool, lowest first (for screens and sheets)."""
    levels: list[Level] = []
    class_of = {name: c for c, name in enumerate(day.class_names)}
    for vehicles, names in proof.pools:
        members = np.isin(day.vclass, [class_of[c] for c in names if c in class_of])
        jobs = np.flatnonzero(members & (proof.high > proof.low))
        if not len(jobs):
            continue
        low, high = proof.low[jobs], proof.high[jobs]
        cuts = np.unique(np.concatenate([low, high]))
        for a, b in zip(cuts[:-1].tolist(), cuts[1:].tolist()):
            inside = jobs[(low <= a) & (high >= b)]
            if len(inside):
                levels.append(Level(b - a, tuple(int(k) for k in inside), vehicles))
    return levels


def proof_bound(day: Day, proof: ServiceProof) -> int:
    """The bound the proof gives (thousandths of priority): what is conceded, plus
    per pool the sum over level stretches of thickness x min(vehicles, jobs there)."""
    total = int(proof.conceded.sum())
    class_of = {name: c for c, name in enumerate(day.class_names)}
    for vehicles, names in proof.pools:
        members = np.isin(day.vclass, [class_of[c] for c in names if c in class_of])
        jobs = np.flatnonzero(members & (proof.high > proof.low))
        if not len(jobs):
            continue
        cuts = np.unique(np.concatenate([proof.low[jobs], proof.high[jobs]]))
        change = np.zeros(len(cuts), dtype=np.int64)
        np.add.at(change, np.searchsorted(cuts, proof.low[jobs]), 1)
        np.add.at(change, np.searchsorted(cuts, proof.high[jobs]), -1)
        covering = np.cumsum(change)[:-1]
        total += int((np.diff(cuts) * np.minimum(vehicles, covering)).sum())
    return total


def priority_value(units: int) -> int | float:
    """Thousandths of priority as the number a dispatcher typed (1, 2.5, ...)."""
    whole, rest = divmod(int(units), PRIORITY_UNIT)
    return whole if rest == 0 else round(units / PRIORITY_UNIT, 3)


def priority_text(units: int) -> str:
    """Thousandths of priority as text: '117', '2.5'."""
    return str(priority_value(units))


def unserved_reasons(day: Day, shortfall: Shortfall) -> dict[int, str]:
    """Why each job not served is not, where the proof says: the group of the proof
    (numbered as :func:`service_levels` lists them) whose jobs pairwise cannot share
    a vehicle and whose every vehicle already does one of them."""
    if shortfall.proof is None:
        return {}
    levels = service_levels(day, shortfall.proof)
    unserved = set(shortfall.unserved)
    mixed = len({j.priority for j in day.jobs}) > 1
    reasons = {}
    for k in shortfall.unserved:
        holding = [(len(level.jobs), g, level) for g, level in enumerate(levels, start=1)
                   if k in level.jobs]
        if not holding:
            continue
        _, number, level = min(holding, key=lambda h: (h[0], h[1]))
        served = [j for j in level.jobs if j not in unserved]
        lowest = min(priority_units(day.jobs[j]) for j in served) if served else 0
        vehicles = (f"each of the {level.vehicles} vehicles already does"
                    if level.vehicles > 1 else "the one vehicle already does")
        text = (f"No two of the {len(level.jobs)} jobs of group {number} can share a vehicle, "
                f"and {vehicles} one of them")
        if mixed and served and lowest >= priority_units(day.jobs[k]):
            text += " (each of priority at least as high)"
        reasons[k] = text + "."
    return reasons
