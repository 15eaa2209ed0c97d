"""The plan as the contract's JSON document (plus a few extra keys)."""

from __future__ import annotations

import json

from ..clock import format_clock, format_clock_or_none
from ..clock import minutes_value as _minutes
from ..fleet.schedule import VehicleDay, class_counts, vehicle_days
from ..fleet.shortfall import priority_value, service_levels, unserved_reasons
from ..fleet.suggest import SuggestionSearch
from ..model import PRIORITY_UNIT, Plan

__all__ = ["plan_to_dict", "plan_to_json"]


def plan_to_dict(plan: Plan, *, cost_model: dict | None = None,
                 driver_names: dict[int, str] | None = None,
                 suggestions: SuggestionSearch | None = None) -> dict:
    """Fixed keys: vehicles, routes (vehicle, jobs), certificate.jobs, verified;
    with a limit on the vehicles available unserved, served_priority and
    served_upper_bound (contract section 6); with ``suggestions``, suggestions
    (section 7).

    ``driver_names`` (vehicle number -> name, as typed in the app) adds a
    ``driver`` to the routes that have one.
    """
    day = plan.day
    names = driver_names or {}
    routes = [_route(plan, v, names.get(v.vehicle)) for v in vehicle_days(plan)]
    extra: dict = {}
    if plan.tradeoff:
        # deadhead_minutes: least with at most k vehicles (never rises with k);
        # exactly_k_deadhead_minutes: least with all k vehicles out.
        extra["tradeoff"] = [{"vehicles": k, "deadhead_minutes": _minutes(d),
                              "exactly_k_deadhead_minutes": _minutes(e)}
                             for (k, d), (_, e) in zip(plan.tradeoff, plan.tradeoff_exact)]
    if cost_model is not None:
        extra["cost_model"] = cost_model
    if plan.shortfall is not None:
        extra.update(_shortfall(plan))
    if suggestions is not None:
        extra.update(_suggestions(plan, suggestions))
    if plan.workday is not None:
        extra["working_day"] = _working_day(plan)
    if plan.deadhead_note:
        # least_deadhead is false: the stage stopped at its time limit.
        extra["least_deadhead_note"] = plan.deadhead_note
    return {
        "vehicles": plan.vehicles,
        "vehicles_by_class": [{"vehicle_class": name, "vehicles": count}
                              for name, count in class_counts(plan)],
        "lower_bound": plan.lower_bound,
        "proven_minimum": plan.proven_minimum,
        "routes": routes,
        "certificate": _certificate(plan),
        "verified": bool(plan.verified),
        "deadhead_minutes": _minutes(plan.deadhead_seconds),
        "least_deadhead": plan.least_deadhead,
        "jobs": day.n,
        "plan_date": day.plan_date.isoformat() if day.plan_date else None,
        "fingerprint": day.fingerprint,
        "warnings": list(day.warnings),
        "travel_pairs_shortened": day.shortened_pairs,
        # Which travel times the closure shortened: given and used minutes, and the
        # pair's row in the travel file (0: estimated from coordinates).
        "travel_shortened": [{"from": p.origin, "to": p.destination,
                              "given_minutes": _minutes(p.given),
                              "used_minutes": _minutes(p.used), "row": p.row}
                             for p in day.shortened],
        "settings": {
            "turnaround_minutes": _minutes(day.settings.turnaround),
            "depot": day.settings.depot,
            "day_start": format_clock_or_none(day.settings.day_start),
            "day_end": format_clock_or_none(day.settings.day_end),
            "speed_kmh": day.settings.speed_kmh,
            "circuity": day.settings.circuity,
            "max_day_minutes": None if day.settings.max_day is None
            else _minutes(day.settings.max_day),
        },
        **extra,
    }


def _working_day(plan: Plan) -> dict:
    """How the plan under a working-day limit was found and what is proven."""
    info = plan.workday
    return {
        "limit_minutes": _minutes(info.limit),
        "vehicles_without_limit": info.unlimited_vehicles,
        "lp_bound": None if info.lp_bound is None else round(info.lp_bound, 6),
        "search": info.status,  # proven, time limit, stopped, too large
        "minimum_by_search": info.minimum_by_search,
        "search_nodes": info.nodes,
        "routes_generated": info.routes_generated,
        "seconds": round(info.seconds, 3),
        "first_plan_seconds": round(info.first_plan_seconds, 3),
        # "proven least": least empty driving for this many vehicles; "searched":
        # less was looked for, not proven least; "not optimised": no time was left
        "deadhead": info.deadhead_status,
    }


def _route(plan: Plan, v: VehicleDay, driver: str | None) -> dict:
    """One route: its jobs and its vehicle's day.  ``leave_depot`` and
    ``back_at_depot`` are null without a depot; the working day runs depot to
    depot with one, first start to last end without (contract section 5)."""
    entry = {"vehicle": v.vehicle, "jobs": [plan.day.jobs[k].id for k in v.jobs],
             "vehicle_class": v.vehicle_class,
             "first_start": format_clock(v.first_start), "last_end": format_clock(v.last_end),
             "leave_depot": format_clock_or_none(v.leave),
             "back_at_depot": format_clock_or_none(v.back),
             "working_day_minutes": _minutes(v.working_day),
             "deadhead_minutes": _minutes(v.deadhead)}
    if driver:
        entry["driver"] = driver
    return entry


def _certificate(plan: Plan) -> dict:
    """The proof of the lower bound (contract sections 4 and 5)."""
    certificate: dict = {"jobs": plan.certificate_ids()}
    if plan.certificate_weights:
        jobs = plan.day.jobs
        certificate["weights"] = {jobs[k].id: w for k, w in plan.certificate_weights}
    return certificate


def _shortfall(plan: Plan) -> dict:
    """Contract section 6, plus the limit, the fleet for every job and the proof:
    ``conceded`` priority per job and ``groups`` of jobs that pairwise cannot share
    a vehicle, each counting ``weight`` x min(vehicles, jobs) toward the bound."""
    day, sf = plan.day, plan.shortfall
    s = day.settings
    ids = [j.id for j in day.jobs]
    out: dict = {
        "unserved": [ids[k] for k in sf.unserved],
        "served_priority": priority_value(sf.served_priority),
        "served_upper_bound": priority_value(sf.served_upper_bound),
        "vehicles_available": s.vehicles if s.vehicles is not None
        else {c: k for c, k in s.class_vehicles},
        "vehicles_needed_for_all": sf.needed_for_all,
    }
    reasons = unserved_reasons(day, sf)
    if reasons:
        out["unserved_reasons"] = {ids[k]: text for k, text in reasons.items()}
    if sf.proof is None and sf.weights is not None:  # under a working-day limit
        out["service_proof"] = {
            # in priority (as typed): no valid route of a group of vehicles carries more
            # than its heaviest_route_weight of these
            "weights": {ids[k]: round(float(w) / PRIORITY_UNIT, 6)
                        for k, w in enumerate(sf.weights.tolist()) if w > 1e-9},
            "heaviest_route_weight": [round(float(w) / PRIORITY_UNIT, 6) for w in sf.heaviest],
        }
    if sf.proof is not None:
        proof = sf.proof
        out["service_proof"] = {
            "conceded": {ids[k]: priority_value(int(v))
                         for k, v in enumerate(proof.conceded.tolist()) if v},
            "groups": [{"jobs": [ids[k] for k in level.jobs],
                        "weight": priority_value(level.thickness),
                        "vehicles": level.vehicles} for level in service_levels(day, proof)],
        }
    return out


def _suggestions(plan: Plan, search: SuggestionSearch) -> dict:
    """Contract section 7, plus how long the search took and whether it was complete."""
    jobs = plan.day.jobs
    return {
        "suggestions": [
            {"moves": [{"job": jobs[m.job].id, "start": format_clock(jobs[m.job].start + m.shift),
                        "end": format_clock(jobs[m.job].end + m.shift),
                        "shift_minutes": _minutes(m.shift)} for m in s.moves],
             "vehicles": s.vehicles, "moved_minutes": _minutes(s.moved_seconds)}
            for s in search.suggestions],
        "suggestion_search": {"max_move_minutes": _minutes(search.max_move),
                              "seconds": round(search.seconds, 3),
                              "move_sets_checked": search.checked,
                              "complete": search.complete},
    }


def plan_to_json(plan: Plan, *, cost_model: dict | None = None,
                 driver_names: dict[int, str] | None = None,
                 suggestions: SuggestionSearch | None = None) -> str:
    """The JSON text; raises ``ValueError`` rather than write NaN or Infinity,
    which are not JSON (RFC 8259, section 6)."""
    return json.dumps(plan_to_dict(plan, cost_model=cost_model, driver_names=driver_names,
                                   suggestions=suggestions),
                      indent=2, ensure_ascii=False, allow_nan=False) + "\n"
