"""Independent check of a plan under a working-day limit, and of its lower bound.

Written apart from the solvers on purpose (it shares nothing with
:mod:`.pricing`, :mod:`.generation` or :mod:`.branch`): it reads the day's
raw arrays and checks, with the contract's formulas (sections 1 and 5), that

1. every job is in exactly one route, each job can follow the one before it,
   and every route's working day is within the limit;
2. the travel matrix obeys the triangle inequality (so dropping jobs from a
   route keeps it valid, which both bounds rely on);
3. the certificate jobs pairwise do not fit one working day;
4. the weights are non-negative and no valid route carries more than 1
   (checked by its own simple dynamic programme over pairs of jobs);
5. the stated lower bound follows from the certificate's size or from the
   weights' sum, and is not above the plan.
"""

from __future__ import annotations

import math

import numpy as np

from .._jit import jit
from ..fleet.verify import _follows, triangle_failures
from ..model import Day

__all__ = ["check_workday_plan", "heaviest_route_weight", "TOLERANCE"]

TOLERANCE = 1e-6  # contract section 5: on the heaviest route and on the sum


def _leave_back(day: Day) -> tuple[np.ndarray, np.ndarray]:
    if day.settings.depot is None:
        return day.start.astype(np.int64), day.end.astype(np.int64)
    d = day.site_index[day.settings.depot]
    t = day.travel
    return (day.start - t[d, day.origin]).astype(np.int64), \
        (day.end + t[day.destination, d]).astype(np.int64)


def _fit(day: Day, limit: int, i: np.ndarray, j: np.ndarray) -> np.ndarray:
    """j can follow i and the route i, j is within the limit (elementwise)."""
    leave, back = _leave_back(day)
    return _follows(day, i, j) & (back[j] - leave[i] <= limit)


@jit
def _heaviest(start, ready, leave, back, origin, destination, vclass, travel, weight, limit):
    """Heaviest route by brute force over pairs: O(n^2) per first job, n = jobs given."""
    n = start.shape[0]
    best = np.empty(n)
    top = 0.0
    for f in range(n):
        deadline = leave[f] + limit
        if back[f] > deadline:
            continue
        for k in range(n):
            best[k] = -1.0
        best[f] = weight[f]
        if best[f] > top:
            top = best[f]
        for j in range(f + 1, n):
            if start[j] > deadline:
                break  # jobs are in start order: none later fits either
            if back[j] > deadline or vclass[j] != vclass[f]:
                continue
            value = -1.0
            for i in range(f, j):
                if best[i] >= 0 and vclass[i] == vclass[j] and \
                        ready[i] + travel[destination[i], origin[j]] <= start[j]:
                    if best[i] > value:
                        value = best[i]
            if value >= 0:
                best[j] = value + weight[j]
                if best[j] > top:
                    top = best[j]
    return top


def heaviest_route_weight(day: Day, limit: int, weights: dict[int, float]) -> float:
    """The most weight any valid route carries (jobs without weight add nothing and,
    the triangle inequality holding, can be left out of every route)."""
    jobs = np.array(sorted((k for k, w in weights.items() if w > 0),
                           key=lambda k: (int(day.start[k]), int(day.end[k]), k)), dtype=np.int64)
    if len(jobs) == 0:
        return 0.0
    leave, back = _leave_back(day)
    ready = day.end + day.settings.turnaround
    w = np.array([weights[int(k)] for k in jobs], dtype=np.float64)
    return float(_heaviest(day.start[jobs].astype(np.int64), ready[jobs].astype(np.int64),
                           leave[jobs], back[jobs], day.origin[jobs].astype(np.int64),
                           day.destination[jobs].astype(np.int64),
                           day.vclass[jobs].astype(np.int64), day.travel, w, np.int64(limit)))


def check_workday_plan(day: Day, routes, certificate, weights: dict[int, float] | None,
                       lower_bound: int, limit: int) -> list[str]:
    """Return the failures (empty: the plan is valid and the bound is proven)."""
    failures: list[str] = []
    n = day.n
    flat = np.array([k for route in routes for k in route], dtype=np.int64)
    if len(flat) and (flat.min() < 0 or flat.max() >= n):
        return ["a route names a job that does not exist"]
    counts = np.bincount(flat, minlength=n) if len(flat) else np.zeros(n, np.int64)
    if np.any(counts != 1):
        failures.append(f"{int(np.sum(counts == 0))} jobs are in no route and "
                        f"{int(np.sum(counts > 1))} in more than one")
    leave, back = _leave_back(day)
    for number, route in enumerate(routes, start=1):
        r = np.asarray(route, dtype=np.int64)
        if len(r) == 0:
            failures.append(f"vehicle {number} has no jobs")
            continue
        if len(r) > 1 and not np.all(_follows(day, r[:-1], r[1:])):
            failures.append(f"vehicle {number}: a job cannot follow the one before it")
        if back[r[-1]] - leave[r[0]] > limit:
            failures.append(f"vehicle {number}: the working day is longer than the limit")
    failures += triangle_failures(day)
    failures += _check_certificate(day, limit, certificate, weights, lower_bound, len(routes))
    return failures


def _check_certificate(day: Day, limit: int, certificate, weights, lower_bound: int,
                       vehicles: int) -> list[str]:
    failures = []
    cert = np.asarray(certificate, dtype=np.int64)
    if len(np.unique(cert)) != len(cert):
        failures.append("a certificate job is listed twice")
    step = max(1, (1 << 22) // max(len(cert), 1))
    for a in range(0, len(cert), step):
        i, j = cert[a:a + step, None], cert[None, :]
        if np.any(_fit(day, limit, i, j)):
            failures.append("two certificate jobs fit one working day")
            break
    proven = len(cert)
    if weights:
        values = np.array(list(weights.values()), dtype=np.float64)
        if np.any(values < 0) or not np.all(np.isfinite(values)):
            failures.append("a certificate weight is negative or not a number")
        elif heaviest_route_weight(day, limit, weights) > 1 + TOLERANCE:
            failures.append("a valid route carries more than 1 of the certificate weights")
        else:
            proven = max(proven, math.ceil(float(values.sum()) - TOLERANCE))
    if lower_bound > proven:
        failures.append(f"the lower bound {lower_bound} does not follow from the certificate "
                        f"(it proves {proven})")
    if lower_bound > vehicles:
        failures.append("the lower bound is above the plan")
    return failures


def check_workday_shortfall(day: Day, routes, certificate, shortfall, limit: int) -> list[str]:
    """Failures of a plan with fewer vehicles than needed under a working-day limit:
    routes and unserved jobs partition the day, routes are valid and within the
    limit, no group of vehicles runs more routes than it has, the certificate jobs
    are served and pairwise do not fit one working day, the served priority adds
    up, and the weights prove the stated bound (contract section 6)."""
    from ..fleet.verify_shortfall import _limits
    from ..model import priority_units

    failures: list[str] = []
    n = day.n
    unserved = np.asarray(shortfall.unserved, dtype=np.int64)
    flat = np.array([k for route in routes for k in route] + unserved.tolist(), dtype=np.int64)
    if len(flat) and (flat.min() < 0 or flat.max() >= n):
        return ["a route or the unserved list names a job that does not exist"]
    if np.any(np.bincount(flat, minlength=n) != 1):
        failures.append("a job is neither in a route nor listed as not served, or twice")
    leave, back = _leave_back(day)
    for number, route in enumerate(routes, start=1):
        r = np.asarray(route, dtype=np.int64)
        if len(r) > 1 and not np.all(_follows(day, r[:-1], r[1:])):
            failures.append(f"vehicle {number}: a job cannot follow the one before it")
        if len(r) and back[r[-1]] - leave[r[0]] > limit:
            failures.append(f"vehicle {number}: the working day is longer than the limit")
    firsts = np.array([r[0] for r in routes if len(r)], dtype=np.int64)
    groups = _limits(day)
    for vehicles, mask in groups:
        if len(firsts) and int(mask[firsts].sum()) > vehicles:
            failures.append(f"more routes than the {vehicles} vehicles available")
    cert = np.asarray(certificate, dtype=np.int64)
    if np.isin(cert, unserved).any() or len(np.unique(cert)) != len(cert):
        failures.append("a certificate job is not served or listed twice")
    if len(cert) and np.any(_fit(day, limit, cert[:, None], cert[None, :])):
        failures.append("two certificate jobs fit one working day")
    priority = np.array([priority_units(j) for j in day.jobs], dtype=np.int64)
    served = np.ones(n, dtype=bool)
    served[unserved] = False
    if int(priority[served].sum()) != shortfall.served_priority:
        failures.append("the served priority is not the sum over the jobs served")
    return failures + _check_service_weights(day, limit, shortfall, groups, priority)


def _check_service_weights(day: Day, limit: int, shortfall, groups, priority) -> list[str]:
    weights = shortfall.weights
    if weights is None or len(weights) != day.n or len(shortfall.heaviest) != len(groups):
        return ["there is no proof of the bound"]
    if np.any(weights < 0) or not np.all(np.isfinite(weights)):
        return ["a proof weight is negative or not a number"]
    total = float(np.maximum(priority - weights, 0.0).sum())
    for (vehicles, mask), stated in zip(groups, shortfall.heaviest):
        mine = {int(k): float(weights[k]) for k in np.flatnonzero(mask & (weights > 0))}
        heaviest = heaviest_route_weight(day, limit, mine)
        if heaviest > stated + TOLERANCE * max(1.0, stated):
            return [f"a valid route carries {heaviest:.6g} of the weights, more than the "
                    f"{stated:.6g} the proof counts"]
        total += vehicles * max(heaviest, stated)
    proven = math.floor(total + TOLERANCE * max(1.0, total))
    failures = []
    if shortfall.served_upper_bound < proven:
        failures.append(f"the proof gives {proven}, not the stated bound "
                        f"{shortfall.served_upper_bound} (thousandths of priority)")
    if shortfall.served_priority > shortfall.served_upper_bound:
        failures.append("the plan serves more priority than the bound allows")
    return failures
