"""Pages for a fleet that is too small, and for slot moves that would save a vehicle.

"Jobs not served": the jobs left over with the vehicles available, why each one,
and the proof that no plan with those vehicles serves more: groups of jobs no
two of which can share a vehicle, each giving at most as many jobs as there
are vehicles.  "What would save a vehicle": the suggested slot moves.
"""

from __future__ import annotations

from reportlab.platypus import Flowable, LongTable, Paragraph, TableStyle

from shipgui.core.clock import format_day_clock
from shipgui.core.clock import format_duration as duration_text
from shipgui.core.fleet.shortfall import priority_text, service_levels, unserved_reasons
from shipgui.core.fleet.suggest import SuggestionSearch
from shipgui.core.model import PRIORITY_UNIT, Plan, priority_units

from .pages import SectionStart
from .styles import FRAME_WIDTH, grid_table_style, heading, styles
from .text import LIMITS, esc, slot_text

__all__ = ["build_unserved", "build_suggestions", "available_text"]

_ID, _NAME = LIMITS["id"], LIMITS["name"]  # characters printed of an id, of a name


def available_text(plan: Plan) -> str:
    """The vehicles available as set: '25', or 'van 5, truck 3'."""
    s = plan.day.settings
    if s.vehicles is not None:
        return str(s.vehicles)
    return ", ".join(f"{c} {k}" for c, k in s.class_vehicles)


def build_unserved(plan: Plan) -> list[Flowable]:
    """The "Jobs not served" section (empty when every job is served)."""
    sf = plan.shortfall
    if sf is None or not sf.unserved:
        return []
    st = styles()
    day = plan.day
    total = sum(priority_units(j) for j in day.jobs)
    served = day.n - len(sf.unserved)
    story: list[Flowable] = [
        SectionStart("Jobs not served", detail=f"{len(sf.unserved)} of {day.n} jobs "
                     f"\u00b7 fingerprint {day.fingerprint}"),
        Paragraph("Jobs not served: hand on or rebook", st["title"]),
        Paragraph(f"With {esc(available_text(plan))} vehicles available this plan serves "
                  f"{served} of the {day.n} jobs (priority {priority_text(sf.served_priority)}"
                  f" of {priority_text(total)}); {sf.needed_for_all} vehicles would serve them "
                  "all. " + ("No plan with these vehicles serves more priority: the proof "
                             "follows." if sf.exact else
                             "No plan with these vehicles serves more than "
                             f"{priority_text(sf.served_upper_bound)}: the proof follows."),
                  st["statement"]),
        _unserved_table(plan),
        *heading("Why no more fit"),
        *(_proof(plan) if sf.proof is not None else _weights_proof(plan)),
    ]
    return story


def _weights_proof(plan: Plan) -> list[Flowable]:
    """The proof under a working-day limit: job weights no route carries much of."""
    st = styles()
    day, sf = plan.day, plan.shortfall
    limit = duration_text(day.settings.max_day or 0)
    pools = [f"{vehicles} vehicles carry at most {vehicles} \u00d7 "
             f"{heaviest / PRIORITY_UNIT:.3g} = {vehicles * heaviest / PRIORITY_UNIT:.4g}"
             for (vehicles, _mask), heaviest in zip(_pool_sizes(day), sf.heaviest)]
    text = ("Why: each job below has a weight. No route within the working day of "
            f"{limit} carries more than the weight named for its vehicles, so the "
            f"{'; the '.join(pools)}. Beyond its weight a job can add at most its priority "
            "less its weight. Adding up, no plan serves more than "
            f"<b>{priority_text(sf.served_upper_bound)}</b>"
            + ("; this plan serves as much." if sf.exact else
               f"; this plan serves {priority_text(sf.served_priority)} (the search for a "
               "better plan stopped; the answer lies between the two)."))
    weights = [(k, float(w)) for k, w in enumerate(sf.weights.tolist()) if w > 1e-9]
    head = ["Job", "Priority", "Weight", "Served"]
    rows = [[Paragraph(h, st["cell_head"]) for h in head]]
    unserved = set(sf.unserved)
    for k, w in sorted(weights, key=lambda item: (int(day.start[item[0]]), item[0])):
        rows.append([Paragraph(esc(day.jobs[k].id, _ID), st["cell"]),
                     Paragraph(priority_text(priority_units(day.jobs[k])), st["cell_right"]),
                     Paragraph(f"{w / PRIORITY_UNIT:.3f}", st["cell_right"]),
                     Paragraph("no" if k in unserved else "yes", st["cell"])])
    table = LongTable(rows, colWidths=[80, 60, 60, 50], repeatRows=1)
    table.setStyle(TableStyle(grid_table_style()))
    check = ("An independent check, written separately from the planner, confirmed that "
             "every job is on one route or in the list above, that every route keeps within "
             "the working day and the vehicles available, and, with its own search for the "
             "heaviest route, that the weights give the bound." if plan.verified else
             "THE INDEPENDENT CHECK FAILED: do not rely on this page.")
    return [Paragraph(text, st["body"]), table, Paragraph(check, st["small"])]


def _pool_sizes(day):
    """(vehicles, class names) per group of vehicles, as the settings give them."""
    from shipgui.core.fleet.shortfall import vehicle_pools
    return [(pool.vehicles, pool.classes) for pool in vehicle_pools(day)]


def _unserved_table(plan: Plan) -> LongTable:
    st = styles()
    day, sf = plan.day, plan.shortfall
    reasons = unserved_reasons(day, sf)
    head = ["Job", "Time", "From \u2192 to", "Customer", "Priority", "Why not"]
    widths = [54, 62, 100, 86, 40, FRAME_WIDTH - 342]
    rows = [[Paragraph(h, st["cell_head"]) for h in head]]
    for k in sorted(sf.unserved, key=lambda k: (int(day.start[k]), k)):
        job = day.jobs[k]
        place = esc(day.site_label(job.origin), _NAME)
        if job.destination != job.origin:
            place += " \u2192 " + esc(day.site_label(job.destination), _NAME)
        rows.append([Paragraph(f"<b>{esc(job.id, _ID)}</b>", st["cell"]),
                     Paragraph(slot_text(job), st["cell"]), Paragraph(place, st["cell_small"]),
                     Paragraph(esc(job.customer, _NAME), st["cell_small"]),
                     Paragraph(priority_text(priority_units(job)), st["cell_right"]),
                     Paragraph(esc(reasons.get(k, "")), st["cell_small"])])
    table = LongTable(rows, colWidths=widths, repeatRows=1)
    table.setStyle(TableStyle(grid_table_style()))
    return table


def _proof(plan: Plan) -> list[Flowable]:
    st = styles()
    day, sf = plan.day, plan.shortfall
    levels = service_levels(day, sf.proof)
    conceded = [(k, int(v)) for k, v in enumerate(sf.proof.conceded.tolist()) if v]
    simple = bool(levels) and all(priority_units(j) == levels[0].thickness for j in day.jobs) \
        and all(level.thickness == levels[0].thickness for level in levels)
    groups = "the group below is a set" if len(levels) == 1 else "each group below is a set"
    if simple:
        counts = [min(level.vehicles, len(level.jobs)) for level in levels]
        jobs = "jobs" if levels[0].thickness == PRIORITY_UNIT else "jobs' worth of priority"
        text = (f"Why: {groups} of jobs no two of which can share a vehicle (for each pair, "
                "the vehicle would reach the later job's start site only after that job "
                "starts). So a vehicle does at most one job of a group, and the vehicles "
                "available at most as many jobs of a group as there are vehicles. Every job "
                "is in one group or among the others, which can give at most one each. "
                f"Adding up, no plan serves more than {' + '.join(map(str, counts))}"
                f"{f' + {len(conceded)}' if conceded else ''} = "
                f"{sum(counts) + len(conceded)} {jobs}; this plan serves as many.")
    else:
        text = ("Why: each job's priority is split into a part counted in full (as if served "
                "in any case) and the rest, spread over one or more consecutive groups below "
                f"(its weight in each). {groups[0].upper() + groups[1:]} of jobs no two of "
                "which can share a vehicle, so the vehicles available serve at most as many "
                "jobs of a group as there are vehicles, and a group adds at most its weight "
                "times that. What is counted in full plus what the groups add is the bound, "
                f"<b>{priority_text(sf.served_upper_bound)}</b>; this plan serves as much.")
    story: list[Flowable] = [Paragraph(text, st["body"]), _groups_table(plan, levels, simple)]
    if conceded:
        if simple:
            title = f"The other {len(conceded)} jobs (at most one each)"
            ids = " ".join(esc(day.jobs[k].id, _ID) for k, _ in conceded)
        else:
            title = "Counted in full"
            ids = ", ".join(f"{esc(day.jobs[k].id, _ID)} ({priority_text(v)})"
                            for k, v in conceded)
            ids += f". Together {priority_text(sum(v for _, v in conceded))}."
        story += [*heading(title, room=40), Paragraph(ids, st["small"])]
    story.append(Paragraph(
        "An independent check, written separately from the planner, confirmed that every job "
        "is on one route or in the list above, that each route can be driven with the "
        "vehicles available, that no two jobs of a group can share a vehicle, and that the "
        "groups add up to the priority served. The method: a minimum-cost flow of the "
        "vehicles through the jobs (Arkin & Silverberg, \u201cScheduling jobs with fixed "
        "start and end times\u201d, Discrete Applied Mathematics 18(1), 1987); for equal "
        "priorities the groups are those of Greene and Kleitman\u2019s theorem (J. "
        "Combinatorial Theory A 20, 1976).", st["small"]))
    return story


def _groups_table(plan: Plan, levels, simple: bool) -> LongTable:
    st = styles()
    day, sf = plan.day, plan.shortfall
    unserved = set(sf.unserved)
    head = ["Group", "Jobs", "Vehicles", "Gives at most"] + ([] if simple else ["Weight"]) \
        + ["The jobs (not served in brackets)"]
    widths = [36, 30, 44, 50] + ([] if simple else [40])
    widths.append(FRAME_WIDTH - sum(widths))
    rows = [[Paragraph(h, st["cell_head"]) for h in head]]
    for number, level in enumerate(levels, start=1):
        ids = " ".join(f"[{esc(day.jobs[k].id, _ID)}]" if k in unserved
                       else esc(day.jobs[k].id, _ID)
                       for k in sorted(level.jobs, key=lambda k: (int(day.start[k]), k)))
        gives = min(level.vehicles, len(level.jobs))
        row = [str(number), str(len(level.jobs)), str(level.vehicles),
               priority_text(level.counts) if not simple else str(gives)]
        if not simple:
            row.append(priority_text(level.thickness))
        rows.append([Paragraph(c, st["cell"]) for c in row] + [Paragraph(ids, st["cell_small"])])
    total = priority_text(sum(level.counts for level in levels))
    if simple:
        total = str(sum(min(lv.vehicles, len(lv.jobs)) for lv in levels))
        unit = levels[0].thickness if levels else PRIORITY_UNIT
        if unit != PRIORITY_UNIT:
            total += f" jobs \u00d7 priority {priority_text(unit)}"
    rows.append([Paragraph("<b>All</b>", st["cell"]), Paragraph("", st["cell"]),
                 Paragraph("", st["cell"]), Paragraph(f"<b>{total}</b>", st["cell"])]
                + [Paragraph("", st["cell"]) for _ in head[4:]])
    table = LongTable(rows, colWidths=widths, repeatRows=1)
    table.setStyle(TableStyle(grid_table_style()))
    return table


def build_suggestions(plan: Plan, search: SuggestionSearch | None) -> list[Flowable]:
    """The "What would save a vehicle" section (empty without a search)."""
    if search is None:
        return []
    st = styles()
    jobs = plan.day.jobs
    story: list[Flowable] = [
        SectionStart("What would save a vehicle",
                     detail=f"{len(search.suggestions)} suggestions"),
        Paragraph("What would save a vehicle", st["title"]),
        Paragraph(f"Now {search.vehicles} vehicles are needed to serve every job. After the "
                  f"moves of each suggestion below (a job's start and end shifted together, by "
                  f"at most {duration_text(search.max_move)}), {search.vehicles - 1} would do; "
                  "each suggestion was checked by solving the changed day. A booked slot moves "
                  "only if the customer agrees.", st["statement"]),
    ]
    if not search.suggestions:
        story.append(Paragraph("No moves within that limit save a vehicle.", st["body"]))
    else:
        rows = [[Paragraph(h, st["cell_head"]) for h in
                 ("#", "Moves", "Minutes moved", "Vehicles after")]]
        for number, suggestion in enumerate(search.suggestions, start=1):
            moves = "<br/>".join(
                f"<b>{esc(jobs[m.job].id, _ID)}</b> {slot_text(jobs[m.job])} \u2192 "
                f"{format_day_clock(jobs[m.job].start + m.shift)}\u2013"
                f"{format_day_clock(jobs[m.job].end + m.shift)} "
                f"({duration_text(abs(m.shift))} {'later' if m.shift > 0 else 'earlier'}"
                f"{', ' + esc(jobs[m.job].customer, _NAME) if jobs[m.job].customer else ''}"
                ")"
                for m in suggestion.moves)
            rows.append([Paragraph(str(number), st["cell"]), Paragraph(moves, st["cell"]),
                         Paragraph(duration_text(suggestion.moved_seconds), st["cell_right"]),
                         Paragraph(str(suggestion.vehicles), st["cell_right"])])
        table = LongTable(rows, colWidths=[24, FRAME_WIDTH - 164, 70, 70], repeatRows=1)
        table.setStyle(TableStyle(grid_table_style()))
        story.append(table)
    story.append(Paragraph(
        f"Searched {search.checked} sets of moves"
        + ("" if search.complete else " (the search of pairs stopped at its limit)")
        + ". Only jobs marked movable were moved; single moves were tried first, then pairs.",
        st["small"]))
    return story
