"""One route sheet per vehicle: what a driver takes along for the day.

Big times, the stops in order with sites, customer, reference and notes, the
empty drive before each job, tick boxes, and sign-off lines at the end.
"""

from __future__ import annotations

from reportlab.platypus import (
    Flowable,
    KeepTogether,
    LongTable,
    Paragraph,
    Spacer,
    Table,
    TableStyle,
)

from shipgui.core import format_clock
from shipgui.core.fleet.deadhead import RouteLegs, route_legs
from shipgui.core.model import Day, Job, Plan

from .pages import SectionStart
from .styles import FRAME_WIDTH, INK, LIGHT_GREY, MID_GREY, grid_table_style, styles
from .text import clock_down, clock_up, drive_minutes, duration_text, esc, esc_lines, site_block

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
    route = plan.routes[vehicle_number - 1]
    legs = route_legs(day, route)
    driver = (driver_name or "").strip()
    detail = f"Driver: {driver}" if driver else "Driver: ______________________"
    return [
        SectionStart(f"Route sheet \u2014 vehicle {vehicle_number} of {plan.vehicles}",
                     detail=detail, continued=f"Vehicle {vehicle_number} (continued)"),
        _title_block(plan, vehicle_number, driver),
        Spacer(1, 6),
        _times_block(day, route, legs),
        Spacer(1, 8),
        _stops_table(day, route, legs),
        Spacer(1, 8),
        _sign_off(),
    ]


def _title_block(plan: Plan, vehicle_number: int, driver: str) -> Table:
    st = styles()
    day = plan.day
    route = plan.routes[vehicle_number - 1]
    vclass = day.jobs[route[0]].vehicle_class
    heading = f"Vehicle {vehicle_number}"
    if vclass:
        heading += f" <font size=12>({esc(vclass)})</font>"
    name = f"<b>{esc(driver)}</b>" if driver else "_" * 32
    table = Table([[Paragraph(heading, st["vehicle"]),
                    Paragraph(f"Driver: {name}", st["driver"])]],
                  colWidths=[FRAME_WIDTH * 0.42, FRAME_WIDTH * 0.58])
    table.setStyle(TableStyle([("VALIGN", (0, 0), (-1, -1), "BOTTOM"),
                               ("LEFTPADDING", (0, 0), (0, -1), 0),
                               ("RIGHTPADDING", (-1, 0), (-1, -1), 0)]))
    return table


def _times_block(day: Day, route: tuple[int, ...], legs: RouteLegs) -> Table:
    """Four boxes: leave, first job, last job, back (or finish without a depot)."""
    st = styles()
    first, last = day.jobs[route[0]], day.jobs[route[-1]]
    depot = day.settings.depot
    empty = sum(legs.before) + legs.pull_in
    if depot is not None:
        where = esc(day.site_label(depot))
        boxes = [("Leave " + where + " by", clock_down(first.start - legs.before[0])),
                 (f"First job {esc(first.id)} starts", format_clock(first.start)),
                 (f"Last job {esc(last.id)} ends", format_clock(last.end)),
                 ("Back at " + where + " about", clock_up(last.end + legs.pull_in))]
    else:
        boxes = [(f"First job {esc(first.id)} starts at "
                  f"{esc(day.site_label(first.origin))}", format_clock(first.start)),
                 (f"Last job {esc(last.id)} ends at "
                  f"{esc(day.site_label(last.destination))}", format_clock(last.end))]
    cells = [[Paragraph(label, st["box_label"]),
              Paragraph(t, st["box_value"])] for label, t in boxes]
    cells.append([Paragraph(f"{len(route)} job{'s' if len(route) != 1 else ''}; empty driving",
                            st["box_label"]),
                  Paragraph(duration_text(empty), st["fact_value"])])
    table = Table([[c[0] for c in cells], [c[1] for c in cells]],
                  colWidths=[FRAME_WIDTH / len(cells)] * len(cells))
    table.setStyle(TableStyle([
        ("BOX", (0, 0), (-1, -1), 0.8, INK),
        ("LINEAFTER", (0, 0), (-2, -1), 0.4, MID_GREY),
        ("VALIGN", (0, 0), (-1, -1), "BOTTOM"),
        ("TOPPADDING", (0, 0), (-1, -1), 3),
        ("BOTTOMPADDING", (0, 1), (-1, 1), 5),
    ]))
    return table


def _stop_row(day: Day, number: int, job: Job, before: int) -> list:
    st = styles()
    place = site_block(day, job.origin)
    if job.destination != job.origin:
        place += "<br/>\u2192 " + site_block(day, job.destination)
    else:
        place += "<br/><font size=7>(ends at the same site)</font>"
    who = "<br/>".join(part for part in (f"<b>{esc(job.customer)}</b>" if job.customer else "",
                                         esc(job.reference)) if part)
    # Plain strings where no wrapping or markup is needed: much cheaper than Paragraphs.
    return [
        str(number),
        drive_minutes(before) if before else "\u2013",
        Paragraph(f"<b>{format_clock(job.start)}</b><br/><font size=8>to "
                  f"{format_clock(job.end)}</font><br/><font size=7>{esc(job.id)}</font>",
                  st["time_big"]),
        Paragraph(place, st["cell"]),
        Paragraph(who, st["cell"]) if who else "",
        Paragraph(esc_lines(job.notes), st["cell_small"]) if job.notes else "",
        Paragraph(f"{TICK_BOX} done<br/>at _____", st["done"]),
    ]


def _stops_table(day: Day, route: tuple[int, ...], legs: RouteLegs) -> LongTable:
    st = styles()
    rows = [[Paragraph(head, st["cell_head"]) for head, _ in STOP_COLUMNS]]
    for k, (index, before) in enumerate(zip(route, legs.before, strict=True), start=1):
        rows.append(_stop_row(day, k, day.jobs[index], before))
    if day.settings.depot is not None:
        back = day.jobs[route[-1]].end + legs.pull_in
        rows.append(["", drive_minutes(legs.pull_in),
                     Paragraph(f"<b>{clock_up(back)}</b><br/><font size=7>about</font>",
                               st["time_big"]),
                     Paragraph("Back to " + site_block(day, day.settings.depot), st["cell"]),
                     "", "", Paragraph(f"{TICK_BOX} back", st["cell"])])
    table = LongTable(rows, colWidths=[w for _, w in STOP_COLUMNS], repeatRows=1)
    table.setStyle(TableStyle(grid_table_style() + [
        ("LINEBELOW", (0, 1), (-1, -1), 0.5, LIGHT_GREY),
        ("TOPPADDING", (0, 1), (-1, -1), 4),
        ("BOTTOMPADDING", (0, 1), (-1, -1), 4),
    ]))
    return table


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
