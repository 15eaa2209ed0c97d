"""Independent check of a plan made with fewer vehicles than needed.

Like :mod:`.verify` it shares no code with the solver: it reads the day's raw
arrays, the settings and the claimed answer, and checks with the contract's
formula that

1. every job is in exactly one route or listed as not served,
2. in every route each job can follow the one before,
3. no group of vehicles (all, or one class) runs more routes than it has,
4. the certificate jobs are served, pairwise cannot follow each other, and are
   as many as the routes (so the routes are the fewest for the jobs served),
5. the travel matrix obeys the triangle inequality,
6. the served priority is what the plan says, and the proof holds: nothing
   conceded is negative, each job's level span is at least its priority minus
   what is conceded, whenever one job can follow another the first one's span
   ends where or before the second one's begins, and the bound those give
   (conceded, plus per group of K vehicles the sum over levels of
   min(K, jobs covering the level)) is the stated ``served_upper_bound``,
   which the served priority reaches.

Why 6 proves the bound: along a route the spans are disjoint and each job's
span is at least its priority less what is conceded, so a route's priority is
at most what its jobs concede plus the levels it passes; K vehicles pass each
level at most K times, and only where a job covers it.
"""

from __future__ import annotations

import numpy as np

from ..model import Day, Shortfall, priority_units
from .verify import _follows, triangle_failures

__all__ = ["check_shortfall"]


def check_shortfall(day: Day, routes, certificate, shortfall: Shortfall) -> list[str]:
    """The list of failures (empty when the plan and its proof hold)."""
    failures: list[str] = []
    n = day.n
    unserved = np.asarray(shortfall.unserved, dtype=np.int64)
    flat = np.array([k for route in routes for k in route] + unserved.tolist(), dtype=np.int64)
    if len(flat) and (flat.min() < 0 or flat.max() >= n):
        return ["a route or the unserved list names a job that does not exist"]
    counts = np.bincount(flat, minlength=n)
    if np.any(counts != 1):
        failures.append(f"{int(np.sum(counts == 0))} jobs are neither in a route nor listed as "
                        f"not served, and {int(np.sum(counts > 1))} are listed twice")
    for number, route in enumerate(routes, start=1):
        r = np.asarray(route, dtype=np.int64)
        if len(r) == 0:
            failures.append(f"vehicle {number} has no jobs")
        elif len(r) > 1 and not np.all(_follows(day, r[:-1], r[1:])):
            failures.append(f"vehicle {number}: a job cannot follow the one before it")
    failures += _check_vehicles(day, routes)
    failures += _check_certificate(day, routes, certificate, unserved)
    failures += triangle_failures(day)
    failures += _check_proof(day, unserved, shortfall)
    return failures


def _limits(day: Day) -> list[tuple[int, np.ndarray]]:
    """(vehicles, mask of the jobs they may serve) for each group of vehicles."""
    s = day.settings
    classes = np.array([j.vehicle_class for j in day.jobs], dtype=object)
    if s.vehicles is not None:
        return [(s.vehicles, np.ones(day.n, dtype=bool))]
    named = dict(s.class_vehicles)
    groups = []
    for name in sorted(set(classes.tolist())):
        mask = classes == name
        groups.append((named.get(name, int(mask.sum())), mask))
    return groups


def _check_vehicles(day: Day, routes) -> list[str]:
    firsts = np.array([route[0] for route in routes if len(route)], dtype=np.int64)
    failures = []
    for vehicles, mask in _limits(day):
        used = int(mask[firsts].sum()) if len(firsts) else 0
        if used > vehicles:
            failures.append(f"{used} routes where only {vehicles} vehicles are available")
    return failures


def _check_certificate(day: Day, routes, certificate, unserved: np.ndarray) -> list[str]:
    cert = np.asarray(certificate, dtype=np.int64)
    failures = []
    if len(np.unique(cert)) != len(cert):
        failures.append("a certificate job is listed twice")
    if np.isin(cert, unserved).any():
        failures.append("a certificate job is not served")
    if len(cert) != len(routes):
        failures.append(f"{len(cert)} certificate jobs but {len(routes)} routes")
    step = max(1, (1 << 22) // max(len(cert), 1))
    for a in range(0, len(cert), step):
        if np.any(_follows(day, cert[a:a + step, None], cert[None, :])):
            failures.append("two certificate jobs could share a vehicle")
            break
    return failures


def _check_proof(day: Day, unserved: np.ndarray, shortfall: Shortfall) -> list[str]:
    proof = shortfall.proof
    priority = np.array([priority_units(j) for j in day.jobs], dtype=np.int64)
    served = np.ones(day.n, dtype=bool)
    served[unserved] = False
    failures = []
    if int(priority[served].sum()) != shortfall.served_priority:
        failures.append("the served priority is not the sum over the jobs served")
    if proof is None:
        return failures + ["there is no proof of the bound"]
    conceded, low, high = (np.asarray(a, dtype=np.int64)
                           for a in (proof.conceded, proof.low, proof.high))
    if not (len(conceded) == len(low) == len(high) == day.n):
        return failures + ["the proof does not cover every job"]
    if np.any(conceded < 0) or np.any(low < 0) or np.any(high - low < priority - conceded):
        failures.append("a job's level span is shorter than its priority less what it concedes")
    if not _spans_in_order(day, low, high):
        failures.append("two jobs one vehicle can do one after the other have overlapping "
                        "level spans")
    bound = int(conceded.sum()) + sum(_level_sum(vehicles, low[mask], high[mask])
                                      for vehicles, mask in _limits(day))
    if bound != shortfall.served_upper_bound:
        failures.append(f"the proof gives {bound}, not the stated bound "
                        f"{shortfall.served_upper_bound} (thousandths of priority)")
    if shortfall.served_priority > bound:
        failures.append("the plan serves more priority than the proof allows")
    return failures


def _spans_in_order(day: Day, low: np.ndarray, high: np.ndarray) -> bool:
    """Whether high[i] <= low[j] whenever j can follow i.

    For one class and one site s where jobs end, the jobs ending at s that j can
    follow are those ready (end + turnaround) by start_j - T[s, origin_j]: sorted
    by ready time, a leading run; so the largest ``high`` of that run must not
    pass low[j].
    """
    ready = day.end + day.settings.turnaround
    for c in np.unique(day.vclass):
        members = np.flatnonzero(day.vclass == c)
        for s in np.unique(day.destination[members]):
            ending = members[day.destination[members] == s]
            ending = ending[np.argsort(ready[ending], kind="stable")]
            running = np.maximum.accumulate(high[ending])
            latest = day.start[members] - day.travel[s, day.origin[members]]
            reach = np.searchsorted(ready[ending], latest, side="right")
            some = reach > 0
            if np.any(running[reach[some] - 1] > low[members[some]]):
                return False
    return True


def _level_sum(vehicles: int, low: np.ndarray, high: np.ndarray) -> int:
    """Sum over levels t of min(vehicles, spans (low, high] covering t), by a sweep."""
    keep = high > low
    events = sorted([(int(a), 1) for a in low[keep]] + [(int(b), -1) for b in high[keep]])
    total, covering, previous = 0, 0, None
    for at, step in events:
        if previous is not None and at > previous:
            total += (at - previous) * min(vehicles, covering)
        covering += step
        previous = at
    return total
