"""XLSX input, CSV dialects and absurd sizes: read right, or refused quickly and clearly."""

from __future__ import annotations

import os
import time as clock
import zipfile
from datetime import datetime, time, timedelta

import openpyxl
import pytest

from shipgui.core import InputError, load_day, read_jobs, read_sites, read_travel
from shipgui.core.day import MAX_SITES
from shipgui.core.io._xlsx import cell_text
from shipgui.core.io.tables import MAX_ROWS, parse_delimiter, read_table


def workbook(path, sheets: dict[str, list[list]]):
    book = openpyxl.Workbook()
    book.remove(book.active)
    for name, rows in sheets.items():
        sheet = book.create_sheet(name)
        for row in rows:
            sheet.append(row)
    book.save(path)
    return path


def with_cached_value(path, cell: str, value: str):
    """Give a formula cell the value a spreadsheet program would have saved."""
    with zipfile.ZipFile(path) as source:
        parts = {i.filename: source.read(i.filename) for i in source.infolist()}
    xml = parts["xl/worksheets/sheet1.xml"].decode()
    start = xml.index(f'<c r="{cell}"')
    end = xml.index("</c>", start)
    parts["xl/worksheets/sheet1.xml"] = (xml[:start] + xml[start:end].replace(
        "<v />", f"<v>{value}</v>").replace("<v></v>", f"<v>{value}</v>") + xml[end:]).encode()
    with zipfile.ZipFile(path, "w") as target:
        for name, data in parts.items():
            target.writestr(name, data)
    return path


@pytest.mark.parametrize("value, minutes, text", [
    (12.3, False, "12.3"), (0.1 + 0.2, False, "0.3"), (12.0, False, "12"), (7, False, "7"),
    (1e20, False, "1e+20"), (float("nan"), False, "nan"), (True, False, "TRUE"),
    (time(7, 45), False, "07:45"), (time(7, 45, 30), False, "07:45:30"),
    (time(1, 30), True, "90"), (datetime(2026, 12, 2, 7, 45), False, "2026-12-02T07:45"),
    (datetime(2026, 12, 2, 7, 44, 59, 999_000), False, "2026-12-02T07:45"),
    (datetime(1900, 1, 1, 1, 30), False, "25:30"),  # serial 1.0625 shown as h:mm
    (timedelta(hours=25, minutes=30), False, "25:30"),
    (timedelta(minutes=90), True, "90"), (timedelta(seconds=45), True, "0.75"),
    (timedelta(minutes=-5), False, "-00:05"),
])
def test_cell_values_become_the_text_a_dispatcher_types(value, minutes, text):
    assert cell_text(value, minutes=minutes) == text


def test_a_workbook_day_reads_like_the_csv_day(tmp_path):
    path = workbook(tmp_path / "day.xlsx", {
        "Jobs": [[" Job ", "ORIGIN", "destination", "start", "end", "duration", "notes"],
                 ["J1", "A", "B", time(7, 0), time(8, 30), None, "gate 4"],
                 [],  # a blank row keeps the spreadsheet's numbering
                 ["J2", "B", "A", time(23, 0), timedelta(hours=25, minutes=30), None, None],
                 [3, "A", "A", datetime(2026, 12, 2, 9, 0), None, timedelta(minutes=45), None],
                 ],
        "Sites": [["site", "x_km", "y_km"], ["A", 0, 0], ["B", 12.3, 0.1 + 0.2]],
        "Travel": [["from", "to", "minutes"], ["A", "B", 20], ["B", "A", 22.5]],
    })
    jobs, plan_date = read_jobs(path, sheet="Jobs")
    assert [(j.id, j.row) for j in jobs] == [("J1", 2), ("J2", 4), ("3", 5)]
    assert str(plan_date) == "2026-12-02" and jobs[2].end - jobs[2].start == 45 * 60
    assert jobs[1].end == 25 * 3600 + 1800
    assert read_sites(path, sheet="sites")[1].x_km == 12.3
    travel = read_travel(path, sheet="Travel")
    assert travel[("B", "A")] == (1350, 3)


def test_a_workbook_loads_as_a_day(tmp_path):
    path = workbook(tmp_path / "day.xlsx", {
        "Jobs": [["job", "origin", "destination", "start", "duration"],
                 ["J1", "A", "B", time(7), timedelta(minutes=90)],
                 ["J2", "B", "A", time(9), 60]],
        "Travel": [["from", "to", "minutes"], ["A", "B", 20], ["B", "A", 22.5]],
    })
    day = load_day(path, None, path, sheets={"travel": "Travel"})
    assert day.n == 2 and day.travel_between("B", "A") == 1350
    assert [j.end - j.start for j in day.jobs] == [5400, 3600]


def test_formulas_read_as_their_saved_values(tmp_path):
    path = workbook(tmp_path / "jobs.xlsx", {
        "Jobs": [["job", "origin", "start", "duration"], ["J1", "A", time(7), "=30*3"]]})
    with pytest.raises(InputError, match="recalculate"):
        read_jobs(path)
    with_cached_value(path, "D2", "90")
    jobs, _ = read_jobs(path)
    assert jobs[0].end - jobs[0].start == 90 * 60


def test_workbook_problems_and_value_problems_come_together(tmp_path):
    path = workbook(tmp_path / "jobs.xlsx", {
        "Jobs": [["job", "origin", "start", "duration"], ["J1", "A", time(7), "#N/A"],
                 ["J2", "A", "soon", 30], ["J3", "A", time(8), "=1/0"]]})
    with pytest.raises(InputError) as info:
        read_jobs(path)
    where = {(p.row, p.column) for p in info.value.problems}
    assert where == {(2, "duration"), (3, "start"), (4, "duration")}


def test_delimiter_detected_and_overridable(tmp_path):
    path = tmp_path / "jobs.csv"
    path.write_text('job;origin;start;end;notes\r\nJ1;A;07:00;08:00;"a; b, c"\r\n')
    assert read_jobs(path)[0][0].notes == "a; b, c"
    with pytest.raises(InputError, match="needs the column"):
        read_jobs(path, delimiter=",")
    assert parse_delimiter("semicolon") == ";" and parse_delimiter("tab") == "\t"
    with pytest.raises(ValueError):
        parse_delimiter("ab")


def test_sheet_for_a_csv_file_is_refused(tmp_path):
    path = tmp_path / "jobs.csv"
    path.write_text("job,origin,start,end\nJ1,A,07:00,08:00\n")
    with pytest.raises(InputError, match="no sheets"):
        read_jobs(path, sheet="Jobs")


def test_a_100_mb_file_is_refused_at_once(tmp_path):
    path = tmp_path / "big.csv"
    with open(path, "wb") as f:
        f.write(b"job,origin,start,end\n")
        f.truncate(100 * 1024 * 1024)
    began = clock.perf_counter()
    with pytest.raises(InputError, match="100 MB"):
        read_jobs(path)
    assert clock.perf_counter() - began < 1


def test_a_million_rows_are_refused_without_a_hang(tmp_path):
    path = tmp_path / "million.csv"
    with open(path, "w") as f:
        f.write("job,origin,start,end\n")
        f.writelines(f"J{k},A,07:00,08:00\n" for k in range(1_000_000))
    began = clock.perf_counter()
    with pytest.raises(InputError) as info:
        read_jobs(path)
    assert f"more than {MAX_ROWS} rows" in str(info.value)
    assert info.value.row == MAX_ROWS + 2
    assert clock.perf_counter() - began < 20


def test_a_workbook_with_too_many_rows_is_refused(tmp_path, monkeypatch):
    path = workbook(tmp_path / "jobs.xlsx", {"Jobs": [["job", "origin", "start", "end"]] + [
        [f"J{k}", "A", time(7), time(8)] for k in range(30)]})
    monkeypatch.setattr("shipgui.core.io.tables.MAX_ROWS", 20)
    with pytest.raises(InputError, match="more than 20 rows"):
        read_table(path)


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="needs named pipes")
def test_a_pipe_or_a_folder_is_refused_not_waited_on(tmp_path):
    os.mkfifo(tmp_path / "pipe.csv")
    with pytest.raises(InputError, match="not an ordinary file"):
        read_jobs(tmp_path / "pipe.csv")
    with pytest.raises(InputError, match="folder"):
        read_jobs(tmp_path)
    with pytest.raises(InputError, match="does not exist"):
        read_jobs(tmp_path / "missing.csv")


def test_too_many_sites_is_an_input_error(tmp_path):
    sites = tmp_path / "sites.csv"
    sites.write_text("site,x_km,y_km\n" + "".join(f"S{k},{k},0\n"
                                                  for k in range(MAX_SITES + 1)))
    jobs = tmp_path / "jobs.csv"
    jobs.write_text("job,origin,start,end\nJ1,S1,07:00,08:00\n")
    with pytest.raises(InputError, match="different sites"):
        load_day(jobs, sites)

