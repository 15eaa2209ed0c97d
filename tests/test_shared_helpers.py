"""Test modules share code only through tests/support: a test module importing
another test module (or a conftest) runs that module's tests' imports and
fixtures in the wrong place and breaks when either is moved or renamed."""

from __future__ import annotations

import ast
from pathlib import Path

TESTS = Path(__file__).resolve().parent


def _wrong_imports(path: Path) -> list[str]:
    wrong = []
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.ImportFrom):
            names = [node.module or ""]
            relative = node.level > 0
        elif isinstance(node, ast.Import):
            names, relative = [a.name for a in node.names], False
        else:
            continue
        for name in names:
            if relative or (name.startswith("tests.") and not name.startswith("tests.support")):
                wrong.append(f"{path.name}: {'.' * node.level}{name}")
    return wrong


def test_tests_import_shared_code_only_from_support():
    found = [w for path in sorted(TESTS.rglob("*.py")) if "support" not in path.parts
             for w in _wrong_imports(path)]
    assert not found, "move shared helpers into tests/support:\n" + "\n".join(found)


def test_the_check_above_can_fail(tmp_path):
    sample = tmp_path / "test_sample.py"
    sample.write_text("from .conftest import small_document\n"
                      "from tests.core.test_solver import _tanker\n"
                      "from tests.support.days import random_day\n")
    assert len(_wrong_imports(sample)) == 2
