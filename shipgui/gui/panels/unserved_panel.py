"""The jobs the vehicles available cannot serve: hand them on or rebook them.

Shown under the timeline when a limit on the vehicles leaves jobs over: one
sentence with how many and how much priority, and a table of the jobs with the
reason for each (from the proof that no plan serves more).
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

from shipgui.core import Plan
from shipgui.core.clock import format_day_clock
from shipgui.core.fleet.shortfall import priority_text, unserved_reasons
from shipgui.core.model import priority_units

__all__ = ["UnservedColumn", "UnservedModel", "UnservedPanel", "unserved_summary"]

AnyIndex = QModelIndex | QPersistentModelIndex
ROOT = QModelIndex()


def unserved_summary(plan: Plan | None) -> str:
    """One sentence about the jobs left over (or why there are none)."""
    if plan is None:
        return "Jobs left without a vehicle appear here once the day is solved."
    sf = plan.shortfall
    if sf is None:
        return ("Every job has a vehicle. To plan with the vehicles you have, set "
                "\u201cVehicles available\u201d under Day and files.")
    if not sf.unserved:
        return (f"All {plan.day.n} jobs are served with the vehicles available "
                f"({sf.needed_for_all} needed).")
    s = plan.day.settings
    available = str(s.vehicles) if s.vehicles is not None else ", ".join(
        f"{c or '(no class)'} {k}" for c, k in s.class_vehicles)
    total = sum(priority_units(j) for j in plan.day.jobs)
    proof = ("no plan with these vehicles serves more (checked independently)"
             if plan.verified and sf.exact else "the best plan found")
    return (f"{len(sf.unserved)} of {plan.day.n} jobs (priority "
            f"{priority_text(total - sf.served_priority)} of {priority_text(total)}) cannot be "
            f"served with {available} vehicles; {sf.needed_for_all} would serve them all. "
            f"Hand them on or rebook them. Served priority {priority_text(sf.served_priority)}: "
            f"{proof}.")


class UnservedColumn(IntEnum):
    JOB = 0
    SLOT = 1
    PLACES = 2
    CUSTOMER = 3
    PRIORITY = 4
    WHY = 5


_HEADINGS = ("Job", "Time", "From → to", "Customer", "Priority", "Why not")


class UnservedModel(QAbstractTableModel):
    """The jobs not served, earliest first, with the proof's reason."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self._rows: list[tuple[str, ...]] = []

    def set_plan(self, plan: Plan | None) -> None:
        self.beginResetModel()
        self._rows = []
        if plan is not None and plan.shortfall is not None:
            day = plan.day
            reasons = unserved_reasons(day, plan.shortfall)
            for k in sorted(plan.shortfall.unserved, key=lambda k: (int(day.start[k]), k)):
                job = day.jobs[k]
                places = job.origin if job.destination == job.origin \
                    else f"{job.origin} → {job.destination}"
                slot = f"{format_day_clock(job.start)}–{format_day_clock(job.end)}"
                self._rows.append((job.id, slot, places, job.customer,
                                   priority_text(priority_units(job)), reasons.get(k, "")))
        self.endResetModel()

    def job_id(self, row: int) -> str:
        return self._rows[row][UnservedColumn.JOB]

    def rowCount(self, parent: AnyIndex = ROOT) -> int:
        return 0 if parent.isValid() else len(self._rows)

    def columnCount(self, parent: AnyIndex = ROOT) -> int:
        return 0 if parent.isValid() else len(UnservedColumn)

    def headerData(self, section: int, orientation: Qt.Orientation,
                   role: int = Qt.ItemDataRole.DisplayRole):
        if role == Qt.ItemDataRole.DisplayRole and orientation == Qt.Orientation.Horizontal:
            return _HEADINGS[section] if 0 <= section < len(_HEADINGS) else None
        return None

    def data(self, index: AnyIndex, role: int = Qt.ItemDataRole.DisplayRole):
        if not index.isValid() or index.row() >= len(self._rows):
            return None
        value = self._rows[index.row()][index.column()]
        if role == Qt.ItemDataRole.DisplayRole:
            return value
        if role == Qt.ItemDataRole.ToolTipRole and index.column() == UnservedColumn.WHY:
            return value
        if role == Qt.ItemDataRole.TextAlignmentRole and index.column() == UnservedColumn.PRIORITY:
            return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        return None


class UnservedPanel(QWidget):
    """The sentence and the table; emits ``job_selected(id)`` when a row is chosen."""

    job_selected = Signal(str)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.heading = QLabel("Jobs not served: hand on or rebook")
        self.heading.setStyleSheet("color: #9a2f2f; font-weight: 600;")
        self.summary = QLabel(unserved_summary(None))
        self.summary.setWordWrap(True)
        self.model = UnservedModel(self)
        self.table = QTableView()
        self.table.setModel(self.model)
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        self.table.verticalHeader().setVisible(False)
        self.table.verticalHeader().setDefaultSectionSize(22)
        self.table.setWordWrap(False)
        header = self.table.horizontalHeader()
        header.setSectionResizeMode(QHeaderView.ResizeMode.ResizeToContents)
        header.setSectionResizeMode(UnservedColumn.WHY, QHeaderView.ResizeMode.Stretch)
        self.table.selectionModel().currentRowChanged.connect(self._on_row)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(6, 6, 6, 6)
        layout.addWidget(self.heading)
        layout.addWidget(self.summary)
        layout.addWidget(self.table, 1)

    def set_plan(self, plan: Plan | None) -> bool:
        """Show the plan's jobs not served; True when there are any."""
        self.model.set_plan(plan)
        self.summary.setText(unserved_summary(plan))
        return self.model.rowCount() > 0

    def _on_row(self, current: QModelIndex, _previous: QModelIndex) -> None:
        if current.isValid():
            self.job_selected.emit(self.model.job_id(current.row()))
