"""The heaviest chain ending at each job, in prefix form (compiled by numba where
defined; plain Python with ``NUMBA_DISABLE_JIT=1``).

``h[j] = weight[j] + max(0, max over jobs i that j can follow of h[i])``: the
longest-path labelling of the order (for unit weights the level of Mirsky,
"A dual of Dilworth's decomposition theorem", American Mathematical Monthly
78(8), 1971).  Jobs are taken in start order (a job a vehicle can do before j
starts before j), and each destination group keeps a Fenwick tree of prefix
maxima over its positions (Fenwick, "A new data structure for cumulative
frequency tables", Software: Practice and Experience 24(3), 1994), so a job
reads the best of each prefix it can follow in O(log m): O(m * G * log m) in all.
"""

from __future__ import annotations

import numpy as np

from .._jit import jit

__all__ = ["heaviest_ending"]


@jit
def _prefix_max(tree, base, i):
    best = np.int64(0)
    while i > 0:
        if tree[base + i] > best:
            best = tree[base + i]
        i -= i & -i
    return best


@jit
def _raise_to(tree, base, size, i, value):
    while i <= size:
        if tree[base + i] < value:
            tree[base + i] = value
        i += i & -i


@jit
def heaviest_ending(group_start, latest, position, by_start, weight, out):
    """Fill ``out[j]`` (local jobs) with the heaviest chain ending at j.

    ``position[j]`` is j's position (sorted by destination group, then ready
    time), ``latest[j, g]`` the last position of group g that j can follow (-1:
    none), ``by_start`` the local jobs in start order, ``weight`` >= 0.
    """
    m = position.shape[0]
    groups = group_start.shape[0] - 1
    tree = np.zeros(m + groups + 1, dtype=np.int64)
    group_of = np.empty(m, dtype=np.int64)
    for g in range(groups):
        for p in range(group_start[g], group_start[g + 1]):
            group_of[p] = g
    for t in range(m):
        j = by_start[t]
        best = np.int64(0)
        for g in range(groups):
            q = latest[j, g]
            if q >= 0:
                value = _prefix_max(tree, group_start[g] + g, q - group_start[g] + 1)
                if value > best:
                    best = value
        h = weight[j] + best
        out[j] = h
        p = position[j]
        g = group_of[p]
        _raise_to(tree, group_start[g] + g, group_start[g + 1] - group_start[g],
                  p - group_start[g] + 1, h)
