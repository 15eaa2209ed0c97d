"""The one way the app makes its menu and toolbar actions."""

from __future__ import annotations

from collections.abc import Callable

from PySide6.QtCore import QObject
from PySide6.QtGui import QAction, QIcon, QKeySequence
from PySide6.QtWidgets import QApplication, QStyle

from shipgui.resources import resource_path

__all__ = ["make_action", "themed_icon"]

Shortcut = str | QKeySequence | QKeySequence.StandardKey


def make_action(parent: QObject, text: str, slot: Callable | None = None, *,
                shortcut: Shortcut | None = None,
                icon: QIcon | QStyle.StandardPixmap | None = None, tip: str = "",
                checkable: bool = False) -> QAction:
    """A QAction with its shortcut, icon and tip; ``tip`` is also the status-bar text.

    ``icon`` is a ready icon or one of the style's standard pixmaps.
    """
    action = QAction(text, parent)
    if shortcut is not None:
        action.setShortcut(QKeySequence(shortcut))
    if isinstance(icon, QStyle.StandardPixmap):
        icon = QApplication.style().standardIcon(icon)
    if icon is not None:
        action.setIcon(icon)
    if tip:
        action.setToolTip(tip)
        action.setStatusTip(tip)
    action.setCheckable(checkable)
    if slot is not None:
        action.triggered.connect(slot)
    return action


def themed_icon(name: str) -> QIcon:
    """The desktop theme's icon of this freedesktop name (``edit-undo``), else the one
    shipped in ``resources/icons/<name>.svg``."""
    return QIcon.fromTheme(name, QIcon(str(resource_path("icons", f"{name}.svg"))))
