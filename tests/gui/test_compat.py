"""The Qt binding guard (gui/_compat.py): it refuses PySide6 6.12 on CPython before
3.12, lets every other pairing through, and many Qt calls in a row must not wear
out None / True / False with the binding installed here."""

import sys

import pytest
from PySide6.QtCore import QObject

import shipgui.gui  # noqa: F401 - runs the guard on import
from shipgui.gui._compat import binding_refusal, check_qt_binding


@pytest.mark.parametrize("pyside, python", [("6.12.0", (3, 11)), ("6.12.1", (3, 10))])
def test_the_crashing_pairing_is_refused(pyside, python):
    reason = binding_refusal(pyside, python)
    assert reason and "PySide6-Essentials<6.12" in reason and pyside in reason


@pytest.mark.parametrize("pyside, python, implementation", [
    ("6.11.3", (3, 11), "cpython"), ("6.12.0", (3, 12), "cpython"),
    ("6.13.0", (3, 11), "cpython"), ("6.12.0", (3, 11), "pypy"), ("6.12", (3, 13), "cpython")])
def test_other_pairings_pass(pyside, python, implementation):
    assert binding_refusal(pyside, python, implementation) is None


def test_the_guard_raises_for_a_refused_binding(monkeypatch):
    import PySide6
    monkeypatch.setattr(PySide6, "__version__", "6.12.0")
    monkeypatch.setattr(sys, "version_info", (3, 11, 9, "final", 0))
    with pytest.raises(ImportError, match="crashes on Python 3.11"):
        check_qt_binding()


def test_a_hundred_thousand_void_and_bool_calls(qapp):
    o = QObject()
    for _ in range(100_000):
        o.setObjectName("x")
        o.objectNameChanged.emit("x")
