"""The "can follow" relation: which job a vehicle can do after which.

Job j can follow job i iff i != j, they share a vehicle class, and
``end_i + turnaround + T[destination_i, origin_j] <= start_j``.

For one successor j and one destination site s, the jobs ending at s that j
can follow are exactly the earliest-ready ones: a prefix of the jobs ending at
s sorted by ready time (end + turnaround).  :class:`PrefixIndex` stores, for
every (site, j), the last position of that prefix: an exact description of the
whole relation in O(n * sites) integers instead of O(n^2) pairs.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from ..model import Day

__all__ = ["PrefixIndex", "prefix_index", "prefix_index_from_matrix", "class_indexes",
           "can_follow_matrix", "follow_slack"]

_CHUNK_CELLS = 1 << 22  # cells per chunk of the dense comparison (~4 M)


@dataclass(frozen=True, eq=False)
class PrefixIndex:
    """The relation restricted to one vehicle class, in prefix form.

    Attributes
    ----------
    jobs : (m,) global job index of each local job.
    order : (m,) local job at each position; positions sorted by (destination, ready).
    group_start : (G+1,) first position of each destination group, and m at the end.
    group_site : (G,) site index of each group.
    latest : (m, G) int32 (one row per successor, contiguous for the kernels);
        ``latest[j, g]`` is the last position q in group g such
        that local job j can follow ``order[q]`` (all of group g's positions up to q
        qualify), or -1 when none does.
    """

    jobs: np.ndarray
    order: np.ndarray
    group_start: np.ndarray
    group_site: np.ndarray
    latest: np.ndarray

    @property
    def m(self) -> int:
        return len(self.jobs)

    def group_of_position(self) -> np.ndarray:
        """(m,) destination group of every position."""
        return np.repeat(np.arange(len(self.group_site)), np.diff(self.group_start))


def prefix_index(day: Day, jobs: np.ndarray) -> PrefixIndex:
    """Build the prefix form of the relation among ``jobs`` (global indices, one class).

    Runs in O(m * G * log m) with G the number of destination sites used.
    """
    jobs = np.asarray(jobs, dtype=np.int64)
    ready = day.end[jobs] + day.settings.turnaround
    dest = day.destination[jobs]
    start = day.start[jobs]
    origin = day.origin[jobs]
    order = np.lexsort((ready, dest))
    sorted_dest = dest[order]
    sorted_ready = ready[order]
    cut = np.flatnonzero(np.diff(sorted_dest)) + 1
    group_start = np.concatenate(([0], cut, [len(jobs)])).astype(np.int64)
    group_site = sorted_dest[group_start[:-1]] if len(jobs) else np.zeros(0, np.int64)
    latest = np.empty((len(jobs), len(group_site)), dtype=np.int32)
    for g, site in enumerate(group_site):
        a, b = group_start[g], group_start[g + 1]
        # The latest ready time at `site` that still lets each job start on time.
        threshold = start - day.travel[site, origin]
        p = np.searchsorted(sorted_ready[a:b], threshold, side="right") - 1
        latest[:, g] = np.where(p >= 0, p + a, -1)
    return PrefixIndex(jobs, order.astype(np.int64), group_start, group_site, latest)


def prefix_index_from_matrix(follows) -> PrefixIndex:
    """Prefix form of any relation given as a matrix (``follows[i, j]``: j can follow i).

    Every job gets a group of its own, so this is exact for any relation (O(n^2)
    memory): for checking the algorithms on orders that do not come from a day.
    """
    follows = np.asarray(follows.toarray() if sp.issparse(follows) else follows, dtype=bool)
    n = follows.shape[0]
    ar = np.arange(n, dtype=np.int64)
    latest = np.where(follows.T, ar[None, :], -1).astype(np.int32)
    return PrefixIndex(ar, ar.copy(), np.arange(n + 1, dtype=np.int64), ar.copy(), latest)


def class_indexes(day: Day) -> list[PrefixIndex]:
    """One prefix index per vehicle class: classes never share a vehicle."""
    return [prefix_index(day, np.flatnonzero(day.vclass == c))
            for c in range(len(day.class_names))]


def can_follow_matrix(day: Day) -> sp.csr_matrix:
    """The relation as a sparse boolean matrix: ``M[i, j]`` iff j can follow i.

    Built in row chunks so that no dense n x n array is ever held.  O(n^2)
    comparisons (vectorised); meant for small and medium days, tools and tests.
    The solver itself uses :func:`prefix_index`.
    """
    n = day.n
    ready = day.end + day.settings.turnaround
    chunk = max(1, _CHUNK_CELLS // max(n, 1))
    rows, cols = [], []
    for a in range(0, n, chunk):
        b = min(n, a + chunk)
        arrive = ready[a:b, None] + day.travel[day.destination[a:b, None], day.origin[None, :]]
        ok = (arrive <= day.start[None, :]) & (day.vclass[a:b, None] == day.vclass[None, :])
        flat = np.flatnonzero(ok)
        rows.append(flat // n + a)
        cols.append(flat % n)
    r = np.concatenate(rows) if rows else np.zeros(0, np.int64)
    c = np.concatenate(cols) if cols else np.zeros(0, np.int64)
    return sp.csr_matrix((np.ones(len(r), dtype=bool), (r, c)), shape=(n, n))


def follow_slack(day: Day, i: int, j: int) -> int | None:
    """Seconds to spare when j follows i (negative: that many seconds short).

    ``None`` when the two jobs are of different vehicle classes.
    """
    if day.vclass[i] != day.vclass[j]:
        return None
    arrive = (day.end[i] + day.settings.turnaround
              + day.travel[day.destination[i], day.origin[j]])
    return int(day.start[j] - arrive)
