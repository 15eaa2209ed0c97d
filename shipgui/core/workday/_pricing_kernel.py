"""The heaviest route within the working-day limit, for every possible first job.

Pricing step of the column generation (:mod:`.columns`): given a weight per job
(the covering LP's duals), find for each first job f the route of most total
weight that starts with f, links jobs that can follow each other, and ends
with a job l with ``back[l] - leave[f] <= limit``.  Jobs of weight zero never
help (:mod:`.problem`), so the caller passes only the "active" jobs.

For one f the route is a longest path in a DAG, found by one sweep in time
order (Desrosiers, Dumas, Solomon & Soumis, "Time constrained routing and
scheduling", Handbooks in OR & MS 8, 1995, for pricing by dynamic programming
over time):

* jobs are finalised in start order: ``best[k]`` = weight of k plus the best
  route ending just before k;
* a job becomes a possible predecessor at its ready time; per destination
  group the "ready" jobs form a prefix of the group's positions (sorted by
  ready time), so a running maximum per group, written at each position,
  answers "best route ending at any job of group g that k can follow" with one
  look-up at ``latest[k, g]`` (the prefix form of the relation, see
  :class:`~shipgui.core.fleet.precedence.PrefixIndex`).

A sweep costs O(w * G) for a window of w jobs and G groups, never listing
pairs.  Branching rules of :mod:`.branch` are honoured through per-job flags,
forced predecessors and forbidden predecessors (the latter by a slow scan of
one group, rare).  With ``lam > 0`` every route also pays ``lam`` times its
empty driving (drives between jobs, pull-out and pull-in), for the second
phase that looks for less empty driving.
"""

from __future__ import annotations

from collections import namedtuple

import numpy as np

from .._jit import jit

__all__ = ["ActiveJobs", "Rules", "LinkCosts", "price_routes", "NO_FIRST", "NO_LAST",
           "NO_PRED", "NO_SUCC", "NEG"]

NO_FIRST = 1  # the job never starts a route
NO_LAST = 2  # the job never ends a route
NO_PRED = 4  # nothing comes before the job
NO_SUCC = 8  # nothing comes after the job through the groups

NEG = -1e300

# The active jobs, numbered 0..A-1 in start order.  Positions sort them by
# (destination group, ready time): job_at[p], group_of[p], pos_of[k];
# ins_order lists positions by ready time (stable, so positions of one group
# come in order); latest[k, g] is the last position of group g that k can
# follow, or -1.
ActiveJobs = namedtuple("ActiveJobs", "start ready leave back latest job_at group_of "
                                      "group_start pos_of ins_order ins_ready")
# Branching rules: flags per job (NO_* bits), forced predecessor (-1: none),
# forbidden predecessors in CSR form (ptr, idx).
Rules = namedtuple("Rules", "flags forced_pred forbid_ptr forbid_idx")
# Empty driving priced in (lam > 0): link[k, g] from group g's site to k's
# origin, pull_out[k], pull_in[k]; all in the weight's units.
LinkCosts = namedtuple("LinkCosts", "lam link pull_out pull_in")


@jit
def _forbidden(rules, k, i):
    for t in range(rules.forbid_ptr[k], rules.forbid_ptr[k + 1]):
        if rules.forbid_idx[t] == i:
            return True
    return False


@jit
def _scan_group(jobs, rules, k, g, q, best, stamp, token):
    """Best allowed predecessor of k among positions of group g up to q (slow path)."""
    value = NEG
    arg = -1
    for p in range(jobs.group_start[g], q + 1):
        i = jobs.job_at[p]
        if stamp[i] != token or best[i] <= NEG or (rules.flags[i] & NO_SUCC) != 0:
            continue
        if _forbidden(rules, k, i):
            continue
        if best[i] > value:
            value = best[i]
            arg = i
    return value, arg


@jit
def price_routes(jobs, weight, limit, rules, costs, firsts, threshold, heaviest,
                 route_ptr, route_buf):
    """Heaviest route from each job in ``firsts``; returns how many routes were written.

    ``heaviest[t]`` gets the weight of the heaviest route starting with
    ``firsts[t]`` (NEG if that job may not start a route).  Routes heavier
    than ``threshold`` are written to ``route_buf`` (active job numbers, in
    order) with ``route_ptr`` as offsets, as long as the buffer has room.
    """
    a_count = jobs.start.shape[0]
    n_groups = jobs.latest.shape[1]
    best = np.full(a_count, NEG)
    pred = np.full(a_count, -1, dtype=np.int64)
    stamp = np.full(a_count, -1, dtype=np.int64)
    pm = np.full(a_count, NEG)
    pm_arg = np.full(a_count, -1, dtype=np.int64)
    pm_stamp = np.full(a_count, -1, dtype=np.int64)
    cur = np.full(n_groups, NEG)
    cur_arg = np.full(n_groups, -1, dtype=np.int64)
    cur_stamp = np.full(n_groups, -1, dtype=np.int64)
    priced = costs.lam > 0
    written = 0
    used = 0
    route_ptr[0] = 0
    for t in range(firsts.shape[0]):
        f = firsts[t]
        token = t
        heaviest[t] = NEG
        if (rules.flags[f] & NO_FIRST) != 0 or rules.forced_pred[f] >= 0:
            continue
        deadline = jobs.leave[f] + limit
        best[f] = weight[f] - (costs.lam * costs.pull_out[f] if priced else 0.0)
        pred[f] = -1
        stamp[f] = token
        end_value = NEG
        end_job = -1
        if (rules.flags[f] & NO_LAST) == 0 and jobs.back[f] <= deadline:
            end_value = best[f] - (costs.lam * costs.pull_in[f] if priced else 0.0)
            end_job = f
        # Insert events from f's ready time on (earlier ones cannot follow f).
        lo = 0
        hi = jobs.ins_ready.shape[0]
        while lo < hi:
            mid = (lo + hi) >> 1
            if jobs.ins_ready[mid] < jobs.ready[f]:
                lo = mid + 1
            else:
                hi = mid
        nxt = lo
        for k in range(f + 1, a_count):
            sk = jobs.start[k]
            if sk > deadline:
                break
            while nxt < jobs.ins_order.shape[0] and jobs.ins_ready[nxt] <= sk:
                p = jobs.ins_order[nxt]
                nxt += 1
                i = jobs.job_at[p]
                g = jobs.group_of[p]
                if cur_stamp[g] != token:
                    cur_stamp[g] = token
                    cur[g] = NEG
                    cur_arg[g] = -1
                if stamp[i] == token and best[i] > cur[g] and (rules.flags[i] & NO_SUCC) == 0:
                    cur[g] = best[i]
                    cur_arg[g] = i
                pm[p] = cur[g]
                pm_arg[p] = cur_arg[g]
                pm_stamp[p] = token
            if jobs.back[k] > deadline:
                continue
            value = NEG
            arg = -1
            forced = rules.forced_pred[k]
            if forced >= 0:
                if stamp[forced] == token and best[forced] > NEG:
                    value = best[forced]
                    arg = forced
                    if priced:
                        value -= costs.lam * costs.link[k, jobs.group_of[jobs.pos_of[forced]]]
            elif (rules.flags[k] & NO_PRED) == 0:
                has_forbidden = rules.forbid_ptr[k + 1] > rules.forbid_ptr[k]
                for g in range(n_groups):
                    q = jobs.latest[k, g]
                    if q < 0 or pm_stamp[q] != token:
                        continue
                    v = pm[q]
                    i = pm_arg[q]
                    if v <= NEG:
                        continue
                    if has_forbidden and _forbidden(rules, k, i):
                        v, i = _scan_group(jobs, rules, k, g, q, best, stamp, token)
                        if v <= NEG:
                            continue
                    if priced:
                        v -= costs.lam * costs.link[k, g]
                    if v > value:
                        value = v
                        arg = i
            stamp[k] = token
            if value <= NEG:
                best[k] = NEG
                continue
            best[k] = weight[k] + value
            pred[k] = arg
            if (rules.flags[k] & NO_LAST) == 0:
                e = best[k] - (costs.lam * costs.pull_in[k] if priced else 0.0)
                if e > end_value:
                    end_value = e
                    end_job = k
        heaviest[t] = end_value
        if end_job >= 0 and end_value > threshold and written + 1 < route_ptr.shape[0]:
            length = 0
            k = end_job
            while k >= 0:
                length += 1
                k = pred[k]
            if used + length <= route_buf.shape[0]:
                k = end_job
                pos = used + length - 1
                while k >= 0:
                    route_buf[pos] = k
                    pos -= 1
                    k = pred[k]
                used += length
                written += 1
                route_ptr[written] = used
    return written
