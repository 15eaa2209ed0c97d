"""Least empty driving among minimum-fleet plans, and the fleet / empty-driving trade-off.

Empty driving (deadhead) of a plan is the drive from each job's destination to
the next job's origin, plus pull-out from and pull-in to the depot when one is
set.  Writing ``pin(s) = T[s, depot]`` and ``pout(j) = T[depot, origin_j]``,

    deadhead = sum over all jobs of (pout + pin)  +  sum over links i -> j of cost(i, j),
    cost(i, j) = T[destination_i, origin_j] - pin(destination_i) - pout(j),

so a link's cost depends only on i's destination site (its group in the
:class:`~shipgui.core.fleet.precedence.PrefixIndex`) and on j.

The plan is a minimum-cost flow of exactly F units, F the maximum matching
(so the fleet stays minimal), on the split graph in compressed form
(Ahuja, Magnanti & Orlin, Network Flows, 1993, ch. 9, for the split-graph
formulation; the waiting chain per site follows the time-space idea of
Kliewer, Mellouli & Suhl, "A time-space network based exact optimization model
for multi-depot bus scheduling", EJOR 175, 2006):

    source -> i (capacity 1)            i may link to a successor
    i -> next job of i's group          waiting at the site (free, unbounded)
    latest[j, g] -> j' (cost(g, j))     the whole prefix of group g reaches j
    j' -> sink (capacity 1)             j may have a predecessor

Every flow path source -> i -> ... -> j' -> sink is a compatible link i -> j
at its exact cost, and every set of links is such a flow, so the optimum is
the optimum over all O(n^2) compatible pairs while the network has only
O(n * sites) arcs.  It is solved by cost scaling (:mod:`._flow_kernel`), first
roughly on each successor's cheapest groups, to choose the arcs to add, then
exactly.

The trade-off then takes one unit of flow off at a time along a cheapest
residual path: successive shortest paths in reverse give the least link cost
with exactly F - 1, F - 2, ... links (Ahuja, Magnanti & Orlin 1993, section 9.7).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from ..model import Day
from ._flow_kernel import (
    DONE,
    SETTLE,
    STOPPED,
    LinkCosts,
    Residual,
    cost_scaling,
    repair,
    residual_slots,
    tighten_prices,
    violated_links,
)
from .precedence import PrefixIndex

__all__ = ["ClassCosts", "class_costs", "least_cost_links", "LinkSolution", "Stopped"]


class Stopped(Exception):
    """The stage was stopped from outside (its ``stop`` flag was set)."""

_ALPHA = 32  # cost-scaling factor between phases
_WARM_DIV = 1024  # a warm start begins near the final precision
# Also price in the near misses, arcs within 2 % of the worst violation: they
# save rounds, but each one makes every later phase slower (5 % added a third
# more arcs at 50 000 jobs and cost a quarter more time).
_MARGIN_PERCENT = 2
# Arcs priced in at once: up to this many, re-optimise by shortest paths from
# the exact prices (a few hundred: 0.1 s at 50 000 jobs) instead of a warm cost
# scaling (seconds: its last phases sweep the whole network).
_REPAIR_LIMIT = 2000
_CANDIDATE_GROUPS = 12  # first round: link arcs from each successor's cheapest groups
_COARSE_SECONDS = 60  # first round solved only to within this per arc: enough to price
_BLOCK_CELLS = 1 << 22  # (job, group) cells worked on at once when choosing them


@dataclass(frozen=True, eq=False)
class ClassCosts:
    """Link costs of one vehicle class: :meth:`cost_of` gives the seconds for
    linking any job of group g before local job j (valid where
    ``index.latest[j, g] >= 0``).  They are worked out when needed, never held
    as an (m, G) table: on a day of 200 000 jobs that table alone is 320 MB."""

    index: PrefixIndex
    links: LinkCosts  # what a link's cost is made of (also read by the kernels)
    base: int
    group_of: np.ndarray  # local job -> its destination group

    def cost_of(self, js: np.ndarray, gs: np.ndarray) -> np.ndarray:
        """Cost (seconds) of linking group ``gs[k]`` before local job ``js[k]``."""
        links = self.links
        return (links.travel[links.group_site[gs], links.origin[js]]
                - links.pin[gs] - links.pout[js])

    def matrix(self, rows: slice = slice(None)) -> np.ndarray:
        """``cost[j, g]`` for the local jobs in ``rows`` (all of them: small days)."""
        links = self.links
        return (links.travel[links.group_site][:, links.origin[rows]].T
                - links.pin[None, :] - links.pout[rows, None])


@dataclass(frozen=True)
class LinkSolution:
    """``succ[i]``: local job after local job i (-1: i ends a route).

    ``curve[s]``: least link cost with exactly ``links - s`` links (s = 0 is
    ``link_cost``), for as many s as were asked and possible.
    """

    succ: np.ndarray
    links: int
    link_cost: int  # sum of cost over the links (seconds)
    curve: tuple[int, ...]
    rounds: int  # pricing rounds


def class_costs(day: Day, index: PrefixIndex) -> ClassCosts:
    t = day.travel
    origin = day.origin[index.jobs]
    dest = day.destination[index.jobs]
    pin = np.zeros(len(index.group_site), dtype=np.int64)
    pout = np.zeros(index.m, dtype=np.int64)
    base = 0
    if day.settings.depot is not None:
        d = day.site_index[day.settings.depot]
        pin = t[index.group_site, d].astype(np.int64)
        pout = t[d, origin].astype(np.int64)
        base = int(pout.sum() + t[dest, d].sum())
    group_of = np.empty(index.m, dtype=np.int64)
    group_of[index.order] = index.group_of_position()
    links = LinkCosts(index.latest, index.group_site.astype(np.int64), origin.astype(np.int64),
                      np.ascontiguousarray(t, dtype=np.int64), pin, pout)
    return ClassCosts(index, links, base, group_of)


@dataclass(frozen=True, eq=False)
class _Network:
    residual: Residual  # first, head, rev, cost of every residual slot
    cap: np.ndarray  # capacity of every slot with no flow
    slot: np.ndarray  # residual slot of each forward arc
    fixed: int  # forward arcs before the link arcs (the same in every round)
    links: slice  # forward arcs position -> successor
    start_pos: np.ndarray  # position of each source arc (the first forward arcs)
    link_key: np.ndarray  # j * groups + g of each link arc, increasing
    source: int
    sink: int
    scale: int

    @property
    def nodes(self) -> int:
        return len(self.residual.first) - 1

    def link_flow(self, cap: np.ndarray) -> np.ndarray:
        return self.cap[self.slot[self.links]] - cap[self.slot[self.links]]


@dataclass(frozen=True, eq=False)
class _FixedArcs:
    """The arcs that are the same in every round: source -> first positions,
    the waiting chains, right copies -> sink (capacity, cost 0)."""

    tail: np.ndarray
    head: np.ndarray
    cap: np.ndarray
    start_pos: np.ndarray  # position of each source arc (the first arcs)
    nodes: int

    @property
    def source(self) -> int:
        return self.nodes - 2

    @property
    def sink(self) -> int:
        return self.nodes - 1


def _fixed_arcs(index: PrefixIndex) -> _FixedArcs:
    m = index.m
    lat = index.latest
    gpos = index.group_of_position()
    reach = lat.max(axis=0).astype(np.int64)  # last position of each group that links
    pos = np.arange(m, dtype=np.int64)
    useful = pos <= reach[gpos]
    nxt = pos + 1
    chain = useful & (nxt < index.group_start[gpos + 1]) & (nxt <= reach[gpos])
    succ_jobs = np.flatnonzero((lat >= 0).any(axis=1))
    source, sink = 2 * m, 2 * m + 1
    start_pos = pos[useful]
    parts = [  # (tail, head, capacity)
        (np.full(len(start_pos), source), start_pos, 1),
        (pos[chain], nxt[chain], m),
        (m + succ_jobs, np.full(len(succ_jobs), sink), 1),
    ]
    return _FixedArcs(
        tail=np.concatenate([p[0] for p in parts]).astype(np.int64),
        head=np.concatenate([p[1] for p in parts]).astype(np.int64),
        cap=np.concatenate([np.full(len(p[0]), p[2], dtype=np.int64) for p in parts]),
        start_pos=start_pos, nodes=2 * m + 2)


def _network(costs: ClassCosts, allowed: np.ndarray, fixed: _FixedArcs) -> _Network:
    """The network with the link arcs of the ``allowed`` (j, g) pairs (all of
    them compatible) after the ``fixed`` arcs."""
    index = costs.index
    m, n_groups = index.latest.shape
    js, gs = np.nonzero(allowed)  # by successor, then group
    scale = fixed.nodes + 1  # costs x (nodes + 1): a 1-optimal flow is optimal
    n_fixed = len(fixed.tail)
    tail = np.concatenate([fixed.tail, index.latest[js, gs]]).astype(np.int64)
    head = np.concatenate([fixed.head, m + js]).astype(np.int64)
    n_arcs = len(tail)
    cost = np.zeros(n_arcs, dtype=np.int64)
    cost[n_fixed:] = costs.cost_of(js, gs) * scale
    cap = np.ones(n_arcs, dtype=np.int64)
    cap[:n_fixed] = fixed.cap
    # Residual slots: forward arcs, then their reverses (capacity 0, cost negated),
    # grouped by tail node.
    first, slot, rev = residual_slots(tail, head, fixed.nodes)
    forward, backward = slot[:n_arcs], slot[n_arcs:]
    res_head = np.empty(2 * n_arcs, dtype=np.int64)
    res_head[forward] = head
    res_head[backward] = tail
    res_cost = np.empty(2 * n_arcs, dtype=np.int64)
    res_cost[forward] = cost
    res_cost[backward] = -cost
    res_cap = np.zeros(2 * n_arcs, dtype=np.int64)
    res_cap[forward] = cap
    return _Network(
        residual=Residual(first, res_head, rev, res_cost), cap=res_cap,
        slot=forward, fixed=n_fixed, links=slice(n_fixed, n_arcs),
        start_pos=fixed.start_pos, link_key=js.astype(np.int64) * n_groups + gs,
        source=fixed.source, sink=fixed.sink, scale=scale)


def _initial_allowed(costs: ClassCosts, groups: int) -> np.ndarray:
    """Per successor, the link arcs from its ``groups`` cheapest groups (a new array).

    Worked out a block of rows at a time, so that no (m, G) cost table is held."""
    valid = costs.index.latest >= 0
    m, n_groups = valid.shape
    if n_groups <= groups:
        return valid
    allowed = np.zeros((m, n_groups), dtype=bool)
    rows = max(1, _BLOCK_CELLS // n_groups)
    for a in range(0, m, rows):
        block = slice(a, min(m, a + rows))
        masked = np.where(valid[block], costs.matrix(block), np.iinfo(np.int64).max)
        best = np.argpartition(masked, groups - 1, axis=1)[:, :groups]
        np.put_along_axis(allowed[block], best, True, axis=1)
    return allowed & valid


def least_cost_links(costs: ClassCosts, matching: np.ndarray, extra: int = 0,
                     check: Callable[[], None] | None = None, *,
                     candidate_groups: int = _CANDIDATE_GROUPS,
                     repair_limit: int = _REPAIR_LIMIT,
                     stop: np.ndarray | None = None) -> LinkSolution:
    """The least-cost set of as many links as ``matching`` has, for one class.

    Parameters
    ----------
    costs : the class's link costs in prefix form (:func:`class_costs`).
    matching : a succ array (-1: no successor), normally a maximum matching, so
        the fleet stays minimal; its links also make the first round feasible.
    extra : also the least cost with links - 1, ..., links - extra.
    check : called between rounds; it may raise to stop the solve.
    candidate_groups, repair_limit : the way to the optimum, never the result:
        link arcs from each successor's ``candidate_groups`` cheapest groups
        in the first round; re-optimise by shortest paths when at most
        ``repair_limit`` arcs are priced in at once, else by cost scaling.
    stop : an int64 array; setting ``stop[0]`` from another thread stops the
        kernels within milliseconds (they run without the GIL).

    Returns
    -------
    LinkSolution
        ``succ`` with the least total link cost among all sets of that many
        links, ``link_cost``, and ``curve`` (least cost with fewer links).

    Raises
    ------
    Stopped
        When ``stop[0]`` was set.
    RuntimeError
        If the flow lost links or its cost disagrees with the links (a bug).

    Notes
    -----
    Each round is a min-cost flow by cost scaling on the O(m * G) arcs allowed
    so far (worst case O(V^2 E log(V C)), Goldberg & Tarjan); rounds are few in
    practice.  Memory O(m * G): the (job, group) bitmap of the arcs allowed and
    the prefix index; link costs are worked out when needed.

    Link arcs are priced in (column generation; e.g. Desrosiers & Lübbecke, "A
    primer in column generation", in Column Generation, Springer 2005): the
    flow is solved on each successor's cheapest groups, exact duals are
    computed, and every left-out arc with a negative reduced cost (and those
    within ``_MARGIN_PERCENT`` of the worst violation) is added before solving again,
    warm-started from the previous flow and prices.  It
    stops when no arc of the full network has a negative reduced cost, which
    proves the flow optimal on the full network.  The same check follows every
    step of the trade-off.

    References
    ----------
    Goldberg & Tarjan, "Finding minimum-cost circulations by successive
    approximation", Mathematics of Operations Research 15(3), 1990.

    Examples
    --------
    Two yards half an hour apart, a job at each yard early and late; the given
    matching crosses over (two empty half-hour drives), the least-cost links
    do not:

    >>> import numpy as np
    >>> from shipgui.core import Job, build_day
    >>> from shipgui.core.fleet.precedence import class_indexes
    >>> H = 3600
    >>> jobs = [Job("J1", "A", "A", 8 * H, 9 * H), Job("J2", "B", "B", 8 * H, 9 * H),
    ...         Job("J3", "A", "A", 10 * H, 11 * H), Job("J4", "B", "B", 10 * H, 11 * H)]
    >>> day = build_day(jobs, [], {("A", "B"): (1800, 0), ("B", "A"): (1800, 0)})
    >>> [index] = class_indexes(day)
    >>> best = least_cost_links(class_costs(day, index), np.array([3, 2, -1, -1]))
    >>> best.succ.tolist(), best.link_cost
    ([2, 3, -1, -1], 0)
    """
    m = costs.index.m
    linked = np.flatnonzero(matching >= 0)
    links = len(linked)
    if links == 0:
        return LinkSolution(np.full(m, -1, dtype=np.int64), 0, 0, (0,), 0)
    allowed = _initial_allowed(costs, max(1, candidate_groups))
    allowed[matching[linked], costs.group_of[linked]] = True
    if stop is None:
        stop = np.zeros(1, dtype=np.int64)
    flow = _PricedFlow(costs, allowed, links, check or (lambda: None), repair_limit, stop)
    succ = flow.links()
    linked = np.flatnonzero(succ >= 0)
    link_cost = int(costs.cost_of(succ[linked], costs.group_of[linked]).sum())
    if len(linked) != links:
        raise RuntimeError("least-deadhead flow does not have the asked number of links")
    if link_cost != flow.link_cost():
        raise RuntimeError("least-deadhead links do not match their flow")
    curve = [link_cost]
    for _ in range(min(extra, links)):
        flow.check()
        flow.take_one_unit()
        curve.append(flow.link_cost())
    return LinkSolution(succ, links, link_cost, tuple(curve), flow.rounds)


class _PricedFlow:
    """A least-cost flow on the network of the allowed link arcs, kept optimal on
    the full network by adding every priced-out arc and solving again."""

    def __init__(self, costs: ClassCosts, allowed: np.ndarray, links: int,
                 check: Callable[[], None], repair_limit: int, stop: np.ndarray):
        self.costs = costs
        self.check = check
        self.repair_limit = repair_limit
        self.stop = stop
        self.allowed = allowed
        self.rounds = 0
        self.fixed = _fixed_arcs(costs.index)
        self.net = _network(costs, allowed, self.fixed)
        self.cap = self.net.cap.copy()
        self.price = np.zeros(self.net.nodes, dtype=np.int64)
        excess = np.zeros(len(self.price), dtype=np.int64)
        excess[self.net.source] = links
        excess[self.net.sink] = -links
        self.eps = 0
        self._scale(excess, 0, coarse=True)  # from scratch on the first arcs
        self._price_in()

    def _scale(self, excess: np.ndarray, eps: int, *, coarse: bool = False) -> None:
        """Cost scaling from an eps-optimal start (eps <= 0: from scratch) down to
        optimal with exact prices, or, ``coarse``, only to within _COARSE_SECONDS
        per arc: good enough prices to choose the arcs to add (self.eps > 0)."""
        net = self.net
        self.rounds += 1
        reached = np.array([max(1, _COARSE_SECONDS * net.scale) if coarse else 1],
                           dtype=np.int64)
        settle = 0 if coarse else net.scale // SETTLE
        status = cost_scaling(net.residual, self.cap, excess, self.price, eps, _ALPHA,
                              _ALPHA if eps <= 0 else _WARM_DIV, self.stop, reached, settle)
        self._done(status, "the matching's links could not be routed")
        self.eps = int(reached[0]) if coarse else 0
        if not coarse and not tighten_prices(net.residual, self.cap, self.price):
            raise RuntimeError("least-deadhead flow is not optimal (negative cycle)")

    def _price_in(self) -> None:
        """Add left-out arcs with a negative reduced cost and re-optimise until
        there are none: many at once by a warm-started cost scaling, a few by
        primal-dual shortest paths from the exact prices."""
        while True:
            self.check()
            priced = self._priced_out()
            zero = np.zeros(len(self.price), dtype=np.int64)
            if priced is None:
                if self.eps == 0:
                    return
                self._scale(zero, self.eps)  # finish the coarse flow exactly
                continue
            violation, count = priced
            if self.eps > 0 or count > self.repair_limit:
                self._scale(zero, max(violation, self.eps))
                continue
            self.rounds += 1
            net, cap = self.net, self.cap
            res = net.residual
            tail = np.repeat(np.arange(net.nodes), np.diff(res.first))
            reduced = res.cost + self.price[tail] - self.price[res.head]
            bad = np.flatnonzero((cap > 0) & (reduced < 0))
            np.subtract.at(zero, tail[bad], cap[bad])
            np.add.at(zero, res.head[bad], cap[bad])
            cap[res.rev[bad]] += cap[bad]
            cap[bad] = 0
            self._done(repair(res, cap, self.price, zero, self.stop),
                       "could not rebalance after pricing")

    def _priced_out(self) -> tuple[int, int] | None:
        """Add the left-out arcs with a negative reduced cost (and near misses)
        and carry the flow over to the larger network: (largest violation,
        number of violated arcs), or None when no arc is violated."""
        worst, count, keys = violated_links(self.costs.links, self.allowed, self.price,
                                            self.net.scale, _MARGIN_PERCENT)
        if count == 0:
            return None
        self.allowed.reshape(-1)[keys] = True
        old, old_cap = self.net, self.cap
        net = _network(self.costs, self.allowed, self.fixed)
        flow = np.zeros(len(net.slot), dtype=np.int64)
        flow[:old.fixed] = (old.cap - old_cap)[old.slot[:old.fixed]]
        flow[net.fixed + np.searchsorted(net.link_key, old.link_key)] = old.link_flow(old_cap)
        cap = net.cap.copy()
        cap[net.slot] -= flow
        cap[net.residual.rev[net.slot]] += flow
        self.net, self.cap = net, cap
        return int(worst), int(count)

    def links(self) -> np.ndarray:
        """succ array of the current flow."""
        net, index = self.net, self.costs.index
        n_groups = index.latest.shape[1]
        used = net.link_flow(self.cap) > 0
        entering = net.start_pos[(net.cap - self.cap)[net.slot[:len(net.start_pos)]] > 0]
        key = net.link_key[used]
        position = index.latest.reshape(-1)[key].astype(np.int64)
        job = key // n_groups
        leave = np.lexsort((job, position))
        succ = np.full(index.m, -1, dtype=np.int64)
        if len(entering) != len(leave):
            raise RuntimeError("least-deadhead flow is not balanced")
        # Within a group, the k-th vehicle to become free takes the k-th link to
        # leave (first in, first out); the flow on the waiting arcs guarantees
        # it is ready in time.
        succ[index.order[entering]] = job[leave]
        return succ

    def link_cost(self) -> int:
        """Total cost of the current links (seconds)."""
        net = self.net
        link_cost = net.residual.cost[net.slot[net.links]]
        return int(net.link_flow(self.cap) @ link_cost) // net.scale

    def take_one_unit(self) -> None:
        """Remove one link at least extra cost (the flow stays optimal): one unit
        back from the sink to the source along a cheapest residual path."""
        net = self.net
        excess = np.zeros(net.nodes, dtype=np.int64)
        excess[net.sink] = 1
        excess[net.source] = -1
        self._done(repair(net.residual, self.cap, self.price, excess, self.stop),
                   "no link to remove in the trade-off")
        self._price_in()

    def _done(self, status: int, failure: str) -> None:
        if status == STOPPED:
            raise Stopped()
        if status != DONE:
            raise RuntimeError(f"least-deadhead flow: {failure}")
