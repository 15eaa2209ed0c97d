"""Least empty driving among minimum-fleet plans, and the fleet / empty-driving trade-off.

Empty driving (deadhead) of a plan is the drive from each job's destination to
the next job's origin, plus pull-out from and pull-in to the depot when one is
set.  Writing ``pin(s) = T[s, depot]`` and ``pout(j) = T[depot, origin_j]``,

    deadhead = sum over all jobs of (pout + pin)  +  sum over links i -> j of cost(i, j),
    cost(i, j) = T[destination_i, origin_j] - pin(destination_i) - pout(j),

so a link's cost depends only on i's destination site (its group in the
:class:`~shipgui.core.precedence.PrefixIndex`) and on j.

The plan is a min-cost assignment: every job either links to a successor or
ends a vehicle's day at a cost above any possible total of link costs, so the
number of links is maximal (the minimum fleet) and, among those, the cost is
least.  It is solved on a small candidate set of links with scipy's sparse
shortest-augmenting-path solver (``min_weight_full_bipartite_matching``;
Jonker & Volgenant, "A shortest augmenting path algorithm for dense and sparse
linear assignment problems", Computing 38, 1987).  Optimality over *all*
compatible pairs is then proven with LP duals: node potentials from shortest
paths in the residual graph must make every compatible link's reduced cost
non-negative.  The check runs per (job, site) on prefix maxima, O(n * sites);
violated links are added and the assignment solved again until none is left
(column generation; e.g. Desrosiers & Lübbecke, "A primer in column
generation", in Column Generation, Springer 2005).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
from scipy.sparse.csgraph import min_weight_full_bipartite_matching

from . import _paths_kernel
from ._jit import numba_jit
from .model import Day
from .precedence import PrefixIndex

__all__ = ["ClassCosts", "class_costs", "least_cost_links", "LinkSolution", "tradeoff_curve"]

_CANDIDATES_PER_JOB = 8
# Up to this many compatible pairs, all of them are candidates from the start:
# one assignment solve, no pricing rounds (faster on small and medium days).
_ALL_PAIRS_LIMIT = 1_500_000
_MAX_ROUNDS = 200
_PRICED_PER_JOB = 3


@dataclass(frozen=True, eq=False)
class ClassCosts:
    """Link costs of one vehicle class: ``cost[j, g]`` seconds for linking any job of
    group g before local job j (valid where ``index.latest[j, g] >= 0``)."""

    index: PrefixIndex
    cost: np.ndarray
    base: int
    group_of: np.ndarray  # local job -> its destination group


@dataclass(frozen=True)
class LinkSolution:
    """``succ[i]``: local job after local job i (-1: i ends a route)."""

    succ: np.ndarray
    links: int
    link_cost: int  # sum of cost over the links (seconds)
    rounds: int


def class_costs(day: Day, index: PrefixIndex) -> ClassCosts:
    t = day.travel
    origin = day.origin[index.jobs]
    dest = day.destination[index.jobs]
    cost = t[index.group_site][:, origin].T.astype(np.int64)  # (m, G)
    base = 0
    if day.settings.depot is not None:
        d = day.site_index[day.settings.depot]
        pin_group = t[index.group_site, d]
        pout = t[d, origin]
        cost = cost - pin_group[None, :] - pout[:, None]
        base = int(pout.sum() + t[dest, d].sum())
    group_of = np.empty(index.m, dtype=np.int64)
    group_of[index.order] = index.group_of_position()
    return ClassCosts(index, cost, base, group_of)


def _compile():
    jit = numba_jit()
    kernel = _paths_kernel.queue_bellman_ford
    return kernel if jit is None else jit(kernel)


_BELLMAN_FORD = None


def _bellman_ford():
    global _BELLMAN_FORD
    if _BELLMAN_FORD is None:
        _BELLMAN_FORD = _compile()
    return _BELLMAN_FORD


def least_cost_links(costs: ClassCosts, *, penalty: tuple[int, int] | None = None,
                     initial: np.ndarray | None = None) -> LinkSolution:
    """Optimal links for one class.

    ``penalty=None``: as many links as possible (minimum fleet), then least cost.
    ``penalty=(num, den)``: minimise ``den * link_cost + num * routes`` (a price of
    num/den seconds per vehicle), for the trade-off curve.
    ``initial``: a succ array whose links seed the candidate set (e.g. a maximum
    matching, which makes the minimum fleet reachable from the first round).
    """
    index, m = costs.index, costs.index.m
    valid = index.latest >= 0
    if m == 0 or not valid.any():
        return LinkSolution(np.full(m, -1, dtype=np.int64), 0, 0, 0)
    cmin = int(costs.cost[valid].min())
    scale = 1 if penalty is None else int(penalty[1])
    weight = (costs.cost - cmin + 1) * scale  # >= 1 so no weight is a zero entry
    if penalty is None:
        end_weight = int(weight[valid].max()) * (m + 1) + 1
    else:
        end_weight = int(penalty[0]) + scale * (1 - cmin)
        if end_weight < 1:  # every link costs more than a vehicle: no links at all
            return LinkSolution(np.full(m, -1, dtype=np.int64), 0, 0, 0)
    if index.edge_count() <= _ALL_PAIRS_LIMIT:
        cand = _all_pairs(index)
    else:
        cand = _initial_candidates(index, weight, valid, initial)
    rounds = 0
    while rounds < _MAX_ROUNDS:
        rounds += 1
        ii, jj = np.divmod(cand, m)
        w = weight[jj, costs.group_of[ii]]
        col = _assign(m, ii, jj, w, end_weight)
        d_row, d_col = _potentials(m, ii, jj, w, col, end_weight)
        extra = _price(index, weight, valid, d_row, d_col)
        if len(extra) == 0:
            break
        cand = np.union1d(cand, extra)
    else:
        raise RuntimeError("least-deadhead search did not converge")
    succ = np.where(col < m, col, -1).astype(np.int64)
    linked = np.flatnonzero(succ >= 0)
    link_cost = int(costs.cost[succ[linked], costs.group_of[linked]].sum())
    return LinkSolution(succ, len(linked), link_cost, rounds)


def _all_pairs(index: PrefixIndex) -> np.ndarray:
    """Every compatible (i, j) as keys i * m + j, expanded from the prefixes."""
    m = index.m
    js, gs = np.nonzero(index.latest >= 0)
    first = index.group_start[gs]
    counts = index.latest[js, gs].astype(np.int64) - first + 1
    offsets = np.arange(counts.sum()) - np.repeat(np.cumsum(counts) - counts, counts)
    positions = np.repeat(first, counts) + offsets
    return np.sort(index.order[positions] * m + np.repeat(js, counts))


def _initial_candidates(index: PrefixIndex, weight, valid, initial) -> np.ndarray:
    """Per job, the cheapest few groups at their tightest position; plus ``initial``."""
    m, n_groups = weight.shape
    k = min(_CANDIDATES_PER_JOB, n_groups)
    masked = np.where(valid, weight, np.iinfo(np.int64).max)
    best = np.argpartition(masked, k - 1, axis=1)[:, :k] if k < n_groups else \
        np.broadcast_to(np.arange(n_groups), (m, n_groups))
    jj = np.repeat(np.arange(m), best.shape[1])
    gg = best.ravel()
    ok = valid[jj, gg]
    ii = index.order[index.latest[jj[ok], gg[ok]]]
    keys = [ii * m + jj[ok]]
    if initial is not None:
        linked = np.flatnonzero(initial >= 0)
        keys.append(linked * m + initial[linked])
    return np.unique(np.concatenate(keys))


def _assign(m: int, ii, jj, w, end_weight: int) -> np.ndarray:
    """Every job (row) to a successor (column j) or to its own end (column m + i)."""
    rows = np.concatenate([ii, np.arange(m)])
    cols = np.concatenate([jj, m + np.arange(m)])
    data = np.concatenate([w, np.full(m, end_weight, dtype=np.int64)]).astype(float)
    graph = sp.csr_matrix((data, (rows, cols)), shape=(m, 2 * m))
    row_ind, col_ind = min_weight_full_bipartite_matching(graph)
    col = np.empty(m, dtype=np.int64)
    col[row_ind] = col_ind
    return col


def _potentials(m: int, ii, jj, w, col, end_weight: int):
    """Distances D from each node to a free column in the residual graph.

    Duals u_i = D(row i), v_c = -D(column c) satisfy u_i + v_c <= weight on every
    candidate arc with equality on the assignment (shortest-path optimality).
    Rows that reach no free column get a large potential so that pricing adds
    their links (or, having no successor at all, they need none).
    """
    inf = _paths_kernel.INF
    ends = np.arange(m)
    matched = col[ii] == jj
    # Reversed residual arcs: unmatched arc row->col becomes col->row (+w);
    # a matched arc (col->row with -w in the residual graph) becomes row->col.
    tail = np.concatenate([np.where(matched, ii, m + jj),
                           np.where(col == m + ends, ends, 2 * m + ends)])
    head = np.concatenate([np.where(matched, m + jj, ii),
                           np.where(col == m + ends, 2 * m + ends, ends)])
    wt = np.concatenate([np.where(matched, -w, w),
                         np.where(col == m + ends, -end_weight, end_weight)])
    order = np.argsort(tail, kind="stable")
    indptr = np.searchsorted(tail[order], np.arange(3 * m + 1))
    dist = np.full(3 * m, inf, dtype=np.int64)
    used = np.zeros(2 * m, dtype=bool)
    used[col] = True
    dist[m:][~used] = 0
    if not _bellman_ford()(indptr.astype(np.int64), head[order].astype(np.int64),
                           wt[order].astype(np.int64), dist):
        raise RuntimeError("negative cycle: the assignment was not optimal")
    d_row = dist[:m]
    unreached = d_row >= inf
    d_row[unreached] = int(np.abs(wt).sum()) + end_weight + 1
    d_col = dist[m:2 * m]
    d_end = np.where(col == m + ends, d_row - end_weight, dist[2 * m:])
    # Dual feasibility v <= 0 (column constraints are "at most one"): D >= 0.
    if np.any(d_col >= inf) or np.any(d_col < 0) or np.any(d_end < 0):
        raise RuntimeError("dual check failed: the assignment was not optimal")
    return d_row, d_col


def _price(index: PrefixIndex, weight, valid, d_row, d_col) -> np.ndarray:
    """Compatible links (i, j) with negative reduced cost, D(i) - D(j) > weight.

    Per group the best i for a prefix is the one of largest D so far; per job j
    only its few most violated links are returned (partial pricing keeps the
    candidate set small).
    """
    m, n_groups = weight.shape
    reduced = np.zeros((m, n_groups), dtype=np.int64)
    pick = np.full((m, n_groups), -1, dtype=np.int64)
    for g in range(n_groups):
        a, b = index.group_start[g], index.group_start[g + 1]
        vals = d_row[index.order[a:b]]
        best = np.maximum.accumulate(vals)
        arg = np.maximum.accumulate(np.where(vals == best, np.arange(b - a), 0))
        js = np.flatnonzero(valid[:, g])
        p = index.latest[js, g] - a
        reduced[js, g] = weight[js, g] - best[p] + d_col[js]
        pick[js, g] = index.order[a + arg[p]]
    k = min(_PRICED_PER_JOB, n_groups)
    top = np.argpartition(reduced, k - 1, axis=1)[:, :k] if k < n_groups else \
        np.broadcast_to(np.arange(n_groups), (m, n_groups))
    jj = np.repeat(np.arange(m), top.shape[1])
    gg = top.ravel()
    bad = reduced[jj, gg] < 0
    return pick[jj[bad], gg[bad]] * m + jj[bad]


def tradeoff_curve(costs: ClassCosts, best: LinkSolution, extra: int) -> list[int]:
    """Least link cost with exactly ``best.links - s`` links, for s = 0..extra.

    The least cost as a function of the number of links is convex (it is a
    min-cost flow value; Ahuja, Magnanti & Orlin, Network Flows, 1993, ch. 9),
    so its corners are found by Lagrangian prices at chord slopes and the
    integer points between corners lie on the chords.
    """
    top = best.links
    low_target = max(0, top - extra)
    corners = {0: 0, top: best.link_cost}
    stack = [(0, top)]
    while stack:
        l1, l2 = stack.pop()
        if l2 - l1 <= 1 or l2 <= low_target:
            continue
        f1, f2 = corners[l1], corners[l2]
        num, den = f2 - f1, l2 - l1
        sol = least_cost_links(costs, penalty=(num, den), initial=best.succ)
        # Value of the solution against the chord's supporting line.
        if den * sol.link_cost - num * sol.links >= den * f1 - num * l1 \
                or sol.links in corners:
            continue  # f is linear on [l1, l2]
        corners[sol.links] = sol.link_cost
        stack.extend([(l1, sol.links), (sol.links, l2)])
    xs = sorted(corners)
    curve = []
    for s in range(extra + 1):
        links = top - s
        if links < 0:
            break
        k = np.searchsorted(xs, links)
        if xs[k] == links:
            curve.append(corners[links])
            continue
        l1, l2 = xs[k - 1], xs[k]
        f1, f2 = corners[l1], corners[l2]
        value = f1 * (l2 - links) + f2 * (links - l1)
        curve.append(value // (l2 - l1))
    return curve
