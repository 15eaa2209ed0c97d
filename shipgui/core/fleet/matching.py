"""Maximum matching between "left" and "right" copies of the jobs of one class.

Two exact kernels, chosen at run time:

* ``hopcroft-karp`` (default): :mod:`._hk_kernel`, compiled with numba
  (plain Python with ``NUMBA_DISABLE_JIT=1``, for small days and tests).
  O(m * G) per phase without listing edges.
* ``dinic``: scipy's ``maximum_flow(method='dinic')`` on a compressed flow
  network (one chain of nodes per destination site; Dinic, "Algorithm for
  solution of a problem of maximum flow in networks with power estimation",
  Soviet Math. Doklady 11, 1970).  Pure numpy/scipy; the default when
  kernels are not compiled, and an independent second kernel for the tests.

Both return the matching and, from their final search, the jobs whose right
copy is reached and whose left copy is not: by König's theorem these form a
maximum antichain (König, "Gráfok és mátrixok", Matematikai és Fizikai Lapok
38, 1931).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp
from scipy.sparse.csgraph import breadth_first_order, maximum_flow

from .._jit import COMPILED
from ..model import Day
from ._hk_kernel import Fit, Links, Prefixes, greedy_start, hk_match
from .precedence import PrefixIndex

__all__ = ["Matching", "maximum_matching", "available_kernels", "default_kernel"]


@dataclass(frozen=True)
class Matching:
    """``succ[i]`` is the local job that follows local job i (-1: i ends a route).

    ``antichain`` holds local jobs, pairwise unable to share a vehicle, one per route.
    """

    succ: np.ndarray
    antichain: np.ndarray

    @property
    def size(self) -> int:
        return int(np.count_nonzero(self.succ >= 0))


KERNELS = ("hopcroft-karp", "dinic")


def available_kernels() -> list[str]:
    """Both kernels always work; Hopcroft-Karp is fast only when compiled."""
    return list(KERNELS)


def default_kernel() -> str:
    """Hopcroft-Karp when the kernels are compiled, else scipy's Dinic."""
    return "hopcroft-karp" if COMPILED else "dinic"


def maximum_matching(index: PrefixIndex, *, kernel: str | None = None,
                     day: Day | None = None) -> Matching:
    """Maximum matching of the relation in ``index`` with its König certificate.

    Parameters
    ----------
    index : the "can follow" relation of one vehicle class in prefix form
        (:func:`.precedence.class_indexes`).
    kernel : "hopcroft-karp" or "dinic" (default :func:`default_kernel`).
    day : with it, Hopcroft-Karp starts from a greedy tightest-fit matching
        (same result size, far fewer phases).

    Returns
    -------
    Matching
        ``succ[i]``: the local job that follows local job i (-1: none); the
        class needs ``m - size`` vehicles.  ``antichain``: that many local jobs,
        pairwise unable to share a vehicle.

    Raises
    ------
    ValueError
        For an unknown kernel name.

    Notes
    -----
    Hopcroft-Karp walks prefixes instead of edges: O(m * G) per phase for m
    jobs and G destination sites, O(sqrt(m)) phases.  Dinic runs on a network
    of O(m) nodes and O(m * G) arcs.  The certificate: right copies reached and
    left copies not reached by the last search (König).

    References
    ----------
    Hopcroft & Karp, "An n^5/2 algorithm for maximum matchings in bipartite
    graphs", SIAM J. Computing 2(4), 1973.  König, "Gráfok és mátrixok",
    Matematikai és Fizikai Lapok 38, 1931.

    Examples
    --------
    >>> from shipgui.core import Job, Settings, build_day
    >>> H = 3600
    >>> jobs = [Job("J1", "A", "B", 8 * H, 9 * H), Job("J2", "B", "A", 9 * H + 900, 10 * H),
    ...         Job("J3", "A", "A", 8 * H + 1800, 9 * H + 1800)]
    >>> day = build_day(jobs, [], {("A", "B"): (1200, 2), ("B", "A"): (1200, 3)},
    ...                 settings=Settings(turnaround=600))
    >>> from shipgui.core.fleet.precedence import class_indexes
    >>> [index] = class_indexes(day)
    >>> found = maximum_matching(index, day=day)
    >>> found.size, found.succ.tolist(), len(found.antichain)
    (1, [1, -1, -1], 2)
    >>> maximum_matching(index, kernel="dinic").size
    1
    """
    kernel = kernel or default_kernel()
    m = index.m
    if m == 0:
        empty = np.zeros(0, dtype=np.int64)
        return Matching(empty, empty)
    if kernel == "dinic":
        return _dinic(index)
    if kernel != "hopcroft-karp":
        raise ValueError(f"unknown matching kernel {kernel!r}")
    links = Links(np.full(m, -1, dtype=np.int64), np.full(m, -1, dtype=np.int64))
    prefixes = Prefixes(index.order, index.group_start, index.latest)
    if day is not None:
        ready_pos = (day.end[index.jobs] + day.settings.turnaround)[index.order]
        fit = Fit(ready_pos, index.group_site, day.travel, day.origin[index.jobs],
                  np.argsort(day.start[index.jobs], kind="stable"))
        greedy_start(prefixes, links, fit)
    reached_pos, reached_right = hk_match(prefixes, links)
    succ = links.succ
    reached_left = np.zeros(m, dtype=bool)
    reached_left[index.order[reached_pos]] = True
    antichain = np.flatnonzero(reached_right & ~reached_left)
    return Matching(succ, antichain)


def _dinic(index: PrefixIndex) -> Matching:
    """Max flow on source -> left_i -> chain(pos i) -> ... -> chain(p) -> right_j -> sink.

    Chain arcs run from each position to the next one of the same destination
    group, so flow entering at i's position can leave at any later position p
    with j able to follow everything up to p.
    """
    m, order, lat = index.m, index.order, index.latest
    pos = np.empty(m, dtype=np.int64)
    pos[order] = np.arange(m)
    g_of_pos = index.group_of_position()
    link = np.flatnonzero(g_of_pos[:-1] == g_of_pos[1:])
    j_idx, g_idx = np.nonzero(lat >= 0)
    exit_pos = lat[j_idx, g_idx].astype(np.int64)
    source, left, chain, right, sink = 0, 1, 1 + m, 1 + 2 * m, 1 + 3 * m
    ar = np.arange(m)
    tail = np.concatenate([np.zeros(m, np.int64), left + ar, chain + link,
                           chain + exit_pos, right + ar])
    head = np.concatenate([left + ar, chain + pos, chain + link + 1,
                           right + j_idx, np.full(m, sink)])
    # Only the source and sink arcs have capacity 1; the rest are "unbounded" (m)
    # so that a minimum cut cuts source/sink arcs only and yields an antichain.
    cap = np.full(len(tail), m, dtype=np.int32)
    cap[:m] = 1
    cap[-m:] = 1
    graph = sp.csr_matrix((cap, (tail, head)), shape=(3 * m + 2, 3 * m + 2))
    flow = maximum_flow(graph, source, sink, method="dinic").flow
    # Residual graph: capacity left over, including reverse arcs of used flow.
    residual = (graph - flow).tocsr()
    residual.data = (residual.data > 0).astype(np.int8)
    residual.eliminate_zeros()
    reached = np.zeros(3 * m + 2, dtype=bool)
    reached[breadth_first_order(residual, source, directed=True,
                                return_predecessors=False)] = True
    antichain = np.flatnonzero(reached[left:left + m] & ~reached[right:right + m])
    return Matching(_pairs_from_flow(flow.tocoo(), m, pos, g_of_pos), antichain)


def _pairs_from_flow(flow: sp.coo_matrix, m: int, pos: np.ndarray, g_of_pos: np.ndarray):
    """Pair entries and exits of each group's chain, in position order.

    Flow on a chain only moves to later positions, so the k-th entry (sorted by
    position) is at or before the k-th exit: pairing them gives valid links.
    """
    used = flow.data > 0
    tail, head = flow.row[used], flow.col[used]
    left, chain, right = 1, 1 + m, 1 + 2 * m
    enter = (tail >= left) & (tail < chain) & (head >= chain) & (head < right)
    leave = (tail >= chain) & (tail < right) & (head >= right) & (head < right + m)
    entry_job = tail[enter] - left
    entry_pos = pos[entry_job]
    exit_pos = tail[leave] - chain
    exit_job = head[leave] - right
    e = np.lexsort((entry_pos, g_of_pos[entry_pos]))
    x = np.lexsort((exit_pos, g_of_pos[exit_pos]))
    succ = np.full(m, -1, dtype=np.int64)
    succ[entry_job[e]] = exit_job[x]
    return succ
