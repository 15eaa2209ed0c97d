"""The day's inputs: which files make it up and the planning settings."""

from __future__ import annotations

import dataclasses
from datetime import date
from pathlib import Path

from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (
    QComboBox,
    QDoubleSpinBox,
    QFormLayout,
    QHBoxLayout,
    QLabel,
    QLineEdit,
    QPushButton,
    QSpinBox,
    QVBoxLayout,
    QWidget,
)

from shipgui.core import Settings, format_clock, parse_clock
from shipgui.core.clock import format_minutes, parse_length
from shipgui.core.document import DayDocument

from .. import wording

__all__ = ["InputsPanel"]

NO_DEPOT = "(no depot)"
MAX_DAY_CAUTION = ("Your setting, not a legal default: drivers' hours, breaks and rest rules "
                   "are set by local law. Empty: no limit.")


def _length_text(seconds: int | None) -> str:
    """A working-day limit as typed: '11:00' (H:MM), '' for none."""
    if seconds is None:
        return ""
    minutes = seconds / 60
    if minutes.is_integer():
        return f"{int(minutes) // 60}:{int(minutes) % 60:02d}"
    return format_minutes(seconds)  # a limit of 612.5 min keeps its half minute


def _short(text: str, limit: int = 160) -> str:
    return text + "." if len(text) <= limit else text[:limit].rsplit(" ", 1)[0] + " …"


class _FileRow(QWidget):
    def __init__(self, kind: str, noun: str, panel: InputsPanel) -> None:
        super().__init__()
        self.noun = noun
        self.name = QLabel("none")
        self.name.setWordWrap(True)
        self.name.setTextInteractionFlags(Qt.TextInteractionFlag.TextSelectableByMouse)
        self.attach = QPushButton("Attach…")
        self.attach.setToolTip(f"Use a {kind} file (CSV or Excel workbook) with this day")
        self.remove = QPushButton("Remove")
        self.attach.clicked.connect(lambda: panel.attach_requested.emit(kind))
        self.remove.clicked.connect(lambda: panel.remove_requested.emit(kind))
        layout = QHBoxLayout(self)
        layout.setContentsMargins(0, 0, 0, 0)
        layout.addWidget(self.name, 1)
        layout.addWidget(self.attach)
        layout.addWidget(self.remove)

    def show_source(self, source: str | None, count: int) -> None:
        if source:
            self.name.setText(f"{Path(source).name} ({wording.count(count, self.noun)})")
            self.name.setToolTip(source)
        elif count:
            self.name.setText(f"{wording.count(count, self.noun)} kept in the plan file")
            self.name.setToolTip("")
        else:
            self.name.setText("none")
            self.name.setToolTip("")
        self.remove.setEnabled(bool(source or count))


class _VehiclesRow(QWidget):
    """Vehicles available: one box, or one per vehicle class when the jobs have
    several; 0 shows "no limit".  Emits ``changed(total, per_class)``."""

    changed = Signal(object, object)

    def __init__(self) -> None:
        super().__init__()
        self._layout = QHBoxLayout(self)
        self._layout.setContentsMargins(0, 0, 0, 0)
        self.boxes: dict[str | None, QSpinBox] = {}  # None: all classes together

    def show_limits(self, settings: Settings, classes: list[str]) -> None:
        """Show the limits for ``classes`` (several: a box per class) without emitting;
        the boxes are only made anew when the classes changed."""
        # One box for all when there is one class or a limit for all is set (set it to
        # "no limit" to get a box per class).
        per_class = len(classes) > 1 and settings.vehicles is None
        keys: list[str | None] = list(classes) if per_class else [None]
        named = dict(settings.class_vehicles)
        if list(self.boxes) == keys:
            for key, box in self.boxes.items():
                box.blockSignals(True)
                box.setValue((settings.vehicles or 0) if key is None else named.get(key, 0))
                box.blockSignals(False)
            return
        for box in self.boxes.values():
            box.blockSignals(True)
            box.deleteLater()
        while self._layout.count():
            item = self._layout.takeAt(0)
            if item.widget() is not None:
                item.widget().deleteLater()
        self.boxes = {}
        for key in keys:
            box = QSpinBox()
            box.setRange(0, 9999)
            box.setSpecialValueText("no limit")
            box.setKeyboardTracking(False)
            box.setValue((settings.vehicles or 0) if key is None else named.get(key, 0))
            box.setToolTip("Vehicles you have for the day. With fewer than needed, the plan "
                           "serves the jobs of the most priority and lists the rest.")
            box.valueChanged.connect(self._emit)
            if key is not None:
                self._layout.addWidget(QLabel(f"{key or '(no class)'}:"))
            self._layout.addWidget(box)
            self.boxes[key] = box
        self._layout.addStretch(1)

    def _emit(self, _value: int) -> None:
        if None in self.boxes:
            value = self.boxes[None].value()
            self.changed.emit(value or None, ())
        else:
            self.changed.emit(None, tuple(sorted((c, b.value()) for c, b in self.boxes.items()
                                                 if b.value())))


class InputsPanel(QWidget):
    """Emits ``settings_edited(settings, undo_text)`` for each checked change."""

    settings_edited = Signal(object, str)
    settings_refused = Signal(str)
    plan_date_edited = Signal(object, str)  # date or None, undo text
    default_requested = Signal()
    attach_requested = Signal(str)
    remove_requested = Signal(str)

    def __init__(self, parent=None) -> None:
        super().__init__(parent)
        self._settings = Settings()
        self._plan_date: date | None = None
        self._loading = False
        self.jobs_file = QLabel("none")
        self.plan_date = QLineEdit()
        self.plan_date.setPlaceholderText("YYYY-MM-DD, or empty")
        self.plan_date.setMinimumWidth(self.plan_date.fontMetrics().horizontalAdvance(
            "YYYY-MM-DD, or empty") + 24)
        self.plan_date.setToolTip("The day the plan is for; printed on every page")
        self.sites_row = _FileRow("sites", "site", self)
        self.travel_row = _FileRow("travel", "travel time", self)
        self.turnaround = QSpinBox()
        self.turnaround.setRange(0, 600)
        self.turnaround.setSuffix(" min")
        self.turnaround.setKeyboardTracking(False)
        self.turnaround.setToolTip("Time between two jobs on one vehicle: unloading, "
                                   "paperwork, a short break")
        self.depot = QComboBox()
        self.day_start = QLineEdit()
        self.day_end = QLineEdit()
        for edit in (self.day_start, self.day_end):
            edit.setPlaceholderText("HH:MM, or empty")
            # Wide enough for the hint in any font (frame and margins: 24 px).
            edit.setFixedWidth(edit.fontMetrics().horizontalAdvance("HH:MM, or empty") + 24)
        self.max_day = QLineEdit()
        self.max_day.setObjectName("maxDay")
        self.max_day.setPlaceholderText("H:MM, or empty")
        self.max_day.setFixedWidth(self.day_start.minimumWidth())
        self.max_day.setToolTip("The longest working day of one vehicle and its driver, from "
                                "leaving the depot to being back (first job's start to last "
                                "job's end without a depot). Empty: no limit.")
        # Beside the field on purpose: the limit is the dispatcher's input, never a default.
        self.max_day_caution = QLabel(MAX_DAY_CAUTION)
        self.max_day_caution.setObjectName("maxDayCaution")
        self.max_day_caution.setWordWrap(True)
        self.max_day_caution.setStyleSheet("color: #6a5420;")
        self.speed = QDoubleSpinBox()
        self.speed.setRange(5, 150)
        self.speed.setDecimals(0)
        self.speed.setSuffix(" km/h")
        self.speed.setKeyboardTracking(False)
        self.circuity = QDoubleSpinBox()
        self.circuity.setRange(1.0, 3.0)
        self.circuity.setSingleStep(0.05)
        self.circuity.setDecimals(2)
        self.circuity.setKeyboardTracking(False)
        estimate_tip = ("Used only for pairs of sites missing from the travel file: "
                        "straight-line distance × road factor ÷ average speed")
        self.speed.setToolTip(estimate_tip)
        self.circuity.setToolTip(estimate_tip)
        self.vehicles = _VehiclesRow()
        self.origin = QLabel("")
        self.origin.setObjectName("settingsOrigin")
        self.origin.setWordWrap(True)
        self.origin.setStyleSheet("color: #56657a;")
        self.make_default = QPushButton("Use as default for new folders")
        self.make_default.setToolTip("A jobs file from a folder never planned before starts "
                                     "with these depot, day, turnaround, speed and road "
                                     "factor settings")
        self.make_default.clicked.connect(self.default_requested)
        self.notes = QLabel("")
        self.notes.setWordWrap(True)
        self.notes.setStyleSheet("color: #6a5420;")
        form = QFormLayout()
        form.setFieldGrowthPolicy(QFormLayout.FieldGrowthPolicy.AllNonFixedFieldsGrow)
        form.addRow("Jobs", self.jobs_file)
        form.addRow("Plan date", self.plan_date)
        form.addRow("Sites", self.sites_row)
        form.addRow("Travel times", self.travel_row)
        form.addRow("Turnaround", self.turnaround)
        form.addRow("Depot", self.depot)
        form.addRow("Day starts", self.day_start)
        form.addRow("Day ends", self.day_end)
        form.addRow("Longest working day", self.max_day)
        form.addRow("", self.max_day_caution)
        form.addRow("Average speed", self.speed)
        form.addRow("Road factor", self.circuity)
        form.addRow("Vehicles available", self.vehicles)
        remembered = QHBoxLayout()
        remembered.addWidget(self.origin, 1)
        remembered.addWidget(self.make_default, 0, Qt.AlignmentFlag.AlignTop)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(8, 8, 8, 8)
        layout.addLayout(form)
        layout.addLayout(remembered)
        layout.addWidget(self.notes)
        layout.addStretch(1)
        self.turnaround.valueChanged.connect(self._turnaround_changed)
        self.depot.activated.connect(self._depot_changed)
        self.day_start.editingFinished.connect(lambda: self._clock_changed("day_start"))
        self.day_end.editingFinished.connect(lambda: self._clock_changed("day_end"))
        self.max_day.editingFinished.connect(self._max_day_changed)
        self.plan_date.editingFinished.connect(self._plan_date_changed)
        self.speed.valueChanged.connect(self._speed_changed)
        self.circuity.valueChanged.connect(self._circuity_changed)
        self.vehicles.changed.connect(self._vehicles_changed)

    # ------------------------------------------------------------ showing
    def show_document(self, document: DayDocument) -> None:
        """Fill the fields from the document without emitting edits."""
        self._loading = True
        try:
            s = self._settings = document.settings
            self.jobs_file.setText(Path(document.sources["jobs"]).name
                                   if "jobs" in document.sources
                                   else f"{wording.count(len(document.jobs), 'job')} kept "
                                        "in the plan file")
            self.sites_row.show_source(document.sources.get("sites"), len(document.sites))
            self.travel_row.show_source(document.sources.get("travel"), len(document.travel))
            self.turnaround.setValue(s.turnaround // 60)
            sites = sorted({x.id for x in document.sites}
                           | {j.origin for j in document.jobs}
                           | ({s.depot} if s.depot else set()))
            self.depot.clear()
            self.depot.addItems([NO_DEPOT, *sites])
            self.depot.setCurrentText(s.depot or NO_DEPOT)
            self.day_start.setText(format_clock(s.day_start) if s.day_start is not None else "")
            self.day_end.setText(format_clock(s.day_end) if s.day_end is not None else "")
            self.max_day.setText(_length_text(s.max_day))
            self.speed.setValue(s.speed_kmh)
            self.circuity.setValue(s.circuity)
            self.vehicles.show_limits(s, sorted({j.vehicle_class for j in document.jobs}))
            self._plan_date = document.plan_date
            self.plan_date.setText(document.plan_date.isoformat() if document.plan_date else "")
        finally:
            self._loading = False

    def show_notes(self, warnings: tuple[str, ...]) -> None:
        """The day's warnings, each cut to a few lines (all of it in the tooltip)."""
        self.notes.setText("\n".join(f"Note: {_short(w)}" for w in warnings))
        self.notes.setToolTip("\n\n".join(warnings))

    def show_origin(self, text: str) -> None:
        """Where the day settings shown come from (a folder's last day, the default…)."""
        self.origin.setText(text[:1].upper() + text[1:] + "." if text else "")

    # ------------------------------------------------------------ editing
    def _emit(self, text: str, **changes) -> None:
        if self._loading:
            return
        new = dataclasses.replace(self._settings, **changes)
        if new != self._settings:
            self._settings = new
            self.settings_edited.emit(new, text)

    def _turnaround_changed(self, minutes: int) -> None:
        self._emit(f"Set turnaround to {minutes} min", turnaround=minutes * 60)

    def _depot_changed(self, _index: int) -> None:
        text = self.depot.currentText()
        depot = None if text == NO_DEPOT else text
        self._emit(f"Set depot to {depot}" if depot else "Plan without a depot", depot=depot)

    def _speed_changed(self, value: float) -> None:
        self._emit(f"Set average speed to {value:g} km/h", speed_kmh=float(value))

    def _circuity_changed(self, value: float) -> None:
        self._emit(f"Set road factor to {value:g}", circuity=float(value))

    def _vehicles_changed(self, total: int | None, per_class: tuple) -> None:
        if total is None and not per_class:
            text = "Plan with no limit on vehicles"
        elif total is not None:
            text = f"Set vehicles available to {total}"
        else:
            text = "Set vehicles available to " + ", ".join(
                f"{c or '(no class)'} {k}" for c, k in per_class)
        self._emit(text, vehicles=total, class_vehicles=per_class)

    def _plan_date_changed(self) -> None:
        if self._loading:
            return
        text = self.plan_date.text().strip()
        try:
            value = date.fromisoformat(text) if text else None
        except ValueError:
            self.plan_date.setText(self._plan_date.isoformat() if self._plan_date else "")
            self.settings_refused.emit(f"The plan date was not changed: '{text}' is not a "
                                       "date; type it like 2026-12-02")
            return
        if value != self._plan_date:
            self._plan_date = value
            self.plan_date_edited.emit(value, f"Set plan date to {value.isoformat()}" if value
                                       else "Clear plan date")

    def _clock_changed(self, name: str) -> None:
        if self._loading:
            return
        edit = self.day_start if name == "day_start" else self.day_end
        label = "day start" if name == "day_start" else "day end"
        text = edit.text().strip()
        old = getattr(self._settings, name)
        if not text:
            self._emit(f"Clear {label}", **{name: None})
            return
        try:
            value = parse_clock(text).seconds
            if value is None:
                raise ValueError(f"'{text}': type a clock time HH:MM")
        except ValueError as exc:
            edit.setText(format_clock(old) if old is not None else "")
            self.settings_refused.emit(f"The {label} was not changed: {exc}")
            return
        self._emit(f"Set {label} to {format_clock(value)}", **{name: value})

    def _max_day_changed(self) -> None:
        if self._loading:
            return
        text = self.max_day.text().strip()
        if not text:
            self._emit("Plan without a working-day limit", max_day=None)
            return
        try:
            value = parse_length(text)
        except ValueError as exc:
            self.max_day.setText(_length_text(self._settings.max_day))
            self.settings_refused.emit(f"The longest working day was not changed: {exc}")
            return
        self.max_day.setText(_length_text(value))
        self._emit(f"Set longest working day to {_length_text(value)}", max_day=value)
