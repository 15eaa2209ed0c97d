"""A readable list of input problems: file, row, column and what is wrong."""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import Qt
from PySide6.QtWidgets import (
    QAbstractItemView,
    QDialog,
    QDialogButtonBox,
    QHeaderView,
    QLabel,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from shipgui.core import Problem

__all__ = ["ProblemList", "ProblemBox", "ProblemsDialog"]

_HEADINGS = ("File", "Row", "Column", "What is wrong")


class ProblemList(QTableWidget):
    """Problems as a table; full file paths are shown as tooltips."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(0, len(_HEADINGS), parent)
        self._problems: list[Problem] = []
        self.setHorizontalHeaderLabels(list(_HEADINGS))
        self.verticalHeader().setVisible(False)
        self.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.setWordWrap(True)
        self.verticalHeader().setDefaultSectionSize(22)
        header = self.horizontalHeader()
        for column in range(3):
            header.setSectionResizeMode(column, QHeaderView.ResizeMode.ResizeToContents)
        header.setSectionResizeMode(3, QHeaderView.ResizeMode.Stretch)

    def set_problems(self, problems: list[Problem]) -> None:
        self._problems = list(problems)
        self.setRowCount(len(problems))
        for row, p in enumerate(problems):
            cells = (Path(p.file).name if p.file else "",
                     str(p.row) if p.row else "", p.column or "", p.message)
            for column, text in enumerate(cells):
                item = QTableWidgetItem(text)
                if column == 0 and p.file:
                    item.setToolTip(p.file)
                if column == 3:
                    item.setToolTip(text)
                if column == 1:
                    item.setTextAlignment(Qt.AlignmentFlag.AlignRight
                                          | Qt.AlignmentFlag.AlignVCenter)
                self.setItem(row, column, item)
        self.resizeRowsToContents()

    def problem(self, row: int) -> Problem:
        return self._problems[row]

    def problem_texts(self) -> list[str]:
        return [self.item(r, 3).text() for r in range(self.rowCount())]


class ProblemBox(QWidget):
    """Above the timeline while the day cannot be planned: a heading and the list."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.heading = QLabel()
        self.heading.setWordWrap(True)
        self.heading.setStyleSheet("color: #9a2f2f; font-weight: 600;")
        self.list = ProblemList()
        layout = QVBoxLayout(self)
        layout.setContentsMargins(6, 6, 6, 6)
        layout.addWidget(self.heading)
        layout.addWidget(self.list, 1)
        self.setVisible(False)

    def show_problems(self, heading: str, problems: list[Problem], details: str = "") -> None:
        self.heading.setText(heading)
        self.list.set_problems(problems)
        self.list.setToolTip(details)
        self.setVisible(True)


class ProblemsDialog(QDialog):
    """Shown when files cannot be opened; the day on screen is left as it was."""

    def __init__(self, heading: str, problems: list[Problem],
                 parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.setWindowTitle("Problems in the input")
        self.resize(760, 320)
        self.heading = QLabel(heading)
        self.heading.setWordWrap(True)
        self.list = ProblemList(self)
        self.list.set_problems(problems)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close)
        buttons.rejected.connect(self.reject)
        layout = QVBoxLayout(self)
        layout.addWidget(self.heading)
        layout.addWidget(self.list, 1)
        layout.addWidget(buttons)
