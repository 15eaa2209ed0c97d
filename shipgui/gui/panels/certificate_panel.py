"""Why the plan cannot use fewer vehicles: the certificate in plain words.

The certificate is a set of jobs no two of which can share a vehicle.  The
panel says so in one sentence and lists every pair with the reason.
"""

from __future__ import annotations

from enum import IntEnum

from PySide6.QtCore import QAbstractTableModel, QModelIndex, QPersistentModelIndex, Qt, Signal
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHeaderView,
    QLabel,
    QTableView,
    QVBoxLayout,
    QWidget,
)

from shipgui.core import Day, Plan, follow_slack, format_clock, format_minutes

__all__ = ["certificate_summary", "explain_pair", "PairColumn", "PairsModel",
           "CertificatePanel"]

AnyIndex = QModelIndex | QPersistentModelIndex
ROOT = QModelIndex()  # the invisible parent of a flat table's rows


def certificate_summary(plan: Plan) -> str:
    n, used = len(plan.certificate), plan.vehicles
    jobs = "job" if n == 1 else "jobs"
    text = (f"No vehicle can do two of these {n} {jobs}, so at least {n} "
            f"{'vehicle is' if n == 1 else 'vehicles are'} needed; this plan uses {used}.")
    if plan.verified:
        text += " Both facts were checked independently of the solver."
    else:
        text += " Warning: the independent check did not pass; do not rely on this plan."
    return text


def _class_name(day: Day, k: int) -> str:
    name = day.jobs[k].vehicle_class
    return f"a '{name}' vehicle" if name else "a vehicle of no particular class"


def explain_pair(day: Day, i: int, j: int) -> str:
    """Why jobs ``i`` and ``j`` (job indices, ``i`` starting no later) need two vehicles."""
    a, b = day.jobs[i], day.jobs[j]
    slack = follow_slack(day, i, j)
    if slack is None:
        return f"{a.id} needs {_class_name(day, i)} and {b.id} needs {_class_name(day, j)}."
    if b.start < a.end:
        return (f"{b.id} starts at {format_clock(b.start)}, while {a.id} is still running "
                f"(until {format_clock(a.end)}).")
    turnaround = day.settings.turnaround
    drive = day.travel_between(a.destination, b.origin)
    arrive = a.end + turnaround + drive
    steps = []
    if turnaround:
        steps.append(f"{format_minutes(turnaround)} min turnaround")
    if a.destination != b.origin:
        steps.append(f"the {format_minutes(drive)} min drive from {a.destination} "
                     f"to {b.origin}")
    after = f" and {' and '.join(steps)}" if steps else ""
    return (f"After {a.id} ends at {format_clock(a.end)}{after}, the vehicle reaches "
            f"{b.id}'s start at {format_clock(arrive)}, {format_minutes(-slack)} min after "
            f"{b.id} starts ({format_clock(b.start)}).")


class PairColumn(IntEnum):
    FIRST = 0
    SECOND = 1
    SHORT_BY = 2
    REASON = 3


_PAIR_HEADINGS = ("Job", "and job", "Short by", "Why they need two vehicles")


class PairsModel(QAbstractTableModel):
    """Every pair of certificate jobs, earlier-starting job first."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self._day: Day | None = None
        self._pairs: list[tuple[int, int]] = []

    def set_plan(self, plan: Plan | None) -> None:
        self.beginResetModel()
        if plan is None:
            self._day, self._pairs = None, []
        else:
            self._day = plan.day
            cert = sorted(plan.certificate, key=lambda k: (int(plan.day.start[k]), k))
            self._pairs = [(cert[x], cert[y]) for x in range(len(cert))
                           for y in range(x + 1, len(cert))]
        self.endResetModel()

    def pair(self, row: int) -> tuple[str, str]:
        i, j = self._pairs[row]
        return self._day.jobs[i].id, self._day.jobs[j].id

    def rowCount(self, parent: AnyIndex = ROOT) -> int:
        return 0 if parent.isValid() else len(self._pairs)

    def columnCount(self, parent: AnyIndex = ROOT) -> int:
        return 0 if parent.isValid() else len(PairColumn)

    def headerData(self, section: int, orientation: Qt.Orientation,
                   role: int = Qt.ItemDataRole.DisplayRole):
        if role == Qt.ItemDataRole.DisplayRole and orientation == Qt.Orientation.Horizontal:
            return _PAIR_HEADINGS[section] if 0 <= section < len(_PAIR_HEADINGS) else None
        return None

    def data(self, index: AnyIndex, role: int = Qt.ItemDataRole.DisplayRole):
        if not index.isValid() or self._day is None or index.row() >= len(self._pairs):
            return None
        i, j = self._pairs[index.row()]
        column = PairColumn(index.column())
        if role == Qt.ItemDataRole.DisplayRole:
            if column == PairColumn.FIRST:
                return self._day.jobs[i].id
            if column == PairColumn.SECOND:
                return self._day.jobs[j].id
            if column == PairColumn.SHORT_BY:
                slack = follow_slack(self._day, i, j)
                return "other class" if slack is None else f"{format_minutes(-slack)} min"
            return explain_pair(self._day, i, j)
        if role == Qt.ItemDataRole.ToolTipRole and column == PairColumn.REASON:
            return explain_pair(self._day, i, j)
        return None


class CertificatePanel(QWidget):
    """The certificate sentence and the table of pairs."""

    pair_selected = Signal(str, str)  # the two job ids of the chosen pair

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.summary = QLabel("The proof appears here once the day is solved.")
        self.summary.setWordWrap(True)
        self.summary.setObjectName("certificateSummary")
        self.model = PairsModel(self)
        self.table = QTableView()
        self.table.setModel(self.model)
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        self.table.verticalHeader().setVisible(False)
        self.table.verticalHeader().setDefaultSectionSize(22)
        self.table.setWordWrap(False)
        header = self.table.horizontalHeader()
        header.setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
        header.setSectionResizeMode(PairColumn.REASON, QHeaderView.ResizeMode.Stretch)
        self.table.selectionModel().currentRowChanged.connect(self._on_row)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(6, 6, 6, 6)
        layout.addWidget(self.summary)
        layout.addWidget(self.table, 1)

    def set_plan(self, plan: Plan | None, message: str = "") -> None:
        self.model.set_plan(plan)
        if plan is None:
            self.summary.setText(message or "The proof appears here once the day is solved.")
        else:
            self.summary.setText(certificate_summary(plan))

    def _on_row(self, current: QModelIndex, _previous: QModelIndex) -> None:
        if current.isValid():
            self.pair_selected.emit(*self.model.pair(current.row()))
