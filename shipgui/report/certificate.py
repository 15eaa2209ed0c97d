"""The proof pages: a set of jobs no two of which can share a vehicle.

If no vehicle can do two of N jobs, any plan needs at least N vehicles; a plan
with N vehicles is then the minimum.  The pages first say it at a glance (the
busiest moment on a time axis, the count per vehicle class, the pairs that
come nearest to sharing a vehicle), then list the N jobs, show for the pairs
why they cannot share, and state the theorem that such a set always exists for
the minimum fleet.  The reasons are worded by
:mod:`shipgui.core.fleet.explain`, as in the app.

How much is printed depends on N so that the pages stay bounded:

* N <= ``SENTENCES_UP_TO``: every pair is explained in a sentence;
* N <= ``MATRIX_UP_TO``: the table of every pair (minutes short, overlap, class);
* larger N: for each job, its closest miss (the other job it comes nearest to
  sharing a vehicle with) in a sentence, N rows; all N(N-1)/2 pairs were checked
  by the independent verification, which the page says.
"""

from __future__ import annotations

from collections.abc import Callable

from reportlab.platypus import Flowable, KeepTogether, LongTable, Paragraph, Spacer, TableStyle

from shipgui.core.clock import format_day_clock, format_duration
from shipgui.core.fleet.explain import (
    PairReason,
    closest_partners,
    explain_pair,
    nearest_misses,
    pair_reason,
    peak_moment,
    reason_label,
)
from shipgui.core.fleet.schedule import class_counts
from shipgui.core.model import Plan

from .pages import SectionStart
from .proof_picture import MAX_BARS, peak_picture
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
from .text import LIMITS, day_mark_note, esc, plan_date_text, slot_text

__all__ = ["build_certificate", "SENTENCES_UP_TO", "MATRIX_UP_TO", "NEAREST_MISSES_SHOWN"]

SENTENCES_UP_TO = 12
MATRIX_UP_TO = 30
NEAREST_MISSES_SHOWN = 5
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
        *_served_only(plan),
        Paragraph(_rule_text(plan), st["body"]),
        *_at_a_glance(plan),
        *heading(f"The {size} jobs"),
        jobs_table(plan),
    ]
    note = day_mark_note(day, [t for k in plan.certificate
                               for t in (day.jobs[k].start, day.jobs[k].end)])
    if note:
        story.append(Paragraph(note, st["small"]))
    why = "Why no two of them can share a vehicle"
    if 1 < size <= SENTENCES_UP_TO:
        story += [*heading(why), _pair_sentences(plan), Spacer(1, 6)]
    elif 1 < size <= MATRIX_UP_TO:
        story += _matrix(plan, title=why)
    elif size > MATRIX_UP_TO:
        story += [*heading(why), *_closest_misses(plan)]
    story += _theorem_and_fingerprint(plan)
    return story


def _at_a_glance(plan: Plan) -> list[Flowable]:
    """What convinces without the mathematics: the busiest moment on a time axis,
    the count per class, and the pairs that come nearest to sharing a vehicle."""
    st = styles()
    day = plan.day
    cert = list(plan.certificate)
    moment, running = peak_moment(day, cert)
    at_once = [cert[p] for p in running]
    shown = cert if len(cert) <= MAX_BARS else at_once[:MAX_BARS]
    text = (f"At {format_day_clock(moment)}, {len(at_once)} of these jobs are running at the "
            "same time, so each of them needs its own vehicle (filled bars).")
    rest = len(cert) - len(at_once)
    if rest:
        text += (f" Each of the other {rest} cannot be reached in time from any of them, nor "
                 "they from it, or needs another vehicle class. For each of them the picture "
                 "shows its nearest miss: the dashed line runs from the end of the earlier "
                 "job to when a vehicle could at best be at the later job's start site, and "
                 "drops to that job's row after it has begun. Every pair is listed below.")
    if len(shown) < len(cert):
        text += f" The picture shows {len(shown)} of the jobs running at that moment."
    story = [*heading("At a glance", room=120), Paragraph(text, st["body"]),
             peak_picture(plan, shown, moment, FRAME_WIDTH)]
    counts = class_counts(plan)
    if len(counts) > 1:
        story.append(Paragraph("By vehicle class: " + "; ".join(
            f"{esc(name or '(no class)', LIMITS['id'])}: {count} vehicle"
            f"{'s' if count != 1 else ''} and {count} of these jobs"
            for name, count in counts) + ".", st["body"]))
    return story + _nearest_misses(plan)


def _nearest_misses(plan: Plan) -> list[Flowable]:
    misses = nearest_misses(plan.day, plan.certificate, NEAREST_MISSES_SHOWN)
    if not misses:
        return []
    st = styles()
    rows = [[Paragraph(h, st["cell_head"]) for h in ("Jobs", "In short", "Why")]]
    for reason in misses:
        rows.append([Paragraph(_pair_ids(plan, reason), st["cell"]),
                     Paragraph(reason_label(reason), st["cell"]),
                     Paragraph(esc(explain_pair(plan.day, reason.first, reason.second)),
                               st["cell_small"])])
    table = LongTable(rows, colWidths=[100, 80, FRAME_WIDTH - 180], repeatRows=1)
    table.setStyle(TableStyle(grid_table_style()))
    intro = ("The pairs that come nearest to sharing a vehicle. Only a change to the day "
             "(a slot moved by at least this much, if the customer agrees) could let them "
             "share one; that is where to look first for a vehicle less.")
    return [*heading("Nearest misses", room=60), Paragraph(intro, st["body"]), table]


def _pair_ids(plan: Plan, reason: PairReason) -> str:
    jobs = plan.day.jobs
    return (f"<b>{esc(jobs[reason.first].id, LIMITS['id'])}</b> then "
            f"<b>{esc(jobs[reason.second].id, LIMITS['id'])}</b>")


def _served_only(plan: Plan) -> list[Flowable]:
    """With fewer vehicles than needed, the proof is about the jobs served."""
    sf = plan.shortfall
    if sf is None or not sf.unserved:
        return []
    return [Paragraph(f"This concerns the {plan.day.n - len(sf.unserved)} jobs the plan serves "
                      "with the vehicles available; the jobs not served, and why no more fit, "
                      "are on the pages \u201cJobs not served\u201d.", styles()["body"])]


def _statement(size: int, vehicles: int) -> str:
    if size == 1:
        return (f"There is work to do, so at least 1 vehicle is needed; this plan uses "
                f"{vehicles}, so it is the minimum.")
    return (f"No vehicle can do two of these {size} jobs, so at least {size} vehicles are "
            f"needed; this plan uses {vehicles}, so it is the minimum.")


def _rule_text(plan: Plan) -> str:
    turnaround = plan.day.settings.turnaround
    gets = f"the drive and the {format_duration(turnaround)} turnaround get" if turnaround \
        else "the drive gets"
    return ("A vehicle can do one job after another only if, once the first job ends, "
            f"{gets} it to the second job's start site no later than the "
            "second job starts, and both jobs are for the same vehicle class. Doing other "
            "jobs in between cannot help: travel times were made consistent first (a drive "
            "is never longer than going via a third site), so a vehicle that cannot make it "
            "directly cannot make it with stops on the way either.")


def jobs_table(plan: Plan) -> LongTable:
    st = styles()
    day = plan.day
    classes = len(day.class_names) > 1
    head = ["#", "Job", "Time", "From \u2192 to"] + (["Class"] if classes else [])
    widths = [28, 76, 100] + ([FRAME_WIDTH - 274, 70] if classes else [FRAME_WIDTH - 204])
    rows = [[Paragraph(h, st["cell_head"]) for h in head]]
    for number, k in enumerate(plan.certificate, start=1):
        job = day.jobs[k]
        place = esc(day.site_label(job.origin), LIMITS["name"])
        if job.destination != job.origin:
            place += " \u2192 " + esc(day.site_label(job.destination), LIMITS["name"])
        row = [Paragraph(str(number), st["cell"]),
               Paragraph(f"<b>{esc(job.id, LIMITS['id'])}</b>", st["cell"]),
               Paragraph(slot_text(job), st["cell"]), Paragraph(place, st["cell"])]
        if classes:
            row.append(Paragraph(esc(job.vehicle_class, LIMITS["id"]) or "(none)",
                                 st["cell"]))
        rows.append(row)
    table = LongTable(rows, colWidths=widths, repeatRows=1)
    table.setStyle(TableStyle(grid_table_style()))
    return table


def _pair_sentences(plan: Plan) -> LongTable:
    st = styles()
    cert = plan.certificate
    rows = [[Paragraph("Pair", st["cell_head"]),
             Paragraph("Why they need two vehicles", st["cell_head"])]]
    for x in range(len(cert)):
        for y in range(x + 1, len(cert)):
            rows.append([Paragraph(f"{x + 1} & {y + 1}", st["cell"]),
                         Paragraph(esc(explain_pair(plan.day, cert[x], cert[y])), st["cell"])])
    table = LongTable(rows, colWidths=[40, FRAME_WIDTH - 40], repeatRows=1)
    table.setStyle(TableStyle(grid_table_style()))
    return table


def _matrix_cell(reason: PairReason) -> str:
    """The table's short form of :func:`reason_label`: minutes short, 'ovl', 'cls'."""
    if reason.kind == "short":
        minutes = reason.short_minutes
        return str(minutes) if minutes < 1000 else f"{round(minutes / 60)}h"
    return {"overlap": "ovl", "class": "cls"}.get(reason.kind, "ok")  # ok: a failed check


def pair_matrix(rows: list[list[str]], cell: float, font_size: float) -> LongTable:
    """The table of every pair once (row = earlier job), shared by both proofs."""
    size = len(rows) - 1
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
    ] + [("BACKGROUND", (1, a + 1), (a + 1, a + 1), FAINT_GREY) for a in range(size)]))
    return table


def _matrix(plan: Plan, *, title: str | None = None) -> list[Flowable]:
    """Every pair once, earlier job in the row (the list is in start order)."""
    st = styles()
    cert = plan.certificate
    size = len(cert)
    cell = min(26.0, (FRAME_WIDTH - 22) / size)
    font_size = 7 if cell >= 19 else 6.2
    rows = [[""] + [str(b + 1) for b in range(size)]]
    for a in range(size):
        rows.append([str(a + 1)] + ["" if b <= a else
                                    _matrix_cell(pair_reason(plan.day, cert[a], cert[b]))
                                    for b in range(size)])
    table = pair_matrix(rows, cell, font_size)
    legend = ("How to read the table: each pair appears once, the earlier job in the row "
              "(numbers as in the list above); the later job can never go first, as it "
              "starts later. A number is how many minutes too late a vehicle would reach the "
              "second job's start site after the first (\u201ccannot follow: so many min "
              "short\u201d, rounded up; \u201ch\u201d means hours); \u201covl\u201d means the "
              "two jobs overlap in time; \u201ccls\u201d that they need different vehicle "
              "classes. Every cell above the diagonal is filled, so no pair can share a "
              "vehicle.")
    # The table is at most 31 short rows: keep it on one page with its legend.
    block = [Paragraph(legend, st["body"]), table]
    if title:
        block.insert(0, Paragraph(title, st["heading"]))
    return [KeepTogether(block)]


def _closest_misses(plan: Plan) -> list[Flowable]:
    return partner_table(plan, "comes closest to sharing a vehicle with", "Closest other job",
                         closest_partners(plan.day, plan.certificate),
                         lambda a, b: explain_pair(plan.day, a, b))


def partner_table(plan: Plan, relation: str, partner_heading: str, partners,
                  explain: Callable[[int, int], str]) -> list[Flowable]:
    """A proof too large to list pair by pair: for each proof job, the other job
    it ``relation`` (``partners[a]``: its place in the certificate, -1: none
    of its class) and ``explain(job, other)``, why even they need two vehicles."""
    st = styles()
    cert = plan.certificate
    size = len(cert)
    intro = (f"All {size * (size - 1) // 2:,} pairs of these {size} jobs were checked by the "
             "independent verification of this plan. Listing them all would take too many "
             f"pages, so for each job the table shows the other job it {relation}, "
             "and why even that does not work.")
    rows = [[Paragraph(h, st["cell_head"]) for h in
             ("#", "Job", partner_heading, "Why they need two vehicles")]]
    for a in range(size):
        partner = int(partners[a])
        if partner < 0:
            reason = "Every other job in this set needs a different vehicle class."
            other = "\u2013"
        else:
            reason = explain(cert[a], cert[partner])
            other = f"{partner + 1}: {plan.day.jobs[cert[partner]].id}"
        rows.append([Paragraph(str(a + 1), st["cell"]),
                     Paragraph(esc(plan.day.jobs[cert[a]].id, LIMITS["id"]), st["cell"]),
                     Paragraph(esc(other, LIMITS["id"]), st["cell"]),
                     Paragraph(esc(reason), st["cell_small"])])
    table = LongTable(rows, colWidths=[28, 72, 90, FRAME_WIDTH - 190], repeatRows=1)
    table.setStyle(TableStyle(grid_table_style()))
    return [Paragraph(intro, st["body"]), table]


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
