"""The summary section: the plan's key facts, warnings and the timeline of all vehicles."""

from __future__ import annotations

from reportlab.platypus import Flowable, Paragraph, Spacer, Table, TableStyle

from shipgui.core import format_clock
from shipgui.core.model import Plan

from .pages import SectionStart
from .styles import FRAME_WIDTH, LIGHT_GREY, heading, styles
from .text import duration_text, esc, plan_date_text, source_names
from .timeline import Timeline, timeline_rows

__all__ = ["build_summary", "MAX_WARNINGS_SHOWN"]

# Warnings beyond this many are counted, not printed: the summary is one page of facts.
MAX_WARNINGS_SHOWN = 8


def build_summary(plan: Plan) -> list[Flowable]:
    """The first section: facts about the plan, warnings, and the timeline picture.

    The timeline continues on further pages when there are more vehicles than fit.
    """
    st = styles()
    day = plan.day
    story: list[Flowable] = [
        SectionStart("Vehicle plan \u2014 summary", detail=f"Plan date: {plan_date_text(day)}",
                     continued="Vehicle plan \u2014 timeline (continued)"),
        Paragraph("Vehicle plan" + (f" for {day.plan_date.isoformat()}" if day.plan_date
                                    else ""), st["title"]),
        Paragraph(f"{plan.vehicles} vehicles cover all {day.n} jobs. No plan with fewer "
                  "vehicles exists: the proof is on the last pages.", st["body"]),
        _facts_table(plan),
        *_warnings(day.warnings),
        *heading("Timeline of all vehicles"),
        Paragraph("One row per vehicle, numbered as on the route sheets. Hours run along "
                  "the top and bottom; 24 and later are the next morning.", st["small"]),
        Spacer(1, 4),
        Timeline(timeline_rows(plan)) if plan.routes else Paragraph("No jobs.", st["body"]),
    ]
    return story


def _facts(plan: Plan) -> list[tuple[str, str]]:
    day = plan.day
    job_time = sum(job.end - job.start for job in day.jobs)
    facts = [("Plan date", esc(plan_date_text(day)))]
    for kind, name in source_names(day):
        facts.append((f"{kind.capitalize()} file", esc(name)))
    facts += [
        ("Input fingerprint", f"<b>{esc(day.fingerprint)}</b>"),
        ("Vehicles needed", f"<b>{plan.vehicles}</b>"),
        ("Jobs", str(day.n)),
        ("Total job time", duration_text(job_time)),
        ("Total empty driving", duration_text(plan.deadhead_seconds)),
        ("Turnaround between jobs", duration_text(day.settings.turnaround)),
    ]
    settings = day.settings
    if settings.depot is not None:
        hours = ""
        if settings.day_start is not None and settings.day_end is not None:
            hours = (f", open {format_clock(settings.day_start)}\u2013"
                     f"{format_clock(settings.day_end)}")
        facts.append(("Depot", esc(day.site_label(settings.depot)) + hours))
    if len(day.class_names) > 1:
        facts.append(("Vehicle classes", esc(", ".join(day.class_names))))
    facts.append(("Independent check", "passed: every job is on exactly one route, every "
                  "route can be driven, and the proof holds"))
    return facts


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
    items = [Paragraph(f"\u2022 {esc(w)}", st["body"]) for w in shown]
    hidden = len(warnings) - len(shown)
    if hidden:
        items.append(Paragraph(f"\u2026 and {hidden} more warnings, listed when the plan "
                               "is solved.", st["body"]))
    return [*heading("Warnings", room=30), *items]
