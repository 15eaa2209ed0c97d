"""What would save a vehicle: slot moves after which one vehicle fewer is needed.

The dispatcher sets the largest move and asks; the list shows each suggestion
(fewest moved minutes first), choosing one shows the moves on the timeline,
and "Apply" makes them one undoable edit.  Moving a booked slot needs the
customer's agreement, which the panel says before anything is applied.
"""

from __future__ import annotations

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (
    QAbstractItemView,
    QFormLayout,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QPushButton,
    QSpinBox,
    QTableWidget,
    QTableWidgetItem,
    QVBoxLayout,
    QWidget,
)

from shipgui.core import Day
from shipgui.core.clock import format_day_clock, format_duration
from shipgui.core.fleet.suggest import DEFAULT_MAX_MOVE, Suggestion, SuggestionSearch

__all__ = ["SavingsPanel", "move_text", "AGREE"]

AGREE = ("Each move changes a booked time slot: agree it with the customer before you "
         "apply it.")


def move_text(day: Day, suggestion: Suggestion) -> str:
    """'J139 13:56–15:25 → 13:34–15:03 (22 min earlier)', one line per move."""
    lines = []
    for m in suggestion.moves:
        job = day.jobs[m.job]
        way = "later" if m.shift > 0 else "earlier"
        before = f"{format_day_clock(job.start)}–{format_day_clock(job.end)}"
        after = f"{format_day_clock(job.start + m.shift)}–{format_day_clock(job.end + m.shift)}"
        lines.append(f"{job.id} {before} → {after} ({format_duration(abs(m.shift))} {way})")
    return "\n".join(lines)


class SavingsPanel(QWidget):
    """Emits ``search_requested(count, max_move_seconds)``, and the moves of the
    suggestion chosen as [(job id, seconds)] in ``suggestion_chosen`` (empty: none)
    and ``apply_requested``."""

    search_requested = Signal(int, int)
    suggestion_chosen = Signal(list)
    apply_requested = Signal(list)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self._day: Day | None = None
        self._search: SuggestionSearch | None = None
        intro = QLabel("Small changes to booked time slots that would let one vehicle fewer "
                       "do the whole day. Each suggestion is checked by solving the changed "
                       "day.")
        intro.setWordWrap(True)
        self.max_move = QSpinBox()
        self.max_move.setRange(1, 240)
        self.max_move.setValue(DEFAULT_MAX_MOVE // 60)
        self.max_move.setSuffix(" min")
        self.max_move.setToolTip("Largest shift of one job, earlier or later")
        self.count = QSpinBox()
        self.count.setRange(1, 20)
        self.count.setValue(5)
        self.find = QPushButton("Look for moves")
        self.find.clicked.connect(lambda: self.search_requested.emit(
            self.count.value(), self.max_move.value() * 60))
        form = QFormLayout()
        form.addRow("Move a job by at most", self.max_move)
        form.addRow("Suggestions wanted", self.count)
        self.status = QLabel("")
        self.status.setWordWrap(True)
        self.status.setStyleSheet("color: #56657a;")
        self.table = QTableWidget(0, 3)
        self.table.setHorizontalHeaderLabels(["Moves", "Moved", "Vehicles after"])
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.NoEditTriggers)
        self.table.verticalHeader().setVisible(False)
        header = self.table.horizontalHeader()
        header.setSectionResizeMode(0, QHeaderView.ResizeMode.Stretch)
        header.setSectionResizeMode(1, QHeaderView.ResizeMode.ResizeToContents)
        header.setSectionResizeMode(2, QHeaderView.ResizeMode.ResizeToContents)
        self.table.itemSelectionChanged.connect(self._on_selection)
        self.agree = QLabel(AGREE)
        self.agree.setWordWrap(True)
        self.agree.setStyleSheet("color: #6a5420; font-weight: 600;")
        self.apply = QPushButton("Apply these moves")
        self.apply.setEnabled(False)
        self.apply.setToolTip("Changes the jobs' times in one step (Undo takes it back)")
        self.apply.clicked.connect(self._on_apply)
        buttons = QHBoxLayout()
        buttons.addWidget(self.find)
        buttons.addStretch(1)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(8, 8, 8, 8)
        layout.addWidget(intro)
        layout.addLayout(form)
        layout.addLayout(buttons)
        layout.addWidget(self.status)
        layout.addWidget(self.table, 1)
        layout.addWidget(self.agree)
        layout.addWidget(self.apply, 0, Qt.AlignmentFlag.AlignRight)

    # ------------------------------------------------------------ showing
    def set_busy(self, busy: bool) -> None:
        self.find.setEnabled(not busy)
        if busy:
            self.status.setText("Looking for moves…")

    def show_search(self, search: SuggestionSearch, day: Day) -> None:
        self._day, self._search = day, search
        self.table.setRowCount(0)
        for suggestion in search.suggestions:
            row = self.table.rowCount()
            self.table.insertRow(row)
            cells = (move_text(day, suggestion), format_duration(suggestion.moved_seconds),
                     str(suggestion.vehicles))
            for column, text in enumerate(cells):
                item = QTableWidgetItem(text)
                if column:
                    item.setTextAlignment(Qt.AlignmentFlag.AlignRight
                                          | Qt.AlignmentFlag.AlignVCenter)
                self.table.setItem(row, column, item)
        self.table.resizeRowsToContents()
        found = len(search.suggestions)
        where = (f"{found} way{'s' if found != 1 else ''} to need {search.vehicles - 1} "
                 f"vehicles instead of {search.vehicles}" if found else
                 f"No moves of at most {format_duration(search.max_move)} save a vehicle")
        cut = "" if search.complete else ", search cut short"
        self.status.setText(f"{where} ({search.checked} sets of moves checked in "
                            f"{search.seconds:.1f} s{cut}).")
        self.apply.setEnabled(False)

    def show_failure(self, text: str) -> None:
        self.status.setText(f"The search stopped unexpectedly: {text.splitlines()[0]}")

    def mark_stale(self) -> None:
        """The day changed: the list no longer applies."""
        if self._search is None:
            return
        self._search = None
        self.table.setRowCount(0)
        self.apply.setEnabled(False)
        self.status.setText("The day changed: look again.")
        self.suggestion_chosen.emit([])

    def chosen(self) -> Suggestion | None:
        rows = self.table.selectionModel().selectedRows()
        if not rows or self._search is None:
            return None
        return self._search.suggestions[rows[0].row()]

    # ------------------------------------------------------------ actions
    def moves(self, suggestion: Suggestion | None) -> list[tuple[str, int]]:
        """(job id, seconds) of each move of ``suggestion``."""
        if suggestion is None or self._day is None:
            return []
        return [(self._day.jobs[m.job].id, m.shift) for m in suggestion.moves]

    def _on_selection(self) -> None:
        suggestion = self.chosen()
        self.apply.setEnabled(suggestion is not None)
        self.suggestion_chosen.emit(self.moves(suggestion))

    def _on_apply(self) -> None:
        moves = self.moves(self.chosen())
        if moves:
            self.apply_requested.emit(moves)
