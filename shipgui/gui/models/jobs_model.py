"""The jobs table: a Qt model over the document's job list, with checked inline edits."""

from __future__ import annotations

from enum import IntEnum

from PySide6.QtCore import (
    QAbstractTableModel,
    QModelIndex,
    QPersistentModelIndex,
    QSortFilterProxyModel,
    Qt,
    Signal,
)
from PySide6.QtGui import QColor, QUndoStack

from shipgui.core import Plan, format_clock
from shipgui.core.document import Change, DayDocument
from shipgui.core.fleet.shortfall import priority_text, unserved_reasons
from shipgui.core.model import priority_units

from .commands import EditJobField

__all__ = ["Column", "JobRole", "JobsModel", "JobsFilterModel", "check_field"]

AnyIndex = QModelIndex | QPersistentModelIndex
ROOT = QModelIndex()  # the invisible parent of a flat table's rows


class Column(IntEnum):
    """Columns of the jobs table, in display order."""

    JOB = 0
    ORIGIN = 1
    DESTINATION = 2
    START = 3
    END = 4
    VEHICLE_CLASS = 5
    CUSTOMER = 6
    REFERENCE = 7
    NOTES = 8
    PRIORITY = 9  # counts when vehicles are short
    MOVABLE = 10  # whether a suggestion may move the job's slot
    VEHICLE = 11  # the vehicle the current plan gives the job (read only)

    @property
    def heading(self) -> str:
        return _HEADINGS[self]

    @property
    def field(self) -> str | None:
        """The Job attribute behind the column (None for the plan's vehicle)."""
        return _FIELDS.get(self)


_HEADINGS = {
    Column.JOB: "Job", Column.ORIGIN: "From", Column.DESTINATION: "To",
    Column.START: "Start", Column.END: "End", Column.VEHICLE_CLASS: "Class",
    Column.CUSTOMER: "Customer", Column.REFERENCE: "Reference", Column.NOTES: "Notes",
    Column.PRIORITY: "Priority", Column.MOVABLE: "Movable", Column.VEHICLE: "Vehicle",
}
_FIELDS = {
    Column.JOB: "id", Column.ORIGIN: "origin", Column.DESTINATION: "destination",
    Column.START: "start", Column.END: "end", Column.VEHICLE_CLASS: "vehicle_class",
    Column.CUSTOMER: "customer", Column.REFERENCE: "reference", Column.NOTES: "notes",
    Column.PRIORITY: "priority", Column.MOVABLE: "movable",
}
NOT_SERVED = "not served"
_UNSERVED_TINT = QColor("#f6dada")


class JobRole(IntEnum):
    """Custom data roles."""

    ROW = Qt.ItemDataRole.UserRole + 1   # row in the document (stable under sorting)
    SORT = Qt.ItemDataRole.UserRole + 2  # value to sort by: seconds for times
    JOB_ID = Qt.ItemDataRole.UserRole + 3


def check_field(document: DayDocument, row: int, name: str, text: str):
    """The value to store for ``text`` typed into field ``name`` of job ``row``: the
    same rules as for the day files and plan files
    (:meth:`~shipgui.core.document.DayDocument.checked_value`).

    Raises ``ValueError`` with a sentence for the dispatcher when it is refused.
    """
    return document.checked_value(row, name, text)


class JobsModel(QAbstractTableModel):
    """Rows are the document's jobs; edits are checked and pushed as undo commands."""

    edit_refused = Signal(str)

    def __init__(self, document: DayDocument, undo_stack: QUndoStack | None = None,
                 parent=None) -> None:
        super().__init__(parent)
        self._document = document
        self._undo_stack = undo_stack
        self._vehicle_of: dict[str, int] = {}
        self._not_served: dict[str, str] = {}  # job id -> why, with a vehicle limit
        document.subscribe(self._on_change)

    @property
    def document(self) -> DayDocument:
        return self._document

    # ------------------------------------------------------------ shape
    def rowCount(self, parent: AnyIndex = ROOT) -> int:
        return 0 if parent.isValid() else len(self._document.jobs)

    def columnCount(self, parent: AnyIndex = ROOT) -> int:
        return 0 if parent.isValid() else len(Column)

    def headerData(self, section: int, orientation: Qt.Orientation,
                   role: int = Qt.ItemDataRole.DisplayRole):
        if role != Qt.ItemDataRole.DisplayRole:
            return None
        if orientation == Qt.Orientation.Horizontal:
            return Column(section).heading if 0 <= section < len(Column) else None
        return str(section + 1)

    def flags(self, index: AnyIndex) -> Qt.ItemFlag:
        if not index.isValid():
            return Qt.ItemFlag.NoItemFlags
        base = Qt.ItemFlag.ItemIsEnabled | Qt.ItemFlag.ItemIsSelectable
        if Column(index.column()).field is not None:
            base |= Qt.ItemFlag.ItemIsEditable
        return base

    # ------------------------------------------------------------ data
    def data(self, index: AnyIndex, role: int = Qt.ItemDataRole.DisplayRole):
        if not index.isValid() or not (0 <= index.row() < len(self._document.jobs)):
            return None
        job = self._document.jobs[index.row()]
        column = Column(index.column())
        if role in (Qt.ItemDataRole.DisplayRole, Qt.ItemDataRole.EditRole):
            return self._text(job, column)
        if role == JobRole.SORT:
            if column in (Column.START, Column.END):
                return getattr(job, column.field)
            if column == Column.VEHICLE:
                return self._vehicle_of.get(job.id, 10**9 if job.id in self._not_served else 0)
            if column == Column.PRIORITY:
                return priority_units(job)
            return self._text(job, column).casefold()
        if role == JobRole.ROW:
            return index.row()
        if role == JobRole.JOB_ID:
            return job.id
        if role == Qt.ItemDataRole.TextAlignmentRole and column in (
                Column.START, Column.END, Column.VEHICLE, Column.PRIORITY):
            return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
        if role == Qt.ItemDataRole.BackgroundRole and job.id in self._not_served:
            return _UNSERVED_TINT
        if role == Qt.ItemDataRole.ToolTipRole:
            if job.id in self._not_served:
                return f"Not served with the vehicles available. {self._not_served[job.id]}"
            if column == Column.NOTES and job.notes:
                return job.notes
        return None

    def _text(self, job, column: Column) -> str:
        if column in (Column.START, Column.END):
            return format_clock(getattr(job, column.field))
        if column == Column.VEHICLE:
            k = self._vehicle_of.get(job.id)
            if k is None:
                return NOT_SERVED if job.id in self._not_served else ""
            return str(k)
        if column == Column.PRIORITY:
            return priority_text(priority_units(job))
        if column == Column.MOVABLE:
            return "yes" if job.movable else "no"
        return str(getattr(job, column.field))

    def is_served(self, job_id: str) -> bool:
        """False for a job the current plan leaves out for want of vehicles."""
        return job_id not in self._not_served

    def setData(self, index: AnyIndex, value, role: int = Qt.ItemDataRole.EditRole) -> bool:
        if role != Qt.ItemDataRole.EditRole or not index.isValid():
            return False
        name = Column(index.column()).field
        if name is None:
            return False
        try:
            checked = check_field(self._document, index.row(), name, str(value))
        except ValueError as exc:
            self.edit_refused.emit(str(exc))
            return False
        if checked == getattr(self._document.jobs[index.row()], name):
            return True
        command = EditJobField(self._document, index.row(), name, checked)
        if self._undo_stack is not None:
            self._undo_stack.push(command)
        else:
            command.redo()
        return True

    # ------------------------------------------------------------ plan
    def set_plan(self, plan: Plan | None) -> None:
        """Show which vehicle the plan gives each job, and mark the jobs it cannot
        serve with the vehicles available (by job id)."""
        before = self._not_served
        self._vehicle_of, self._not_served = {}, {}
        if plan is not None:
            for k, route in enumerate(plan.routes, start=1):
                for j in route:
                    self._vehicle_of[plan.day.jobs[j].id] = k
            if plan.shortfall is not None:
                reasons = unserved_reasons(plan.day, plan.shortfall)
                self._not_served = {plan.day.jobs[k].id: reasons.get(k, "")
                                    for k in plan.shortfall.unserved}
        if not self.rowCount():
            return
        # Only what changed: the vehicle column, and the whole rows of jobs whose
        # "not served" mark came or went (the sorting proxy maps a change of all
        # rows and columns piece by piece: a third of a second at 10 000 jobs).
        role = Qt.ItemDataRole
        self.dataChanged.emit(self.index(0, Column.VEHICLE),
                              self.index(self.rowCount() - 1, Column.VEHICLE),
                              [role.DisplayRole, role.EditRole, JobRole.SORT,
                               role.BackgroundRole, role.ToolTipRole])
        marked = set(before) ^ set(self._not_served)
        for row, job in enumerate(self._document.jobs):
            if job.id in marked:
                self.dataChanged.emit(self.index(row, 0), self.index(row, len(Column) - 1),
                                      [role.BackgroundRole, role.ToolTipRole])

    # ------------------------------------------------------------ document changes
    def _on_change(self, change: Change, done: bool) -> None:
        if change.kind == "job" and done:
            self.dataChanged.emit(self.index(change.row, 0),
                                  self.index(change.row, len(Column) - 1))
        elif change.kind == "insert":
            if done:
                self.endInsertRows()
            else:
                self.beginInsertRows(QModelIndex(), change.row, change.row)
        elif change.kind == "remove":
            if done:
                self.endRemoveRows()
            else:
                self.beginRemoveRows(QModelIndex(), change.row, change.row)
        elif change.kind == "reset":
            if done:
                self._vehicle_of, self._not_served = {}, {}
                self.endResetModel()
            else:
                self.beginResetModel()


class JobsFilterModel(QSortFilterProxyModel):
    """Sorting by :data:`JobRole.SORT` and a case-blind filter over every column."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self.setSortRole(JobRole.SORT)
        self.setFilterKeyColumn(-1)
        self.setFilterCaseSensitivity(Qt.CaseSensitivity.CaseInsensitive)
