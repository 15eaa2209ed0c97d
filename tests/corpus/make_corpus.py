"""Writes the corpus of bad input files and the table of what each must produce.

    python tests/corpus/make_corpus.py

Every file in ``bad/`` is something a dispatcher could plausibly feed the tool
(a spreadsheet saved the wrong way, a typo, a file of the wrong kind).
``expected.csv`` says, per file, which loader reads it (jobs, sites, travel),
the sheet (for workbooks, if not the first), and the row, column and a phrase
of the message it must produce.  All data is invented.
"""

from __future__ import annotations

import csv
import io
import random
import zipfile
from collections.abc import Callable
from datetime import time, timedelta
from pathlib import Path

HERE = Path(__file__).resolve().parent
BAD = HERE / "bad"
JOBS = "job,origin,destination,start,end\n"
JOBS_D = "job,origin,start,duration\n"
SITES = "site,name,lat,lon\n"
TRAVEL = "from,to,minutes\n"


def _padding_rows(count: int) -> str:
    return "".join(f"P{k},A,A,07:00,08:00\n" for k in range(count))


def _xlsx(rows: list[list], *, title: str = "Jobs", extra: dict | None = None) -> bytes:
    import openpyxl
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.title = title
    for row in rows:
        sheet.append(row)
    for name, more in (extra or {}).items():
        other = book.create_sheet(name)
        for row in more:
            other.append(row)
    out = io.BytesIO()
    book.save(out)
    return out.getvalue()


def _zip(parts: dict[str, bytes]) -> bytes:
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED) as archive:
        for name, data in parts.items():
            archive.writestr(name, data)
    return out.getvalue()


def _replace_part(xlsx: bytes, part: str, data: bytes) -> bytes:
    source = zipfile.ZipFile(io.BytesIO(xlsx))
    return _zip({i.filename: (data if i.filename == part else source.read(i.filename))
                 for i in source.infolist()})


def _zip_bomb() -> bytes:
    # 300 MB of zeros deflate to about 300 kB: the directory tells the size.
    out = io.BytesIO()
    with zipfile.ZipFile(out, "w", zipfile.ZIP_DEFLATED, compresslevel=9) as archive:
        archive.writestr("[Content_Types].xml", "<Types/>")
        archive.writestr("xl/workbook.xml", "<workbook/>")
        with archive.open("xl/worksheets/sheet1.xml", "w", force_zip64=True) as part:
            block = b"\0" * (1 << 20)
            for _ in range(300):
                part.write(block)
    return out.getvalue()


_XML_BOMB = (b'<?xml version="1.0"?>\n<!DOCTYPE lolz [<!ENTITY lol "lol">'
             b'<!ENTITY lol2 "&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;">]>'
             b'<worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main">'
             b'<sheetData><row r="1"><c r="A1" t="inlineStr"><is><t>&lol2;</t></is></c></row>'
             b'</sheetData></worksheet>')

def _plan(jobs: list[dict] | None = None, **more) -> str:
    """A plan document (.shipgui) with one good job unless ``jobs`` is given."""
    import json
    inputs = {"jobs": jobs if jobs is not None else
              [{"job": "J1", "origin": "A", "start": "08:00", "end": "09:00"}]}
    inputs.update(more.pop("inputs", {}))
    return json.dumps({"format": "shipgui-plan", "schema_version": 1, "inputs": inputs, **more})


def _stray_cell_xlsx() -> bytes:
    """A jobs sheet with a header cell at XFD1 (the last column) and one beyond the
    named columns in every data row."""
    import openpyxl
    book = openpyxl.Workbook()
    sheet = book.active
    for row in GOOD_JOBS_ROWS:
        sheet.append(row)
    sheet["XFD1"] = "stray"
    sheet["A2"] = "J1"
    sheet["E2"] = time(7, 0)  # ends when it starts: the file still has to say so
    out = io.BytesIO()
    book.save(out)
    return out.getvalue()


GOOD_JOBS_ROWS = [["job", "origin", "destination", "start", "end"],
                  ["J1", "A", "B", time(7, 0), time(8, 30)]]

# name, kind, sheet, row, column, phrase, content (text is written as UTF-8)
Entry = tuple[str, str, str, str, str, str, Callable[[], bytes | str]]
ENTRIES: list[Entry] = [
    ("jobs_missing_origin.csv", "jobs", "", "1", "origin", "needs the column 'origin'",
     lambda: "job,start,end\nJ1,07:00,08:00\n"),
    ("jobs_missing_two_columns.csv", "jobs", "", "1", "job", "'job', 'origin'",
     lambda: "start,end\n07:00,08:00\n"),
    ("jobs_no_end_or_duration.csv", "jobs", "", "1", "end", "'end' or a column 'duration'",
     lambda: "job,origin,start\nJ1,A,07:00\n"),
    ("jobs_duplicate_id.csv", "jobs", "", "3", "job", "listed twice",
     lambda: JOBS + "J1,A,B,07:00,08:00\nJ1,A,B,09:00,10:00\n"),
    ("jobs_duplicate_header.csv", "jobs", "", "1", "job", "appears twice",
     lambda: "job,origin,start,end,Job\nJ1,A,07:00,08:00,J1\n"),
    ("jobs_empty_id.csv", "jobs", "", "2", "job", "'job' is empty",
     lambda: JOBS + ",A,B,07:00,08:00\n"),
    ("jobs_bad_time.csv", "jobs", "", "2", "start", "is not a time",
     lambda: JOBS + "J1,A,B,7.30,08:00\n"),
    ("jobs_minute_60.csv", "jobs", "", "2", "end", "go up to 59",
     lambda: JOBS + "J1,A,B,07:00,07:60\n"),
    ("jobs_hour_48.csv", "jobs", "", "2", "end", "too late",
     lambda: JOBS + "J1,A,B,07:00,48:00\n"),
    ("jobs_end_before_start.csv", "jobs", "", "2", "end", "before or when it starts",
     lambda: JOBS + "J1,A,B,09:00,08:00\n"),
    ("jobs_end_equals_start.csv", "jobs", "", "2", "end", "before or when it starts",
     lambda: JOBS + "J1,A,B,09:00,09:00\n"),
    ("jobs_past_midnight.csv", "jobs", "", "2", "end", "25:30",
     lambda: JOBS + "J1,A,B,23:00,01:30\n"),
    ("jobs_negative_duration.csv", "jobs", "", "2", "duration", "more than zero",
     lambda: JOBS_D + "J1,A,07:00,-5\n"),
    ("jobs_zero_duration.csv", "jobs", "", "2", "duration", "more than zero",
     lambda: JOBS_D + "J1,A,07:00,0\n"),
    ("jobs_nan_duration.csv", "jobs", "", "2", "duration", "not a number of minutes",
     lambda: JOBS_D + "J1,A,07:00,NaN\n"),
    ("jobs_inf_duration.csv", "jobs", "", "2", "duration", "not a number of minutes",
     lambda: JOBS_D + "J1,A,07:00,inf\n"),
    ("jobs_huge_duration.csv", "jobs", "", "2", "duration", "more than two months",
     lambda: JOBS_D + "J1,A,07:00,1e9\n"),
    ("jobs_long_duration.csv", "jobs", "", "2", "duration", "more than 48 hours",
     lambda: JOBS_D + "J1,A,07:00,5000\n"),
    ("jobs_end_and_duration_disagree.csv", "jobs", "", "2", "duration", "disagree",
     lambda: "job,origin,start,end,duration\nJ1,A,07:00,08:00,90\n"),
    ("jobs_control_character.csv", "jobs", "", "2", "job", "control character",
     lambda: JOBS + "J\x071,A,B,07:00,08:00\n"),
    ("jobs_escape_sequence.csv", "jobs", "", "2", "notes",
     "control character",
     lambda: "job,origin,start,end,notes\nJ1,A,07:00,08:00,\x1b[31mred\n"),
    ("jobs_nul_early.csv", "jobs", "", "", "", "not a text (CSV) file",
     lambda: JOBS + "J1,A,B,07:00\x00,08:00\n"),
    ("jobs_nul_late.csv", "jobs", "", "4002", "start", "control character",
     lambda: JOBS + _padding_rows(4000) + "J1,A,B,07:00\x00,08:00\n"),
    ("jobs_binary_junk.csv", "jobs", "", "", "", "not a text (CSV) file",
     lambda: random.Random(7).randbytes(4096)),
    ("jobs_png_renamed.csv", "jobs", "", "", "", "PNG picture",
     lambda: b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR" + bytes(64)),
    ("jobs_pdf_renamed.csv", "jobs", "", "", "", "PDF document",
     lambda: b"%PDF-1.4\n%\xe2\xe3\xcf\xd3\n1 0 obj\n<<>>\nendobj\n"),
    ("jobs_xls_renamed.csv", "jobs", "", "", "", "old Excel (.xls)",
     lambda: b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1" + bytes(504)),
    ("jobs_utf16.csv", "jobs", "", "", "", "UTF-16",
     lambda: (JOBS + "J1,A,B,07:00,08:00\n").encode("utf-16")),
    ("jobs_empty.csv", "jobs", "", "", "", "the file is empty", lambda: b""),
    ("jobs_header_only.csv", "jobs", "", "1", "", "no jobs", lambda: JOBS),
    ("jobs_latin1.csv", "jobs", "", "3", "", "not UTF-8",
     lambda: (JOBS + "J1,A,B,07:00,08:00\nJ2,A,B,07:00,08:00,Caf\xe9\n").encode("latin-1")),
    ("jobs_huge_field.csv", "jobs", "", "2", "", "far too long",
     lambda: JOBS + 'J1,A,B,07:00,"' + "x" * 200_000 + "\n"),
    ("jobs_long_note.csv", "jobs", "", "2", "notes", "characters long",
     lambda: "job,origin,start,end,notes\nJ1,A,07:00,08:00," + "n" * 20_000 + "\n"),
    ("jobs_mixed_offsets.csv", "jobs", "", "3", "start", "UTC offset",
     lambda: JOBS + "J1,A,B,2026-12-02T07:00+01:00,2026-12-02T08:00+01:00\n"
                    "J2,A,B,2026-12-02T09:00,2026-12-02T10:00\n"),
    ("jobs_year_typo.csv", "jobs", "", "2", "end", "more than 48 hours",
     lambda: JOBS + "J1,A,B,2026-12-02T07:00,2027-12-02T08:00\n"),
    ("jobs_semicolon_bad_time.csv", "jobs", "", "3", "start", "is not a time",
     lambda: "job;origin;start;end\r\nJ1;A;07:00;08:00\r\nJ2;A;7h;09:00\r\n"),
    ("jobs_many_problems.csv", "jobs", "", "2", "start", "more problems",
     lambda: JOBS + "".join(f"J{k},A,B,x{k},08:00\n" for k in range(80))),
    ("sites_latitude_95.csv", "sites", "", "2", "lat", "between -90 and 90",
     lambda: SITES + "A,Alder yard,95,10\n"),
    ("sites_lon_missing.csv", "sites", "", "2", "lon", "go together",
     lambda: SITES + "A,Alder yard,50,\n"),
    ("sites_duplicate.csv", "sites", "", "3", "site", "listed twice",
     lambda: SITES + "A,Alder yard,50,10\nA,Again,51,10\n"),
    ("sites_nan_coordinate.csv", "sites", "", "2", "lat", "not a number",
     lambda: SITES + "A,Alder yard,nan,10\n"),
    ("sites_no_site_column.csv", "sites", "", "1", "site", "needs the column 'site'",
     lambda: "name,lat,lon\nAlder yard,50,10\n"),
    ("sites_empty_id.csv", "sites", "", "2", "site", "'site' is empty",
     lambda: SITES + ",Alder yard,50,10\n"),
    ("travel_duplicate_pair.csv", "travel", "", "3", "from", "listed twice",
     lambda: TRAVEL + "A,B,10\nA,B,12\n"),
    ("travel_self_nonzero.csv", "travel", "", "2", "minutes", "to itself",
     lambda: TRAVEL + "A,A,5\n"),
    ("travel_negative.csv", "travel", "", "2", "minutes", "zero or more",
     lambda: TRAVEL + "A,B,-5\n"),
    ("travel_text_minutes.csv", "travel", "", "2", "minutes", "not a number of minutes",
     lambda: TRAVEL + "A,B,ten\n"),
    ("travel_infinity.csv", "travel", "", "2", "minutes", "not a number of minutes",
     lambda: TRAVEL + "A,B,Infinity\n"),
    ("travel_no_minutes_column.csv", "travel", "", "1", "minutes", "'minutes'",
     lambda: "from,to\nA,B\n"),
    ("travel_empty_to.csv", "travel", "", "2", "to", "'to' is empty",
     lambda: TRAVEL + "A,,5\n"),
    ("jobs_absurd_width.csv", "jobs", "", "1", "", "wider than any spreadsheet",
     lambda: "job,origin,start,end" + "," * 20_000 + "stray\nJ1,A,07:00,08:00\n"),
    ("jobs_too_many_columns.csv", "jobs", "", "1", "", "over 500",
     lambda: "job,origin,start,end," + ",".join(f"c{k}" for k in range(600)) + "\n"),
    ("jobs_wide_header_bad_time.csv", "jobs", "", "2", "start", "is not a time",
     lambda: "job,origin,start,end" + "," * 50_000 + "\nJ1,A,7h,08:00\n"),
    ("jobs_invisible_id.csv", "jobs", "", "3", "job", "invisible character (U+200B)",
     lambda: JOBS + "J1,A,B,07:00,08:00\nJ\u200b1,A,B,09:00,10:00\n"),
    ("jobs_lookalike_id.csv", "jobs", "", "3", "job", "looks the same as job 'J1'",
     lambda: JOBS + "J1,A,B,07:00,08:00\n\uff2a1,A,B,09:00,10:00\n"),
    ("jobs_long_id.csv", "jobs", "", "2", "job", "not an id",
     lambda: JOBS + "J" * 150 + ",A,B,07:00,08:00\n"),
    ("jobs_decimal_comma_typo.csv", "jobs", "", "2", "duration", "12,5",
     lambda: "job;origin;start;duration\nJ1;A;07:00;12,,5\n"),
    ("jobs_thousands_separator.csv", "jobs", "", "2", "duration", "not a number of minutes",
     lambda: 'job,origin,start,duration\nJ1,A,07:00,"1.000,5"\n'),
    ("sites_thousands_separator.csv", "sites", "", "2", "lon", "not a number between",
     lambda: "site;lat;lon\nA;48,5;10.000,5\n"),
    ("sites_lat_out_of_range_swapped.csv", "sites", "", "2", "lat", "lat and lon swapped",
     lambda: SITES + "A,Alder yard,120.5,45.2\n"),
    ("sites_lookalike_id.csv", "sites", "", "3", "site", "looks the same as site 'A'",
     lambda: SITES + "A,Alder yard,50,10\n\uff21,Again,51,10\n"),
    # --------------------------------------------------------------- plan files
    ("plan_huge_integer.shipgui", "plan", "", "1", "lat", "number from -90 to 90",
     lambda: _plan(inputs={"sites": [{"site": "A", "lat": 10**400, "lon": 1}]})),
    ("plan_huge_float.shipgui", "plan", "", "", "speed_kmh", "number from 0.1 to 1000",
     lambda: _plan(settings={"speed_kmh": 1}).replace('"speed_kmh": 1', '"speed_kmh": 1e400')),
    ("plan_huge_turnaround.shipgui", "plan", "", "", "turnaround_seconds", "whole number",
     lambda: _plan(settings={"turnaround_seconds": 10**400})),
    ("plan_half_second.shipgui", "plan", "", "", "turnaround_seconds", "whole number",
     lambda: _plan(settings={"turnaround_seconds": 0.5})),
    ("plan_surrogate_notes.shipgui", "plan", "", "1", "notes", "broken character",
     lambda: _plan([{"job": "J1", "origin": "A", "start": "08:00", "end": "09:00",
                     "notes": "\ud800"}])),
    ("plan_surrogate_driver.shipgui", "plan", "", "", "driver_names.1", "broken character",
     lambda: _plan(driver_names={"1": "\udc41na"})),
    ("plan_surrogate_driver_name.shipgui", "plan", "", "1", "name", "broken character",
     lambda: _plan(drivers=[{"name": "Ada \ud83d", "jobs": ["J1"]}])),
    ("plan_control_id.shipgui", "plan", "", "1", "job", "control character",
     lambda: _plan([{"job": "J1\x1b[2J", "origin": "A", "start": "08:00", "end": "09:00"}])),
    ("plan_huge_id.shipgui", "plan", "", "1", "job", "not an id",
     lambda: _plan([{"job": "J" * 200_000, "origin": "A", "start": "08:00",
                     "end": "09:00"}])),
    ("plan_duplicate_site.shipgui", "plan", "", "2", "site", "listed twice",
     lambda: _plan(inputs={"sites": [{"site": "A", "x_km": 0, "y_km": 0},
                                     {"site": "A", "x_km": 5, "y_km": 0}]})),
    ("plan_duplicate_travel.shipgui", "plan", "", "2", "from", "listed twice",
     lambda: _plan(inputs={"travel": [{"from": "A", "to": "B", "seconds": 60},
                                      {"from": "A", "to": "B", "seconds": 90}]})),
    ("plan_day_start_without_depot.shipgui", "plan", "", "", "day_start", "needs a depot",
     lambda: _plan(settings={"day_start": "05:00"})),
    ("plan_many_problems.shipgui", "plan", "", "1", "end", "more problems",
     lambda: _plan([{"job": f"J{k}", "origin": "A", "start": "09:00", "end": "08:00"}
                    for k in range(2_000)])),
    ("plan_with_bom_bad_time.shipgui", "plan", "", "1", "start", "is not a time",
     lambda: "\ufeff" + _plan([{"job": "J1", "origin": "A", "start": "8h", "end": "09:00"}])),
    # --------------------------------------------------------------- workbooks
    ("jobs_formula_without_value.xlsx", "jobs", "", "2", "end", "recalculate",
     lambda: _xlsx([GOOD_JOBS_ROWS[0], ["J1", "A", "B", time(7), "=D2+TIME(1,0,0)"]])),
    ("jobs_error_cell.xlsx", "jobs", "", "2", "duration", "#DIV/0!",
     lambda: _xlsx([["job", "origin", "start", "duration"], ["J1", "A", time(7), "#DIV/0!"]])),
    ("jobs_bad_time_row3.xlsx", "jobs", "", "3", "start", "is not a time",
     lambda: _xlsx([GOOD_JOBS_ROWS[0], GOOD_JOBS_ROWS[1], ["J2", "A", "B", "7h30", time(9)]])),
    ("jobs_tab_in_cell.xlsx", "jobs", "", "2", "notes", "control character",
     lambda: _xlsx([["job", "origin", "start", "end", "notes"],
                    ["J1", "A", time(7), time(8), "gate\t4"]])),
    ("jobs_negative_duration.xlsx", "jobs", "", "2", "duration", "more than zero",
     lambda: _xlsx([["job", "origin", "start", "duration"],
                    ["J1", "A", time(7), timedelta(minutes=-30)]])),
    ("jobs_missing_sheet.xlsx", "jobs", "Monday", "", "", "no sheet named 'Monday'",
     lambda: _xlsx(GOOD_JOBS_ROWS)),
    ("jobs_empty_sheet.xlsx", "jobs", "", "", "", "the file is empty", lambda: _xlsx([])),
    ("jobs_truncated.xlsx", "jobs", "", "", "", "damaged",
     lambda: _xlsx(GOOD_JOBS_ROWS)[:1500]),
    ("jobs_zip_not_workbook.xlsx", "jobs", "", "", "", "zip archive, not an Excel workbook",
     lambda: _zip({"readme.txt": b"not a workbook"})),
    ("jobs_opendocument.xlsx", "jobs", "", "", "", "OpenDocument",
     lambda: _zip({"mimetype": b"application/vnd.oasis.opendocument.spreadsheet",
                   "content.xml": b"<office:document-content/>"})),
    ("jobs_xls_renamed.xlsx", "jobs", "", "", "", "old Excel (.xls)",
     lambda: b"\xd0\xcf\x11\xe0\xa1\xb1\x1a\xe1" + bytes(504)),
    ("jobs_text_renamed.xlsx", "jobs", "", "", "", "is not one",
     lambda: JOBS + "J1,A,B,07:00,08:00\n"),
    ("jobs_zip_bomb.xlsx", "jobs", "", "", "", "unpacks to 300 MB", _zip_bomb),
    ("jobs_xml_bomb.xlsx", "jobs", "", "", "", "unsafe XML",
     lambda: _replace_part(_xlsx(GOOD_JOBS_ROWS), "xl/worksheets/sheet1.xml", _XML_BOMB)),
    ("sites_latitude_95.xlsx", "sites", "Sites", "3", "lat", "between -90 and 90",
     lambda: _xlsx(GOOD_JOBS_ROWS, extra={"Sites": [["site", "lat", "lon"], ["A", 50.5, 10.25],
                                                    ["B", 95.0, 10.0]]})),
    ("jobs_stray_header_cell.xlsx", "jobs", "", "2", "end", "before or when it starts",
     _stray_cell_xlsx),
    ("travel_duplicate_pair.xlsx", "travel", "", "3", "from", "listed twice",
     lambda: _xlsx([["from", "to", "minutes"], ["A", "B", 10], ["A", "B", 12.5]],
                   title="Travel")),
]


def write_corpus() -> None:
    BAD.mkdir(exist_ok=True)
    with open(HERE / "expected.csv", "w", newline="", encoding="utf-8") as f:
        out = csv.writer(f, lineterminator="\n")
        out.writerow(["file", "kind", "sheet", "row", "column", "phrase"])
        for name, kind, sheet, row, column, phrase, content in ENTRIES:
            data = content()
            # surrogatepass: a plan file may carry "\ud800" escapes, never raw surrogates
            (BAD / name).write_bytes(data.encode("utf-8", "surrogatepass")
                                     if isinstance(data, str) else data)
            out.writerow([name, kind, sheet, row, column, phrase])


if __name__ == "__main__":
    write_corpus()
    print(f"{len(ENTRIES)} files in {BAD}")
