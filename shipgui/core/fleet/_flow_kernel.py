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
* :func:`violated_links`: the pricing step, over every compatible (job,
  group) pair without listing them.
* :func:`tighten_prices`: queue relaxation until every residual arc has a
  non-negative reduced cost (exact LP duals of an optimal flow).  Cost scaling
  also tries it, with bounded effort, after each phase once eps is small
  ("price refinement", Goldberg 1997, section 7): when it succeeds the flow is
  already optimal and the remaining phases are skipped.
* :func:`repair`: re-balance a few units after arcs were added, by primal-dual
  shortest paths from exact duals (Ahuja, Magnanti & Orlin, Network Flows,
  1993, section 9.8).  The trade-off uses it too: one unit of excess at the
  sink and one of demand at the source take one unit off the flow along a
  cheapest residual path, one step of successive shortest paths in reverse
  (Ahuja, Magnanti & Orlin 1993, section 9.7).
"""

from __future__ import annotations

from collections import namedtuple

import numpy as np

from .._jit import jit

# The residual network in CSR form; see the module docstring.
Residual = namedtuple("Residual", "first head rev cost")
# What the cost of linking group g before local job j is made of (seconds):
# travel[group_site[g], origin[j]] - pin[g] - pout[j]; latest[j, g] is the
# position the link leaves from (-1: no link), as in the prefix index.
LinkCosts = namedtuple("LinkCosts", "latest group_site origin travel pin pout")
# A binary min-heap of (key, node) pairs in two arrays.
Heap = namedtuple("Heap", "keys nodes")
# Nodes by distance: top[d] is the first node at distance d (-1: none); the
# others follow by after[v] (before[v] goes back), -1 ending the list.
Buckets = namedtuple("Buckets", "top after before")

INF = np.int64(1) << np.int64(62)
# What the long kernels return: done; the supplies cannot be routed; stopped
# because ``stop[0]`` was set (from another thread: the kernels release the GIL).
DONE, NO_ROUTE, STOPPED = 1, 0, -1
STOP_CHECK = 1023  # a kernel looks at its stop flag every 1 024 relabels or searches
# Effort of one try at exact prices between cost-scaling phases: up to this many
# times the nodes queued again (a failed try costs about that many passes over
# the arcs; a flow that is already optimal usually settles in far fewer).
_SETTLE_PASSES = 16
# Callers whose costs are scaled by ``scale`` pass ``settle = scale // SETTLE``:
# the tries start once eps is below 1/32 of a unit of the unscaled costs.
SETTLE = 32


@jit
def residual_slots(tail, head, nodes):
    """Where each arc and its reverse go in the residual network.

    Arc a (``tail[a]`` -> ``head[a]``) has slot ``slot[a]``, its reverse slot
    ``slot[len(tail) + a]``; slots are grouped by their own tail node, node u's
    from ``first[u]`` to ``first[u + 1]``, each group in arc order (forward
    arcs before reverses): what a stable sort by tail gives, by counting.
    ``rev[s]`` is the slot of the reverse of the arc in slot s.
    Returns (first, slot, rev).
    """
    count = tail.shape[0]
    first = np.zeros(nodes + 1, dtype=np.int64)
    for a in range(count):
        first[tail[a] + 1] += 1
        first[head[a] + 1] += 1
    for u in range(nodes):
        first[u + 1] += first[u]
    fill = first[:nodes].copy()
    slot = np.empty(2 * count, dtype=np.int64)
    for a in range(count):
        slot[a] = fill[tail[a]]
        fill[tail[a]] += 1
    for a in range(count):
        slot[count + a] = fill[head[a]]
        fill[head[a]] += 1
    rev = np.empty(2 * count, dtype=np.int64)
    for a in range(count):
        rev[slot[a]] = slot[count + a]
        rev[slot[count + a]] = slot[a]
    return first, slot, rev


@jit(inline=True)
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


@jit(inline=True)
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
def update_prices(net, cap, price, excess, eps, dist, done, buckets):
    """Global price update (Goldberg 1997, section 5): lower every price by eps
    times its distance to a node with a deficit, with arc lengths
    floor(reduced cost / eps) + 1.  Keeps eps-optimality and makes a shortest
    admissible path from every excess to a deficit.

    The lengths are small integers, so the search keeps one bucket of nodes per
    distance (Dial, "Algorithm 360: shortest-path forest with topological
    ordering", CACM 12(11), 1969) up to n; a node further away counts as far as
    the last node settled, as does every node left when all nodes with an
    excess are reached.
    """
    first, head, rev, cost = net.first, net.head, net.rev, net.cost
    n = first.shape[0] - 1
    top_bucket = buckets.top
    for d in range(n + 1):
        top_bucket[d] = -1
    waiting = 0  # nodes with an excess not yet reached
    for v in range(n):
        done[v] = False
        dist[v] = INF
        if excess[v] < 0:
            dist[v] = 0
            _bucket_add(buckets, v, 0)
        elif excess[v] > 0:
            waiting += 1
    top = 0
    d = 0
    while d <= n and waiting > 0:
        w = top_bucket[d]
        if w < 0:
            d += 1
            continue
        _bucket_remove(buckets, w, d)
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
                if nd < dist[v] and nd <= n:
                    if dist[v] <= n:
                        _bucket_remove(buckets, v, dist[v])
                    dist[v] = nd
                    _bucket_add(buckets, v, nd)
    for v in range(n):
        price[v] -= eps * (dist[v] if done[v] else top)


@jit(inline=True)
def _bucket_add(buckets, v, d):
    top, after, before = buckets.top, buckets.after, buckets.before
    after[v] = top[d]
    before[v] = -1
    if top[d] >= 0:
        before[top[d]] = v
    top[d] = v


@jit(inline=True)
def _bucket_remove(buckets, v, d):
    top, after, before = buckets.top, buckets.after, buckets.before
    if before[v] >= 0:
        after[before[v]] = after[v]
    else:
        top[d] = after[v]
    if after[v] >= 0:
        before[after[v]] = before[v]


@jit(inline=True)
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


@jit(inline=True)
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
def cost_scaling(net, cap, excess, price, eps, alpha, first_alpha, stop, reached, settle):
    """Route all ``excess`` (supplies > 0, demands < 0; sums to zero) at least cost.

    ``cap``, ``excess`` and ``price`` are changed in place (excess ends all
    zero).  The start must be ``eps``-optimal for ``price`` (eps <= 0: the
    largest absolute cost, right for any start with zero prices).  The first
    phase divides eps by ``first_alpha``, the others by ``alpha``; the last
    phase is the first with eps <= ``reached[0]`` (1: optimal), and ``reached[0]``
    is then set to that eps (the flow is eps-optimal for the prices).

    From the first phase ending with eps <= ``settle`` on (0: never), each
    phase is followed by an attempt, of bounded effort, to make the prices
    exact (:func:`tighten_prices`); when it succeeds the flow is optimal, the
    scaling ends there and ``reached[0]`` is set to 0.  Worth it when costs
    are multiples of a large scale: with eps far below it, only a cycle of
    very many arcs could still have a negative cost.

    Returns DONE, or NO_ROUTE when the supplies cannot be routed: then some
    price falls further than a refine can move it when a routing exists
    (Goldberg & Tarjan 1990: from an eps'-optimal start, by at most about
    (eps' + eps) * n), or STOPPED when ``stop[0]`` was set (the flow is then
    unusable).
    """
    first, head, rev, cost = net.first, net.head, net.rev, net.cost
    n = first.shape[0] - 1
    current = np.empty(n, dtype=np.int64)
    queue = np.empty(n, dtype=np.int64)
    in_queue = np.zeros(n, dtype=np.bool_)
    dist = np.empty(n, dtype=np.int64)
    done = np.empty(n, dtype=np.bool_)
    floor = np.empty(n, dtype=np.int64)
    trial = np.empty(n, dtype=np.int64)
    buckets = Buckets(np.empty(n + 1, dtype=np.int64), np.empty(n, dtype=np.int64),
                      np.empty(n, dtype=np.int64))
    if eps <= 0:  # zero prices: any flow is eps-optimal for the largest |cost|
        eps = np.int64(1)
        for a in range(cost.shape[0]):
            c = cost[a] if cost[a] >= 0 else -cost[a]
            if c > eps:
                eps = c
    divide = first_alpha
    while True:
        if stop[0] != 0:
            return STOPPED
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
        update_prices(net, cap, price, excess, eps, dist, done, buckets)
        for u in range(n):
            floor[u] = price[u] - (start_eps + 2 * eps) * (n + 1)
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
                    return NO_ROUTE
                current[u] = first[u]
                relabels += 1
                if relabels & STOP_CHECK == 0 and stop[0] != 0:
                    return STOPPED
                if relabels >= n:
                    update_prices(net, cap, price, excess, eps, dist, done, buckets)
                    relabels = 0
                    for w in range(n):
                        current[w] = first[w]
        if eps <= reached[0]:
            break
        if eps <= settle:
            for u in range(n):
                trial[u] = price[u]
            if _lower_prices(net, cap, trial, _SETTLE_PASSES * n, stop):
                for u in range(n):
                    price[u] = trial[u]
                reached[0] = 0
                return DONE
            if stop[0] != 0:
                return STOPPED
    reached[0] = eps
    return DONE


@jit
def tighten_prices(net, cap, price):
    """Lower prices until no residual arc has a negative reduced cost, in place.

    Returns False if that is impossible (a negative cycle: the flow is not optimal).
    """
    return _lower_prices(net, cap, price, -1, np.zeros(1, dtype=np.int64))


@jit(inline=True)
def _lower_prices(net, cap, price, effort, stop):
    """:func:`tighten_prices`; with ``effort`` >= 0 it also gives up (False, the
    prices half changed) after that many nodes were queued again, or when
    ``stop[0]`` is set."""
    first, head, cost = net.first, net.head, net.cost
    n = first.shape[0] - 1
    queue = np.empty(n, dtype=np.int64)
    in_queue = np.ones(n, dtype=np.bool_)
    count = np.zeros(n, dtype=np.int64)
    for u in range(n):
        queue[u] = u
    qh = 0
    size = n
    requeued = 0
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
                        requeued += 1
                        if count[v] > n or requeued == effort:
                            return False
                        if requeued & STOP_CHECK == 0 and stop[0] != 0:
                            return False
                        queue[(qh + size) % n] = v
                        size += 1
                        in_queue[v] = True
    return True


@jit(inline=True)
def _dijkstra(net, cap, price, dist, via, heap, size, target, excess, stop):
    """Dijkstra on reduced costs from the nodes already in the heap (``size``
    of them, their ``dist`` set), until it settles ``target`` or, when target
    is -1, the first node with a negative ``excess``.  Fills dist and via (the
    arc into each node); returns the node reached, -1 if none, -2 when
    ``stop[0]`` was set."""
    first, head, cost = net.first, net.head, net.cost
    n = first.shape[0] - 1
    done = np.zeros(n, dtype=np.bool_)
    settled = 0
    while size > 0:
        d = heap.keys[0]
        u = heap.nodes[0]
        size = _heap_pop(heap, size)
        if done[u]:
            continue
        done[u] = True
        settled += 1
        if settled & STOP_CHECK == 0 and stop[0] != 0:
            return -2
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


@jit(inline=True)
def _raise_prices(price, dist, reach):
    """Add each node's distance, capped at ``reach``, to its price: reduced
    costs stay >= 0 and those on shortest paths become 0."""
    for v in range(price.shape[0]):
        price[v] += dist[v] if dist[v] < reach else reach


@jit
def repair(net, cap, price, excess, stop):
    """Route every excess to a deficit along shortest paths, in place.

    Primal-dual: a Dijkstra from all excesses to the nearest deficit updates
    the prices, then depth-first searches push as many units as they can along
    arcs of zero reduced cost (Ahuja, Magnanti & Orlin 1993, section 9.8).
    Needs reduced costs >= 0 on residual arcs and keeps them so, so the result
    is optimal.  Cheap when few units are out of balance.  Returns DONE,
    NO_ROUTE when some excess cannot reach a deficit, or STOPPED when
    ``stop[0]`` was set.
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
        if stop[0] != 0:
            return STOPPED
        size = 0
        for v in range(n):
            dist[v] = INF
            if excess[v] > 0:
                dist[v] = 0
                size = _heap_push(heap, size, np.int64(0), v)
        if size == 0:
            return DONE
        target = _dijkstra(net, cap, price, dist, via, heap, size, -1, excess, stop)
        if target == -2:
            return STOPPED
        if target < 0:
            return NO_ROUTE
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


@jit(inline=True)
def _link_reduced_cost(links, price, scale, m, j, g, q):
    cost = links.travel[links.group_site[g], links.origin[j]] - links.pin[g] - links.pout[j]
    return cost * scale + price[q] - price[m + j]


@jit
def violated_links(links, allowed, price, scale, margin_percent):
    """Link arcs left out (``allowed`` false) whose reduced cost under ``price``
    is negative: returns (largest violation, how many, keys j * G + g of those
    and of the near misses within ``margin_percent`` of the largest).  Right
    copy j is node m + j, as in the network; costs are multiplied by ``scale``."""
    latest = links.latest
    m, n_groups = latest.shape
    worst = np.int64(0)
    count = 0
    for j in range(m):
        for g in range(n_groups):
            q = latest[j, g]
            if q >= 0 and not allowed[j, g]:
                rc = _link_reduced_cost(links, price, scale, m, j, g, q)
                if rc < 0:
                    count += 1
                    if -rc > worst:
                        worst = -rc
    if count == 0:
        return worst, count, np.empty(0, dtype=np.int64)
    margin = worst * margin_percent // 100
    taken = 0
    for step in range(2):  # count, then fill
        keys = np.empty(taken, dtype=np.int64)
        taken = 0
        for j in range(m):
            for g in range(n_groups):
                q = latest[j, g]
                if q >= 0 and not allowed[j, g]:
                    if _link_reduced_cost(links, price, scale, m, j, g, q) < margin:
                        if step == 1:
                            keys[taken] = j * n_groups + g
                        taken += 1
    return worst, count, keys
