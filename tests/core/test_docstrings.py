"""The public entry points document themselves (numpydoc sections) with small
examples, and the examples run: they are doctests of this suite."""

from __future__ import annotations

import doctest
import importlib

import pytest

ENTRY_POINTS = [
    ("shipgui.core.day", "build_day"),
    ("shipgui.core.fleet.solve", "solve_day"),
    ("shipgui.core.fleet.matching", "maximum_matching"),
    ("shipgui.core.fleet.least_deadhead", "least_cost_links"),
    ("shipgui.core.fleet.verify", "check_plan"),
]
SECTIONS = ("Parameters", "Returns", "Notes", "References", "Examples")


def _function(module: str, name: str):
    return getattr(importlib.import_module(module), name)


@pytest.mark.parametrize("module, name", ENTRY_POINTS)
def test_the_examples_run(module, name):
    function = _function(module, name)
    runner = doctest.DocTestRunner(optionflags=doctest.ELLIPSIS | doctest.NORMALIZE_WHITESPACE)
    tests = doctest.DocTestFinder().find(function, name, globs=vars(
        importlib.import_module(module)).copy())
    for test in tests:
        runner.run(test)
    result = runner.summarize(verbose=False)
    assert result.attempted >= 2 and result.failed == 0


@pytest.mark.parametrize("module, name", ENTRY_POINTS)
def test_numpydoc_sections(module, name):
    doc = _function(module, name).__doc__
    for section in SECTIONS:
        assert f"\n    {section}\n    {'-' * len(section)}\n" in doc, (name, section)
    assert "O(" in doc.split("Notes", 1)[1], f"{name}: Notes give the running time"
