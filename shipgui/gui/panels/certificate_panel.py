"""Why the plan cannot use fewer vehicles: the certificate in plain words.

The certificate is a set of jobs no two of which can share a vehicle.  The
panel says so in one sentence and lists every pair with the reason, in the
words and rounding the printed proof uses (:mod:`shipgui.core.fleet.explain`).
"""

from __future__ import annotations

from enum import IntEnum

import numpy as np
from PySide6.QtCore import QAbstractTableModel, QModelIndex, QPersistentModelIndex, Qt, Signal
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHeaderView,
    QLabel,
    QTableView,
    QVBoxLayout,
    QWidget,
)

from shipgui.core import Day, Plan
from shipgui.core.fleet.explain import explain_pair, pair_reason, reason_label

__all__ = ["certificate_summary", "explain_pair", "PairColumn", "PairsModel",
           "CertificatePanel"]

AnyIndex = QModelIndex | QPersistentModelIndex
ROOT = QModelIndex()  # the invisible parent of a flat table's rows


def certificate_summary(plan: Plan) -> str:
    n, used = len(plan.certificate), plan.vehicles
    if n == 1:
        text = f"A day with jobs needs at least 1 vehicle; this plan uses {used}."
    else:
        text = (f"No vehicle can do two of these {n} jobs, so at least {n} vehicles are "
                f"needed; this plan uses {used}.")
    if plan.verified:
        text += " Both facts were checked independently of the solver."
    else:
        text += " Warning: the independent check did not pass; do not rely on this plan."
    return text


class PairColumn(IntEnum):
    FIRST = 0
    SECOND = 1
    SHORT_BY = 2
    REASON = 3


_PAIR_HEADINGS = ("Job", "and job", "In short", "Why they need two vehicles")


class PairsModel(QAbstractTableModel):
    """Every pair of certificate jobs, earlier-starting job first.

    Pairs are found from the row number (rows of job x start at ``_offsets[x]``),
    so a certificate of a thousand jobs never becomes a list of half a million.
    """

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self._day: Day | None = None
        self._cert: list[int] = []
        self._offsets = np.zeros(1, dtype=np.int64)

    def set_plan(self, plan: Plan | None) -> None:
        self.beginResetModel()
        if plan is None:
            self._day, self._cert = None, []
        else:
            self._day = plan.day
            self._cert = sorted(plan.certificate, key=lambda k: (int(plan.day.start[k]), k))
        later = np.arange(len(self._cert) - 1, -1, -1, dtype=np.int64)  # pairs per job
        self._offsets = np.concatenate([[0], np.cumsum(later)])
        self.endResetModel()

    def _pair(self, row: int) -> tuple[int, int]:
        x = int(np.searchsorted(self._offsets, row, side="right")) - 1
        return self._cert[x], self._cert[x + 1 + row - int(self._offsets[x])]

    def pair(self, row: int) -> tuple[str, str]:
        i, j = self._pair(row)
        return self._day.jobs[i].id, self._day.jobs[j].id

    def rowCount(self, parent: AnyIndex = ROOT) -> int:
        return 0 if parent.isValid() else int(self._offsets[-1])

    def columnCount(self, parent: AnyIndex = ROOT) -> int:
        return 0 if parent.isValid() else len(PairColumn)

    def headerData(self, section: int, orientation: Qt.Orientation,
                   role: int = Qt.ItemDataRole.DisplayRole):
        if role == Qt.ItemDataRole.DisplayRole and orientation == Qt.Orientation.Horizontal:
            return _PAIR_HEADINGS[section] if 0 <= section < len(_PAIR_HEADINGS) else None
        return None

    def data(self, index: AnyIndex, role: int = Qt.ItemDataRole.DisplayRole):
        if not index.isValid() or self._day is None or index.row() >= self.rowCount():
            return None
        i, j = self._pair(index.row())
        column = PairColumn(index.column())
        if role == Qt.ItemDataRole.DisplayRole:
            if column == PairColumn.FIRST:
                return self._day.jobs[i].id
            if column == PairColumn.SECOND:
                return self._day.jobs[j].id
            if column == PairColumn.SHORT_BY:
                return reason_label(pair_reason(self._day, i, j))
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
