"""Hopcroft-Karp maximum matching on the prefix form of the relation.

Hopcroft & Karp, "An n^(5/2) algorithm for maximum matchings in bipartite
graphs", SIAM J. Computing 2(4), 1973.  Left copy i, right copy j, edge when j
can follow i.  Searches start from free right copies (jobs that begin a chain).

Because a right copy's neighbours in one destination group are a prefix of
that group's positions, a breadth-first layer occupies a contiguous range of
positions in every group, and the depth-first step keeps one pointer per
(layer, group): every left copy is tried at most once per phase, so a phase
costs O(m * G) without ever listing the edges.

The searches are compiled by numba where they are defined (:mod:`.._jit`);
with ``NUMBA_DISABLE_JIT=1`` or without numba they run as plain Python.  The
loop over phases stays in Python (a handful of calls): compiling it as well
would double the first start's compile time of this module for nothing.
"""

from __future__ import annotations

from collections import namedtuple

import numpy as np

from .._jit import jit

# The relation of one class in prefix form (see PrefixIndex): positions sorted
# by (destination group, ready time), group bounds, and latest[j, g].
Prefixes = namedtuple("Prefixes", "order group_start latest")
# The matching, kept both ways: succ[left] = right, pred[right] = left (-1: none).
Links = namedtuple("Links", "succ pred")
# What the greedy start needs to rank candidates: ready time per position, the
# site of each group, the closed travel matrix, each job's origin site, and the
# right copies in start order.
Fit = namedtuple("Fit", "ready_pos group_site travel origin right_order")


def hk_match(prefixes, links):
    """Grow the matching (succ[left] = right, pred[right] = left) to maximum, in place.

    Returns (reached_left_by_position, reached_right) of the final search,
    from which the certificate follows (König's theorem).
    """
    while True:
        bounds, last_layer, reached_pos, reached_right = _bfs(prefixes, links)
        if last_layer < 0:
            return reached_pos, reached_right
        _dfs_phase(prefixes, links, bounds, last_layer)


@jit
def _bfs(prefixes, links):
    """Layered search from all free right copies.

    bounds[L, g] is the last position of group g reached by layer L (layer 0
    reaches nothing: bounds[0, g] = group_start[g] - 1).  Returns last_layer = -1
    when no free left copy is reachable (the matching is maximum).
    """
    order, group_start, latest = prefixes.order, prefixes.group_start, prefixes.latest
    succ, pred = links.succ, links.pred
    m = order.shape[0]
    n_groups = latest.shape[1]
    cap = 64
    bounds = np.empty((cap, n_groups), dtype=np.int64)
    hi = np.empty(n_groups, dtype=np.int64)
    for g in range(n_groups):
        bounds[0, g] = group_start[g] - 1
        hi[g] = group_start[g] - 1
    reached_pos = np.zeros(m, dtype=np.bool_)
    reached_right = np.zeros(m, dtype=np.bool_)
    frontier = np.empty(m, dtype=np.int64)
    size = 0
    for j in range(m):
        if pred[j] < 0:
            frontier[size] = j
            size += 1
            reached_right[j] = True
    nxt = np.empty(m, dtype=np.int64)
    layer = 0
    found = False
    while size > 0 and not found:
        layer += 1
        if layer >= cap:
            bounds = _grown(bounds, cap * 2)
            cap *= 2
        nsize = 0
        for k in range(size):
            j = frontier[k]
            for g in range(n_groups):
                p = latest[j, g]
                if p > hi[g]:
                    for q in range(hi[g] + 1, p + 1):
                        reached_pos[q] = True
                        i = order[q]
                        r = succ[i]
                        if r < 0:
                            found = True
                        elif not reached_right[r]:
                            reached_right[r] = True
                            nxt[nsize] = r
                            nsize += 1
                    hi[g] = p
        for g in range(n_groups):
            bounds[layer, g] = hi[g]
        frontier, nxt = nxt, frontier
        size = nsize
    if not found:
        return bounds, -1, reached_pos, reached_right
    return bounds, layer, reached_pos, reached_right


@jit(inline=True)
def _grown(bounds, rows):
    """A copy of ``bounds`` with room for ``rows`` layers."""
    grown = np.empty((rows, bounds.shape[1]), dtype=np.int64)
    for r in range(bounds.shape[0]):
        for g in range(bounds.shape[1]):
            grown[r, g] = bounds[r, g]
    return grown


@jit
def _dfs_phase(prefixes, links, bounds, last_layer):
    """Find a maximal set of disjoint shortest augmenting paths and flip them."""
    order, latest = prefixes.order, prefixes.latest
    succ, pred = links.succ, links.pred
    m = order.shape[0]
    n_groups = latest.shape[1]
    cur = np.empty((last_layer + 1, n_groups), dtype=np.int64)
    for L in range(1, last_layer + 1):
        for g in range(n_groups):
            cur[L, g] = bounds[L - 1, g] + 1
    stack_right = np.empty(last_layer + 1, dtype=np.int64)
    stack_pos = np.empty(last_layer + 1, dtype=np.int64)
    stack_group = np.empty(last_layer + 1, dtype=np.int64)
    for root in range(m):
        if pred[root] >= 0:
            continue
        depth = 0
        stack_right[0] = root
        stack_group[0] = 0
        while depth >= 0:
            j = stack_right[depth]
            layer = depth + 1
            q = -1
            g = stack_group[depth]
            while g < n_groups:
                limit = min(latest[j, g], bounds[layer, g])
                c = cur[layer, g]
                if c <= limit:
                    q = c
                    cur[layer, g] = c + 1
                    break
                g += 1
            stack_group[depth] = g
            if q < 0:
                depth -= 1  # dead end: this right copy is exhausted for the phase
                continue
            i = order[q]
            if layer == last_layer:
                if succ[i] < 0:
                    stack_pos[depth] = q
                    for d in range(depth + 1):
                        left = order[stack_pos[d]]
                        right = stack_right[d]
                        succ[left] = right
                        pred[right] = left
                    break
                continue
            stack_pos[depth] = q
            depth += 1
            stack_right[depth] = succ[i]
            stack_group[depth] = 0


@jit
def greedy_start(prefixes, links, fit):
    """A good first matching, so that few augmenting phases remain.

    Right copies are taken in start order; each takes, among its groups, the
    free left copy that arrives at its origin latest (tightest fit, least
    idle time).  A "latest free position" union-find finds that left copy of
    a group in near-constant time (Tarjan, "Efficiency of a good but not
    linear set union algorithm", JACM 22(2), 1975).
    """
    order, group_start, latest = prefixes.order, prefixes.group_start, prefixes.latest
    succ, pred = links.succ, links.pred
    ready_pos, group_site, travel, origin = fit.ready_pos, fit.group_site, fit.travel, fit.origin
    right_order = fit.right_order
    m = order.shape[0]
    n_groups = latest.shape[1]
    # parent[q + 1] leads to 1 + the latest free position <= q (0: none left).
    parent = np.empty(m + 1, dtype=np.int64)
    for q in range(m + 1):
        parent[q] = q
    for k in range(m):
        j = right_order[k]
        best_q = -1
        best_arrival = -1
        for g in range(n_groups):
            p = latest[j, g]
            if p < 0:
                continue
            q = _find(parent, p + 1) - 1
            if q < group_start[g]:
                continue
            arrival = ready_pos[q] + travel[group_site[g], origin[j]]
            if arrival > best_arrival:
                best_arrival = arrival
                best_q = q
        if best_q >= 0:
            i = order[best_q]
            succ[i] = j
            pred[j] = i
            parent[best_q + 1] = best_q


@jit(inline=True)
def _find(parent, x):
    root = x
    while parent[root] != root:
        root = parent[root]
    while parent[x] != root:
        nxt = parent[x]
        parent[x] = root
        x = nxt
    return root
