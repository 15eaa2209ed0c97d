"""Routes as a spreadsheet: one row per job with its vehicle and place in the route.

CSV (UTF-8 with a BOM, so spreadsheet programs pick the right encoding) or
XLSX.  In CSV every text cell that came from a user is neutralised against
formula injection: a cell starting with ``= + - @``, a tab or a carriage return
would be run as a formula when the file is opened, so it gets a leading single
quote (OWASP, "CSV Injection", https://owasp.org/www-community/attacks/CSV_Injection).
XLSX cells carry their type, so text is written as a string cell, exactly as
typed: a string cell is never run as a formula (ECMA-376 Part 1, 18.3.1.4,
cell type ``inlineStr``).
Each row also carries its vehicle's day: class, leaving and being back at the
depot, working day and empty driving (the same on every row of a vehicle).
Files are written atomically (:func:`shipgui.core.io.files.write_bytes_atomic`).
"""

from __future__ import annotations

import csv
import io
from dataclasses import astuple, dataclass, fields
from pathlib import Path

from ..clock import format_clock, format_clock_or_none
from ..clock import minutes_value as _minutes
from ..fleet.schedule import vehicle_days
from ..io.files import write_bytes_atomic
from ..model import Plan

__all__ = ["RouteRow", "route_rows", "neutralise", "routes_csv_bytes", "routes_xlsx_bytes",
           "write_routes", "COLUMNS"]

_FORMULA_START = ("=", "+", "-", "@", "\t", "\r")


@dataclass(frozen=True)
class RouteRow:
    """One job on one vehicle; times as ``HH:MM``, empty driving in minutes."""

    vehicle: int
    sequence: int
    job: str
    start: str
    end: str
    origin: str
    destination: str
    customer: str
    reference: str
    notes: str
    empty_minutes_before: float
    driver: str = ""
    vehicle_class: str = ""
    leave_depot: str = ""  # the vehicle's, empty without a depot
    back_at_depot: str = ""
    working_day_minutes: float = 0
    vehicle_empty_minutes: float = 0


COLUMNS = tuple(f.name for f in fields(RouteRow))
_TEXT = {"job", "start", "end", "origin", "destination", "customer", "reference", "notes",
         "driver", "vehicle_class", "leave_depot", "back_at_depot"}


def neutralise(text: str) -> str:
    """``text`` made safe to open in a spreadsheet (no formula can run from it)."""
    if text.startswith(_FORMULA_START) or text.lstrip(" ").startswith(_FORMULA_START):
        return "'" + text
    return text


def route_rows(plan: Plan, driver_names: dict[int, str] | None = None) -> list[RouteRow]:
    """Every job once, by vehicle and then in driving order."""
    day = plan.day
    names = driver_names or {}
    rows = []
    for v in vehicle_days(plan):
        vehicle = (v.vehicle_class, format_clock_or_none(v.leave) or "",
                   format_clock_or_none(v.back) or "", _minutes(v.working_day),
                   _minutes(v.deadhead))
        for sequence, (k, empty) in enumerate(zip(v.jobs, v.before), start=1):
            job = day.jobs[k]
            rows.append(RouteRow(v.vehicle, sequence, job.id, format_clock(job.start),
                                 format_clock(job.end), job.origin, job.destination,
                                 job.customer, job.reference, job.notes, _minutes(empty),
                                 names.get(v.vehicle, ""), *vehicle))
    return rows


def _cells(row: RouteRow) -> list:
    return [neutralise(v) if name in _TEXT else v for name, v in zip(COLUMNS, astuple(row))]


def routes_csv_bytes(rows: list[RouteRow]) -> bytes:
    out = io.StringIO()
    writer = csv.writer(out, lineterminator="\r\n")
    writer.writerow(COLUMNS)
    writer.writerows(_cells(row) for row in rows)
    return ("\ufeff" + out.getvalue()).encode("utf-8")


def routes_xlsx_bytes(rows: list[RouteRow]) -> bytes:
    import openpyxl  # only for spreadsheets; the rest of the core does without it
    from openpyxl.cell import WriteOnlyCell
    from openpyxl.cell.cell import ILLEGAL_CHARACTERS_RE

    book = openpyxl.Workbook(write_only=True)
    sheet = book.create_sheet("Routes")
    sheet.append(list(COLUMNS))

    def text_cell(value: str) -> WriteOnlyCell:
        # Characters XML cannot hold become U+FFFD; openpyxl would refuse the file.
        cell = WriteOnlyCell(sheet, ILLEGAL_CHARACTERS_RE.sub("\ufffd", value))
        cell.data_type = "s"  # openpyxl would take "=..." for a formula
        return cell

    for row in rows:
        sheet.append([text_cell(value) if name in _TEXT else value
                      for name, value in zip(COLUMNS, astuple(row))])
    out = io.BytesIO()
    book.save(out)
    return out.getvalue()


def write_routes(plan: Plan, path: str | Path,
                 driver_names: dict[int, str] | None = None) -> None:
    """Write the routes as CSV or XLSX, chosen by the file's suffix."""
    rows = route_rows(plan, driver_names)
    suffix = Path(path).suffix.lower()
    if suffix == ".xlsx":
        data = routes_xlsx_bytes(rows)
    elif suffix == ".csv":
        data = routes_csv_bytes(rows)
    else:
        raise ValueError(f"routes are written as .csv or .xlsx, not {suffix or 'no suffix'}")
    write_bytes_atomic(path, data)
