"""The layers of the contributor guide: core runs headless (no Qt, no reportlab),
and inside core the imports follow the data (files -> readers -> day -> fleet
-> export), never back up."""

from __future__ import annotations

import ast
import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]
CORE = ROOT / "shipgui" / "core"

# What each part of core may import from core (besides itself).  The base
# records and helpers sit at the bottom; a part not listed here fails the test,
# so a new folder has to be placed in the order on purpose.
BASE = {"clock", "errors", "model", "caution", "travel", "drivers", "_jit"}
MAY_IMPORT = {
    "base": set(),
    "io": {"base"},
    "day": {"base", "io"},
    "document": {"base", "io", "day"},
    "fleet": {"base"},
    "workday": {"base", "fleet"},
    "planner": {"base", "fleet", "workday"},
    "export": {"base", "io", "fleet", "workday"},
    "demo": {"base", "day"},
    # Compiling the kernels ahead runs small solves of every kind on an invented day.
    "prepare": {"base", "day", "fleet", "workday", "planner"},
    "__init__": {"base", "io", "day", "fleet", "workday", "planner", "export"},
}


def _part(module: str) -> str:
    """'shipgui.core.fleet.solve' -> 'fleet'; base modules -> 'base'."""
    name = module.split(".")[2] if module.count(".") >= 2 else "__init__"
    return "base" if name in BASE else name


def _core_imports(path: Path) -> set[str]:
    """Absolute names of the shipgui.core modules that ``path`` imports."""
    module = ".".join(path.relative_to(ROOT).with_suffix("").parts)
    package = module.rsplit(".", 1)[0] if path.name != "__init__.py" else module
    if path.name == "__init__.py":
        module = package
    found = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.ImportFrom):
            if node.level:
                base = package.rsplit(".", node.level - 1)[0] if node.level > 1 else package
                name = f"{base}.{node.module}" if node.module else base
            else:
                name = node.module or ""
            names = [name] + [f"{name}.{a.name}" for a in node.names]
        elif isinstance(node, ast.Import):
            names = [a.name for a in node.names]
        else:
            continue
        found.update(n for n in names if n.startswith("shipgui.core."))
    return found


def test_core_parts_import_only_downwards():
    wrong = []
    for path in sorted(CORE.rglob("*.py")):
        module = ".".join(path.relative_to(ROOT).with_suffix("").parts)
        part = _part(module)
        assert part in MAY_IMPORT, f"{path}: place '{part}' in MAY_IMPORT"
        for name in _core_imports(path):
            target = _part(name)
            if target in MAY_IMPORT and target != part and target not in MAY_IMPORT[part]:
                wrong.append(f"{module} imports {name}")
    assert not wrong, "imports against the data flow:\n" + "\n".join(wrong)


def test_the_rule_above_can_fail():
    # A reader importing a solver is caught (a check that cannot fail checks nothing).
    assert "fleet" not in MAY_IMPORT["io"]
    assert _part("shipgui.core.fleet.solve") == "fleet"
    assert _part("shipgui.core.clock") == "base"


def _loaded_after(imports: str) -> set[str]:
    code = (f"import sys; sys.path.insert(0, {str(ROOT)!r}); {imports}; "
            "print(' '.join(sorted({m.split('.')[0] for m in sys.modules})))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, timeout=120)
    return set(out.stdout.split())


def test_core_imports_neither_qt_nor_reportlab():
    modules = [".".join(p.relative_to(ROOT).with_suffix("").parts).removesuffix(".__init__")
               for p in CORE.rglob("*.py")]
    loaded = _loaded_after("; ".join(f"import {m}" for m in modules))
    assert "PySide6" not in loaded and "reportlab" not in loaded


def test_cli_solve_path_does_not_load_qt():
    loaded = _loaded_after("import shipgui.cli")
    assert "PySide6" not in loaded


def test_the_product_never_loads_networkx():
    # networkx is the tests' reference; the product uses numpy and scipy only.
    modules = [".".join(p.relative_to(ROOT).with_suffix("").parts).removesuffix(".__init__")
               for p in CORE.rglob("*.py")]
    loaded = _loaded_after("; ".join(f"import {m}" for m in modules)
                           + "; import shipgui.cli; import shipgui.report")
    assert "networkx" not in loaded


def test_report_does_not_import_qt():
    assert "PySide6" not in _loaded_after("import shipgui.report")
