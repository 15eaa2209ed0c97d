"""The proof pages: a set of jobs no two of which can share a vehicle.

If no vehicle can do two of N jobs, any plan needs at least N vehicles; a plan
with N vehicles is then the minimum.  The pages list the N jobs, show for the
pairs why neither order works, and state the theorem that such a set always
exists for the minimum fleet.

How much is printed depends on N so that the pages stay bounded:

* N <= ``SENTENCES_UP_TO``: every pair is explained in a sentence, plus the matrix;
* N <= ``MATRIX_UP_TO``: the full N x N matrix of minutes late;
* larger N: for each job, its closest miss (the other job it comes nearest to
  sharing a vehicle with) in a sentence, N rows; all N(N-1)/2 pairs were checked
  by the independent verification, which the page says.
"""

from __future__ import annotations

import math

from reportlab.platypus import Flowable, KeepTogether, LongTable, Paragraph, Spacer, TableStyle

from shipgui.core import follow_slack
from shipgui.core.model import Plan

from .pages import SectionStart
from .styles import (
    FAINT_GREY,
    FONT,
    FONT_BOLD,
    FRAME_WIDTH,
    LIGHT_GREY,
    grid_table_style,
    heading,
    styles,
)
from .text import duration_text, esc, late_text, plan_date_text, slot_text

__all__ = ["build_certificate", "why_neither_order", "SENTENCES_UP_TO", "MATRIX_UP_TO"]

SENTENCES_UP_TO = 12
MATRIX_UP_TO = 30
REFERENCE = ("R. P. Dilworth, \u201cA decomposition theorem for partially ordered sets\u201d, "
             "Annals of Mathematics 51(1), 1950, pp. 161\u2013166")


def build_certificate(plan: Plan) -> list[Flowable]:
    """The proof section for ``plan``: the certificate jobs and why they are one per vehicle."""
    st = styles()
    day = plan.day
    size = len(plan.certificate)
    start = SectionStart("Proof that the fleet is minimum",
                         detail=f"{size} jobs \u00b7 fingerprint {day.fingerprint}")
    if size == 0:
        return [start, Paragraph("No jobs, no vehicles", st["title"]),
                Paragraph("The input has no jobs, so no vehicle is needed.", st["statement"]),
                *_theorem_and_fingerprint(plan)[-2:]]
    story: list[Flowable] = [
        start,
        Paragraph(f"Why {plan.vehicles} vehicle{'s' if plan.vehicles != 1 else ''} "
                  "is the minimum", st["title"]),
        Paragraph(_statement(size, plan.vehicles), st["statement"]),
        Paragraph(_rule_text(plan), st["body"]),
        *heading(f"The {size} jobs"),
        _jobs_table(plan),
    ]
    slack = _slack_matrix(plan)
    why = "Why no two of them can share a vehicle"
    if 1 < size <= SENTENCES_UP_TO:
        story += [*heading(why), _pair_sentences(plan), Spacer(1, 6)]
        story += _matrix(plan, slack)
    elif 1 < size <= MATRIX_UP_TO:
        story += _matrix(plan, slack, title=why)
    elif size > MATRIX_UP_TO:
        story += [*heading(why), *_closest_misses(plan, slack)]
    story += _theorem_and_fingerprint(plan)
    return story


def _statement(size: int, vehicles: int) -> str:
    if size == 1:
        return (f"There is work to do, so at least 1 vehicle is needed; this plan uses "
                f"{vehicles}, so it is the minimum.")
    return (f"No vehicle can do two of these {size} jobs, so at least {size} vehicles are "
            f"needed; this plan uses {vehicles}, so it is the minimum.")


def _rule_text(plan: Plan) -> str:
    turnaround = plan.day.settings.turnaround
    gets = f"the drive and the {duration_text(turnaround)} turnaround get" if turnaround \
        else "the drive gets"
    return ("A vehicle can do one job after another only if, once the first job ends, "
            f"{gets} it to the second job's start site no later than the "
            "second job starts, and both jobs are for the same vehicle class. Doing other "
            "jobs in between cannot help: travel times were made consistent first (a drive "
            "is never longer than going via a third site), so a vehicle that cannot make it "
            "directly cannot make it with stops on the way either.")


def _jobs_table(plan: Plan) -> LongTable:
    st = styles()
    day = plan.day
    classes = len(day.class_names) > 1
    head = ["#", "Job", "Time", "From \u2192 to"] + (["Class"] if classes else [])
    widths = [28, 76, 100] + ([FRAME_WIDTH - 274, 70] if classes else [FRAME_WIDTH - 204])
    rows = [[Paragraph(h, st["cell_head"]) for h in head]]
    for number, k in enumerate(plan.certificate, start=1):
        job = day.jobs[k]
        place = esc(day.site_label(job.origin))
        if job.destination != job.origin:
            place += " \u2192 " + esc(day.site_label(job.destination))
        row = [Paragraph(str(number), st["cell"]), Paragraph(f"<b>{esc(job.id)}</b>", st["cell"]),
               Paragraph(slot_text(job), st["cell"]), Paragraph(place, st["cell"])]
        if classes:
            row.append(Paragraph(esc(job.vehicle_class) or "(none)", st["cell"]))
        rows.append(row)
    table = LongTable(rows, colWidths=widths, repeatRows=1)
    table.setStyle(TableStyle(grid_table_style()))
    return table


def _slack_matrix(plan: Plan) -> list[list[int | None]]:
    """``slack[a][b]``: seconds to spare when certificate job b follows job a."""
    day, cert = plan.day, plan.certificate
    return [[follow_slack(day, i, j) if i != j else None for j in cert] for i in cert]


def why_neither_order(plan: Plan, a: int, b: int) -> str:
    """Plain text (not markup) saying why jobs ``a`` and ``b`` (day indices) cannot share."""
    day = plan.day
    first, second = day.jobs[a], day.jobs[b]
    forward, backward = follow_slack(day, a, b), follow_slack(day, b, a)
    if forward is None or backward is None:
        return f"{first.id} and {second.id} need different vehicle classes."
    return (f"After {first.id}, the vehicle reaches {second.id}'s start site "
            f"{_gap_text(forward)} {second.id} starts; after {second.id}, it reaches "
            f"{first.id}'s start site {_gap_text(backward)} {first.id} starts.")


def _gap_text(slack: int) -> str:
    if slack < 0:
        return f"{late_text(-slack)} after"
    return f"{duration_text(slack)} before"  # only possible for a plan that failed its check


def _pair_sentences(plan: Plan) -> LongTable:
    st = styles()
    cert = plan.certificate
    rows = [[Paragraph("Pair", st["cell_head"]),
             Paragraph("Why neither order works", st["cell_head"])]]
    for x in range(len(cert)):
        for y in range(x + 1, len(cert)):
            rows.append([Paragraph(f"{x + 1} & {y + 1}", st["cell"]),
                         Paragraph(esc(why_neither_order(plan, cert[x], cert[y])), st["cell"])])
    table = LongTable(rows, colWidths=[40, FRAME_WIDTH - 40], repeatRows=1)
    table.setStyle(TableStyle(grid_table_style()))
    return table


def _matrix_cell(slack: int | None) -> str:
    if slack is None:
        return "cls"
    if slack >= 0:
        return "ok"  # only possible for a plan that failed its check
    minutes = math.ceil(-slack / 60)
    return str(minutes) if minutes < 1000 else f"{round(minutes / 60)}h"


def _matrix(plan: Plan, slack: list[list[int | None]], *,
            title: str | None = None) -> list[Flowable]:
    st = styles()
    size = len(plan.certificate)
    cell = min(26.0, (FRAME_WIDTH - 22) / size)
    font_size = 7 if cell >= 19 else 6.2
    rows = [[""] + [str(b + 1) for b in range(size)]]
    for a in range(size):
        rows.append([str(a + 1)] + ["\u2013" if a == b else _matrix_cell(slack[a][b])
                                    for b in range(size)])
    table = LongTable(rows, colWidths=[22] + [cell] * size, repeatRows=1, hAlign="LEFT")
    table.setStyle(TableStyle([
        ("FONT", (0, 0), (-1, -1), FONT, font_size),
        ("FONT", (0, 0), (-1, 0), FONT_BOLD, font_size),
        ("FONT", (0, 0), (0, -1), FONT_BOLD, font_size),
        ("ALIGN", (0, 0), (-1, -1), "CENTER"),
        ("GRID", (0, 0), (-1, -1), 0.3, LIGHT_GREY),
        ("BACKGROUND", (0, 0), (-1, 0), FAINT_GREY),
        ("BACKGROUND", (0, 0), (0, -1), FAINT_GREY),
        ("TOPPADDING", (0, 0), (-1, -1), 1.5),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 2.5),
        ("LEFTPADDING", (0, 0), (-1, -1), 0.5),
        ("RIGHTPADDING", (0, 0), (-1, -1), 0.5),
    ] + [("BACKGROUND", (a + 1, a + 1), (a + 1, a + 1), LIGHT_GREY) for a in range(size)]))
    legend = ("How to read the table: the job in the row is done first, the job in the "
              "column second (numbers as in the list above). Each number is how many minutes "
              "too late the vehicle would reach the second job's start site; \u201ch\u201d "
              "means hours. \u201ccls\u201d means the two jobs need different vehicle "
              "classes. Every cell off the diagonal is filled, so neither order works for "
              "any pair.")
    # The matrix is at most 31 short rows: keep it on one page with its legend.
    block = [Paragraph(legend, st["body"]), table]
    if title:
        block.insert(0, Paragraph(title, st["heading"]))
    return [KeepTogether(block)]


def _closest_misses(plan: Plan, slack: list[list[int | None]]) -> list[Flowable]:
    st = styles()
    cert = plan.certificate
    size = len(cert)
    intro = (f"All {size * (size - 1) // 2} pairs of these {size} jobs were checked by the "
             "independent verification of this plan. Listing them all would take too many "
             "pages, so for each job the table shows the other job it comes closest to "
             "sharing a vehicle with, and why even that does not work.")
    rows = [[Paragraph(h, st["cell_head"]) for h in
             ("#", "Job", "Closest other job", "Why neither order works")]]
    for a in range(size):
        partner = _closest_partner(slack, a)
        if partner is None:
            reason = "Every other job in this set needs a different vehicle class."
            other = "\u2013"
        else:
            reason = why_neither_order(plan, cert[a], cert[partner])
            other = f"{partner + 1}: {plan.day.jobs[cert[partner]].id}"
        rows.append([Paragraph(str(a + 1), st["cell"]),
                     Paragraph(esc(plan.day.jobs[cert[a]].id), st["cell"]),
                     Paragraph(esc(other), st["cell"]), Paragraph(esc(reason), st["cell"])])
    table = LongTable(rows, colWidths=[28, 72, 90, FRAME_WIDTH - 190], repeatRows=1)
    table.setStyle(TableStyle(grid_table_style()))
    return [Paragraph(intro, st["body"]), table]


def _closest_partner(slack: list[list[int | None]], a: int) -> int | None:
    """The other job whose better order misses by the least."""
    best, best_gap = None, None
    for b in range(len(slack)):
        if b == a or slack[a][b] is None:
            continue
        gap = max(slack[a][b], slack[b][a])  # the better of the two orders
        if best_gap is None or gap > best_gap:
            best, best_gap = b, gap
    return best


def _theorem_and_fingerprint(plan: Plan) -> list[Flowable]:
    st = styles()
    day = plan.day
    return [
        *heading("Why such a set always exists"),
        Paragraph("For any day of jobs, the fewest vehicles that can do all the jobs equals "
                  "the largest number of jobs of which no two can share a vehicle. This is "
                  f"Dilworth\u2019s theorem ({esc(REFERENCE)}). The planner finds the routes "
                  "and such a set together; an independent check, written separately from "
                  "the planner, confirmed that every job is on exactly one route, that each "
                  "route can be driven, and that no two jobs of the set can share a vehicle.",
                  st["body"]),
        *heading("What this proof covers", room=40),
        Paragraph(f"It holds for the input with fingerprint <b>{esc(day.fingerprint)}</b> "
                  f"(plan date: {esc(plan_date_text(day))}): these jobs, sites, travel times "
                  "and settings. Any change to them changes the fingerprint, and the plan "
                  "must be solved again.", st["body"]),
    ]
