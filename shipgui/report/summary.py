"""The summary section: the plan's key facts, what more vehicles would save, warnings
and the timeline of all vehicles."""

from __future__ import annotations

import math

from reportlab.platypus import Flowable, Paragraph, Spacer, Table, TableStyle

from shipgui.core.clock import format_day_clock, format_duration, shown_minutes
from shipgui.core.fleet.deadhead import TRADEOFF_SHOWN, tradeoff_rows
from shipgui.core.fleet.schedule import class_counts, vehicle_days
from shipgui.core.model import Plan
from shipgui.core.workday.explain import a_working_day, format_limit, limit_cost_text, search_text

from .pages import SectionStart
from .styles import FRAME_WIDTH, LIGHT_GREY, grid_table_style, heading, styles
from .text import LIMITS, date_text, esc, plan_date_text, source_names
from .timeline import Timeline, timeline_rows

__all__ = ["build_summary", "MAX_WARNINGS_SHOWN", "plan_title"]

# Warnings beyond this many are counted, not printed: the summary is one page of facts.
MAX_WARNINGS_SHOWN = 8


def plan_title(plan: Plan) -> str:
    """'Vehicle plan for Mon 2026-03-02', or 'Vehicle plan' without a date."""
    day = plan.day.plan_date
    return "Vehicle plan" + (f" for {date_text(day)}" if day else "")


def build_summary(plan: Plan) -> list[Flowable]:
    """The first section: facts about the plan, what more vehicles would save (when
    the plan carries a trade-off), warnings, and the timeline picture.

    The timeline continues on further pages when there are more vehicles than fit.
    """
    st = styles()
    day = plan.day
    story: list[Flowable] = [
        SectionStart("Vehicle plan \u2014 summary", detail=f"Plan date: {plan_date_text(day)}",
                     continued="Vehicle plan \u2014 timeline (continued)"),
        Paragraph(esc(plan_title(plan)), st["title"]),
        Paragraph(_intro(plan), st["body"]),
        _facts_table(plan),
        *_warnings(day.warnings),
        *_tradeoff(plan),
        *heading("Timeline of all vehicles"),
        Paragraph("One row per vehicle, numbered as on the route sheets. Hours run along "
                  "the top and bottom; hours after the line marked \u201c00 +1\u201d are on "
                  "the next day.", st["small"]),
        Spacer(1, 4),
        Timeline(timeline_rows(plan)) if plan.routes else Paragraph("No jobs.", st["body"]),
    ]
    return story


def _intro(plan: Plan) -> str:
    verb = "covers" if plan.vehicles == 1 else "cover"
    sf = plan.shortfall
    if sf is not None and sf.unserved:
        return (f"{_vehicles_text(plan.vehicles)} {verb} {plan.day.n - len(sf.unserved)} of "
                f"the {plan.day.n} jobs, as many as the vehicles available allow; "
                f"{len(sf.unserved)} are not served (listed on the next page, with the proof "
                f"that no more fit). {sf.needed_for_all} vehicles would serve every job.")
    jobs = "the 1 job" if plan.day.n == 1 else f"all {plan.day.n} jobs"
    info = plan.workday
    if info is None:
        return (f"{_vehicles_text(plan.vehicles)} {verb} {jobs}. No plan with fewer vehicles "
                "exists: the proof is on the last pages.")
    text = (f"{_vehicles_text(plan.vehicles)} {verb} {jobs}, every working day within "
            f"{format_limit(info.limit)}. ")
    if plan.proven_minimum:
        return text + ("No plan with fewer vehicles within that limit exists: the proof is "
                       "on the last pages.")
    text += (f"No plan within that limit has fewer than {plan.lower_bound} (the proof is on "
             f"the last pages), so the minimum is {plan.lower_bound} to {plan.vehicles}")
    if info.minimum_by_search:
        return text + (f"; the search found none with fewer than {plan.vehicles}, so "
                       f"{plan.vehicles} is the minimum.")
    return text + f": {esc(search_text(info))}."


def _workday_facts(plan: Plan) -> list[tuple[str, str]]:
    """The rows a working-day limit adds: the limit, what is proven, what it costs."""
    info = plan.workday
    limit = format_limit(info.limit)
    span = "leaving the depot to being back" if plan.day.settings.depot \
        else "first job's start to last job's end"
    if plan.proven_minimum:
        fleet = f"<b>{plan.vehicles}</b>: proven minimum for {a_working_day(info.limit)}"
    else:
        fleet = (f"<b>{plan.vehicles}</b> planned; at least <b>{plan.lower_bound}</b> needed "
                 f"(proven)")
        if info.minimum_by_search:
            fleet += f"; {plan.vehicles} is the minimum, found by search"
    search = esc(search_text(info)).capitalize()
    if info.status != "time limit":  # that one says its seconds already
        search += f" ({info.seconds:.0f} s)"
    return [
        ("Longest working day", f"<b>{limit}</b>, {span}<br/><font size=8>your setting, not a "
         "legal default: drivers' hours, breaks and rest rules are set by local law</font>"),
        ("Vehicles", fleet),
        ("Search", search),
        ("Without the limit", esc(limit_cost_text(plan).removeprefix("Without the limit: "))),
    ]


def _facts(plan: Plan) -> list[tuple[str, str]]:
    """(label, value markup) rows of the facts table, in print order."""
    day = plan.day
    job_time = sum(job.end - job.start for job in day.jobs)
    facts = [("Plan date", esc(plan_date_text(day)))]
    for kind, name in source_names(day):
        facts.append((f"{kind.capitalize()} file", esc(name, LIMITS["file"])))
    facts.append(("Input fingerprint", f"<b>{esc(day.fingerprint)}</b>"))
    facts += [("Vehicles needed", f"<b>{plan.vehicles}</b>")] if plan.workday is None \
        else _workday_facts(plan)
    counts = class_counts(plan)
    if len(counts) > 1:
        facts.append(("Vehicles by class", " \u00b7 ".join(
            f"{esc(name or '(no class)', LIMITS['id'])} <b>{count}</b>"
            for name, count in counts)))
    facts += [
        ("Jobs", str(day.n)),
        ("Total job time", format_duration(job_time)),
        ("Total empty driving", _empty_driving_text(plan)),
        ("Turnaround between jobs", format_duration(day.settings.turnaround)),
    ]
    settings = day.settings
    if settings.depot is not None:
        hours = ""
        if settings.day_start is not None and settings.day_end is not None:
            hours = (f", open {format_day_clock(settings.day_start)}\u2013"
                     f"{format_day_clock(settings.day_end)}")
        facts.append(("Depot", esc(day.site_label(settings.depot), LIMITS["name"]) + hours))
    within = " within the working-day limit" if plan.workday is not None else ""
    facts.append(("Independent check", "passed: every job is on exactly one route, every "
                  f"route can be driven{within}, and the proof holds"))
    return facts


def _vehicles_text(count: int) -> str:
    return f"{count} vehicle" if count == 1 else f"{count} vehicles"


def _empty_driving_text(plan: Plan) -> str:
    text = format_duration(plan.deadhead_seconds)
    if plan.workday is not None and plan.vehicles:
        text += "<br/><font size=8>" + {
            "proven least": f"the least possible with {_vehicles_text(plan.vehicles)} "
                            "within the working day",
            "searched": "searched for less; not proven the least possible"}.get(
            plan.workday.deadhead_status, "not optimised: no time was left") + "</font>"
    elif plan.least_deadhead and plan.vehicles:
        text += (f"<br/><font size=8>the least possible with "
                 f"{_vehicles_text(plan.vehicles)}</font>")
    elif plan.deadhead_note:
        text += f"<br/><font size=8>{esc(plan.deadhead_note)}</font>"
    elif plan.vehicles:
        text += "<br/><font size=8>not minimised: any plan with this many vehicles</font>"
    sheets = sum(math.ceil(s / 60) for v in vehicle_days(plan) for s in (*v.before, v.pull_in))
    if sheets != shown_minutes(plan.deadhead_seconds):
        text += (f"<br/><font size=8>{format_duration(sheets * 60)} on the route sheets, which "
                 "round each drive up to the minute</font>")
    return text


def _facts_table(plan: Plan) -> Table:
    st = styles()
    rows = [[Paragraph(label, st["fact_label"]), Paragraph(value, st["fact_value"])]
            for label, value in _facts(plan)]
    table = Table(rows, colWidths=[40 * 3.6, FRAME_WIDTH - 40 * 3.6], hAlign="LEFT")
    table.setStyle(TableStyle([
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("LINEBELOW", (0, 0), (-1, -1), 0.3, LIGHT_GREY),
        ("LEFTPADDING", (0, 0), (-1, -1), 2),
        ("TOPPADDING", (0, 0), (-1, -1), 2),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 2),
    ]))
    return table


def _warnings(warnings: tuple[str, ...]) -> list[Flowable]:
    st = styles()
    if not warnings:
        return [Spacer(1, 4), Paragraph("No warnings about the input.", st["body"])]
    shown = warnings[:MAX_WARNINGS_SHOWN]
    items = [Paragraph(f"\u2022 {esc(w, LIMITS['warning'])}", st["body"]) for w in shown]
    hidden = len(warnings) - len(shown)
    if hidden:
        items.append(Paragraph(f"\u2026 and {hidden} more warnings, listed when the plan "
                               "is solved.", st["body"]))
    return [*heading("Warnings", room=30), *items]


def _tradeoff(plan: Plan) -> list[Flowable]:
    """How much empty driving each extra vehicle would save; nothing without a trade-off.

    Savings are differences of the printed (rounded) figures, so the columns add up
    as printed.  The "exactly this many" column is shown only when it prints
    differently from the "at most" column in some row.
    """
    rows = tradeoff_rows(plan, TRADEOFF_SHOWN)
    if not rows or plan.vehicles == 0:
        return []
    st = styles()
    fewest = rows[0].vehicles
    show_exact = any(row.exactly_differs for row in rows)
    head = ["Vehicles (at most)", "Least empty driving",
            f"Saving vs {_vehicles_text(fewest)}"]
    if show_exact:
        head.append("Exactly this many out")
    table_rows = [[Paragraph(head[0], st["cell_head"]),
                   *(Paragraph(h, st["cell_head_right"]) for h in head[1:])]]
    for row in rows:
        this_plan = row.vehicles == fewest
        cells = [f"{row.vehicles} (this plan)" if this_plan else str(row.vehicles),
                 format_duration(row.at_most),
                 "\u2014" if this_plan else format_duration(row.saving_minutes * 60)]
        if show_exact:
            cells.append(format_duration(row.exactly))
        table_rows.append([Paragraph(cells[0], st["cell"]),
                           *(Paragraph(c, st["cell_right"]) for c in cells[1:])])
    widths = [95, 95, 110] + ([110] if show_exact else [])
    table = Table(table_rows, colWidths=widths, hAlign="LEFT", repeatRows=1)
    table.setStyle(TableStyle(grid_table_style()))

    example = rows[1].vehicles if len(rows) > 1 else fewest
    body: list[Flowable] = [
        Paragraph(f"\u201cAt most {example}\u201d means the best plan with {example} "
                  "vehicles or fewer, so the empty driving never goes up.", st["body"]),
        table,
    ]
    notes = []
    if show_exact:
        why = (", because each vehicle that goes out also drives from the depot and back"
               if plan.day.settings.depot is not None else "")
        notes.append("\u201cExactly this many out\u201d is the least empty driving when "
                     f"all of them are used; it can be more than with fewer vehicles{why}.")
    last = rows[-1].vehicles
    if last == plan.day.n and last < fewest + TRADEOFF_SHOWN:
        notes.append(f"More than {_vehicles_text(last)} would change nothing: with "
                     f"{last}, each vehicle does a single job.")
    if notes:
        body += [Spacer(1, 3), Paragraph(" ".join(notes), st["small"])]
    # The heading starts a new page unless the whole section fits below it.
    room = sum(flowable.wrap(FRAME_WIDTH, 10_000)[1] for flowable in body) + 10
    return [*heading("What more vehicles would save", room=room), *body]
