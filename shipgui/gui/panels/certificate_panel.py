"""Why the plan cannot use fewer vehicles: the certificate in plain words.

The certificate is a set of jobs no two of which can share a vehicle.  The
panel says so in one sentence and lists every pair with the reason, in the
words and rounding the printed proof uses (:mod:`shipgui.core.fleet.explain`).
Under a working-day limit the pairs are jobs that do not fit one working day
(:mod:`shipgui.core.workday.explain`), and where job weights prove more, a
second table lists them with how to read them.
"""

from __future__ import annotations

from enum import IntEnum

import numpy as np
from PySide6.QtCore import QAbstractTableModel, QModelIndex, QPersistentModelIndex, Qt, Signal
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QTableView,
    QVBoxLayout,
    QWidget,
)

from shipgui.core import Day, Plan
from shipgui.core.clock import format_day_clock
from shipgui.core.fleet.explain import explain_pair, pair_reason, reason_label
from shipgui.core.workday.explain import (
    explain_fit,
    fit_label,
    fit_reason,
    proof_statement,
    weight_text,
    weights_reading,
)

__all__ = ["certificate_summary", "explain_pair", "PairColumn", "PairsModel",
           "WeightColumn", "WeightsModel", "CertificatePanel"]

AnyIndex = QModelIndex | QPersistentModelIndex
ROOT = QModelIndex()  # the invisible parent of a flat table's rows


def certificate_summary(plan: Plan) -> str:
    n, used = len(plan.certificate), plan.vehicles
    if plan.workday is not None:
        text = proof_statement(plan)
    elif n == 1:
        text = f"A day with jobs needs at least 1 vehicle; this plan uses {used}."
    else:
        text = (f"No vehicle can do two of these {n} jobs, so at least {n} vehicles are "
                f"needed; this plan uses {used}.")
    if plan.verified and plan.workday is not None:
        text += (" The routes (each within the limit) and this proof were checked "
                 "independently of the solver.")
    elif plan.verified:
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
        self._limit: int | None = None  # the working-day limit, seconds
        self._cert: list[int] = []
        self._offsets = np.zeros(1, dtype=np.int64)

    def set_plan(self, plan: Plan | None) -> None:
        self.beginResetModel()
        if plan is None:
            self._day, self._cert, self._limit = None, [], None
        else:
            self._day = plan.day
            self._limit = plan.workday.limit if plan.workday is not None else None
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
                return self._label(i, j)
            return self._explain(i, j)
        if role == Qt.ItemDataRole.ToolTipRole and column == PairColumn.REASON:
            return self._explain(i, j)
        return None

    def _label(self, i: int, j: int) -> str:
        if self._limit is None:
            return reason_label(pair_reason(self._day, i, j))
        return fit_label(fit_reason(self._day, i, j, self._limit))

    def _explain(self, i: int, j: int) -> str:
        if self._limit is None:
            return explain_pair(self._day, i, j)
        return explain_fit(self._day, i, j, self._limit)


class WeightColumn(IntEnum):
    JOB = 0
    TIME = 1
    WEIGHT = 2


_WEIGHT_HEADINGS = ("Job", "Time", "Weight")


class WeightsModel(QAbstractTableModel):
    """The jobs that carry a weight in the proof, in start order."""

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self._day: Day | None = None
        self._weights: list[tuple[int, float]] = []

    def set_plan(self, plan: Plan | None) -> None:
        self.beginResetModel()
        self._day = plan.day if plan is not None else None
        self._weights = list(plan.certificate_weights) if plan is not None else []
        self.endResetModel()

    def job_id(self, row: int) -> str:
        return self._day.jobs[self._weights[row][0]].id

    def rowCount(self, parent: AnyIndex = ROOT) -> int:
        return 0 if parent.isValid() else len(self._weights)

    def columnCount(self, parent: AnyIndex = ROOT) -> int:
        return 0 if parent.isValid() else len(WeightColumn)

    def headerData(self, section: int, orientation: Qt.Orientation,
                   role: int = Qt.ItemDataRole.DisplayRole):
        if role == Qt.ItemDataRole.DisplayRole and orientation == Qt.Orientation.Horizontal:
            return _WEIGHT_HEADINGS[section] if 0 <= section < len(_WEIGHT_HEADINGS) else None
        return None

    def data(self, index: AnyIndex, role: int = Qt.ItemDataRole.DisplayRole):
        if not index.isValid() or self._day is None or index.row() >= self.rowCount():
            return None
        k, weight = self._weights[index.row()]
        job = self._day.jobs[k]
        column = WeightColumn(index.column())
        if role == Qt.ItemDataRole.DisplayRole:
            if column == WeightColumn.JOB:
                return job.id
            if column == WeightColumn.TIME:
                return f"{format_day_clock(job.start)}–{format_day_clock(job.end)}"
            return weight_text(weight)
        if role == Qt.ItemDataRole.ToolTipRole and column == WeightColumn.WEIGHT:
            return f"{weight:.9g}"
        if role == Qt.ItemDataRole.TextAlignmentRole and column == WeightColumn.WEIGHT:
            return int(Qt.AlignmentFlag.AlignRight | Qt.AlignmentFlag.AlignVCenter)
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
        self.weights_note = QLabel()
        self.weights_note.setObjectName("weightsReading")
        self.weights_note.setWordWrap(True)
        self.weights_model = WeightsModel(self)
        self.weights = QTableView()
        self.weights.setObjectName("weightsTable")
        self.weights.setModel(self.weights_model)
        self.weights.setSelectionBehavior(QAbstractItemView.SelectionBehavior.SelectRows)
        self.weights.setSelectionMode(QAbstractItemView.SelectionMode.SingleSelection)
        self.weights.verticalHeader().setVisible(False)
        self.weights.verticalHeader().setDefaultSectionSize(22)
        self.weights.horizontalHeader().setSectionResizeMode(
            QHeaderView.ResizeMode.ResizeToContents)
        self.weights.horizontalHeader().setStretchLastSection(True)
        self.weights.selectionModel().currentRowChanged.connect(self._on_weight_row)
        self.pairs_heading = QLabel()
        self.pairs_heading.setObjectName("pairsHeading")
        self.pairs_heading.setWordWrap(True)
        weights_box = QWidget()
        weights_layout = QHBoxLayout(weights_box)
        weights_layout.setContentsMargins(0, 0, 0, 0)
        weights_layout.addWidget(self.weights, 2)
        weights_layout.addWidget(self.weights_note, 3)
        self.weights_box = weights_box
        layout = QVBoxLayout(self)
        layout.setContentsMargins(6, 6, 6, 6)
        layout.addWidget(self.summary)
        layout.addWidget(weights_box, 1)
        layout.addWidget(self.pairs_heading)
        layout.addWidget(self.table, 1)
        self._show_weights(None)

    def set_plan(self, plan: Plan | None, message: str = "") -> None:
        self.model.set_plan(plan)
        self._show_weights(plan)
        if plan is None:
            self.summary.setText(message or "The proof appears here once the day is solved.")
        else:
            self.summary.setText(certificate_summary(plan))

    def _show_weights(self, plan: Plan | None) -> None:
        """The weights table and how to read it, and a heading over the pairs that
        says what they prove alone; both only when weights prove more."""
        weighted = plan is not None and bool(plan.certificate_weights)
        self.weights_model.set_plan(plan if weighted else None)
        self.weights_box.setVisible(weighted)
        self.pairs_heading.setVisible(weighted)
        if weighted:
            n = len(plan.certificate)
            self.weights_note.setText(weights_reading(plan))
            self.pairs_heading.setText(
                f"Alone, these {n} jobs prove at least {n}: no two of them fit one working "
                "day.")

    def _on_weight_row(self, current: QModelIndex, _previous: QModelIndex) -> None:
        if current.isValid():
            job = self.weights_model.job_id(current.row())
            self.pair_selected.emit(job, job)

    def _on_row(self, current: QModelIndex, _previous: QModelIndex) -> None:
        if current.isValid():
            self.pair_selected.emit(*self.model.pair(current.row()))
