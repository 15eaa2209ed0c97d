"""Shortest paths with negative arc costs (no negative cycles): queue-based
Bellman-Ford (Bellman, "On a routing problem", Quart. Appl. Math. 16, 1958;
the FIFO queue variant is common practice).  Plain Python over numpy arrays so
numba can compile it; see :mod:`shipgui.core.least_deadhead`."""

from __future__ import annotations

import numpy as np

INF = np.int64(1) << np.int64(60)


def queue_bellman_ford(indptr, indices, weights, dist):
    """Relax from every node whose ``dist`` is finite, in place.

    Returns False if a negative cycle is found (a node relaxed n times).
    """
    n = indptr.shape[0] - 1
    queue = np.empty(n + 1, dtype=np.int64)
    in_queue = np.zeros(n, dtype=np.bool_)
    count = np.zeros(n, dtype=np.int64)
    head = 0
    tail = 0
    size = 0
    for v in range(n):
        if dist[v] < INF:
            queue[tail] = v
            tail = (tail + 1) % (n + 1)
            size += 1
            in_queue[v] = True
    while size > 0:
        u = queue[head]
        head = (head + 1) % (n + 1)
        size -= 1
        in_queue[u] = False
        du = dist[u]
        for k in range(indptr[u], indptr[u + 1]):
            v = indices[k]
            nd = du + weights[k]
            if nd < dist[v]:
                dist[v] = nd
                if not in_queue[v]:
                    count[v] += 1
                    if count[v] > n:
                        return False
                    queue[tail] = v
                    tail = (tail + 1) % (n + 1)
                    size += 1
                    in_queue[v] = True
    return True
