"""The layers of style.md: core runs headless (no Qt, no reportlab)."""

import subprocess
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]


def _loaded_after(imports: str) -> set[str]:
    code = (f"import sys; sys.path.insert(0, {str(ROOT)!r}); {imports}; "
            "print(' '.join(sorted({m.split('.')[0] for m in sys.modules})))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, timeout=120)
    return set(out.stdout.split())


def test_core_imports_neither_qt_nor_reportlab():
    modules = [p.stem for p in (ROOT / "shipgui" / "core").glob("*.py")]
    loaded = _loaded_after("; ".join(f"import shipgui.core.{m}" for m in modules)
                           + "; from shipgui.core import solve_day")
    assert "PySide6" not in loaded and "reportlab" not in loaded


def test_cli_solve_path_does_not_load_qt():
    loaded = _loaded_after("import shipgui.cli")
    assert "PySide6" not in loaded


def test_report_does_not_import_qt():
    assert "PySide6" not in _loaded_after("import shipgui.report")
