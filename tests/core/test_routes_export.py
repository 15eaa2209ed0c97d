"""Routes export: every job once with vehicle and sequence; no formula can run from it."""

from __future__ import annotations

import csv
import io
import zipfile

import openpyxl
import pytest

from shipgui.core import Job, Settings, Site, build_day, format_clock, solve_day
from shipgui.core.export.routes_table import (
    COLUMNS,
    neutralise,
    route_rows,
    routes_csv_bytes,
    write_routes,
)

ATTACKS = ["=1+1", "+SUM(A1)", "-2+3", "@cmd", "\tx", "\rx", " =HYPERLINK(\"x\")"]


def plan_with_texts():
    sites = [Site("A", x_km=0, y_km=0), Site("B", x_km=6, y_km=0)]
    jobs = [Job(f"J{k}", "A", "B", 8 * 3600 + k * 7200, 9 * 3600 + k * 7200,
                customer=text, reference="=1+1" if k == 0 else "R", notes=text, row=k + 2)
            for k, text in enumerate(ATTACKS)]
    return solve_day(build_day(jobs, sites, {}, settings=Settings(depot="A")))


@pytest.mark.parametrize("text", ATTACKS)
def test_formula_starts_are_quoted(text):
    assert neutralise(text) == "'" + text


@pytest.mark.parametrize("text", ["Alder yard", "12", "gate 4 - rear", "", "'quoted"])
def test_ordinary_text_is_left_alone(text):
    assert neutralise(text) == text


def test_rows_cover_every_job_in_route_order():
    plan = plan_with_texts()
    rows = route_rows(plan, {1: "Driver One"})
    assert sorted(r.job for r in rows) == sorted(j.id for j in plan.day.jobs)
    for vehicle, route in enumerate(plan.route_ids(), start=1):
        mine = [r for r in rows if r.vehicle == vehicle]
        assert [r.job for r in mine] == route
        assert [r.sequence for r in mine] == list(range(1, len(route) + 1))
    assert rows[0].driver == "Driver One"
    assert rows[0].empty_minutes_before == 0  # the first job starts at the depot


def test_csv_reads_back_neutralised(tmp_path):
    plan = plan_with_texts()
    path = tmp_path / "routes.csv"
    write_routes(plan, path)
    raw = path.read_bytes()
    assert raw.startswith(b"\xef\xbb\xbf")
    records = list(csv.DictReader(io.StringIO(raw.decode("utf-8-sig"), newline="")))
    assert tuple(records[0]) == COLUMNS and len(records) == len(ATTACKS)
    customers = {r["customer"] for r in records}
    assert customers == {"'" + t for t in ATTACKS}
    assert all(not r[c].startswith(("=", "+", "-", "@", "\t", "\r"))
               for r in records for c in ("customer", "notes", "reference"))


def test_xlsx_keeps_the_text_as_typed_in_string_cells(tmp_path):
    # String cells never run as formulas, so the CSV's protective quote would only
    # show inside the cell (issue: "'=1+1" in the customer column).
    plan = plan_with_texts()
    path = tmp_path / "routes.xlsx"
    write_routes(plan, path)
    for data_only in (False, True):
        sheet = openpyxl.load_workbook(path, data_only=data_only).active
        rows = list(sheet.iter_rows(values_only=True))
        assert rows[0] == COLUMNS
        customers = {r[COLUMNS.index("customer")] for r in rows[1:]}
        # XML turns a carriage return into a line feed.
        assert customers == {t.replace("\r", "\n") for t in ATTACKS}
        kinds = {c.data_type for row in sheet.iter_rows(min_row=2) for c in row}
        assert "f" not in kinds
        assert rows[1][0] == 1 and rows[1][1] == 1  # vehicle and sequence are numbers
    with zipfile.ZipFile(path) as book:
        xml = book.read("xl/worksheets/sheet1.xml").decode("utf-8")
    assert "<f>" not in xml and "=1+1" in xml


def test_rows_carry_the_vehicle_day():
    plan = plan_with_texts()
    rows = route_rows(plan)
    first = rows[0]
    jobs = [plan.day.jobs[k] for k in plan.routes[0]]
    # Depot A: the first job starts at A, so the vehicle leaves at its start; the
    # last job ends at B, 6 km away: 6 x 1.2 / 50 km/h = 8.64 min back.
    assert first.leave_depot == format_clock(jobs[0].start)
    back = jobs[-1].end + 519  # 8.64 min, rounded up to whole seconds
    assert first.back_at_depot == format_clock(back)
    assert first.working_day_minutes == round((back - jobs[0].start) / 60, 2)
    assert first.vehicle_empty_minutes == round(plan.route_deadhead_seconds[0] / 60, 2)
    assert {r.vehicle_class for r in rows} == {""}


def test_other_suffixes_are_refused(tmp_path):
    with pytest.raises(ValueError):
        write_routes(plan_with_texts(), tmp_path / "routes.txt")
    assert not (tmp_path / "routes.txt").exists()


def test_control_characters_cannot_break_the_workbook():
    from shipgui.core.export.routes_table import RouteRow, routes_xlsx_bytes
    row = RouteRow(1, 1, "J\x01", "08:00", "09:00", "A", "B", "\x00x", "", "", 0)
    book = openpyxl.load_workbook(io.BytesIO(routes_xlsx_bytes([row])))
    assert book.active["A2"].value == 1 and "\ufffd" in book.active["C2"].value
    assert routes_csv_bytes([row]).count(b"\r\n") == 2
