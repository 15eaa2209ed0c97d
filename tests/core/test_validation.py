"""One validation for the day files, plan files and cell edits: what each accepts
and refuses, and how a problem is named (file, row, column and the job)."""

from __future__ import annotations

import json
import tracemalloc

import pytest

from shipgui.core import InputError, Settings, load_day, solve_day
from shipgui.core.document import DayDocument
from shipgui.core.export.plan_json import plan_to_dict
from shipgui.core.io.plan_file import read_plan_file
from shipgui.core.io.readers import read_day_file, read_jobs
from shipgui.core.io.tables import read_table
from tests.support.documents import small_document

JOBS = "job,origin,destination,start,end,vehicle_class\n"
SITES = "site,x_km,y_km\nA,0,0\nB,6,0\nC,12,0\n"


def _write(tmp_path, name, text):
    path = tmp_path / name
    path.write_bytes(text.encode("utf-8") if isinstance(text, str) else text)
    return path


def _load(tmp_path, jobs, sites=SITES, travel=None, **settings):
    return load_day(_write(tmp_path, "jobs.csv", jobs),
                    _write(tmp_path, "sites.csv", sites) if sites else None,
                    _write(tmp_path, "travel.csv", travel) if travel else None,
                    settings=Settings(**settings))


def _problems(info):
    return list(info.value.problems)


# ------------------------------------------------------------- vehicle classes

def test_vehicle_classes_ignore_case_and_spaces_and_keep_the_first_spelling(tmp_path):
    # Two overlapping pairs: one class each way needs 2 vehicles, four classes need 4.
    text = JOBS + ("J1,A,A,07:00,08:00,Reefer \nJ2,A,A,08:30,09:00,reefer\n"
                   "J3,A,A,07:00,08:00,RIGID\nJ4,A,A,08:30,09:00,rigid\n")
    day = _load(tmp_path, text)
    assert [j.vehicle_class for j in day.jobs] == ["Reefer", "Reefer", "RIGID", "RIGID"]
    assert solve_day(day).vehicles == 2
    notes = [w for w in day.warnings if "vehicle class" in w]
    assert len(notes) == 2 and "'reefer' (1 job)" in notes[0] and "shown as 'Reefer'" in notes[0]


def test_one_spelling_gives_no_warning(tmp_path):
    day = _load(tmp_path, JOBS + "J1,A,A,07:00,08:00,van\nJ2,A,A,08:30,09:00,van\n")
    assert not any("vehicle class" in w for w in day.warnings)


def test_vehicles_per_class_follow_the_class_as_the_jobs_spell_it(tmp_path):
    text = JOBS + "J1,A,A,07:00,08:00,Reefer\nJ2,A,A,07:30,09:00,reefer \n"
    day = _load(tmp_path, text, class_vehicles=(("REEFER", 2),))
    assert day.settings.class_vehicles == (("Reefer", 2),)


# ------------------------------------------------------------- unknown sites

def test_a_mistyped_site_names_every_job_that_uses_it(tmp_path):
    text = JOBS + ("J1,A,B,07:00,08:00,\nJ2,BB,C,09:00,10:00,\nJ3,A,BB,11:00,12:00,\n"
                   "J4,a,C,13:00,14:00,\n")
    with pytest.raises(InputError) as info:
        _load(tmp_path, text)
    where = {(p.job, p.row, p.column) for p in _problems(info)}
    assert where == {("J2", 3, "origin"), ("J3", 4, "destination"), ("J4", 5, "origin")}
    assert all(p.file.endswith("jobs.csv") for p in _problems(info))
    messages = {p.job: p.message for p in _problems(info)}
    assert "'BB' is not in the sites file" in messages["J2"]
    assert "did you mean 'A'?" in messages["J4"]
    assert "travel" not in str(info.value)  # not blamed on a travel file there is none of


def test_an_unknown_depot_is_named(tmp_path):
    with pytest.raises(InputError) as info:
        _load(tmp_path, JOBS + "J1,A,B,07:00,08:00,\n", depot="YRAD")
    assert "the depot 'YRAD' is not a site in the sites file" in str(info.value)


def test_sites_known_from_the_travel_file_only(tmp_path):
    travel = "from,to,minutes\nA,B,10\nB,A,10\n"
    with pytest.raises(InputError) as info:
        _load(tmp_path, JOBS + "J1,A,X,07:00,08:00,\n", sites=None, travel=travel)
    assert _problems(info)[0].job == "J1"
    assert "'X' is not in the travel file" in str(info.value)


# ------------------------------------------------------------- job ids in messages

def test_a_message_about_one_job_names_it(tmp_path):
    with pytest.raises(InputError) as info:
        _load(tmp_path, JOBS + "J7,A,B,09:00,08:00,\n")
    problem = _problems(info)[0]
    assert (problem.row, problem.column, problem.job) == (2, "end", "J7")
    assert str(problem).startswith("jobs.csv, row 2, column 'end', job J7: the job ends")


def test_a_bad_value_of_a_job_names_the_job_but_not_a_broken_id(tmp_path):
    path = _write(tmp_path, "jobs.csv", "job,origin,start,end,notes\n"
                                        "J1,A,07:00,08:00,\x1b[2J\nJ\x072,A,07:00,08:00,\n")
    with pytest.raises(InputError) as info:
        read_jobs(path)
    assert [(p.row, p.column, p.job) for p in _problems(info)] == [(2, "notes", "J1"),
                                                                   (3, "job", None)]


# ------------------------------------------------------------- site coordinates

REGION = "site,lat,lon\nA,48.70,10.20\nB,48.75,10.25\nC,48.72,10.10\n"


def test_swapped_lat_lon_is_blamed_on_the_sites_row(tmp_path):
    sites = REGION + "D,10.22,48.71\n"
    jobs = JOBS + "".join(f"J{k},D,A,{7 + k:02d}:00,{7 + k:02d}:30,\n" for k in range(8))
    with pytest.raises(InputError) as info:
        _load(tmp_path, jobs, sites=sites)
    problems = _problems(info)
    assert len(problems) == 1
    assert (problems[0].row, problems[0].column) == (5, "lat")
    assert problems[0].file.endswith("sites.csv") and "swapped" in problems[0].message


def test_a_far_off_site_is_blamed_once_when_jobs_fail_because_of_it(tmp_path):
    sites = REGION + "E,-30,-60\n"
    jobs = JOBS + "J1,A,B,07:00,08:00,\n" + "".join(
        f"J{k},E,A,{7 + k:02d}:00,{7 + k:02d}:30,\n" for k in range(2, 12))
    with pytest.raises(InputError) as info:
        _load(tmp_path, jobs, sites=sites)
    problems = _problems(info)
    assert len(problems) == 1 and problems[0].row == 5
    assert "10 jobs using site E" in problems[0].message


def test_a_far_off_site_whose_jobs_fit_is_accepted(tmp_path):
    sites = REGION + "E,50.5,12.0\n"  # about 200 km away: a long but real drive
    day = _load(tmp_path, JOBS + "J1,A,B,07:00,08:00,\nJ2,E,E,09:00,10:00,\n", sites=sites)
    assert day.n == 2


# ------------------------------------------------------------- numbers

def test_decimal_commas_are_read_the_same_everywhere(tmp_path):
    jobs = "job;origin;destination;start;duration\nJ1;A;B;07:00;45,5\n"
    sites = "site;lat;lon\nA;48,70;10,20\nB;48,75;10,25\n"
    travel = "from;to;minutes\nA;B;12,5\nB;A;12.5\n"
    day = _load(tmp_path, jobs, sites=sites, travel=travel)
    assert day.jobs[0].end - day.jobs[0].start == 2730
    assert day.travel_between("A", "B") == day.travel_between("B", "A") == 750
    assert day.sites["A"].lat == 48.70


@pytest.mark.parametrize("text", ["1.000,5", "1,000.5", "1 000", "12,,5", "0x10", "1_000"])
def test_number_forms_are_refused_the_same_everywhere(tmp_path, text):
    quoted = f'"{text}"'
    jobs = f"job,origin,start,duration\nJ1,A,07:00,{quoted}\n"
    sites = f"site,lat,lon\nA,{quoted},10\n"
    travel = f"from,to,minutes\nA,B,{quoted}\n"
    messages = []
    for kind, content in (("jobs", jobs), ("sites", sites), ("travel", travel)):
        with pytest.raises(InputError) as info:
            read_day_file(_write(tmp_path, f"{kind}.csv", content))
        messages.append(_problems(info)[0].message)
    assert all("write numbers like 12.5 or 12,5" in m for m in messages)


@pytest.mark.parametrize("text, value", [("2,5", 2.5), ("0.5", 0.5), ("1_000", None),
                                         ("1.000,5", None), ("inf", None)])
def test_a_priority_is_read_like_every_other_number(tmp_path, text, value):
    path = _write(tmp_path, "jobs.csv",
                  f'job,origin,start,end,priority\nJ1,A,07:00,08:00,"{text}"\n')
    doc = small_document()
    if value is None:
        with pytest.raises(InputError):
            read_jobs(path)
        with pytest.raises(ValueError, match="12.5 or 12,5"):
            doc.checked_value(0, "priority", text)
    else:
        assert read_jobs(path)[0][0].priority == value == doc.checked_value(0, "priority", text)


# ------------------------------------------------------------- shortened travel

def test_shortened_travel_times_are_listed_with_given_and_used_minutes(tmp_path):
    travel = "from,to,minutes\nA,B,50\nB,A,10\nA,C,5\nC,B,5\nB,C,60\nC,A,60\n"
    day = _load(tmp_path, JOBS + "J1,A,B,07:00,09:00,\n", sites=None, travel=travel)
    pairs = {(p.origin, p.destination): p for p in day.shortened}
    assert len(pairs) == day.shortened_pairs == 3
    # A -> B 50 min given; via C it is 5 + 5; B -> C: via A 10 + 5; C -> A: via B 5 + 10.
    assert (pairs["A", "B"].given, pairs["A", "B"].used, pairs["A", "B"].row) == (3000, 600, 2)
    assert (pairs["B", "C"].used, pairs["C", "A"].used) == (900, 900)
    assert day.shortened[0] == pairs["B", "C"]  # the largest cut first (60 to 15 min)
    note = next(w for w in day.warnings if "shortened" in w)
    assert "A -> B 50 min given, 10 min used" in note
    listed = plan_to_dict(solve_day(day))["travel_shortened"]
    assert {"from": "A", "to": "B", "given_minutes": 50, "used_minutes": 10,
            "row": 2} in listed


# ------------------------------------------------------------- wide files

def _peak_mb(call):
    tracemalloc.start()
    try:
        call()
        return tracemalloc.get_traced_memory()[1] / 1e6
    finally:
        tracemalloc.stop()


def test_a_header_ending_in_thousands_of_commas_costs_nothing_per_row(tmp_path):
    rows = "".join(f"J{k},A,07:00,08:00\n" for k in range(5000))
    plain = _write(tmp_path, "plain.csv", "job,origin,start,end\n" + rows)
    path = _write(tmp_path, "jobs.csv", "job,origin,start,end" + "," * 50_000 + "\n" + rows)
    table = read_table(path)
    assert table.columns == ("job", "origin", "start", "end")
    assert {len(values) for _row, values in table.rows} == {4}
    # Before: every row padded to 50 004 columns (2 GB for this 0.2 MB file).
    assert _peak_mb(lambda: read_jobs(path)) < _peak_mb(lambda: read_jobs(plain)) + 10


def test_a_stray_cell_far_right_in_a_workbook_costs_nothing_per_row(tmp_path):
    import openpyxl
    book = openpyxl.Workbook()
    sheet = book.active
    sheet.append(["job", "origin", "start", "end"])
    for k in range(2000):
        sheet.append([f"J{k}", "A", "07:00", "08:00"])
    sheet["XFD1"] = "stray"
    path = tmp_path / "jobs.xlsx"
    book.save(path)
    table = read_table(path)
    assert table.columns == ("job", "origin", "start", "end", "stray")
    assert {len(values) for _row, values in table.rows} == {5}
    del sheet["XFD1"]
    plain = tmp_path / "plain.xlsx"
    book.save(plain)
    # Before: 2 000 rows x 16 384 columns held at once (about 260 MB).
    assert _peak_mb(lambda: read_jobs(path)) < _peak_mb(lambda: read_jobs(plain)) + 20


def test_absurd_widths_are_refused(tmp_path):
    path = _write(tmp_path, "jobs.csv", "job,origin,start,end" + "," * 20_000 + "x\n")
    with pytest.raises(InputError, match="wider than any spreadsheet"):
        read_table(path)


# ------------------------------------------------------------- plan files

def _plan_file(tmp_path, **changes):
    doc = small_document()
    path = tmp_path / "day.shipgui"
    doc.save(path)
    data = json.loads(path.read_text(encoding="utf-8"))
    for dotted, value in changes.items():
        target = data
        *parents, last = dotted.split("__")
        for key in parents:
            target = target[int(key)] if isinstance(target, list) else target[key]
        target[last] = value
    path.write_text(json.dumps(data), encoding="utf-8")
    return path


def test_a_plan_file_with_a_byte_order_mark_opens(tmp_path):
    path = _plan_file(tmp_path)
    path.write_bytes(b"\xef\xbb\xbf" + path.read_bytes())
    assert len(read_plan_file(path).jobs) == 4


@pytest.mark.parametrize("field, value, column, words", [
    ("inputs__jobs__0__job", "J" * 5_000_000, "job", "not an id"),
    ("inputs__jobs__0__notes", "a\nb", "notes", "control character"),
    ("inputs__jobs__1__job", "J1", "job", "listed twice"),
    ("inputs__jobs__1__job", "\uff2a1", "job", "looks the same as job 'J1'"),
    ("inputs__jobs__0__customer", "\ud800", "customer", "broken character"),
    ("inputs__sites__0__name", "\udfff", "name", "broken character"),
    ("inputs__sites__0__x_km", 10**400, "x_km", "number from"),
    ("settings__turnaround_seconds", 0.5, "turnaround_seconds", "whole number"),
    ("settings__turnaround_seconds", 10**400, "turnaround_seconds", "whole number"),
    ("settings__speed_kmh", float("inf"), "speed_kmh", "number from"),
    ("settings__day_start", "05:00", "day_start", "needs a depot"),
    ("settings__depot", "YARD\u200b", "depot", "invisible character"),
    ("sources__jobs", "\udce9.csv", "sources.jobs", "broken character"),
])
def test_plan_files_follow_the_rules_of_the_day_files(tmp_path, field, value, column, words):
    path = _plan_file(tmp_path, **{field: value})
    with pytest.raises(InputError) as info:
        read_plan_file(path)
    assert any(p.column == column and words in p.message for p in _problems(info)), \
        str(info.value)


def test_a_plan_file_with_twenty_thousand_bad_jobs_lists_fifty(tmp_path):
    jobs = [{"job": f"J{k}", "origin": "A", "start": "09:00", "end": "08:00"}
            for k in range(20_000)]
    path = _plan_file(tmp_path, inputs__jobs=jobs)
    with pytest.raises(InputError) as info:
        read_plan_file(path)
    assert len(_problems(info)) == 50 and info.value.more == 19_950
    assert str(info.value).endswith("... and 19950 more problems")


def test_duplicated_sites_and_travel_pairs_in_a_plan_file_are_refused(tmp_path):
    sites = [{"site": "A", "x_km": 0, "y_km": 0}, {"site": "A", "x_km": 9, "y_km": 0}]
    travel = [{"from": "A", "to": "B", "seconds": 60}, {"from": "A", "to": "B", "seconds": 90}]
    path = _plan_file(tmp_path, inputs__sites=sites, inputs__travel=travel)
    with pytest.raises(InputError) as info:
        read_plan_file(path)
    assert {(p.row, p.column) for p in _problems(info)} == {(2, "site"), (2, "from")}


# ------------------------------------------------------------- cell edits

@pytest.mark.parametrize("name, text, words", [
    ("notes", "line\nbreak", "control character"),
    ("customer", "nul\x00", "control character"),
    ("reference", "\x1b[1m", "control character"),
    ("notes", "x" * 20_000, "characters long"),
    ("id", "J\u200b2", "invisible character"),
    ("id", "\uff2a2", "looks the same as job J2"),
    ("vehicle_class", "v" * 101, "not an id"),
])
def test_cell_edits_follow_the_rules_of_the_day_files(name, text, words):
    doc = small_document()
    with pytest.raises(ValueError, match=words):
        doc.checked_value(0, name, text)


def test_a_cell_edit_accepts_what_a_file_accepts():
    doc = small_document()
    assert doc.checked_value(0, "notes", "  gate 4, ring twice ") == "gate 4, ring twice"
    assert doc.checked_value(0, "end", "25:30") == 25 * 3600 + 1800
    doc.plan_date = __import__("datetime").date(2026, 12, 2)
    assert doc.checked_value(0, "end", "2026-12-02T09:45") == 9 * 3600 + 2700


def test_settings_without_a_depot_are_refused_by_the_day_as_by_the_plan_file():
    doc = small_document()
    doc.settings = Settings(day_start=5 * 3600)
    with pytest.raises(InputError, match="needs a depot"):
        doc.build()


def test_document_and_files_refuse_the_same_ids(tmp_path):
    """The same id texts are refused by the CSV reader and by a cell edit."""
    for text in ("J\u200b9", "J\x079", "J" * 101):
        path = _write(tmp_path, "jobs.csv", f"job,origin,start,end\n{text},A,07:00,08:00\n")
        with pytest.raises(InputError):
            read_jobs(path)
        with pytest.raises(ValueError):
            DayDocument.checked_value(small_document(), 0, "id", text)
