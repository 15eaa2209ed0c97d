"""A readable list of input problems: file, row, column, job and what is wrong."""

from __future__ import annotations

from pathlib import Path

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (
    QAbstractItemView,
    QDialog,
    QDialogButtonBox,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QSplitter,
    QTableWidget,
    QTableWidgetItem,
    QToolButton,
    QVBoxLayout,
    QWidget,
)

from shipgui.core import Day, InputError, Problem, format_minutes

__all__ = ["ProblemList", "ProblemBox", "ProblemsDialog", "problems_of", "shortened_notes",
           "shortened_heading"]

_HEADINGS = ("File", "Row", "Column", "Job", "What is wrong")
_MESSAGE = len(_HEADINGS) - 1


def problems_of(error: InputError) -> tuple[list[Problem], int]:
    """The problems an error lists and how many more it left out."""
    return list(error.problems), getattr(error, "more", 0)


def shortened_heading(day: Day) -> str:
    """The one line over the list of shortened travel times."""
    count = len(day.shortened)
    given = sum(1 for p in day.shortened if p.row)
    text = (f"Planned. {count} travel time{'s were' if count != 1 else ' was'} shortened "
            "because driving via other sites is quicker")
    if given:
        return text + f"; check the {given} from the travel file."
    return text + " (estimates from coordinates, beaten by a given time via other sites)."


def shortened_notes(day: Day) -> list[Problem]:
    """The travel times the shortest-path closure lowered, as rows for the list: a
    travel-file pair names its row; an estimate names the sites file."""
    notes = []
    for p in day.shortened:
        pair = f"{p.origin} -> {p.destination}: "
        if p.row:
            notes.append(Problem(f"{pair}{format_minutes(p.given)} min given, "
                                 f"{format_minutes(p.used)} min used (via other sites)",
                                 day.sources.get("travel"), p.row, "minutes"))
        else:
            notes.append(Problem(f"{pair}{format_minutes(p.given)} min estimated from "
                                 f"coordinates, {format_minutes(p.used)} min used (a given "
                                 "time via other sites is quicker)", day.sources.get("sites")))
    return notes


class ProblemList(QTableWidget):
    """Problems as a table; full file paths are shown as tooltips.  A problem about
    one job names it in the Job column (clicking the row can select the job)."""

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(0, len(_HEADINGS), parent)
        self._problems: list[Problem] = []
        self.more = 0
        self.setHorizontalHeaderLabels(list(_HEADINGS))
        self.verticalHeader().setVisible(False)
        self.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.setWordWrap(True)
        self.verticalHeader().setDefaultSectionSize(22)
        header = self.horizontalHeader()
        for column in range(_MESSAGE):
            header.setSectionResizeMode(column, QHeaderView.ResizeMode.ResizeToContents)
        header.setSectionResizeMode(_MESSAGE, QHeaderView.ResizeMode.Stretch)
        # Wrapped messages need their rows measured again once the width is known.
        header.sectionResized.connect(lambda *_: self.resizeRowsToContents())

    def set_problems(self, problems: list[Problem], more: int = 0) -> None:
        """Show ``problems``; ``more`` left out ones are counted in a last row."""
        self._problems = list(problems)
        self.more = more
        self.setRowCount(len(problems) + (1 if more else 0))
        for row, p in enumerate(problems):
            cells = (Path(p.file).name if p.file else "", str(p.row) if p.row else "",
                     p.column or "", p.job or "", p.message)
            for column, text in enumerate(cells):
                item = QTableWidgetItem(text)
                if column == 0 and p.file:
                    item.setToolTip(p.file)
                if column == _MESSAGE:
                    item.setToolTip(text)
                if column == 1:
                    item.setTextAlignment(Qt.AlignmentFlag.AlignRight
                                          | Qt.AlignmentFlag.AlignVCenter)
                self.setItem(row, column, item)
        if more:
            for column in range(_MESSAGE):
                self.setItem(len(problems), column, QTableWidgetItem(""))
            self.setItem(len(problems), _MESSAGE,
                         QTableWidgetItem(f"… and {more} more problem{'s' if more != 1 else ''}"
                                          " (fix these first)"))
        self.resizeRowsToContents()

    def problem(self, row: int) -> Problem | None:
        """The problem shown in ``row`` (None for the "... more" row)."""
        return self._problems[row] if 0 <= row < len(self._problems) else None

    def problem_texts(self) -> list[str]:
        """Each row as one line (file, row, column, job: what is wrong)."""
        texts = [str(p) for p in self._problems]
        if self.more:
            texts.append(self.item(len(self._problems), _MESSAGE).text())
        return texts


class ProblemBox(QWidget):
    """A heading over a problem list.  Notes (a plan was made, but check these) can
    be folded to the heading; problems that stop planning are always listed."""

    problem_clicked = Signal(object)  # Problem

    def __init__(self, parent: QWidget | None = None) -> None:
        super().__init__(parent)
        self.heading = QLabel()
        self.heading.setWordWrap(True)
        self.toggle = QToolButton()
        self.toggle.setCheckable(True)
        self.toggle.toggled.connect(self._fold)
        self.list = ProblemList()
        self.list.cellClicked.connect(self._clicked)
        top = QHBoxLayout()
        top.setContentsMargins(0, 0, 0, 0)
        top.addWidget(self.heading, 1)
        top.addWidget(self.toggle, 0, Qt.AlignmentFlag.AlignTop)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(6, 6, 6, 6)
        layout.addLayout(top)
        layout.addWidget(self.list, 1)

    def show_problems(self, heading: str, problems: list[Problem], more: int = 0,
                      details: str = "") -> None:
        """Problems that stop planning: in red, always listed (``details``: the
        list's tooltip, e.g. a failure's traceback)."""
        self.heading.setStyleSheet("color: #9a2f2f; font-weight: 600;")
        self.heading.setText(heading)
        self.list.setToolTip(details)
        self.list.setHorizontalHeaderItem(_MESSAGE, QTableWidgetItem(_HEADINGS[_MESSAGE]))
        self.list.set_problems(problems, more)
        self.toggle.setVisible(False)
        self.list.setVisible(True)
        self.setVisible(True)

    def show_notes(self, heading: str, notes: list[Problem]) -> None:
        """Notes on a plan that was made: folded to the heading until opened."""
        self.heading.setStyleSheet("color: #6a5420; font-weight: 600;")
        self.heading.setText(heading)
        self.list.setToolTip("")
        self.list.setHorizontalHeaderItem(_MESSAGE, QTableWidgetItem("What to check"))
        self.list.set_problems(notes)
        self.toggle.setVisible(True)
        self.toggle.setChecked(False)
        self._fold(False)
        self.setVisible(True)

    def show_shortened(self, day: Day) -> None:
        """The travel times the closure shortened, as notes; hidden when none."""
        notes = shortened_notes(day)
        if notes:
            self.show_notes(shortened_heading(day), notes)
        else:
            self.setVisible(False)

    def _fold(self, opened: bool) -> None:
        self.toggle.setText("Hide the list" if opened else "Show the list")
        self.list.setVisible(opened)
        self._limit_height()
        splitter = self.parentWidget()
        if opened and isinstance(splitter, QSplitter):  # room for a few rows
            sizes = splitter.sizes()
            mine = splitter.indexOf(self)
            if mine == 0 and len(sizes) > 1:
                room = min(220, (sizes[0] + sizes[1]) // 2)
                splitter.setSizes([room, sizes[0] + sizes[1] - room, *sizes[2:]])

    def _limit_height(self) -> None:
        """Folded, the box is as tall as its heading at the current width (which
        a splitter may change), so the heading is never cut off."""
        if not self.list.isHidden() or self.toggle.isHidden():
            self.setMinimumHeight(0)
            self.setMaximumHeight(16_777_215)
            return
        m = self.layout().contentsMargins()
        room = self.width() - self.toggle.sizeHint().width() - m.left() - m.right() - 12
        text = self.heading.heightForWidth(max(room, 50))
        height = max(text, self.toggle.sizeHint().height()) + m.top() + m.bottom()
        self.setFixedHeight(height)
        splitter = self.parentWidget()
        if isinstance(splitter, QSplitter):  # hand the room it no longer needs on
            sizes = splitter.sizes()
            mine = splitter.indexOf(self)
            if mine == 0 and len(sizes) > 1 and sizes[0] != height:
                splitter.setSizes([height, sizes[1] + sizes[0] - height, *sizes[2:]])

    def resizeEvent(self, event) -> None:
        super().resizeEvent(event)
        self._limit_height()

    def _clicked(self, row: int, _column: int) -> None:
        problem = self.list.problem(row)
        if problem is not None:
            self.problem_clicked.emit(problem)


class ProblemsDialog(QDialog):
    """Shown when files cannot be opened; the day on screen is left as it was."""

    def __init__(self, heading: str, problems: list[Problem],
                 parent: QWidget | None = None, more: int = 0) -> None:
        super().__init__(parent)
        self.setWindowTitle("Problems in the input")
        self.resize(820, 320)
        self.heading = QLabel(heading)
        self.heading.setWordWrap(True)
        self.list = ProblemList(self)
        self.list.set_problems(problems, more)
        buttons = QDialogButtonBox(QDialogButtonBox.StandardButton.Close)
        buttons.rejected.connect(self.reject)
        layout = QVBoxLayout(self)
        layout.addWidget(self.heading)
        layout.addWidget(self.list, 1)
        layout.addWidget(buttons)
