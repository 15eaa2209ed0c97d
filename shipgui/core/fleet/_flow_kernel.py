"""Minimum-cost flow kernels on a residual graph in CSR form.

Compiled by numba where they are defined (:mod:`.._jit`; plain Python with
``NUMBA_DISABLE_JIT=1``); :mod:`.least_deadhead` builds the network.  The
network is a :data:`Residual` record: every arc slot ``a`` of node ``u``
(``first[u] <= a < first[u + 1]``) has a ``head``, a ``cost`` and the slot of
its reverse ``rev[a]`` (with cost ``-cost[a]``).  The flow's state, the
residual capacity ``cap[a]`` and the node prices, travels beside it.  Prices
are distance-like: the reduced cost of slot a from u to v is
``cost[a] + price[u] - price[v]``.

* :func:`cost_scaling`: push-relabel successive approximation (Goldberg &
  Tarjan, "Finding minimum-cost circulations by successive approximation",
  Math. Oper. Res. 15(3), 1990; FIFO discharge and the relabel rule as in
  Goldberg, "An efficient implementation of a scaling minimum-cost flow
  algorithm", J. Algorithms 22, 1997).  With costs multiplied by more than the
  number of nodes, a 1-optimal flow is optimal (Goldberg & Tarjan 1990, Thm 3.3
  in their numbering: epsilon < 1/n implies optimality for integer costs).
* :func:`tighten_prices`: queue relaxation until every residual arc has a
  non-negative reduced cost (exact LP duals of an optimal flow).
* :func:`repair`: re-balance a few units after arcs were added, by primal-dual
  shortest paths from exact duals (Ahuja, Magnanti & Orlin, Network Flows,
  1993, section 9.8).
* :func:`cancel_one_unit`: one step of successive shortest paths in reverse:
  take one unit off the flow from ``source`` to ``sink`` at least extra cost
  (Dijkstra on reduced costs; Ahuja, Magnanti & Orlin 1993, section 9.7).
"""

from __future__ import annotations

from collections import namedtuple

import numpy as np

from .._jit import jit

# The residual network in CSR form; see the module docstring.
Residual = namedtuple("Residual", "first head rev cost")
# A binary min-heap of (key, node) pairs in two arrays.
Heap = namedtuple("Heap", "keys nodes")

INF = np.int64(1) << np.int64(62)


@jit
def _heap_push(heap, size, key, node):
    """Binary min-heap of (key, node) pairs, ties by node (a deterministic order)."""
    keys, nodes = heap.keys, heap.nodes
    i = size
    while i > 0:
        parent = (i - 1) >> 1
        if keys[parent] < key or (keys[parent] == key and nodes[parent] <= node):
            break
        keys[i] = keys[parent]
        nodes[i] = nodes[parent]
        i = parent
    keys[i] = key
    nodes[i] = node
    return size + 1


@jit
def _heap_pop(heap, size):
    """Remove the top of the heap (read it from keys[0], nodes[0] first)."""
    keys, nodes = heap.keys, heap.nodes
    size -= 1
    key = keys[size]
    node = nodes[size]
    i = 0
    while True:
        child = 2 * i + 1
        if child >= size:
            break
        if child + 1 < size and (keys[child + 1] < keys[child] or (
                keys[child + 1] == keys[child] and nodes[child + 1] < nodes[child])):
            child += 1
        if key < keys[child] or (key == keys[child] and node <= nodes[child]):
            break
        keys[i] = keys[child]
        nodes[i] = nodes[child]
        i = child
    keys[i] = key
    nodes[i] = node
    return size


@jit
def update_prices(net, cap, price, excess, eps, dist, done, heap):
    """Global price update (Goldberg 1997, section 5): lower every price by eps
    times its distance to a node with a deficit, with arc lengths
    floor(reduced cost / eps) + 1.  Keeps eps-optimality and makes a shortest
    admissible path from every excess to a deficit.  The search stops once
    every node with an excess is reached; the rest count as that far away."""
    first, head, rev, cost = net.first, net.head, net.rev, net.cost
    n = first.shape[0] - 1
    size = 0
    waiting = 0  # nodes with an excess not yet reached
    for v in range(n):
        done[v] = False
        dist[v] = INF
        if excess[v] < 0:
            dist[v] = 0
            size = _heap_push(heap, size, np.int64(0), v)
        elif excess[v] > 0:
            waiting += 1
    top = np.int64(0)
    while size > 0 and waiting > 0:
        d = heap.keys[0]
        w = heap.nodes[0]
        size = _heap_pop(heap, size)
        if done[w]:
            continue
        done[w] = True
        top = d
        if excess[w] > 0:
            waiting -= 1
        pw = price[w]
        for b in range(first[w], first[w + 1]):
            a = rev[b]
            if cap[a] > 0:
                v = head[b]
                if done[v]:
                    continue
                step = (cost[a] + price[v] - pw) // eps + 1
                if step < 0:
                    step = 0
                nd = d + step
                if nd < dist[v]:
                    dist[v] = nd
                    size = _heap_push(heap, size, nd, v)
    for v in range(n):
        price[v] -= eps * (dist[v] if done[v] else top)


@jit
def _relabel(net, cap, price, u, eps):
    """Lower u's price just enough for one residual arc to become admissible
    (reduced cost -eps).  False if u has no residual arc at all."""
    first, head, cost = net.first, net.head, net.cost
    best = -INF
    for b in range(first[u], first[u + 1]):
        if cap[b] > 0:
            val = price[head[b]] - cost[b]
            if val > best:
                best = val
    if best == -INF:
        return False
    price[u] = best - eps
    return True


@jit
def _has_admissible(net, cap, price, current, v):
    """Advance v's current arc to its next admissible arc; False if none is left."""
    first, head, cost = net.first, net.head, net.cost
    pv = price[v]
    b = current[v]
    end = first[v + 1]
    while b < end:
        if cap[b] > 0 and cost[b] + pv - price[head[b]] < 0:
            break
        b += 1
    current[v] = b
    return b < end


@jit
def cost_scaling(net, cap, excess, price, eps, alpha, first_alpha):
    """Route all ``excess`` (supplies > 0, demands < 0; sums to zero) at least cost.

    ``cap``, ``excess`` and ``price`` are changed in place (excess ends all
    zero).  The start must be ``eps``-optimal for ``price`` (eps <= 0: the
    largest absolute cost, right for any start with zero prices).  The first
    phase divides eps by ``first_alpha``, the others by ``alpha``.  Returns
    False when the supplies cannot be routed: then some price falls further
    than a refine can move it when a routing exists (Goldberg & Tarjan 1990:
    from an eps'-optimal start, by at most about (eps' + eps) * n).
    """
    first, head, rev, cost = net.first, net.head, net.rev, net.cost
    n = first.shape[0] - 1
    current = np.empty(n, dtype=np.int64)
    queue = np.empty(n, dtype=np.int64)
    in_queue = np.zeros(n, dtype=np.bool_)
    dist = np.empty(n, dtype=np.int64)
    done = np.empty(n, dtype=np.bool_)
    heap = Heap(np.empty(cap.shape[0] + n + 1, dtype=np.int64),
                np.empty(cap.shape[0] + n + 1, dtype=np.int64))
    if eps <= 0:  # zero prices: any flow is eps-optimal for the largest |cost|
        eps = np.int64(1)
        for a in range(cost.shape[0]):
            c = cost[a] if cost[a] >= 0 else -cost[a]
            if c > eps:
                eps = c
    divide = first_alpha
    while True:
        start_eps = eps  # the flow is start_eps-optimal now
        eps = max(np.int64(1), eps // divide)
        divide = alpha
        # Saturate every residual arc of negative reduced cost: the flow becomes
        # 0-optimal and the imbalance shows up as excesses.
        for u in range(n):
            pu = price[u]
            for a in range(first[u], first[u + 1]):
                if cap[a] > 0:
                    v = head[a]
                    if cost[a] + pu - price[v] < 0:
                        d = cap[a]
                        excess[u] -= d
                        excess[v] += d
                        cap[rev[a]] += d
                        cap[a] = 0
        update_prices(net, cap, price, excess, eps, dist, done, heap)
        floor = price - (start_eps + 2 * eps) * (n + 1)
        relabels = 0
        qh = 0
        size = 0
        for u in range(n):
            current[u] = first[u]
            if excess[u] > 0:
                queue[(qh + size) % n] = u
                size += 1
                in_queue[u] = True
        while size > 0:
            u = queue[qh]
            qh = (qh + 1) % n
            size -= 1
            in_queue[u] = False
            while excess[u] > 0:
                a = current[u]
                end = first[u + 1]
                pu = price[u]
                while a < end:
                    if cap[a] > 0:
                        v = head[a]
                        if cost[a] + pu - price[v] < 0 and excess[v] >= 0 and \
                                not _has_admissible(net, cap, price, current, v):
                            # Push look-ahead (Goldberg 1997, section 6): v could not
                            # pass the flow on, so relabel v first and look again.
                            if _relabel(net, cap, price, v, eps):
                                current[v] = first[v]
                                relabels += 1
                        if cost[a] + pu - price[v] < 0:
                            d = excess[u] if excess[u] < cap[a] else cap[a]
                            cap[a] -= d
                            cap[rev[a]] += d
                            excess[u] -= d
                            excess[v] += d
                            if excess[v] > 0 and not in_queue[v]:
                                queue[(qh + size) % n] = v
                                size += 1
                                in_queue[v] = True
                            if excess[u] == 0:
                                break
                    a += 1
                if excess[u] == 0:
                    current[u] = a
                    break
                if not _relabel(net, cap, price, u, eps) or price[u] < floor[u]:
                    return False
                current[u] = first[u]
                relabels += 1
                if relabels >= n:
                    update_prices(net, cap, price, excess, eps, dist, done, heap)
                    relabels = 0
                    for w in range(n):
                        current[w] = first[w]
        if eps == 1:
            break
    return True


@jit
def tighten_prices(net, cap, price):
    """Lower prices until no residual arc has a negative reduced cost, in place.

    Returns False if that is impossible (a negative cycle: the flow is not optimal).
    """
    first, head, cost = net.first, net.head, net.cost
    n = first.shape[0] - 1
    queue = np.empty(n, dtype=np.int64)
    in_queue = np.ones(n, dtype=np.bool_)
    count = np.zeros(n, dtype=np.int64)
    for u in range(n):
        queue[u] = u
    qh = 0
    size = n
    while size > 0:
        u = queue[qh]
        qh = (qh + 1) % n
        size -= 1
        in_queue[u] = False
        pu = price[u]
        for a in range(first[u], first[u + 1]):
            if cap[a] > 0:
                v = head[a]
                if pu + cost[a] < price[v]:
                    price[v] = pu + cost[a]
                    if not in_queue[v]:
                        count[v] += 1
                        if count[v] > n:
                            return False
                        queue[(qh + size) % n] = v
                        size += 1
                        in_queue[v] = True
    return True


@jit
def _dijkstra(net, cap, price, dist, via, heap, size, target, excess):
    """Dijkstra on reduced costs from the nodes already in the heap (``size``
    of them, their ``dist`` set), until it settles ``target`` or, when target
    is -1, the first node with a negative ``excess``.  Fills dist and via (the
    arc into each node); returns the node reached, or -1."""
    first, head, cost = net.first, net.head, net.cost
    n = first.shape[0] - 1
    done = np.zeros(n, dtype=np.bool_)
    while size > 0:
        d = heap.keys[0]
        u = heap.nodes[0]
        size = _heap_pop(heap, size)
        if done[u]:
            continue
        done[u] = True
        if u == target or (target < 0 and excess[u] < 0):
            return u
        pu = price[u]
        for a in range(first[u], first[u + 1]):
            if cap[a] > 0:
                v = head[a]
                nd = d + cost[a] + pu - price[v]
                if nd < dist[v]:
                    dist[v] = nd
                    via[v] = a
                    size = _heap_push(heap, size, nd, v)
    return -1


@jit
def _raise_prices(price, dist, reach):
    """Add each node's distance, capped at ``reach``, to its price: reduced
    costs stay >= 0 and those on shortest paths become 0."""
    for v in range(price.shape[0]):
        price[v] += dist[v] if dist[v] < reach else reach


@jit
def cancel_one_unit(net, cap, price, source, sink):
    """Send one unit from ``sink`` back to ``source`` along a cheapest residual path.

    Needs reduced costs >= 0 on residual arcs (see :func:`tighten_prices`) and
    keeps them so.  Returns the path's cost, or INF when there is no path.
    """
    first, head, rev, cost = net.first, net.head, net.rev, net.cost
    n = first.shape[0] - 1
    dist = np.full(n, INF, dtype=np.int64)
    via = np.full(n, -1, dtype=np.int64)
    heap = Heap(np.empty(cap.shape[0] + 1, dtype=np.int64),
                np.empty(cap.shape[0] + 1, dtype=np.int64))
    size = _heap_push(heap, 0, np.int64(0), sink)
    dist[sink] = 0
    no_excess = np.zeros(0, dtype=np.int64)  # not read: the search stops at source
    if _dijkstra(net, cap, price, dist, via, heap, size, source, no_excess) < 0:
        return INF
    path_cost = np.int64(0)
    v = source
    while v != sink:
        a = via[v]
        cap[a] -= 1
        cap[rev[a]] += 1
        path_cost += cost[a]
        v = head[rev[a]]
    _raise_prices(price, dist, dist[source])
    return path_cost


@jit
def repair(net, cap, price, excess):
    """Route every excess to a deficit along shortest paths, in place.

    Primal-dual: a Dijkstra from all excesses to the nearest deficit updates
    the prices, then depth-first searches push as many units as they can along
    arcs of zero reduced cost (Ahuja, Magnanti & Orlin 1993, section 9.8).
    Needs reduced costs >= 0 on residual arcs and keeps them so, so the result
    is optimal.  Cheap when few units are out of balance.  Returns False if
    some excess cannot reach a deficit.
    """
    first, head, rev, cost = net.first, net.head, net.rev, net.cost
    n = first.shape[0] - 1
    dist = np.empty(n, dtype=np.int64)
    via = np.empty(n, dtype=np.int64)
    dead = np.empty(n, dtype=np.bool_)
    on_path = np.zeros(n, dtype=np.bool_)
    current = np.empty(n, dtype=np.int64)
    path = np.empty(n, dtype=np.int64)  # arcs of the search path
    stack = np.empty(n + 1, dtype=np.int64)  # nodes of the search path
    heap = Heap(np.empty(cap.shape[0] + n + 1, dtype=np.int64),
                np.empty(cap.shape[0] + n + 1, dtype=np.int64))
    while True:
        size = 0
        for v in range(n):
            dist[v] = INF
            if excess[v] > 0:
                dist[v] = 0
                size = _heap_push(heap, size, np.int64(0), v)
        if size == 0:
            return True
        target = _dijkstra(net, cap, price, dist, via, heap, size, -1, excess)
        if target < 0:
            return False
        _raise_prices(price, dist, dist[target])
        for v in range(n):
            current[v] = first[v]
            dead[v] = False
        # Push along zero-reduced-cost arcs from every excess while paths remain.
        for s in range(n):
            while excess[s] > 0 and not dead[s]:
                top = 0
                stack[0] = s
                on_path[s] = True
                found = False
                while top >= 0:
                    u = stack[top]
                    if u != s and excess[u] < 0:
                        found = True
                        break
                    pu = price[u]
                    moved = False
                    while current[u] < first[u + 1]:
                        a = current[u]
                        v = head[a]
                        if cap[a] > 0 and not dead[v] and not on_path[v] \
                                and cost[a] + pu - price[v] == 0:
                            path[top] = a
                            top += 1
                            stack[top] = v
                            on_path[v] = True
                            moved = True
                            break
                        current[u] += 1
                    if not moved:
                        dead[u] = True
                        on_path[u] = False
                        top -= 1
                        if top >= 0:
                            current[stack[top]] += 1
                if not found:
                    break
                t = stack[top]
                delta = excess[s] if excess[s] < -excess[t] else -excess[t]
                for k in range(top):
                    if cap[path[k]] < delta:
                        delta = cap[path[k]]
                for k in range(top):
                    cap[path[k]] -= delta
                    cap[rev[path[k]]] += delta
                excess[s] -= delta
                excess[t] += delta
                for k in range(top + 1):
                    on_path[stack[k]] = False
