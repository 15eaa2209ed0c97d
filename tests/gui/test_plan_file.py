"""The plan document, the exported plan JSON, and reading CSV inputs."""

from __future__ import annotations

import json

import pytest

from shipgui.core import InputError, Settings, solve_day
from shipgui.core.demo import DEMO_SETTINGS, demo_files
from shipgui.gui import plan_file

from .conftest import small_document


def test_plan_document_round_trip(qapp, tmp_path):
    doc = small_document()
    doc.settings = Settings(turnaround=615, depot="A", day_start=5 * 3600, day_end=26 * 3600)
    doc.travel = {("A", "B"): (437, 2)}
    doc.driver_names = {1: "Driver One"}
    path = tmp_path / "day.shipgui"
    plan_file.save_document(doc, path)
    data = json.loads(path.read_text(encoding="utf-8"))
    assert data["format"] == "shipgui-plan" and data["schema_version"] == 1
    assert set(data["inputs"]) == {"jobs", "sites", "travel"}
    back = plan_file.open_document(path)
    assert back.jobs == [j.__class__(**{**vars(j), "row": k + 1})
                         for k, j in enumerate(doc.jobs)]
    assert back.sites == doc.sites
    assert {k: v[0] for k, v in back.travel.items()} == {("A", "B"): 437}
    assert back.settings == doc.settings
    assert back.driver_names == {1: "Driver One"}
    assert back.path == path
    assert back.build().fingerprint == doc.build().fingerprint


def test_save_replaces_the_old_file_whole(qapp, tmp_path):
    path = tmp_path / "day.shipgui"
    path.write_text("old content")
    plan_file.save_document(small_document(), path)
    assert json.loads(path.read_text())["format"] == "shipgui-plan"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["day.shipgui"]


def test_write_to_an_impossible_place_raises_and_leaves_nothing(qapp, tmp_path):
    target = tmp_path / "missing-folder" / "day.shipgui"
    with pytest.raises(OSError):
        plan_file.save_document(small_document(), target)
    assert not target.exists()


@pytest.mark.parametrize("content, words", [
    ("{not json", "damaged"),
    ('{"vehicles": 3, "routes": []}', "exported plan"),
    ('{"format": "shipgui-plan", "schema_version": 9}', "version 9"),
    ('{"format": "shipgui-plan", "schema_version": 1, "inputs": {"jobs": '
     '[{"job": "J1", "origin": "A", "start": "8h", "end": "09:00"}]}}', "not a time"),
    ('{"format": "shipgui-plan", "schema_version": 1, "inputs": {"jobs": []}}', "no jobs"),
])
def test_bad_plan_documents_name_the_problem(qapp, tmp_path, content, words):
    path = tmp_path / "bad.shipgui"
    path.write_text(content)
    with pytest.raises(InputError) as info:
        plan_file.open_document(path)
    assert any(words in p.message for p in info.value.problems)
    assert all(p.file == str(path) for p in info.value.problems)


def test_plan_json_has_the_contract_keys(qapp, tmp_path):
    plan = solve_day(small_document().build())
    path = tmp_path / "plan.json"
    plan_file.write_plan_json(plan, path, {1: "Driver One"})
    data = json.loads(path.read_text())
    assert data["vehicles"] == 2 and data["verified"] is True
    assert [r["vehicle"] for r in data["routes"]] == [1, 2]
    assert sorted(j for r in data["routes"] for j in r["jobs"]) == ["J1", "J2", "J3", "J4"]
    assert len(data["certificate"]["jobs"]) == 2
    assert data["routes"][0]["driver"] == "Driver One"


def test_open_inputs_reads_the_demo(qapp):
    files = demo_files()
    doc = plan_file.open_inputs(files["jobs"], files["sites"], files["travel"],
                                settings=DEMO_SETTINGS)
    assert len(doc.jobs) == 150 and doc.sources["travel"] == str(files["travel"])
    assert doc.build().n == 150


def test_open_inputs_reports_every_bad_file_with_row_and_column(qapp, tmp_path):
    jobs = tmp_path / "jobs.csv"
    jobs.write_text("job,origin,start,end\nJ1,A,08:00,09:00\nJ2,A,8h,09:00\n")
    sites = tmp_path / "sites.csv"
    sites.write_text("site,x_km,y_km\nA,0,north\n")
    with pytest.raises(InputError) as info:
        plan_file.open_inputs(jobs, sites)
    where = {(p.file, p.row, p.column) for p in info.value.problems}
    assert (str(jobs), 3, "start") in where and (str(sites), 2, "y_km") in where


def test_csv_kind_and_companions(tmp_path):
    (tmp_path / "jobs.csv").write_text("Job,Origin,Start,Duration\n")
    (tmp_path / "sites.csv").write_text("site,lat,lon\n")
    (tmp_path / "travel.csv").write_text("from,to,minutes\n")
    (tmp_path / "other.csv").write_text("a,b\n")
    assert plan_file.csv_kind(tmp_path / "jobs.csv") == "jobs"
    assert plan_file.csv_kind(tmp_path / "travel.csv") == "travel"
    assert plan_file.csv_kind(tmp_path / "other.csv") is None
    assert set(plan_file.companion_files(tmp_path / "jobs.csv")) == {"sites", "travel"}
