"""One route sheet per vehicle: what a driver takes along for the day.

Big times, the stops in order with sites (and their contact, opening hours and
access notes where the sites file has them), customer, reference and notes, the
empty drive before each job (minutes, and km where coordinates allow), long
waits and whether there is time to go back to the depot, tick boxes, and
sign-off lines at the end.

Every figure on the sheet is rounded once and the totals are sums of what is
printed: each drive is rounded up to the minute, the empty driving in the
header is the sum of those minutes, and the working day runs from the printed
leaving time to the printed time back.  That can print a minute or two over a
working-day limit the route keeps to the second; the sheet then says so.
"""

from __future__ import annotations

import math

from reportlab.platypus import (
    Flowable,
    KeepTogether,
    LongTable,
    Paragraph,
    Spacer,
    Table,
    TableStyle,
)

from shipgui.core.clock import format_day_clock, format_duration
from shipgui.core.fleet.schedule import VehicleDay, Wait, route_km, vehicle_day
from shipgui.core.model import Day, Job, Plan
from shipgui.core.travel import site_distance_km
from shipgui.core.workday.explain import format_limit

from .pages import SectionStart
from .styles import FAINT_GREY, FRAME_WIDTH, INK, LIGHT_GREY, MID_GREY, grid_table_style, styles
from .text import (
    LIMITS,
    clock_down,
    clock_up,
    day_mark_note,
    drive_minutes,
    esc,
    esc_lines,
    plan_date_text,
    site_block,
)

__all__ = ["build_route_sheet", "STOP_COLUMNS"]

TICK_BOX = "\u2610"
# (header, width in points); widths add up to the frame width of an A4 page.
STOP_COLUMNS = (
    ("#", 18),
    ("Empty drive first", 44),
    ("Time", 64),
    ("From \u2192 to", 146),
    ("Customer \u00b7 reference", 92),
    ("Notes", 98),
    ("Done", FRAME_WIDTH - 462),
)


def build_route_sheet(plan: Plan, vehicle_number: int, *,
                      driver_name: str | None = None) -> list[Flowable]:
    """The route sheet of vehicle ``vehicle_number`` (1-based, as printed).

    Long routes continue on further pages; the table header repeats there.
    """
    if not 1 <= vehicle_number <= plan.vehicles:
        raise ValueError(f"vehicle {vehicle_number} is not in this plan "
                         f"(vehicles 1 to {plan.vehicles})")
    day = plan.day
    v = vehicle_day(plan, vehicle_number)
    story: list[Flowable] = [
        SectionStart(f"Route sheet \u2014 vehicle {vehicle_number} of {plan.vehicles}",
                     detail=f"Plan date: {plan_date_text(day)}",
                     continued=f"Vehicle {vehicle_number} (continued)"),
        _title_block(v, (driver_name or "").strip()),
        Spacer(1, 6),
        _times_block(plan, v),
    ]
    note = day_mark_note(day, _printed_times(day, v))
    if note:
        story += [Spacer(1, 3), Paragraph(note, styles()["small"])]
    story += [Spacer(1, 8), _stops_table(day, v), Spacer(1, 8), _sign_off()]
    return story


def _title_block(v: VehicleDay, driver: str) -> Table:
    """Vehicle number and class; lines for the driver and the registration."""
    st = styles()
    heading = f"Vehicle {v.vehicle}"
    if v.vehicle_class:
        heading += f" <font size=12>({esc(v.vehicle_class, LIMITS['label'])})</font>"
    name = f"<b>{esc(driver, LIMITS['label'])}</b>" if driver else "_" * 30
    table = Table([[Paragraph(heading, st["vehicle"]),
                    Paragraph(f"Driver: {name}<br/>Registration: {'_' * 18}", st["driver"])]],
                  colWidths=[FRAME_WIDTH * 0.42, FRAME_WIDTH * 0.58])
    table.setStyle(TableStyle([("VALIGN", (0, 0), (-1, -1), "BOTTOM"),
                               ("LEFTPADDING", (0, 0), (0, -1), 0),
                               ("RIGHTPADDING", (-1, 0), (-1, -1), 0)]))
    return table


def _shown_minutes(seconds: int) -> int:
    """A drive as the sheet prints it: whole minutes, rounded up."""
    return math.ceil(seconds / 60)


def _times_block(plan: Plan, v: VehicleDay) -> Table:
    """Boxes: leave, first job, last job, back (or start and finish without a depot),
    then the day in figures that add up to what the sheet prints."""
    st = styles()
    day = plan.day
    first, last = day.jobs[v.jobs[0]], day.jobs[v.jobs[-1]]
    if v.leave is not None and v.back is not None:
        where = esc(day.site_label(day.settings.depot), LIMITS["label"])
        boxes = [("Leave " + where + " by", clock_down(v.leave)),
                 (f"First job {esc(first.id, LIMITS['label'])} starts",
                  format_day_clock(first.start)),
                 (f"Last job {esc(last.id, LIMITS['label'])} ends", format_day_clock(last.end)),
                 ("Back at " + where + " about", clock_up(v.back))]
        working = (math.ceil(v.back / 60) - math.floor(v.leave / 60)) * 60
    else:
        boxes = [(f"First job {esc(first.id, LIMITS['label'])} starts at "
                  f"{esc(day.site_label(first.origin), LIMITS['name'])}",
                  format_day_clock(first.start)),
                 (f"Last job {esc(last.id, LIMITS['label'])} ends at "
                  f"{esc(day.site_label(last.destination), LIMITS['name'])}",
                  format_day_clock(last.end))]
        working = v.working_day
    empty = sum(_shown_minutes(s) for s in (*v.before, v.pull_in))
    limit = day.settings.max_day
    rounded_over = limit is not None and working > limit >= v.working_day
    figures = [f"{len(v.jobs)} job{'s' if len(v.jobs) != 1 else ''}",
               f"working day {format_duration(working)}"
               + (f" (limit {format_limit(limit)})" if limit is not None else ""),
               f"empty driving {format_duration(empty * 60)}"]
    if rounded_over:  # the times are rounded outwards; the day itself keeps the limit
        figures.insert(2, "over the limit only because the times are rounded outwards: "
                          f"the day itself is {format_duration(v.working_day)} or less")
    km = route_km(plan, v.vehicle)
    if km is not None:
        figures.append(f"about {km:,.0f} km in all")
    cells = [[Paragraph(label, st["box_label"]), Paragraph(t, st["box_value"])]
             for label, t in boxes]
    cells.append([Paragraph("The day", st["box_label"]),
                  Paragraph("<br/>".join(figures), st["cell_small"])])
    widths = [(FRAME_WIDTH - 120) / len(boxes)] * len(boxes) + [120]
    table = Table([[c[0] for c in cells], [c[1] for c in cells]], colWidths=widths)
    table.setStyle(TableStyle([
        ("BOX", (0, 0), (-1, -1), 0.8, INK),
        ("LINEAFTER", (0, 0), (-2, -1), 0.4, MID_GREY),
        ("VALIGN", (0, 0), (-1, -1), "BOTTOM"),
        ("TOPPADDING", (0, 0), (-1, -1), 3),
        ("BOTTOMPADDING", (0, 1), (-1, 1), 5),
    ]))
    return table


def _legs(day: Day, v: VehicleDay) -> list[tuple[str, str]]:
    """(from site, to site) of each empty drive before a job; ('', '') for none."""
    depot = day.settings.depot
    legs = []
    for pos, k in enumerate(v.jobs):
        before = depot if pos == 0 else day.jobs[v.jobs[pos - 1]].destination
        legs.append((before or "", day.jobs[k].origin))
    return legs


def _km(day: Day, a: str, b: str) -> float | None:
    if not a or not b:
        return None
    return 0.0 if a == b else site_distance_km(day.sites.get(a), day.sites.get(b),
                                               day.settings.circuity)


def _drive_cell(day: Day, seconds: int, leg: tuple[str, str]) -> str | Paragraph:
    if not seconds:
        return "\u2013"
    km = _km(day, *leg)
    text = drive_minutes(seconds)
    if km is None:
        return text
    return Paragraph(f"{text}<br/><font size=7>{km:,.0f} km</font>", styles()["cell"])


def _stop_row(day: Day, number: int, job: Job, drive: str | Paragraph) -> list:
    st = styles()
    place = site_block(day, job.origin, details=True)
    if job.destination != job.origin:
        place += "<br/>\u2192 " + site_block(day, job.destination, details=True)
    else:
        place += "<br/><font size=7>(ends at the same site)</font>"
    who = "<br/>".join(part for part in (
        f"<b>{esc(job.customer, LIMITS['text'])}</b>" if job.customer else "",
        esc(job.reference, LIMITS["text"])) if part)
    # Plain strings where no wrapping or markup is needed: much cheaper than Paragraphs.
    return [
        str(number),
        drive,
        Paragraph(f"{_big_time(format_day_clock(job.start))}<br/><font size=8>to "
                  f"{format_day_clock(job.end)}</font><br/>"
                  f"<font size=7>{esc(job.id, LIMITS['id'])}</font>", st["time_big"]),
        Paragraph(place, st["cell"]),
        Paragraph(who, st["cell"]) if who else "",
        Paragraph(esc_lines(job.notes, LIMITS["notes"]), st["cell_small"]) if job.notes else "",
        Paragraph(f"{TICK_BOX} done<br/>at _____", st["done"]),
    ]


def _big_time(text: str) -> str:
    """A clock time in bold with its day mark small beside it ('00:58 +1')."""
    clock, _, mark = text.partition(" ")
    return f"<b>{clock}</b>" + (f"<font size=8> {mark}</font>" if mark else "")


def _wait_text(day: Day, v: VehicleDay, wait: Wait) -> str:
    """A long wait, where it is spent, and whether the depot is within reach."""
    job = day.jobs[v.jobs[wait.after]]
    minutes = math.floor(wait.end / 60) - math.ceil(wait.start / 60)  # as the clocks print
    text = (f"Wait {format_duration(minutes * 60)} at "
            f"<b>{esc(day.site_label(job.destination), LIMITS['name'])}</b>: free from "
            f"{clock_up(wait.start)}, drive on by {clock_down(wait.end)}.")
    depot = day.settings.depot
    if depot is None:
        return text
    where = esc(day.site_label(depot), LIMITS["name"])
    if wait.depot_time is None:
        return text + f" Not enough time to go back to {where} in between."
    return (text + f" Time to go back to {where} in between: about "
            f"{format_duration(wait.depot_time)} there.")


def _stops_table(day: Day, v: VehicleDay) -> LongTable:
    st = styles()
    rows = [[Paragraph(head, st["cell_head"]) for head, _ in STOP_COLUMNS]]
    waits = {w.after: w for w in v.waits}
    wait_rows = []
    for pos, (k, before, leg) in enumerate(zip(v.jobs, v.before, _legs(day, v), strict=True)):
        rows.append(_stop_row(day, pos + 1, day.jobs[k], _drive_cell(day, before, leg)))
        if pos in waits:
            wait_rows.append(len(rows))
            rows.append(["", "", Paragraph(_wait_text(day, v, waits[pos]), st["cell"]),
                         "", "", "", ""])
    if v.back is not None:
        last = day.jobs[v.jobs[-1]]
        rows.append(["", _drive_cell(day, v.pull_in, (last.destination, day.settings.depot)),
                     Paragraph(f"{_big_time(clock_up(v.back))}<br/><font size=7>about</font>",
                               st["time_big"]),
                     Paragraph("Back to " + site_block(day, day.settings.depot), st["cell"]),
                     "", "", Paragraph(f"{TICK_BOX} back", st["cell"])])
    table = LongTable(rows, colWidths=[w for _, w in STOP_COLUMNS], repeatRows=1)
    table.setStyle(TableStyle(grid_table_style() + [
        ("LINEBELOW", (0, 1), (-1, -1), 0.5, LIGHT_GREY),
        ("TOPPADDING", (0, 1), (-1, -1), 4),
        ("BOTTOMPADDING", (0, 1), (-1, -1), 4),
    ] + [command for r in wait_rows for command in (
        ("SPAN", (2, r), (-1, r)), ("BACKGROUND", (0, r), (-1, r), FAINT_GREY))]))
    return table


def _printed_times(day: Day, v: VehicleDay) -> list[int]:
    times = [t for k in v.jobs for t in (day.jobs[k].start, day.jobs[k].end)]
    return times + [t for t in (v.leave, v.back) if t is not None]


def _sign_off() -> Flowable:
    """Sign-off lines, kept together with a rule above instead of a heading (saves room)."""
    st = styles()
    line = "_" * 22
    rows = [
        [Paragraph(f"{TICK_BOX} Vehicle checked before leaving", st["cell"]),
         Paragraph(f"{TICK_BOX} All jobs done as listed (if not, note why)", st["cell"])],
        [Paragraph(f"Start: time {line[:9]}  odometer {line[:12]}", st["cell"]),
         Paragraph(f"End: time {line[:9]}  odometer {line[:12]}", st["cell"])],
        [Paragraph(f"Driver signature {line}", st["cell"]),
         Paragraph(f"Dispatcher signature {line}", st["cell"])],
    ]
    table = Table(rows, colWidths=[FRAME_WIDTH / 2] * 2)
    table.setStyle(TableStyle([("LINEABOVE", (0, 0), (-1, 0), 0.8, INK),
                               ("TOPPADDING", (0, 0), (-1, -1), 8),
                               ("LEFTPADDING", (0, 0), (-1, -1), 0)]))
    return KeepTogether([table])
