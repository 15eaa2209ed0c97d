"""Writing the file: identical bytes for identical input, atomic replace, refusal."""

from __future__ import annotations

import dataclasses
import hashlib
import os
import subprocess
import sys
from pathlib import Path

import pytest

from shipgui.core import PlanNotVerified, solve_day
from shipgui.report import build_pdf_bytes, write_plan_pdf
from tests.support.pdf import small_day


@pytest.fixture(scope="module")
def plan():
    return solve_day(small_day())


def test_same_input_same_bytes(plan):
    names = {1: "Ζωή Παπαδοπούλου"}
    first = build_pdf_bytes(plan, driver_names=names)
    again = build_pdf_bytes(solve_day(small_day()), driver_names=dict(names))
    assert first == again
    assert first.startswith(b"%PDF-")


def test_demo_bytes_are_stable(demo_plan, demo_pdf):
    assert build_pdf_bytes(demo_plan) == demo_pdf


def test_driver_names_change_the_bytes(plan):
    assert build_pdf_bytes(plan) != build_pdf_bytes(plan, driver_names={1: "Пётр Иванов"})


def test_write_creates_file_and_leaves_no_temp(plan, tmp_path):
    target = tmp_path / "plan.pdf"
    write_plan_pdf(plan, target)
    assert target.read_bytes() == build_pdf_bytes(plan)
    assert os.listdir(tmp_path) == ["plan.pdf"]
    write_plan_pdf(plan, str(target), driver_names={2: "Łódź Ściółka"})  # replaces it
    assert os.listdir(tmp_path) == ["plan.pdf"]


def test_unverified_plan_is_refused_and_nothing_written(plan, tmp_path):
    unverified = dataclasses.replace(plan, verified=False,
                                     verification_failures=("route 2 is not drivable",))
    target = tmp_path / "plan.pdf"
    with pytest.raises(PlanNotVerified, match="route 2 is not drivable"):
        write_plan_pdf(unverified, target)
    assert os.listdir(tmp_path) == []
    with pytest.raises(PlanNotVerified):
        build_pdf_bytes(unverified)


def test_failure_keeps_existing_file(plan, tmp_path):
    target = tmp_path / "plan.pdf"
    target.write_bytes(b"earlier plan")
    unverified = dataclasses.replace(plan, verified=False)
    with pytest.raises(PlanNotVerified):
        write_plan_pdf(unverified, target)
    with pytest.raises(TypeError):
        write_plan_pdf(plan, target, driver_names={1: 42})
    assert target.read_bytes() == b"earlier plan"
    assert os.listdir(tmp_path) == ["plan.pdf"]


def test_failed_replace_leaves_no_temp_file(plan, tmp_path):
    target = tmp_path / "plan.pdf"
    target.mkdir()  # the final step (replace) fails: a folder is in the way
    with pytest.raises(OSError):
        write_plan_pdf(plan, target)
    assert os.listdir(tmp_path) == ["plan.pdf"]
    assert target.is_dir()


def test_missing_folder_is_an_error(plan, tmp_path):
    with pytest.raises(FileNotFoundError):
        write_plan_pdf(plan, tmp_path / "no such folder" / "plan.pdf")
    assert os.listdir(tmp_path) == []


def test_same_bytes_in_separate_processes(plan):
    """No dependence on hash seeds, clocks or object addresses."""
    root = Path(__file__).resolve().parents[2]
    code = ("import sys, hashlib; sys.path.insert(0, sys.argv[1]); "
            "from shipgui.core import solve_day; from shipgui.report import build_pdf_bytes; "
            "from tests.support.pdf import small_day; "
            "print(hashlib.sha256(build_pdf_bytes(solve_day(small_day()))).hexdigest())")
    digests = set()
    for seed in ("1", "2"):
        env = {**os.environ, "PYTHONHASHSEED": seed}
        out = subprocess.run([sys.executable, "-c", code, str(root)], capture_output=True,
                             text=True, check=True, timeout=120, env=env)
        digests.add(out.stdout.strip())
    assert digests == {hashlib.sha256(build_pdf_bytes(plan)).hexdigest()}


def test_new_file_is_not_private(plan, tmp_path):
    target = tmp_path / "plan.pdf"
    write_plan_pdf(plan, target)
    mask = os.umask(0o022)
    os.umask(mask)
    assert target.stat().st_mode & 0o777 == 0o666 & ~mask
