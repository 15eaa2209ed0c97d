"""The proof pages of a plan under a working-day limit.

Two jobs fit one working day when one can follow the other and a vehicle doing
just those two is back within the limit (contract section 5).  Jobs no two of
which fit each need their own vehicle; where job weights prove more, no working
day within the limit carries more than 1 of them, so at least the rounded-up
sum is needed.  The pages say which, list the jobs with each pair's reason (as
the app does, :mod:`shipgui.core.workday.explain`), print the weights with how
to read them, and the result of the independent check, run again here for the
printed numbers.

How much of the pairs is printed depends on the set's size N, as for the plain
proof (:mod:`.certificate`): sentences up to ``SENTENCES_UP_TO``, a table of
every pair up to ``MATRIX_UP_TO``, and beyond that each job's nearest fit.
"""

from __future__ import annotations

from reportlab.platypus import Flowable, KeepTogether, LongTable, Paragraph, Spacer, TableStyle

from shipgui.core.model import Plan
from shipgui.core.workday.explain import (
    FitReason,
    a_working_day,
    closest_fits,
    explain_fit,
    fit_reason,
    format_limit,
    pair_kind_counts,
    proof_statement,
    weight_text,
    weights_reading,
    weights_total_text,
)
from shipgui.core.workday.verify import check_workday_plan, heaviest_route_weight

from .certificate import MATRIX_UP_TO, SENTENCES_UP_TO, jobs_table, pair_matrix, partner_table
from .pages import SectionStart
from .styles import (
    FAINT_GREY,
    FRAME_WIDTH,
    LIGHT_GREY,
    grid_table_style,
    heading,
    styles,
)
from .text import LIMITS, day_mark_note, esc, plan_date_text, slot_text

__all__ = ["build_workday_proof", "REFERENCES"]

REFERENCES = (
    "M. Fischetti, S. Martello and P. Toth, \u201cThe fixed job schedule problem with "
    "spread-time constraints\u201d, Operations Research 35(6), 1987",
    "M. E. L\u00fcbbecke and J. Desrosiers, \u201cSelected topics in column generation\u201d, "
    "Operations Research 53(6), 2005",
)


def build_workday_proof(plan: Plan) -> list[Flowable]:
    """The proof section for a plan under a working-day limit (``plan.workday`` set)."""
    st = styles()
    day = plan.day
    info = plan.workday
    size = len(plan.certificate)
    title = (f"Why {plan.vehicles} vehicle{'s' if plan.vehicles != 1 else ''} is the minimum "
             f"for {a_working_day(info.limit)}" if plan.proven_minimum else
             f"Why at least {plan.lower_bound} vehicles are needed within "
             f"{a_working_day(info.limit)}")
    story: list[Flowable] = [
        SectionStart("Proof of the vehicles needed",
                     detail=f"{size} jobs \u00b7 fingerprint {day.fingerprint}"),
        Paragraph(esc(title), st["title"]),
        Paragraph(esc(proof_statement(plan)), st["statement"]),
        Paragraph(_rule_text(plan), st["body"]),
    ]
    if plan.certificate_weights:
        story += _weights(plan)
    if size:
        story += _pairwise(plan)
    return story + _why_and_fingerprint(plan)


def _rule_text(plan: Plan) -> str:
    limit = format_limit(plan.workday.limit)
    depot = plan.day.settings.depot
    span = (f"from leaving {esc(plan.day.site_label(depot), LIMITS['name'])} to being back"
            if depot else "from the start of its first job to the end of its last")
    return (f"A vehicle\u2019s working day runs {span}; here it is at most {limit}. Two jobs "
            "fit one working day when one can follow the other (after the first job, the "
            "turnaround and the drive get the vehicle to the second in time) and one vehicle "
            f"doing just those two is back within {limit}. A vehicle doing more jobs cannot "
            "do better: travel times were made consistent first (a drive is never longer "
            "than going via a third site), so leaving jobs out of a route never breaks a "
            "link or lengthens the day. Jobs no two of which fit one working day therefore "
            "each need their own vehicle.")


# ------------------------------------------------------------------ weights

def _weights(plan: Plan) -> list[Flowable]:
    st = styles()
    day = plan.day
    rows = [[Paragraph(h, st["cell_head"]) for h in ("#", "Job", "Time", "From \u2192 to")]
            + [Paragraph("Weight", st["cell_head_right"])]]
    for number, (k, weight) in enumerate(plan.certificate_weights, start=1):
        job = day.jobs[k]
        place = esc(day.site_label(job.origin), LIMITS["name"])
        if job.destination != job.origin:
            place += " \u2192 " + esc(day.site_label(job.destination), LIMITS["name"])
        rows.append([Paragraph(str(number), st["cell"]),
                     Paragraph(f"<b>{esc(job.id, LIMITS['id'])}</b>", st["cell"]),
                     Paragraph(slot_text(job), st["cell"]), Paragraph(place, st["cell"]),
                     Paragraph(weight_text(weight), st["cell_right"])])
    rows.append(["", Paragraph("<b>Sum</b>", st["cell"]), "", "",
                 Paragraph(f"<b>{weights_total_text(plan.certificate_weights)}</b>",
                           st["cell_right"])])
    table = LongTable(rows, colWidths=[28, 76, 100, FRAME_WIDTH - 284, 80], repeatRows=1)
    table.setStyle(TableStyle(grid_table_style() + [
        ("LINEABOVE", (0, -1), (-1, -1), 0.8, LIGHT_GREY),
        ("BACKGROUND", (0, -1), (-1, -1), FAINT_GREY)]))
    note = day_mark_note(day, [t for k, _ in plan.certificate_weights
                               for t in (day.jobs[k].start, day.jobs[k].end)])
    story = [*heading(f"The weights: {len(plan.certificate_weights)} jobs", room=120),
             Paragraph(esc(weights_reading(plan)), st["body"]), table]
    if note:
        story.append(Paragraph(note, st["small"]))
    return story + [Spacer(1, 4), Paragraph(_check_text(plan), st["body"])]


def _check_text(plan: Plan) -> str:
    """The independent check run again on the printed weights: its verdict and the
    weight of the heaviest working day it found."""
    day = plan.day
    limit = plan.workday.limit
    weights = dict(plan.certificate_weights)
    failures = check_workday_plan(day, plan.routes, plan.certificate, weights,
                                  plan.lower_bound, limit)
    heaviest = heaviest_route_weight(day, limit, weights)
    if failures:
        return ("<b>Independent check: FAILED</b> (" + esc("; ".join(failures[:3]))
                + "). Do not rely on this bound.")
    return (f"<b>Independent check: passed.</b> Code written apart from the planner found the "
            f"heaviest working day within {format_limit(limit)} that these jobs allow: it "
            f"carries {_heaviest_text(heaviest)}, so none carries more than 1. The weights are "
            f"not negative, and their sum proves at least {plan.lower_bound}.")


def _heaviest_text(value: float) -> str:
    text = weight_text(value)
    return text if "/" in text or "." not in text else f"{value:.6f}".rstrip("0")


# ------------------------------------------------------------------ pairs

def _pairwise(plan: Plan) -> list[Flowable]:
    st = styles()
    day = plan.day
    size = len(plan.certificate)
    limit = plan.workday.limit
    intro = (f"These {size} jobs pairwise do not fit one working day, so they need {size} "
             "vehicles" + ("; the weights above prove more." if plan.certificate_weights
                           else "."))
    story = [*heading(f"The {size} jobs no two of which fit one working day"),
             Paragraph(intro, st["body"]), jobs_table(plan)]
    note = day_mark_note(day, [t for k in plan.certificate
                               for t in (day.jobs[k].start, day.jobs[k].end)])
    if note:
        story.append(Paragraph(note, st["small"]))
    if size < 2:
        return story
    counts = pair_kind_counts(day, plan.certificate, limit)
    story.append(Paragraph(_counts_text(counts, limit), st["body"]))
    why = "Why no two of them fit one working day"
    if size <= SENTENCES_UP_TO:
        story += [*heading(why), _pair_sentences(plan)]
    elif size <= MATRIX_UP_TO:
        story += _matrix(plan, why)
    else:
        story += [*heading(why), *_nearest_fits(plan)]
    return story


def _counts_text(counts: dict[str, int], limit: int) -> str:
    total = sum(counts.values())
    parts = [(counts["overlap"], "overlap in time"),
             (counts["short"], "cannot follow each other in time"),
             (counts["too long"], "could follow, but together make a working day longer "
                                  f"than {format_limit(limit)}"),
             (counts["class"], "need different vehicle classes")]
    said = "; ".join(f"{n:,} {words}" for n, words in parts if n)
    text = f"Of the {total:,} pairs: {said}."
    if counts["fits"]:
        text += f" <b>{counts['fits']:,} pairs fit one working day: the check failed.</b>"
    return text


def _pair_sentences(plan: Plan) -> LongTable:
    st = styles()
    cert, limit = plan.certificate, plan.workday.limit
    rows = [[Paragraph("Pair", st["cell_head"]),
             Paragraph("Why they need two vehicles", st["cell_head"])]]
    for x in range(len(cert)):
        for y in range(x + 1, len(cert)):
            rows.append([Paragraph(f"{x + 1} & {y + 1}", st["cell"]),
                         Paragraph(esc(explain_fit(plan.day, cert[x], cert[y], limit)),
                                   st["cell"])])
    table = LongTable(rows, colWidths=[40, FRAME_WIDTH - 40], repeatRows=1)
    table.setStyle(TableStyle(grid_table_style()))
    return table


def _matrix_cell(reason: FitReason) -> str:
    """Minutes short, 'ovl', 'cls', or the pair's working day as H:MM when too long."""
    if reason.kind == "too long":
        minutes = reason.day_minutes
        return f"{minutes // 60}:{minutes % 60:02d}"
    if reason.kind == "short":
        minutes = reason.follow.short_minutes
        return str(minutes) if minutes < 1000 else f"{round(minutes / 60)}h"
    return {"overlap": "ovl", "class": "cls"}.get(reason.kind, "ok")  # ok: a failed check


def _matrix(plan: Plan, title: str) -> list[Flowable]:
    """Every pair once, the earlier job in the row (the list is in start order)."""
    st = styles()
    cert, limit = plan.certificate, plan.workday.limit
    size = len(cert)
    cell = min(26.0, (FRAME_WIDTH - 22) / size)
    font_size = 6.5 if cell >= 19 else 5.6
    rows = [[""] + [str(b + 1) for b in range(size)]]
    for a in range(size):
        rows.append([str(a + 1)] + ["" if b <= a else
                                    _matrix_cell(fit_reason(plan.day, cert[a], cert[b], limit))
                                    for b in range(size)])
    table = pair_matrix(rows, cell, font_size)
    legend = ("How to read the table: each pair appears once, the earlier job in the row "
              "(numbers as in the list above). A number is how many minutes too late a "
              "vehicle would reach the second job after the first (rounded up; \u201ch\u201d "
              "means hours); \u201covl\u201d means the two jobs overlap in time; \u201ccls\u201d "
              "that they need different vehicle classes; a time such as 12:40 is the working "
              f"day of one vehicle doing both, longer than the {format_limit(limit)} limit. "
              "Every cell above the diagonal is filled, so no two of these jobs fit one "
              "working day.")
    return [KeepTogether([Paragraph(title, st["heading"]), Paragraph(legend, st["body"]),
                          table])]


def _nearest_fits(plan: Plan) -> list[Flowable]:
    cert, limit = plan.certificate, plan.workday.limit
    return partner_table(plan, "comes nearest to fitting one working day with",
                         "Nearest other job", closest_fits(plan.day, cert, limit),
                         lambda a, b: explain_fit(plan.day, a, b, limit))


# ------------------------------------------------------------------ closing

def _why_and_fingerprint(plan: Plan) -> list[Flowable]:
    st = styles()
    day = plan.day
    weights = ("Weights of this kind come from the linear programme that covers the jobs "
               f"with working days (its dual; {esc(REFERENCES[1])}), but the bound does not "
               "depend on how they were found: any weights that no working day carries "
               "above 1 prove it, and that is what the check confirms. ") \
        if plan.certificate_weights else ""
    return [
        *heading("Why this is a proof", room=60),
        Paragraph("With a longest working day, finding the fewest vehicles is a hard problem "
                  f"({esc(REFERENCES[0])}): the plan is searched for, and the number of "
                  "vehicles needed is proven separately, from below. " + weights
                  + "An independent check, written separately from the planner, confirmed "
                  "that every job is on exactly one route, that each route can be driven "
                  "within the limit, and the proof on these pages.", st["body"]),
        *heading("What this proof covers", room=40),
        Paragraph(f"It holds for the input with fingerprint <b>{esc(day.fingerprint)}</b> "
                  f"(plan date: {esc(plan_date_text(day))}): these jobs, sites, travel times "
                  "and settings, the longest working day among them. Any change to them "
                  "changes the fingerprint, and the plan must be solved again.", st["body"]),
    ]
