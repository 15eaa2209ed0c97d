"""Every file of the bad-input corpus gives an input error naming file, row, column
and a sentence with the expected phrase (tests/corpus/expected.csv); none
crashes.  Regenerate the corpus with ``python tests/corpus/make_corpus.py``."""

from __future__ import annotations

import csv
from pathlib import Path

import pytest

from shipgui.core import InputError, read_jobs, read_sites, read_travel
from shipgui.core.io.plan_file import read_plan_file

CORPUS = Path(__file__).resolve().parents[1] / "corpus"
READERS = {"jobs": read_jobs, "sites": read_sites, "travel": read_travel,
           "plan": lambda path, sheet=None: read_plan_file(path)}


def _expected() -> list[dict[str, str]]:
    with open(CORPUS / "expected.csv", newline="", encoding="utf-8") as f:
        return list(csv.DictReader(f))


EXPECTED = _expected()


def test_the_corpus_is_complete():
    names = {e["file"] for e in EXPECTED}
    on_disk = {p.name for p in (CORPUS / "bad").iterdir()}
    assert names == on_disk
    assert len(names) >= 40
    assert {Path(n).suffix for n in names} == {".csv", ".xlsx", ".shipgui"}


@pytest.mark.parametrize("case", EXPECTED, ids=[e["file"] for e in EXPECTED])
def test_bad_file_gives_its_message(case):
    path = CORPUS / "bad" / case["file"]
    with pytest.raises(InputError) as info:
        READERS[case["kind"]](path, sheet=case["sheet"] or None)
    error = info.value
    matching = [p for p in error.problems if case["phrase"] in p.message]
    if not matching and case["phrase"] in str(error):
        matching = [error.problems[0]]  # a phrase of the summary ("... more problems")
    assert matching, f"{case['phrase']!r} not in {str(error)!r}"
    problem = matching[0]
    assert problem.file == str(path)
    assert problem.row == (int(case["row"]) if case["row"] else None)
    assert problem.column == (case["column"] or None)
    assert case["file"] in str(error)
    assert "Traceback" not in str(error) and len(str(error).splitlines()[0]) < 400
    assert len(error.problems) <= 50  # a long list ends in "... and N more problems"
