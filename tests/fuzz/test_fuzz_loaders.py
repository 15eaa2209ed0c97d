"""Fuzzing the loaders: generated CSV and XLSX days, valid and corrupted.

The property: ``load_day`` either returns a day that satisfies the contract's
invariants or raises ``InputError`` naming the file, nothing else (no other
exception, no hang).  Examples per test come from ``SHIPGUI_FUZZ_EXAMPLES``
(default small, for CI); the dedicated run is

    SHIPGUI_FUZZ_EXAMPLES=10000 python -m pytest -p no:cacheprovider tests/fuzz
"""

from __future__ import annotations

import csv
import io
import json
import os
import tempfile
from datetime import datetime, time, timedelta
from pathlib import Path

import numpy as np
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from shipgui.core import Day, InputError, load_day

EXAMPLES = int(os.environ.get("SHIPGUI_FUZZ_EXAMPLES", "0") or 0)
FUZZ = settings(max_examples=EXAMPLES or 60, deadline=None, database=None,
                suppress_health_check=list(HealthCheck))
XLSX_FUZZ = settings(FUZZ, max_examples=EXAMPLES or 25)
WORK = Path(tempfile.mkdtemp(prefix="shipgui-fuzz-"))
SITES = ["A", "B", "C", "D"]

# ------------------------------------------------------------------ cell values
clock_texts = st.builds(lambda h, m: f"{h:02d}:{m:02d}", st.integers(0, 50), st.integers(0, 61))
iso_texts = st.builds(lambda d, off: d.isoformat(timespec="minutes") + off,
                      st.datetimes(min_value=datetime(1, 1, 2), max_value=datetime(9999, 12, 30)),
                      st.sampled_from(["", "", "Z", "+01:00", "-05:30", "+14:00"]))
number_texts = st.one_of(
    st.integers(-10, 10_000).map(str),
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.decimals(allow_nan=True, allow_infinity=True).map(str),
    st.sampled_from(["1e999999", "-0", "0x10", "1_000", "12,5", "NaN", "sNaN", "inf", ""]))
junk_texts = st.text(max_size=12)
site_texts = st.one_of(st.sampled_from(SITES), st.sampled_from(SITES), junk_texts)
job_cells = {
    "job": st.one_of(st.builds(lambda k: f"J{k}", st.integers(0, 8)), junk_texts),
    "origin": site_texts, "destination": site_texts,
    "start": st.one_of(clock_texts, iso_texts, junk_texts),
    "end": st.one_of(clock_texts, iso_texts, junk_texts),
    "duration": number_texts, "vehicle_class": st.sampled_from(["", "", "van", "truck"]),
    "notes": junk_texts,
}
site_cells = {"site": site_texts, "name": junk_texts,
              "lat": st.one_of(st.floats(-100, 100).map(str), number_texts),
              "lon": st.one_of(st.floats(-200, 200).map(str), number_texts),
              "x_km": st.one_of(st.floats(-50, 50).map(str), number_texts),
              "y_km": st.one_of(st.floats(-50, 50).map(str), number_texts)}
travel_cells = {"from": site_texts, "to": site_texts,
                "minutes": st.one_of(st.integers(0, 90).map(str), number_texts)}


@st.composite
def table(draw, cells: dict, required: list[str]):
    """A header (some optional columns, shuffled, odd case) and up to 8 rows."""
    optional = [c for c in cells if c not in required]
    columns = required + draw(st.lists(st.sampled_from(optional), unique=True)) \
        if optional else list(required)
    if draw(st.booleans()) and len(columns) > 1:  # sometimes a required column is missing
        columns.remove(draw(st.sampled_from(columns)))
    columns = draw(st.permutations(columns))
    header = [draw(st.sampled_from([c, c.upper(), f" {c} ", c.title()])) for c in columns]
    rows = draw(st.lists(st.tuples(*[cells[c] for c in columns]), max_size=8))
    return [header] + [list(r) for r in rows]


# ------------------------------------------------------------------ CSV files
@st.composite
def csv_bytes(draw, rows: list[list[str]]) -> bytes:
    out = io.StringIO()
    csv.writer(out, delimiter=draw(st.sampled_from([",", ";"])),
               lineterminator=draw(st.sampled_from(["\n", "\r\n", "\r"]))).writerows(rows)
    data = out.getvalue().encode("utf-8")
    if draw(st.booleans()):
        data = b"\xef\xbb\xbf" + data
    return draw(corrupted(data))


@st.composite
def corrupted(draw, data: bytes) -> bytes:
    """Sometimes damage the bytes: flip, cut, insert junk or control characters."""
    for _ in range(draw(st.integers(0, 3))):
        kind = draw(st.sampled_from(["flip", "cut", "insert", "control", "quote"]))
        # A position as a fraction of the length: the draws then never depend on the
        # bytes (a workbook's bytes carry its save time).
        at = draw(st.integers(0, 1 << 20)) * len(data) >> 20
        if kind == "flip" and data:
            at = min(at, len(data) - 1)
            data = data[:at] + bytes([data[at] ^ draw(st.integers(1, 255))]) + data[at + 1:]
        elif kind == "cut":
            data = data[:at]
        elif kind == "insert":
            data = data[:at] + draw(st.binary(max_size=16)) + data[at:]
        elif kind == "control":
            data = data[:at] + bytes([draw(st.sampled_from([0, 1, 7, 9, 11, 27, 127]))]) \
                + data[at:]
        else:
            data = data[:at] + b'"' + data[at:]
    return data


def write(name: str, data: bytes | None) -> Path | None:
    if data is None:
        return None
    path = WORK / name
    path.write_bytes(data)
    return path


def assert_loads_or_refuses(jobs: Path, sites: Path | None, travel: Path | None) -> None:
    try:
        day = load_day(jobs, sites, travel)
    except InputError as exc:
        assert exc.problems and all(p.message for p in exc.problems)
        named = {str(p) for p in (jobs, sites, travel) if p is not None}
        assert all(p.file in named for p in exc.problems if p.file)
        return
    check_day(day)


def check_day(day: Day) -> None:
    """The contract's invariants of a validated day."""
    ids = [j.id for j in day.jobs]
    assert ids and len(set(ids)) == len(ids) and all(ids)
    assert all(j.end > j.start for j in day.jobs)
    t = day.travel
    assert (t >= 0).all() and (np.diag(t) == 0).all()
    # closed under shortest paths: no detour via a third site is quicker
    assert ((t[:, :, None] + t[None, :, :]).min(axis=1) == t).all()
    slot = day.end - day.start
    assert (slot >= t[day.origin, day.destination]).all()


@FUZZ
@given(data=st.data())
def test_csv_days_load_or_give_an_input_error(data):
    jobs = data.draw(csv_bytes(data.draw(table(job_cells, ["job", "origin", "start", "end"]))))
    sites = data.draw(st.none() | csv_bytes(data.draw(table(site_cells, ["site"]))))
    travel = data.draw(st.none() | csv_bytes(data.draw(
        table(travel_cells, ["from", "to", "minutes"]))))
    assert_loads_or_refuses(write("jobs.csv", jobs), write("sites.csv", sites),
                            write("travel.csv", travel))


@FUZZ
@given(data=st.binary(max_size=2048), suffix=st.sampled_from([".csv", ".xlsx", ""]))
def test_any_bytes_load_or_give_an_input_error(data, suffix):
    assert_loads_or_refuses(write(f"junk{suffix}", data), None, None)


# ------------------------------------------------------------------ XLSX files
xml_safe_text = st.text(st.characters(blacklist_categories=("Cs",),
                                      blacklist_characters=[chr(c) for c in range(32)
                                                            if c not in (9, 10, 13)]),
                        max_size=12)
spreadsheet_values = st.one_of(
    st.none(), xml_safe_text, st.integers(-10**6, 10**6), st.booleans(),
    st.floats(allow_nan=False, allow_infinity=False),
    st.times(), st.datetimes(min_value=datetime(1900, 1, 1), max_value=datetime(2100, 1, 1)),
    st.timedeltas(min_value=timedelta(days=-3), max_value=timedelta(days=3)),
    st.sampled_from(["=1+1", "=A1", "=1/0", "=NOW()", "#DIV/0!", "#N/A", "#VALUE!"]),
    st.sampled_from([time(7, 45), time(25 % 24, 30), timedelta(hours=25, minutes=30)]))


def xlsx_cells(cells: dict) -> dict:
    return {k: st.one_of(v, spreadsheet_values) for k, v in cells.items()}


@st.composite
def xlsx_bytes(draw) -> bytes:
    import openpyxl
    book = openpyxl.Workbook()
    book.remove(book.active)
    for name, cells, required in (("Jobs", job_cells, ["job", "origin", "start", "end"]),
                                  ("Sites", site_cells, ["site"])):
        sheet = book.create_sheet(name)
        for row in draw(table(xlsx_cells(cells), required)):
            sheet.append([_storable(v) for v in row])
    book.properties.created = book.properties.modified = datetime(2026, 12, 2)
    out = io.BytesIO()
    book.save(out)
    data = out.getvalue()
    return draw(corrupted(data)) if draw(st.integers(0, 3)) == 0 else data


def _storable(value):
    # openpyxl refuses to write characters XML cannot hold; a real file cannot have them.
    if isinstance(value, str):
        from openpyxl.cell.cell import ILLEGAL_CHARACTERS_RE
        return ILLEGAL_CHARACTERS_RE.sub("", value)
    return value


@XLSX_FUZZ
@given(workbook=xlsx_bytes(), sheet=st.sampled_from([None, "Jobs", "Sites", "missing"]))
def test_xlsx_days_load_or_give_an_input_error(workbook, sheet):
    path = write("day.xlsx", workbook)
    try:
        day = load_day(path, path, None, sheets={"jobs": sheet} if sheet else
                       {"sites": "Sites"})
    except InputError as exc:
        assert exc.problems and all(p.file == str(path) for p in exc.problems if p.file)
        return
    check_day(day)


# ------------------------------------------------------------------ wide headers
@FUZZ
@given(data=st.data())
def test_wide_headers_load_like_narrow_ones(data):
    """Empty header columns (trailing or between), and stray values under them, change
    nothing: the day reads as the same file without them."""
    rows = data.draw(table(job_cells, ["job", "origin", "start", "end"]))
    gap = data.draw(st.integers(1, 3000))
    stray = st.text(st.characters(blacklist_categories=("Cc", "Cs")), max_size=8)
    wide = [rows[0] + [""] * gap] + [r + [""] * data.draw(st.integers(0, 3)) + [junk]
                                     for r, junk in zip(rows[1:], data.draw(st.lists(
                                         stray, min_size=len(rows) - 1,
                                         max_size=len(rows) - 1)))]
    narrow_day = _outcome(write("narrow.csv", _csv(rows)))
    wide_day = _outcome(write("wide.csv", _csv(wide)))
    assert narrow_day == wide_day


def _csv(rows: list[list[str]]) -> bytes:
    out = io.StringIO()
    csv.writer(out, lineterminator="\n", quoting=csv.QUOTE_ALL).writerows(rows)
    return out.getvalue().encode("utf-8")


def _outcome(path: Path):
    """The jobs read, or the problems (without the file name), for comparing files."""
    try:
        return [(j.id, j.start, j.end) for j in load_day(path).jobs]
    except InputError as exc:
        return [(p.row, p.column, p.message) for p in exc.problems]


# ------------------------------------------------------------------ plan files
json_leaf = st.one_of(
    st.none(), st.booleans(), st.integers(-10**6, 10**6),
    st.sampled_from([10**400, -10**400, 0.5, 1e308, float("inf"), float("nan"), 2**63]),
    st.floats(), st.text(max_size=12),
    st.sampled_from(["\ud800", "J\udc00", "a\x00b", "\x1b[2J", "J\u200b1", "\uff2a1", "",
                     "08:00", "25:30", "2026-12-02T08:00", "x" * 20_000]))
plan_job = st.fixed_dictionaries(
    {"job": st.one_of(st.sampled_from(["J1", "J2", "J1"]), json_leaf),
     "origin": st.one_of(st.sampled_from(SITES), json_leaf),
     "start": st.one_of(clock_texts, json_leaf), "end": st.one_of(clock_texts, json_leaf)},
    optional={"destination": st.one_of(st.sampled_from(SITES), json_leaf),
              "notes": json_leaf, "vehicle_class": json_leaf, "row": json_leaf})
plan_site = st.fixed_dictionaries(
    {"site": st.one_of(st.sampled_from(SITES), json_leaf)},
    optional={"x_km": json_leaf, "y_km": json_leaf, "lat": json_leaf, "lon": json_leaf,
              "name": json_leaf})
plan_travel = st.fixed_dictionaries(
    {"from": st.one_of(st.sampled_from(SITES), json_leaf),
     "to": st.one_of(st.sampled_from(SITES), json_leaf),
     "seconds": st.one_of(st.integers(0, 7200), json_leaf)})
plan_settings = st.fixed_dictionaries(
    {}, optional={"turnaround_seconds": json_leaf, "depot": json_leaf,
                  "day_start": st.one_of(clock_texts, json_leaf),
                  "day_end": st.one_of(clock_texts, json_leaf), "speed_kmh": json_leaf,
                  "circuity": json_leaf})
plan_documents = st.fixed_dictionaries(
    {"format": st.sampled_from(["shipgui-plan", "shipgui-plan", "other"]),
     "schema_version": st.one_of(st.just(1), st.just(1), json_leaf),
     "inputs": st.fixed_dictionaries({"jobs": st.lists(plan_job, max_size=5)},
                                     optional={"sites": st.lists(plan_site, max_size=4),
                                               "travel": st.lists(plan_travel, max_size=4)})},
    optional={"settings": plan_settings, "plan_date": json_leaf,
              "driver_names": st.dictionaries(st.text(max_size=3), json_leaf, max_size=3),
              "sources": st.dictionaries(st.sampled_from(["jobs", "sites", "\ud800"]),
                                         json_leaf, max_size=3)})


@FUZZ
@given(document=plan_documents, bom=st.booleans())
def test_plan_files_open_and_save_again_or_give_an_input_error(document, bom):
    """A plan file either opens (and then saves again, builds a day or names the
    problem) or is refused with an InputError naming the file; never anything else.
    Before: huge numbers raised OverflowError, lone surrogates opened and then made
    every save fail."""
    from shipgui.core.day import build_inputs
    from shipgui.core.io.plan_file import plan_file_bytes, read_plan_file
    text = json.dumps(document, ensure_ascii=True)  # "\ud800" escapes, as a file holds them
    path = write("day.shipgui", (b"\xef\xbb\xbf" if bom else b"") + text.encode("utf-8"))
    try:
        inputs = read_plan_file(path)
    except InputError as exc:
        assert exc.problems and all(p.file in (None, str(path)) for p in exc.problems)
        assert len(exc.problems) <= 50
        return
    plan_file_bytes(inputs).decode("utf-8")  # saving can never fail on the text
    try:
        check_day(build_inputs(inputs))
    except InputError as exc:
        assert exc.problems


# ------------------------------------------------------------------ one validation
cell_texts = st.one_of(
    st.text(max_size=8),
    st.builds(lambda a, c, b: a + c + b, st.text(max_size=3),
              st.sampled_from(["\n", "\r", "\t", "\x00", "\x1b", "\x7f", "\x85", "\u200b",
                               "\ufeff", "\u00a0", "\u2028", "\u3000", "\uff2a"]),
              st.text(max_size=3)),
    st.sampled_from(["J" * 100, "J" * 101, " J1 ", "J1", "\uff2a1"]))


@FUZZ
@given(value=cell_texts, field=st.sampled_from(["job", "origin", "notes", "vehicle_class"]))
def test_files_plan_files_and_cell_edits_accept_the_same_values(value, field):
    """A value a jobs CSV accepts, a plan file and a cell edit accept too (the same
    text stored), and what one refuses the others refuse."""
    from shipgui.core import Job
    from shipgui.core.document import DayDocument
    from shipgui.core.io.plan_file import read_plan_file
    from shipgui.core.io.readers import read_jobs
    name = "id" if field == "job" else field
    record = {"job": "J9", "origin": "A", "start": "07:00", "end": "08:00", field: value}
    out = io.StringIO()
    csv.writer(out, lineterminator="\n", quoting=csv.QUOTE_ALL).writerows(
        [list(record), list(record.values())])
    plan = {"format": "shipgui-plan", "schema_version": 1, "inputs": {"jobs": [record]}}
    readers = (
        lambda: read_jobs(write("one.csv", out.getvalue().encode("utf-8")))[0][0],
        lambda: read_plan_file(write("one.shipgui", json.dumps(plan).encode("utf-8"))).jobs[0])
    outcomes = []
    for read in readers:
        try:
            outcomes.append(getattr(read(), name))
        except InputError:
            outcomes.append(None)
    document = DayDocument([Job("J9", "A", "A", 7 * 3600, 8 * 3600)])
    try:
        outcomes.append(document.checked_value(0, name, value))
    except ValueError:
        outcomes.append(None)
    assert outcomes[0] == outcomes[1] == outcomes[2], outcomes
