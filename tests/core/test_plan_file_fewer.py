"""Priority, movable and the vehicles available in plan files and the jobs file."""

from __future__ import annotations

import dataclasses
import json

import pytest

from shipgui.core import InputError, Settings
from shipgui.core.document import DayDocument
from shipgui.core.io.readers import read_jobs
from tests.support.documents import small_document


def test_plan_file_keeps_priority_movable_and_limits(tmp_path):
    doc = small_document()
    doc.jobs[0] = dataclasses.replace(doc.jobs[0], priority=2.5, movable=False)
    doc.settings = Settings(turnaround=600, class_vehicles=(("", 1),))
    path = tmp_path / "day.shipgui"
    doc.save(path)
    data = json.loads(path.read_text(encoding="utf-8"))
    assert data["inputs"]["jobs"][0]["priority"] == 2.5
    assert "priority" not in data["inputs"]["jobs"][1]  # defaults are not written
    back = DayDocument.open(path)
    assert back.jobs[0].priority == 2.5 and back.jobs[0].movable is False
    assert back.jobs[1].priority == 1 and back.jobs[1].movable is True
    assert back.settings.class_vehicles == (("", 1),) and back.settings.vehicles is None
    assert back.build().fingerprint == doc.build().fingerprint
    doc.settings = Settings(vehicles=3)
    doc.save(path)
    assert DayDocument.open(path).settings.vehicles == 3


@pytest.mark.parametrize("record, phrase", [
    ({"priority": -1}, "more than 0"), ({"priority": "2"}, "should be a number"),
    ({"movable": "no"}, "true or false"),
])
def test_plan_file_refuses_bad_values(tmp_path, record, phrase):
    doc = small_document()
    path = tmp_path / "day.shipgui"
    doc.save(path)
    data = json.loads(path.read_text(encoding="utf-8"))
    data["inputs"]["jobs"][0].update(record)
    path.write_text(json.dumps(data), encoding="utf-8")
    with pytest.raises(InputError, match=phrase):
        DayDocument.open(path)


def test_plan_file_refuses_a_bad_vehicle_count(tmp_path):
    path = tmp_path / "day.shipgui"
    small_document().save(path)
    data = json.loads(path.read_text(encoding="utf-8"))
    data["settings"]["vehicles"] = 0
    path.write_text(json.dumps(data), encoding="utf-8")
    with pytest.raises(InputError, match="whole number of vehicles"):
        DayDocument.open(path)


def test_jobs_file_priority_and_movable(tmp_path):
    jobs = tmp_path / "jobs.csv"
    jobs.write_text("job;origin;start;end;priority;movable\n"
                    "A;X;07:00;08:00;2,5;No\nB;X;07:00;08:00;;\nC;X;07:00;08:00;0.125;yes\n")
    found, _ = read_jobs(jobs)
    assert [(j.priority, j.movable) for j in found] == [(2.5, False), (1.0, True),
                                                        (0.125, True)]
