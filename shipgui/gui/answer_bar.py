"""The always-visible answer: vehicles needed, empty driving, verified, solving state."""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtGui import QAction
from PySide6.QtWidgets import QFrame, QHBoxLayout, QLabel, QProgressBar, QToolButton, QWidget

from shipgui.core import Plan
from shipgui.core.clock import format_duration

__all__ = ["AnswerBar", "hours_minutes"]


hours_minutes = format_duration  # "3 h 05 min" style, rounded up to the minute


class _Figure(QWidget):
    """A big value with a small caption under it."""

    def __init__(self, caption: str, parent=None) -> None:
        super().__init__(parent)
        self.value = QLabel("–")
        self.value.setObjectName("figureValue")
        self.caption = QLabel(caption)
        self.caption.setObjectName("figureCaption")
        layout = QHBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.setSpacing(6)
        layout.addWidget(self.value)
        layout.addWidget(self.caption)


class AnswerBar(QFrame):
    def __init__(self, cancel_action: QAction, parent=None) -> None:
        super().__init__(parent)
        self.setObjectName("answerBar")
        self.vehicles = _Figure("vehicles needed")
        self.deadhead = _Figure("empty driving")
        self.verified = QLabel("✓ verified")
        self.verified.setObjectName("verifiedBadge")
        self.verified.setToolTip("An independent check confirmed that every job is covered "
                                 "once, each route is drivable, and no smaller fleet exists.")
        self.verified.setVisible(False)
        self.status = QLabel("")
        self.status.setObjectName("solveStatus")
        self.status.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self.progress = QProgressBar()
        self.progress.setRange(0, 0)
        self.progress.setMaximumWidth(120)
        self.progress.setTextVisible(False)
        self.progress.setVisible(False)
        self.cancel = QToolButton()
        self.cancel.setDefaultAction(cancel_action)
        self.cancel.setVisible(False)
        layout = QHBoxLayout(self)
        layout.setContentsMargins(12, 6, 12, 6)
        layout.setSpacing(18)
        layout.addWidget(self.vehicles)
        layout.addWidget(self.deadhead)
        layout.addWidget(self.verified)
        layout.addStretch(1)
        layout.addWidget(self.status)
        layout.addWidget(self.progress)
        layout.addWidget(self.cancel)
        self.setStyleSheet(
            "#answerBar { background: #f1f4f8; border-bottom: 1px solid #d6dce4; }"
            " #figureValue { font-size: 20px; font-weight: 600; color: #22303f; }"
            " #figureCaption { color: #56657a; }"
            " #verifiedBadge { color: #ffffff; background: #3f8a5f; border-radius: 4px;"
            " padding: 2px 8px; font-weight: 600; }"
            " #solveStatus { color: #56657a; }")

    def show_plan(self, plan: Plan, seconds: float) -> None:
        self.vehicles.value.setText(str(plan.vehicles))
        self.deadhead.value.setText(hours_minutes(plan.deadhead_seconds))
        self.verified.setVisible(bool(plan.verified))
        self.set_busy(False)
        note = "" if plan.verified else "  The independent check FAILED."
        self.status.setText(f"Up to date · {plan.day.n} jobs · solved in "
                            f"{seconds * 1000:.0f} ms{note}")

    def show_stale(self, why: str) -> None:
        """Keep the figures but say they no longer match the inputs."""
        self.verified.setVisible(False)
        self.set_busy(False)
        self.status.setText(why)

    def show_nothing(self, why: str) -> None:
        self.vehicles.value.setText("–")
        self.deadhead.value.setText("–")
        self.verified.setVisible(False)
        self.set_busy(False)
        self.status.setText(why)

    def set_busy(self, busy: bool, stage: str = "") -> None:
        self.progress.setVisible(busy)
        self.cancel.setVisible(busy)
        if busy:
            self.verified.setVisible(False)
            self.status.setText(f"Solving… {stage}" if stage else "Solving…")
