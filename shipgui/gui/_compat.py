"""Refuses a Qt binding known to crash the app.

PySide6 6.12 on CPython before 3.12 drops a reference to ``None`` / ``True``
/ ``False`` on every Qt call returning void or bool; after some tens of
thousands of calls (minutes of normal use) the interpreter aborts with
"deallocating None".  pyproject.toml pins PySide6 below 6.12 for those
Pythons; this guard catches an environment that installed it anyway.
"""

from __future__ import annotations

import sys

__all__ = ["check_qt_binding"]


def check_qt_binding() -> None:
    import PySide6

    version = tuple(int(p) for p in PySide6.__version__.split(".")[:2])
    if sys.implementation.name == "cpython" and sys.version_info < (3, 12) \
            and version == (6, 12):
        raise ImportError(
            f"PySide6 {PySide6.__version__} crashes on Python "
            f"{sys.version_info.major}.{sys.version_info.minor} (a reference-count bug); "
            "install 'PySide6-Essentials<6.12' or use Python 3.12 or newer")
