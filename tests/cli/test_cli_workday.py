"""`shipgui solve --max-day` and `--time-limit` as contract section 5 fixes them."""

from __future__ import annotations

import json

import pytest

from shipgui.cli import main
from shipgui.core.demo import demo_files


def demo_args(*extra):
    f = demo_files()
    return ["solve", str(f["jobs"]), "--sites", str(f["sites"]), "--travel", str(f["travel"]),
            "--turnaround", "10", "--depot", "YARD", "--day-start", "05:00",
            "--day-end", "27:00", *extra]


def test_max_day_gives_the_contract_keys_and_a_proven_minimum(tmp_path, capsys):
    out = tmp_path / "plan.json"
    assert main(demo_args("--max-day", "11:00", "--json", str(out))) == 0
    plan = json.loads(out.read_text())
    assert plan["vehicles"] == plan["lower_bound"] == 39  # calibration figure
    assert plan["proven_minimum"] is True and plan["verified"] is True
    assert len(plan["certificate"]["jobs"]) == 39
    assert all(r["working_day_minutes"] <= 660 for r in plan["routes"])
    assert plan["settings"]["max_day_minutes"] == 660
    assert plan["working_day"]["vehicles_without_limit"] == 28
    text = capsys.readouterr().out
    assert "Vehicles needed: 39 (proven minimum" in text and "local law" in text
    assert "the limit costs 11 more" in text


def test_without_max_day_the_keys_say_the_plain_minimum_is_proven(tmp_path):
    out = tmp_path / "plan.json"
    assert main(demo_args("--json", str(out))) == 0
    plan = json.loads(out.read_text())
    assert plan["lower_bound"] == plan["vehicles"] == len(plan["certificate"]["jobs"])
    assert plan["proven_minimum"] is True and "weights" not in plan["certificate"]
    assert "working_day" not in plan


def test_minutes_and_hours_both_work(tmp_path):
    a, b = tmp_path / "a.json", tmp_path / "b.json"
    assert main(demo_args("--max-day", "600", "--json", str(a))) == 0
    assert main(demo_args("--max-day", "10:00", "--json", str(b))) == 0
    assert json.loads(a.read_text())["vehicles"] == json.loads(b.read_text())["vehicles"] == 45


@pytest.mark.parametrize("value", ["0", "-5", "25:00", "ten", "10:75", ""])
def test_bad_max_day_is_exit_2(value, capsys):
    assert main(demo_args("--max-day", value)) == 2
    assert "--max-day" in capsys.readouterr().err


def test_a_job_longer_than_the_limit_names_the_job(tmp_path, capsys):
    assert main(demo_args("--max-day", "2:00")) == 2
    err = capsys.readouterr().err
    assert "jobs.csv" in err and "row" in err and "over the longest working day" in err


@pytest.mark.parametrize("value", ["0", "-1", "nan", "abc"])
def test_bad_time_limit_is_exit_2(value, capsys):
    assert main(demo_args("--max-day", "11:00", "--time-limit", value)) == 2
    assert "--time-limit" in capsys.readouterr().err


def test_time_limit_keeps_the_best_plan_and_says_what_is_proven(tmp_path):
    # A day where the fast plan is above the bound: stopped at once, the answer is
    # a valid plan, exit 0, proven_minimum false.
    from tests.support.days import depot_day
    day = depot_day(1000, 40, seed=1)
    jobs = tmp_path / "jobs.csv"
    sites = tmp_path / "sites.csv"
    rows = ["job,origin,destination,start,end"] + [
        f"{j.id},{j.origin},{j.destination},{j.start // 3600:02d}:{j.start % 3600 // 60:02d}"
        f":{j.start % 60:02d},{j.end // 3600:02d}:{j.end % 3600 // 60:02d}:{j.end % 60:02d}"
        for j in day.jobs]
    jobs.write_text("\n".join(rows) + "\n")
    sites.write_text("site,x_km,y_km\n" + "".join(
        f"{s.id},{s.x_km},{s.y_km}\n" for s in day.sites.values()))
    out = tmp_path / "plan.json"
    code = main(["solve", str(jobs), "--sites", str(sites), "--turnaround", "10",
                 "--depot", "S0", "--max-day", "10:00", "--time-limit", "0.1",
                 "--json", str(out)])
    assert code == 0
    plan = json.loads(out.read_text())
    assert plan["verified"] is True and plan["lower_bound"] <= plan["vehicles"]
    assert plan["proven_minimum"] == (plan["lower_bound"] == plan["vehicles"])
    assert plan["working_day"]["search"] in ("time limit", "proven")


def test_vehicles_with_max_day_name_the_jobs_to_hand_on(tmp_path, capsys):
    out = tmp_path / "plan.json"
    assert main(demo_args("--max-day", "11:00", "--vehicles", "36", "--json", str(out))) == 0
    plan = json.loads(out.read_text())
    assert plan["verified"] is True and plan["vehicles"] <= 36
    served = [j for r in plan["routes"] for j in r["jobs"]]
    assert sorted(served + plan["unserved"]) == sorted(set(served + plan["unserved"]))
    assert len(served) + len(plan["unserved"]) == 150
    assert plan["served_priority"] <= plan["served_upper_bound"] <= 150
    assert all(r["working_day_minutes"] <= 660 for r in plan["routes"])
    text = capsys.readouterr().out
    assert "Not served:" in text and "within the working-day limit" in text
