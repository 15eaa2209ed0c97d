"""The plan file (.shipgui), the exported plan JSON, and reading the day files."""

from __future__ import annotations

import json

import pytest

from shipgui.core import InputError, Settings, solve_day
from shipgui.core.demo import DEMO_SETTINGS, demo_files
from shipgui.core.document import DayDocument
from shipgui.core.drivers import Driver
from shipgui.core.export.plan_json import plan_to_json
from shipgui.core.io.readers import read_inputs
from tests.support.documents import small_document


def test_plan_document_round_trip(tmp_path):
    doc = small_document()
    doc.settings = Settings(turnaround=615, depot="A", day_start=5 * 3600, day_end=26 * 3600)
    doc.travel = {("A", "B"): (437, 2)}
    doc.drivers = [Driver("Driver One", frozenset({"J1", "J2"}))]
    path = tmp_path / "day.shipgui"
    doc.save(path)
    data = json.loads(path.read_text(encoding="utf-8"))
    assert data["format"] == "shipgui-plan" and data["schema_version"] == 2
    assert set(data["inputs"]) == {"jobs", "sites", "travel"}
    back = DayDocument.open(path)
    assert back.jobs == doc.jobs  # rows too: messages keep naming the jobs file's rows
    assert back.sites == doc.sites
    assert back.travel == {("A", "B"): (437, 2)}
    assert back.settings == doc.settings
    assert back.drivers == [Driver("Driver One", frozenset({"J1", "J2"}))]
    assert data["drivers"] == [{"name": "Driver One", "jobs": ["J1", "J2"]}]
    assert back.path == path
    assert back.build().fingerprint == doc.build().fingerprint


def test_the_longest_working_day_is_kept_with_the_plan(tmp_path):
    doc = small_document()
    doc.settings = Settings(turnaround=600, max_day=11 * 3600)
    path = tmp_path / "day.shipgui"
    doc.save(path)
    data = json.loads(path.read_text(encoding="utf-8"))
    assert data["settings"]["max_day_seconds"] == 11 * 3600
    assert DayDocument.open(path).settings.max_day == 11 * 3600
    # No limit is written as null and read back as none.
    doc.settings = Settings(turnaround=600)
    doc.save(path)
    assert json.loads(path.read_text(encoding="utf-8"))["settings"]["max_day_seconds"] is None
    assert DayDocument.open(path).settings.max_day is None


def test_a_plan_file_from_before_the_limit_reads_as_no_limit(tmp_path):
    doc = small_document()
    path = tmp_path / "old.shipgui"
    doc.save(path)
    data = json.loads(path.read_text(encoding="utf-8"))
    del data["settings"]["max_day_seconds"]  # as files were written before the setting
    path.write_text(json.dumps(data), encoding="utf-8")
    assert DayDocument.open(path).settings.max_day is None


@pytest.mark.parametrize("value", [0, -60, 24 * 3600 + 1, 39600.5, "11:00", True, [1]])
def test_a_bad_longest_working_day_names_the_field(tmp_path, value):
    path = tmp_path / "bad.shipgui"
    small_document().save(path)
    data = json.loads(path.read_text(encoding="utf-8"))
    data["settings"]["max_day_seconds"] = value
    path.write_text(json.dumps(data), encoding="utf-8")
    with pytest.raises(InputError) as info:
        DayDocument.open(path)
    (problem,) = info.value.problems
    assert problem.column == "max_day_seconds" and problem.file == str(path)
    assert "longest working day" in problem.message


def test_save_replaces_the_old_file_whole(tmp_path):
    path = tmp_path / "day.shipgui"
    path.write_text("old content")
    small_document().save(path)
    assert json.loads(path.read_text())["format"] == "shipgui-plan"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["day.shipgui"]


def test_write_to_an_impossible_place_raises_and_leaves_nothing(tmp_path):
    target = tmp_path / "missing-folder" / "day.shipgui"
    with pytest.raises(OSError):
        small_document().save(target)
    assert not target.exists()


@pytest.mark.parametrize("content, words", [
    ("{not json", "damaged"),
    ('{"vehicles": 3, "routes": []}', "exported plan"),
    ('{"format": "shipgui-plan", "schema_version": 9}', "version 9"),
    ('{"format": "shipgui-plan", "schema_version": 1, "inputs": {"jobs": '
     '[{"job": "J1", "origin": "A", "start": "8h", "end": "09:00"}]}}', "not a time"),
    ('{"format": "shipgui-plan", "schema_version": 1, "inputs": {"jobs": []}}', "no jobs"),
])
def test_bad_plan_documents_name_the_problem(tmp_path, content, words):
    path = tmp_path / "bad.shipgui"
    path.write_text(content)
    with pytest.raises(InputError) as info:
        DayDocument.open(path)
    assert any(words in p.message for p in info.value.problems)
    assert all(p.file == str(path) for p in info.value.problems)


def test_plan_json_has_the_contract_keys(tmp_path):
    plan = solve_day(small_document().build())
    path = tmp_path / "plan.json"
    path.write_text(plan_to_json(plan, driver_names={1: "Driver One"}))
    data = json.loads(path.read_text())
    assert data["vehicles"] == 2 and data["verified"] is True
    assert [r["vehicle"] for r in data["routes"]] == [1, 2]
    assert sorted(j for r in data["routes"] for j in r["jobs"]) == ["J1", "J2", "J3", "J4"]
    assert len(data["certificate"]["jobs"]) == 2
    assert data["routes"][0]["driver"] == "Driver One"


def test_open_inputs_reads_the_demo():
    files = demo_files()
    doc = DayDocument.from_inputs(read_inputs(files["jobs"], files["sites"], files["travel"],
                                              settings=DEMO_SETTINGS))
    assert len(doc.jobs) == 150 and doc.sources["travel"] == str(files["travel"])
    assert doc.build().n == 150


def test_open_inputs_reports_every_bad_file_with_row_and_column(tmp_path):
    jobs = tmp_path / "jobs.csv"
    jobs.write_text("job,origin,start,end\nJ1,A,08:00,09:00\nJ2,A,8h,09:00\n")
    sites = tmp_path / "sites.csv"
    sites.write_text("site,x_km,y_km\nA,0,north\n")
    with pytest.raises(InputError) as info:
        read_inputs(jobs, sites)
    where = {(p.file, p.row, p.column) for p in info.value.problems}
    assert (str(jobs), 3, "start") in where and (str(sites), 2, "y_km") in where


def test_solve_reads_a_plan_file(tmp_path, capsys):
    from shipgui.cli import main
    path = tmp_path / "day.shipgui"
    small_document().save(path)
    out = tmp_path / "plan.json"
    assert main(["solve", str(path), "--json", str(out)]) == 0
    assert json.loads(out.read_text())["vehicles"] == 2
    assert main(["solve", str(path), "--sites", str(path)]) == 2
    assert "plan file" in capsys.readouterr().err


def test_a_version_1_plan_file_still_opens(tmp_path):
    # Files saved before version 2 (no working-day limit, drivers by vehicle
    # number) open as they were.
    path = tmp_path / "old.shipgui"
    path.write_text('{"format": "shipgui-plan", "schema_version": 1, "inputs": {"jobs": '
                    '[{"job": "J1", "origin": "A", "start": "08:00", "end": "09:00"}]}, '
                    '"settings": {"turnaround_seconds": 600}, "driver_names": {"1": "Ada"}}')
    doc = DayDocument.open(path)
    assert [j.id for j in doc.jobs] == ["J1"] and doc.settings.max_day is None
    assert doc.settings.turnaround == 600
