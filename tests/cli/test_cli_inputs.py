"""`shipgui solve` on input that should just work, or say exactly what is wrong."""

from __future__ import annotations

import json

import pytest

from shipgui.cli import main
from shipgui.core.demo import demo_files


def _demo(*extra: str) -> list[str]:
    f = demo_files()
    return ["solve", str(f["jobs"]), "--sites", str(f["sites"]), "--travel", str(f["travel"]),
            *extra]


def test_an_unknown_depot_is_named_not_blamed_on_the_travel_file(capsys):
    assert main(_demo("--depot", "YRAD")) == 2
    err = capsys.readouterr().err
    assert "the depot 'YRAD' is not a site in the sites file or the travel file" in err
    assert "did you mean 'YARD'?" in err and "no travel time" not in err


def test_a_mistyped_site_names_the_jobs_that_use_it(tmp_path, capsys):
    jobs = tmp_path / "jobs.csv"
    text = demo_files()["jobs"].read_text(encoding="utf-8").splitlines()
    header, first, *rest = text
    typo = first.replace(",S", ",S9", 1)  # the first job's site becomes S9x: no such site
    jobs.write_text("\n".join([header, typo, *rest]) + "\n", encoding="utf-8")
    f = demo_files()
    assert main(["solve", str(jobs), "--sites", str(f["sites"]), "--travel",
                 str(f["travel"])]) == 2
    err = capsys.readouterr().err.splitlines()
    assert len(err) == 1 and "jobs.csv, row 2, column" in err[0]
    assert ", job J" in err[0] and "is not in the sites file or the travel file" in err[0]


def test_numbers_with_a_decimal_comma_as_in_the_files(tmp_path, capsys):
    out = tmp_path / "plan.json"
    assert main(_demo("--turnaround", "7,5", "--speed", "47,5", "--circuity", "1,25",
                      "--json", str(out))) == 0
    settings = json.loads(out.read_text())["settings"]
    assert settings["turnaround_minutes"] == 7.5 and settings["speed_kmh"] == 47.5
    assert settings["circuity"] == 1.25


@pytest.mark.parametrize("value", ["1.000,5", "inf", "fast"])
def test_a_number_option_in_another_form_is_refused(capsys, value):
    assert main(_demo("--speed", value)) == 2
    assert "write numbers like 12.5 or 12,5" in capsys.readouterr().err


def test_a_plan_file_with_huge_numbers_is_an_input_error(tmp_path, capsys):
    path = tmp_path / "bad.shipgui"
    path.write_text('{"format": "shipgui-plan", "schema_version": 1, "inputs": {"jobs": '
                    '[{"job": "J1", "origin": "A", "start": "08:00", "end": "09:00"}]}, '
                    '"settings": {"turnaround_seconds": 1' + "0" * 400 + "}}",
                    encoding="utf-8")
    assert main(["solve", str(path)]) == 2
    err = capsys.readouterr().err
    assert "bad.shipgui, column 'turnaround_seconds'" in err and "internal error" not in err
