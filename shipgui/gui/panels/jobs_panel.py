"""The jobs table with its filter box and add / delete buttons."""

from __future__ import annotations

from PySide6.QtCore import QItemSelectionModel, Qt, Signal
from PySide6.QtGui import QAction
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QTableView,
    QToolButton,
    QVBoxLayout,
    QWidget,
)

from ..models.jobs_model import Column, JobRole, JobsFilterModel, JobsModel

__all__ = ["JobsPanel"]

# Columns size to their content, up to these widths (long notes get a tooltip).
_MOST = {Column.CUSTOMER: 220, Column.REFERENCE: 140, Column.NOTES: 240}
_SAMPLED_ROWS = 400  # rows looked at when sizing columns (all of them is slow at 200 000)


class JobsPanel(QWidget):
    """Shows a :class:`JobsModel` through a sorting and filtering proxy."""

    job_selected = Signal(str)

    def __init__(self, model: JobsModel, actions: list[QAction], parent=None) -> None:
        super().__init__(parent)
        self.model = model
        self.proxy = JobsFilterModel(self)
        self.proxy.setSourceModel(model)
        self.filter = QLineEdit()
        self.filter.setPlaceholderText("Filter jobs: id, site, customer, notes…")
        self.filter.setClearButtonEnabled(True)
        self.filter.textChanged.connect(self.proxy.setFilterFixedString)
        self.table = QTableView()
        self.table.setModel(self.proxy)
        self.table.setSortingEnabled(True)
        self.table.sortByColumn(Column.START, Qt.SortOrder.AscendingOrder)
        self.table.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.table.setEditTriggers(QAbstractItemView.EditTrigger.DoubleClicked
                                   | QAbstractItemView.EditTrigger.EditKeyPressed
                                   | QAbstractItemView.EditTrigger.AnyKeyPressed)
        self.table.verticalHeader().setVisible(False)
        self.table.verticalHeader().setDefaultSectionSize(22)
        header = self.table.horizontalHeader()
        header.setSectionResizeMode(QHeaderView.ResizeMode.Interactive)
        header.setStretchLastSection(False)
        header.setResizeContentsPrecision(_SAMPLED_ROWS)
        self.fit_columns()
        self.table.selectionModel().currentRowChanged.connect(self._on_current)
        bar = QHBoxLayout()
        bar.addWidget(self.filter, 1)
        for action in actions:
            button = QToolButton()
            button.setDefaultAction(action)
            button.setToolButtonStyle(Qt.ToolButtonStyle.ToolButtonTextBesideIcon)
            bar.addWidget(button)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(6, 6, 6, 6)
        self.message = QLabel()
        self.message.setWordWrap(True)
        self.message.setStyleSheet("color: #9a2f2f;")
        self.message.setVisible(False)
        layout.addLayout(bar)
        layout.addWidget(self.message)
        layout.addWidget(self.table, 1)
        self._quiet = False

    def fit_columns(self) -> None:
        """Size the columns to their headings and content (long text columns capped)."""
        self.table.resizeColumnsToContents()
        for column, most in _MOST.items():
            if self.table.columnWidth(column) > most:
                self.table.setColumnWidth(column, most)

    def width_through(self, last: Column) -> int:
        """The panel width that shows every column up to ``last`` whole."""
        columns = sum(self.table.columnWidth(c) for c in Column if c <= last)
        margins = self.layout().contentsMargins()
        frame = 2 * self.table.frameWidth()
        scrollbar = self.table.verticalScrollBar().sizeHint().width()
        return columns + frame + scrollbar + margins.left() + margins.right() + 4

    def show_message(self, text: str) -> None:
        """A refused edit's reason under the filter box (empty text hides it)."""
        self.message.setText(text)
        self.message.setVisible(bool(text))

    def selected_rows(self) -> list[int]:
        """Document rows of the selected jobs."""
        rows = {self.proxy.mapToSource(i).row()
                for i in self.table.selectionModel().selectedRows()}
        return sorted(rows)

    def current_job(self) -> str | None:
        index = self.table.currentIndex()
        return index.data(JobRole.JOB_ID) if index.isValid() else None

    def select_job(self, job_id: str | None) -> None:
        """Select the job's row (clearing the filter if it hides the job) quietly."""
        if job_id is None:
            return
        row = self.model.document.row_of(job_id)
        if row < 0:
            return
        index = self.proxy.mapFromSource(self.model.index(row, Column.JOB))
        if not index.isValid():
            self.filter.clear()
            index = self.proxy.mapFromSource(self.model.index(row, Column.JOB))
        self._quiet = True
        try:
            self.table.selectionModel().setCurrentIndex(
                index, QItemSelectionModel.SelectionFlag.ClearAndSelect
                | QItemSelectionModel.SelectionFlag.Rows)
            self.table.scrollTo(index)
        finally:
            self._quiet = False

    def edit_job(self, job_id: str, column: Column = Column.JOB) -> None:
        self.select_job(job_id)
        row = self.model.document.row_of(job_id)
        self.table.edit(self.proxy.mapFromSource(self.model.index(row, column)))

    def _on_current(self, current, _previous) -> None:
        if not self._quiet and current.isValid():
            self.job_selected.emit(current.data(JobRole.JOB_ID))
