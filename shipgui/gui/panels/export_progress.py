"""A status-bar strip while an export is written: what, how far, and a Cancel button."""

from __future__ import annotations

from PySide6.QtWidgets import (
    QHBoxLayout,
    QLabel,
    QProgressBar,
    QPushButton,
    QSizePolicy,
    QWidget,
)

from ..services.exports import ExportController

__all__ = ["ExportProgress"]


class ExportProgress(QWidget):
    """Visible only while ``controller`` is busy."""

    def __init__(self, controller: ExportController, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.controller = controller
        self.label = QLabel()
        self.bar = QProgressBar()
        self.bar.setRange(0, 0)  # moving until the first figure arrives
        self.bar.setMaximumWidth(160)
        self.bar.setTextVisible(False)
        self.cancel = QPushButton("Cancel")
        self.cancel.setToolTip("Stop writing; no file is written")
        self.cancel.clicked.connect(self._cancel)
        self.setSizePolicy(QSizePolicy.Policy.Maximum, QSizePolicy.Policy.Preferred)
        layout = QHBoxLayout(self)
        layout.setContentsMargins(0, 0, 6, 0)
        layout.addWidget(self.label)
        layout.addWidget(self.bar)
        layout.addWidget(self.cancel)
        controller.started.connect(self._started)
        controller.progress.connect(self._progress)
        controller.busy_changed.connect(lambda busy: self.setVisible(busy))
        self.setVisible(False)

    def _started(self, what: str) -> None:
        self.label.setText(f"Writing {what}…")
        self.bar.setRange(0, 0)
        self.cancel.setEnabled(True)

    def _progress(self, done: int, total: int) -> None:
        if total > 0:
            self.bar.setRange(0, total)
            self.bar.setValue(min(done, total))

    def _cancel(self) -> None:
        self.cancel.setEnabled(False)
        self.label.setText(f"Stopping: {self.controller.what} will not be written…")
        self.controller.cancel()
