"""Refuses a Qt binding known to crash the app.

PySide6 6.12 on CPython before 3.12 drops a reference to ``None`` / ``True``
/ ``False`` on every Qt call returning void or bool; after some tens of
thousands of calls (minutes of normal use) the interpreter aborts with
"deallocating None".  pyproject.toml pins PySide6 below 6.12 for those
Pythons; this guard catches an environment that installed it anyway.
"""

from __future__ import annotations

import sys

__all__ = ["check_qt_binding", "binding_refusal"]


def binding_refusal(pyside: str, python: tuple[int, int],
                    implementation: str = "cpython") -> str | None:
    """Why this PySide6 version must not run on this Python, or None when it may."""
    version = tuple(int(p) for p in pyside.split(".")[:2] if p.isdigit())
    if implementation == "cpython" and python < (3, 12) and version == (6, 12):
        return (f"PySide6 {pyside} crashes on Python {python[0]}.{python[1]} (a "
                "reference-count bug); install 'PySide6-Essentials<6.12' or use Python "
                "3.12 or newer")
    return None


def check_qt_binding() -> None:
    """Raise ImportError when the installed PySide6 would crash on this Python."""
    import PySide6

    reason = binding_refusal(PySide6.__version__, sys.version_info[:2],
                             sys.implementation.name)
    if reason:
        raise ImportError(reason)
