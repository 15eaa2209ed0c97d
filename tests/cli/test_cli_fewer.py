"""`--vehicles` and `--suggest` as contract sections 6 and 7 fix them."""

import json

import pytest

from shipgui.cli import main
from shipgui.core.demo import demo_files


def demo_args(*extra):
    """`shipgui solve` on the demo day's files with its settings."""
    f = demo_files()
    return ["solve", str(f["jobs"]), "--sites", str(f["sites"]), "--travel", str(f["travel"]),
            "--turnaround", "10", "--depot", "YARD", "--day-start", "05:00",
            "--day-end", "27:00", *extra]


def test_fewer_vehicles_json_keys_and_every_job_once(tmp_path, capsys):
    out = tmp_path / "plan.json"
    assert main(demo_args("--vehicles", "25", "--json", str(out))) == 0
    plan = json.loads(out.read_text())
    assert plan["verified"] is True and plan["vehicles"] <= 25
    routed = [j for r in plan["routes"] for j in r["jobs"]]
    assert sorted(routed + plan["unserved"]) == sorted(set(routed + plan["unserved"]))
    assert len(routed) + len(plan["unserved"]) == 150 and len(plan["unserved"]) == 3
    assert plan["served_priority"] == plan["served_upper_bound"] == 147
    assert plan["vehicles_needed_for_all"] == 28
    assert len(plan["certificate"]["jobs"]) == plan["vehicles"]
    text = capsys.readouterr().out
    assert "Not served: 3 of 150 jobs" in text and "local law" in text


def test_enough_vehicles_changes_nothing_in_json(tmp_path):
    plain, limited = tmp_path / "a.json", tmp_path / "b.json"
    assert main(demo_args("--json", str(plain))) == 0
    assert main(demo_args("--vehicles", "40", "--json", str(limited))) == 0
    a, b = json.loads(plain.read_text()), json.loads(limited.read_text())
    assert a["routes"] == b["routes"] and b["unserved"] == []
    assert b["served_priority"] == b["served_upper_bound"] == 150


def test_suggestions_json(tmp_path, capsys):
    out = tmp_path / "plan.json"
    assert main(demo_args("--suggest", "3", "--max-move", "30", "--json", str(out))) == 0
    plan = json.loads(out.read_text())
    assert 1 <= len(plan["suggestions"]) <= 3
    for s in plan["suggestions"]:
        assert s["vehicles"] == plan["vehicles"] - 1
        assert all(set(m) >= {"job", "start", "end"} for m in s["moves"])
    minutes = [s["moved_minutes"] for s in plan["suggestions"]]
    assert minutes == sorted(minutes)
    assert "customer must agree" in capsys.readouterr().out


def _write(tmp_path, header, row):
    jobs = tmp_path / "jobs.csv"
    jobs.write_text(f"job,origin,start,end,{header}\nJ1,A,07:00,08:00,{row}\n"
                    f"J2,A,07:30,09:00,{row if header != 'vehicle_class' else 'van'}\n")
    return str(jobs)


@pytest.mark.parametrize("args, phrase", [
    (["--vehicles", "0"], "at least 1 vehicle"),
    (["--vehicles", "-3"], "at least 1 vehicle"),
    (["--vehicles", "two"], "whole number"),
    (["--vehicles", "3", "--vehicles", "van=1"], "not both"),
    (["--vehicles", "=2"], "class name is missing"),
    (["--suggest", "0"], "1 to 50 suggestions"),
    (["--suggest", "51"], "1 to 50 suggestions"),
    (["--max-move", "30"], "goes with --suggest"),
    (["--suggest", "2", "--max-move", "soon"], "--max-move"),
    (["--suggest", "2", "--max-day", "10:00"], "not yet supported"),
])
def test_bad_arguments_exit_2(tmp_path, capsys, args, phrase):
    jobs = _write(tmp_path, "customer", "X")
    out = tmp_path / "plan.json"
    assert main(["solve", jobs, *args, "--json", str(out)]) == 2
    err = capsys.readouterr().err
    assert phrase in err and "Traceback" not in err and not out.exists()


@pytest.mark.parametrize("header, value, phrase", [
    ("priority", "-1", "more than 0"),
    ("priority", "0", "more than 0"),
    ("priority", "high", "not a number"),
    ("priority", "1.2345", "three decimals"),
    ("movable", "maybe", "yes or no"),
])
def test_bad_job_columns_exit_2_naming_row_column_job(tmp_path, capsys, header, value, phrase):
    jobs = _write(tmp_path, header, value)
    assert main(["solve", jobs]) == 2
    err = capsys.readouterr().err
    assert phrase in err and "row 2" in err and f"column '{header}'" in err and "J1" in err


def test_unknown_class_exit_2(tmp_path, capsys):
    jobs = _write(tmp_path, "vehicle_class", "truck")
    assert main(["solve", jobs, "--vehicles", "lorry=1"]) == 2
    err = capsys.readouterr().err
    assert "class 'lorry'" in err and "truck, van" in err


def test_per_class_limit_and_fixed_slots(tmp_path):
    jobs = tmp_path / "jobs.csv"
    jobs.write_text("job,origin,start,end,vehicle_class,priority,movable\n"
                    "J1,A,07:00,08:00,van,1,no\nJ2,A,07:30,09:00,van,2,\n"
                    "J3,A,07:00,08:00,truck,,yes\n")
    out = tmp_path / "plan.json"
    assert main(["solve", str(jobs), "--vehicles", "van=1", "--json", str(out)]) == 0
    plan = json.loads(out.read_text())
    assert plan["unserved"] == ["J1"] and plan["served_priority"] == 3
    assert plan["vehicles_available"] == {"van": 1}
