"""Outputs all or nothing, checked options, and a summary a person can read."""

from __future__ import annotations

import errno
import json
import os
import re
import subprocess
import sys
from dataclasses import replace
from pathlib import Path

import pytest

import shipgui.cli as cli
from shipgui.cli import main
from shipgui.core import Job, Settings, build_day, solve_day
from shipgui.core.io import files

ROOT = Path(__file__).resolve().parents[2]
as_root = os.name == "posix" and os.geteuid() == 0


def _jobs(tmp_path, rows=("J1,A,07:00,08:00", "J2,A,07:30,09:00", "J3,A,09:30,10:00")):
    path = tmp_path / "jobs.csv"
    path.write_text("job,origin,start,end\n" + "\n".join(rows) + "\n")
    return path


# ------------------------------------------------------------------ all or nothing

def test_one_output_failing_leaves_no_other_output(tmp_path, monkeypatch, capsys):
    jobs = _jobs(tmp_path)
    old = tmp_path / "old.json"
    old.write_text("the plan from yesterday")
    real_stage = files._stage

    def disk_full_for_pdf(path, data):
        if path.suffix == ".pdf":
            raise OSError(errno.ENOSPC, "No space left on device", str(path))
        return real_stage(path, data)

    monkeypatch.setattr(files, "_stage", disk_full_for_pdf)
    code = main(["solve", str(jobs), "--json", str(old), "--routes", str(tmp_path / "r.csv"),
                 "--pdf", str(tmp_path / "out.pdf")])
    err = capsys.readouterr().err
    assert code == 1
    assert "out.pdf" in err and "the disk is full" in err and "nothing was written" in err
    assert old.read_text() == "the plan from yesterday"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["jobs.csv", "old.json"]


@pytest.mark.skipif(as_root, reason="root may write into a read-only folder")
def test_read_only_folder_is_refused_before_anything_is_written(tmp_path, capsys):
    jobs = _jobs(tmp_path)
    locked = tmp_path / "locked"
    locked.mkdir()
    locked.chmod(0o555)
    try:
        code = main(["solve", str(jobs), "--json", str(tmp_path / "w.json"),
                     "--pdf", str(locked / "out.pdf")])
    finally:
        locked.chmod(0o755)
    assert code == 2 and "permission denied" in capsys.readouterr().err
    assert not (tmp_path / "w.json").exists()


def test_two_outputs_with_one_path_are_refused(tmp_path, capsys):
    jobs = _jobs(tmp_path)
    out = tmp_path / "out.json"
    assert main(["solve", str(jobs), "--json", str(out), "--pdf", str(out)]) == 2
    assert "the same file as --json" in capsys.readouterr().err
    link = tmp_path / "link.pdf"
    link.symlink_to(out)
    assert main(["solve", str(jobs), "--json", str(out), "--pdf", str(link)]) == 2
    assert not out.exists()


def test_longest_legal_name_works_and_a_longer_one_is_exit_2(tmp_path, capsys):
    jobs = _jobs(tmp_path)
    limit = os.pathconf(tmp_path, "PC_NAME_MAX")
    legal = tmp_path / ("p" * (limit - 5) + ".json")
    assert main(["solve", str(jobs), "--json", str(legal)]) == 0
    assert json.loads(legal.read_text())["vehicles"] == 2
    capsys.readouterr()
    assert main(["solve", str(jobs), "--json", str(tmp_path / ("p" * 300 + ".json"))]) == 2
    assert "too long" in capsys.readouterr().err


def test_a_name_refused_while_writing_is_exit_2_with_the_reason(tmp_path, monkeypatch, capsys):
    jobs = _jobs(tmp_path)
    monkeypatch.setattr(cli, "_output_problem", lambda path: "")  # pass the early check
    code = main(["solve", str(jobs), "--json", str(tmp_path / ("q" * 300 + ".json"))])
    assert code == 2
    assert "name is too long" in capsys.readouterr().err
    assert [p.name for p in tmp_path.iterdir()] == ["jobs.csv"]


@pytest.mark.parametrize("option", ["--json", "--pdf", "--routes"])
def test_empty_output_name_is_exit_2(tmp_path, option, capsys):
    assert main(["solve", str(_jobs(tmp_path)), option, ""]) == 2
    assert "give a file name" in capsys.readouterr().err


# ------------------------------------------------------------------ number options

@pytest.mark.parametrize("args", [
    ["--speed", "inf"], ["--speed", "nan"], ["--speed", "1e-300"], ["--speed", "0"],
    ["--circuity", "1e300"], ["--circuity", "0.5"], ["--vehicle-cost", "nan"],
    ["--empty-hour-cost", "inf"], ["--vehicle-cost", "-1"], ["--tradeoff", "-1"],
    ["--tradeoff", "51"], ["--tradeoff", "2.5"], ["--turnaround", "1e9"],
    ["--turnaround", "1441"], ["--date", "2026-02-30"], ["--date", "tomorrow"],
])
def test_number_options_have_checked_ranges(tmp_path, args, capsys):
    out = tmp_path / "plan.json"
    assert main(["solve", str(_jobs(tmp_path)), *args, "--json", str(out)]) == 2
    err = capsys.readouterr().err
    assert args[0] in err and "Traceback" not in err and "internal" not in err
    assert not out.exists()


def test_json_never_holds_nan_or_infinity(tmp_path):
    out = tmp_path / "plan.json"
    assert main(["solve", str(_jobs(tmp_path)), "--vehicle-cost", "300",
                 "--empty-hour-cost", "0", "--json", str(out)]) == 0
    text = out.read_text()
    json.loads(text, parse_constant=lambda c: pytest.fail(f"{c} in the JSON"))


def test_demo_options_all_have_help_text(capsys):
    with pytest.raises(SystemExit):
        main(["demo", "--help"])
    text = capsys.readouterr().out
    options = text[text.index("options:"):].splitlines()[1:]
    for k, line in enumerate(options):
        m = re.match(r"^  (-[-\w]+)", line)
        if not m:
            continue
        rest = line[m.end():].strip()
        helped = re.search(r"\s{2,}\S", line[m.end():]) or (
            k + 1 < len(options) and options[k + 1].startswith(" " * 10))
        assert helped, f"{m[1]} has no help text ({rest!r})"


# ------------------------------------------------------------------ the terminal

def test_closed_pipe_is_quiet():
    # `shipgui demo | head -1`: the reader goes away; no "internal error".
    r = subprocess.run(f"{sys.executable} -m shipgui demo | head -1", shell=True,
                       capture_output=True, text=True, timeout=300,
                       env=dict(os.environ, PYTHONPATH=str(ROOT)), cwd=ROOT)
    assert r.stdout.startswith("Demo: ") and r.stdout.count("\n") == 1
    assert r.stderr == ""


def test_tradeoff_lines_never_print_one_figure_twice(capsys):
    day = build_day([Job(f"J{k}", "A", "A", 7 * 3600, 8 * 3600) for k in range(3)], [], {})
    plan = solve_day(day)
    # 870 s and 890 s both show as 15 min: the "all out" figure adds nothing.
    plan = replace(plan, least_deadhead=True, deadhead_seconds=1000,
                   tradeoff=((3, 1000), (4, 870), (5, 870)),
                   tradeoff_exact=((3, 1000), (4, 890), (5, 1300)))
    lines = [line for line in cli._summary(plan, "test").splitlines() if "at most" in line]
    assert lines == ["  with at most 4 vehicles: 15 min empty driving",
                     "  with at most 5 vehicles: 15 min empty driving (all 5 out: 22 min)"]


def test_a_large_proof_prints_its_first_lines_and_says_where_the_rest_are(tmp_path, capsys):
    rows = [f"J{k:03d},A,07:00,08:00" for k in range(100)]  # all at once: 100 vehicles
    out = tmp_path / "plan.json"
    assert main(["solve", str(_jobs(tmp_path, rows)), "--json", str(out)]) == 0
    text = capsys.readouterr().out
    listed = re.findall(r"\bJ\d{3}\b", text[text.index("Why not fewer"):
                                            text.index("Empty driving")])
    assert len(listed) == cli.CERTIFICATE_IDS_SHOWN
    assert f"... and 70 more; the whole list is in {out} (certificate.jobs)" in text
    assert len(json.loads(out.read_text())["certificate"]["jobs"]) == 100


def test_vehicles_by_class_in_summary_and_json(tmp_path, capsys):
    path = tmp_path / "jobs.csv"
    path.write_text("job,origin,start,end,vehicle_class\nJ1,A,07:00,08:00,reefer\n"
                    "J2,A,07:00,08:00,reefer\nJ3,A,07:00,08:00,rigid\n"
                    "J4,A,09:00,10:00,rigid\n")
    out = tmp_path / "plan.json"
    assert main(["solve", str(path), "--json", str(out)]) == 0
    assert "  by class: reefer 2, rigid 1" in capsys.readouterr().out
    plan = json.loads(out.read_text())
    assert plan["vehicles_by_class"] == [{"vehicle_class": "reefer", "vehicles": 2},
                                         {"vehicle_class": "rigid", "vehicles": 1}]
    rigid = next(r for r in plan["routes"] if r["vehicle_class"] == "rigid")
    assert rigid["jobs"] == ["J3", "J4"] and rigid["working_day_minutes"] == 180
    assert rigid["leave_depot"] is None and rigid["back_at_depot"] is None


def test_json_routes_carry_depot_times_and_working_day(tmp_path):
    out = tmp_path / "plan.json"
    assert main(["demo", "--json", str(out)]) == 0
    plan = json.loads(out.read_text())
    for route in plan["routes"]:
        leave, back = (cli.parse_clock(route[k]).seconds for k in ("leave_depot", "back_at_depot"))
        assert route["working_day_minutes"] == round((back - leave) / 60, 2)
        assert leave <= cli.parse_clock(route["first_start"]).seconds
    assert sum(r["deadhead_minutes"] for r in plan["routes"]) == pytest.approx(
        plan["deadhead_minutes"], abs=0.01 * len(plan["routes"]))  # each to 2 decimals


# ------------------------------------------------------------------ the plan date

def test_plan_date_option(tmp_path):
    out, pdf = tmp_path / "plan.json", tmp_path / "plan.pdf"
    assert main(["solve", str(_jobs(tmp_path)), "--date", "2026-03-02", "--json", str(out),
                 "--pdf", str(pdf)]) == 0
    assert json.loads(out.read_text())["plan_date"] == "2026-03-02"
    from pypdf import PdfReader
    reader = PdfReader(pdf)
    assert all("2026-03-02" in page.extract_text() for page in reader.pages)
    assert reader.metadata.title == "Vehicle plan for Mon 2026-03-02"


def test_plan_date_must_agree_with_the_files_date_times(tmp_path, capsys):
    path = tmp_path / "jobs.csv"
    path.write_text("job,origin,start,end\nJ1,A,2026-03-02T07:00,2026-03-02T08:00\n")
    assert main(["solve", str(path), "--date", "2026-03-02"]) == 0
    assert main(["solve", str(path), "--date", "2026-03-03"]) == 2
    assert "start on 2026-03-02" in capsys.readouterr().err


def test_settings_from_a_plan_file_keep_what_the_command_line_does_not_set(tmp_path):
    base = Settings(turnaround=300, max_day=11 * 3600)
    args = cli._solve_parser().parse_args(["x.csv", "--turnaround", "7"])
    assert cli._settings(args, base) == replace(base, turnaround=420)


def test_site_details_from_the_sites_file_reach_the_sheet_and_plan_files(tmp_path):
    from pypdf import PdfReader

    from shipgui.core.io.plan_file import plan_file_bytes, read_plan_file
    from shipgui.core.io.readers import read_inputs
    sites = tmp_path / "sites.csv"
    sites.write_text("site,name,contact,phone,opening_hours,access_notes\n"
                     "A,Pelling mill,Ada Brackwater,01632 960 555,07:00-16:00,Gate code 4711\n")
    jobs, pdf = _jobs(tmp_path), tmp_path / "plan.pdf"
    assert main(["solve", str(jobs), "--sites", str(sites), "--pdf", str(pdf)]) == 0
    text = " ".join(" ".join(page.extract_text().split()) for page in PdfReader(pdf).pages)
    assert "Ada Brackwater · 01632 960 555" in text and "Access: Gate code 4711" in text
    inputs = read_inputs(jobs, sites)
    saved = tmp_path / "day.shipgui"
    saved.write_bytes(plan_file_bytes(inputs))
    assert read_plan_file(saved).sites == inputs.sites
