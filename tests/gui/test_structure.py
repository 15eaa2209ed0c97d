"""The desktop package's shape: no import cycles (the file actions do not know the
window), one way to make actions, and modules a reader takes in at once."""

from __future__ import annotations

import ast
from pathlib import Path

GUI = Path(__file__).resolve().parents[2] / "shipgui" / "gui"


def _module(path: Path) -> str:
    parts = path.relative_to(GUI.parent.parent).with_suffix("").parts
    return ".".join(parts[:-1] if parts[-1] == "__init__" else parts)


def _imports(path: Path) -> set[str]:
    """shipgui.gui modules ``path`` imports, TYPE_CHECKING imports included."""
    module = _module(path)
    package = module if path.name == "__init__.py" else module.rsplit(".", 1)[0]
    found = set()
    for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
        if isinstance(node, ast.ImportFrom):
            base = package.rsplit(".", node.level - 1)[0] if node.level > 1 else package
            name = (f"{base}.{node.module}" if node.module else base) if node.level \
                else node.module or ""
            found.update([name] + [f"{name}.{a.name}" for a in node.names])
        elif isinstance(node, ast.Import):
            found.update(a.name for a in node.names)
    return {n for n in found if n.startswith("shipgui.gui")}


def _graph() -> dict[str, set[str]]:
    modules = {_module(p): p for p in GUI.rglob("*.py")}
    return {m: {n for n in _imports(p) if n in modules and n != m} for m, p in modules.items()}


def _cycle(graph: dict[str, set[str]]) -> list[str]:
    state: dict[str, int] = {}
    stack: list[str] = []

    def visit(m: str) -> list[str]:
        state[m] = 1
        stack.append(m)
        for n in sorted(graph[m]):
            if state.get(n) == 1:
                return stack[stack.index(n):] + [n]
            if n not in state and (found := visit(n)):
                return found
        state[m] = 2
        stack.pop()
        return []

    for m in sorted(graph):
        if m not in state and (found := visit(m)):
            return found
    return []


def test_no_import_cycles_in_the_app():
    assert _cycle(_graph()) == []
    assert "shipgui.gui.main_window" not in _graph()["shipgui.gui.file_actions"]


def test_the_cycle_check_can_fail():
    assert _cycle({"a": {"b"}, "b": {"a"}}) == ["a", "b", "a"]


def test_actions_are_made_in_one_place():
    makers = [p.name for p in GUI.rglob("*.py") if "QAction(" in p.read_text(encoding="utf-8")]
    assert makers == ["actions.py"]


def test_modules_stay_readable():
    long = {p.name: n for p in GUI.rglob("*.py")
            if (n := len(p.read_text(encoding="utf-8").splitlines())) > 500}
    assert long == {}
