"""Many Qt calls in a row must not wear out None / True / False (the PySide6 6.12
on Python 3.11 bug that pyproject.toml pins away; see gui/_compat.py)."""

from PySide6.QtCore import QObject

import shipgui.gui  # noqa: F401 - refuses a binding with the bug


def test_a_hundred_thousand_void_and_bool_calls(qapp):
    o = QObject()
    for _ in range(100_000):
        o.setObjectName("x")
        o.objectNameChanged.emit("x")
