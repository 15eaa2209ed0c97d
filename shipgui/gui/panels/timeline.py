"""The timeline: one row per vehicle, a bar per job, thin bars for empty driving.

Rows are drawn when they come into view (and a few ahead each way), so a
day of thousands of vehicles shows at once and the window never waits for
items nobody sees; asking for a job's bar draws its row.
"""

from __future__ import annotations

import math

import numpy as np
from PySide6.QtCore import QRectF, Qt, Signal
from PySide6.QtGui import QBrush, QColor, QFont, QFontMetricsF, QPainter, QPen
from PySide6.QtWidgets import (
    QGraphicsItem,
    QGraphicsRectItem,
    QGraphicsScene,
    QGraphicsSimpleTextItem,
    QGraphicsView,
)

from shipgui.core import Plan
from shipgui.core.clock import format_day_clock, format_duration
from shipgui.core.fleet.schedule import vehicle_day

from .timeline_text import bar_label, drive_tooltip, job_tooltip, working_day_tooltip

__all__ = ["TimelineView", "JobBar", "COLOURS"]

ROW_HEIGHT = 30
BAR_HEIGHT = 20
LEG_HEIGHT = 6
LABEL_WIDTH = 96  # at least; grows with the longest vehicle name, up to MAX_LABEL_WIDTH
MAX_LABEL_WIDTH = 260
LEFT_PAD = 28  # room for the first hour's label right of the vehicle names
AXIS_HEIGHT = 26
MIN_PX_PER_HOUR, MAX_PX_PER_HOUR = 20, 1200

COLOURS = {
    "job": QColor("#4f78a8"),
    "job_text": QColor("#ffffff"),
    "certificate": QColor("#d08a2e"),
    "muted": QColor("#a9b8cc"),
    "selected": QColor("#1b2a3a"),
    "leg": QColor("#9aa5b1"),
    "stripe": QColor("#f3f5f8"),
    "grid": QColor("#dde2e8"),
    "axis": QColor("#eef1f5"),
    "label": QColor("#2b3642"),
    "day": QColor("#7d8b99"),
    "moved": QColor("#b5652a"),  # a job a suggestion would move
    "ghost": QColor(181, 101, 42, 60),  # where it would go
    "workday": QColor("#6f9a7a"),  # a vehicle's working day, depot to depot
    "workday_room": QColor("#dfe9e1"),  # the rest of what the limit allows
    "limit": QColor("#b5533c"),  # where the limit would end the working day
}
WORKDAY_HEIGHT = 3  # the working-day band under the bars
ROWS_AHEAD = 4  # rows drawn beyond the view each way, so a small scroll finds them ready


class JobBar(QGraphicsRectItem):
    """One job on the timeline; selectable, carries the job id."""

    def __init__(self, rect: QRectF, job_id: str, tooltip: str) -> None:
        super().__init__(rect)
        self.job_id = job_id
        self.setFlag(QGraphicsItem.GraphicsItemFlag.ItemIsSelectable, True)
        self.setToolTip(tooltip)
        self.setPen(QPen(Qt.PenStyle.NoPen))
        self.setZValue(2)
        self.base_brush = QBrush(COLOURS["job"])
        self.setBrush(self.base_brush)
        self.label = ""  # the id as written on the bar ("" when no room)

    def paint(self, painter: QPainter, option, widget=None) -> None:
        painter.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        painter.setBrush(self.base_brush)
        if self.isSelected():
            painter.setPen(QPen(COLOURS["selected"], 2.5))
        else:
            painter.setPen(QPen(Qt.PenStyle.NoPen))
        painter.drawRoundedRect(self.rect(), 3, 3)


class TimelineView(QGraphicsView):
    """Shows a plan; emits ``job_selected(id)`` when the user picks a job bar."""

    job_selected = Signal(str)
    vehicle_name_requested = Signal(int)  # vehicle number; sent on double-click of its name
    zoom_changed = Signal(int)

    def __init__(self, parent=None, *, pixels_per_hour: int = 90) -> None:
        super().__init__(parent)
        self.setScene(QGraphicsScene(self))
        self.setRenderHint(QPainter.RenderHint.Antialiasing, True)
        self.setAlignment(Qt.AlignmentFlag.AlignLeft | Qt.AlignmentFlag.AlignTop)
        self.setDragMode(QGraphicsView.DragMode.ScrollHandDrag)
        self.setBackgroundBrush(QBrush(QColor("#ffffff")))
        self._px_per_hour = pixels_per_hour
        self._plan: Plan | None = None
        self._names: dict[int, str] = {}
        self._highlight_certificate = False
        self._moves: dict[str, int] = {}  # job id -> seconds, a suggestion shown
        self._bars: dict[str, JobBar] = {}
        self._row_of: dict[str, int] = {}  # job id -> row of its vehicle, made on first need
        self._drawn: set[int] = set()  # rows whose items exist
        self._label_panel: QGraphicsItem | None = None
        self._certificate_ids: set[str] | None = None
        self._bar_font_cache: tuple[QFont, QFontMetricsF] | None = None
        self._pinned_labels: list[QGraphicsItem] = []
        self._pinned_axis: list[QGraphicsItem] = []
        self._t0 = self._t1 = 0
        self._label_width = LABEL_WIDTH
        self._quiet = False
        self._message = "No plan yet."
        self.scene().selectionChanged.connect(self._on_selection)
        self.horizontalScrollBar().valueChanged.connect(self._pin)
        self.verticalScrollBar().valueChanged.connect(self._pin)
        self._rebuild()

    # ------------------------------------------------------------ public
    @property
    def pixels_per_hour(self) -> int:
        return self._px_per_hour

    def set_plan(self, plan: Plan | None, driver_names: dict[int, str] | None = None,
                 *, message: str = "No plan yet.") -> None:
        selected = self.selected_job()
        self._plan = plan
        self._names = dict(driver_names or {})
        self._message = message
        self._moves = {}
        self._rebuild()
        if selected:
            self.select_job(selected)

    def set_certificate_highlight(self, on: bool) -> None:
        self._highlight_certificate = on
        self._colour_bars()

    def set_moves(self, moves: list[tuple[str, int]]) -> None:
        """Show suggested slot moves: the jobs in their own colour and, dashed, where
        they would go (job id, seconds); an empty list clears them."""
        self._moves = dict(moves)
        self._rebuild()
        self.select_jobs([job_id for job_id, _ in moves])

    def job_bar(self, job_id: str) -> JobBar | None:
        self._draw_rows_of([job_id])
        return self._bars.get(job_id)

    def selected_job(self) -> str | None:
        for item in self.scene().selectedItems():
            if isinstance(item, JobBar):
                return item.job_id
        return None

    def select_job(self, job_id: str | None, *, centre: bool = True) -> None:
        """Select (and scroll to) a job without emitting ``job_selected``."""
        self.select_jobs([job_id] if job_id else [], centre=centre)

    def select_jobs(self, job_ids: list[str], *, centre: bool = True) -> None:
        """Select several jobs (e.g. a pair of the proof) without emitting signals."""
        self._quiet = True
        try:
            self.scene().clearSelection()
            self._draw_rows_of(job_ids)
            bars = [self._bars[j] for j in job_ids if j in self._bars]
            for bar in bars:
                bar.setSelected(True)
            if bars and centre:
                self.ensureVisible(bars[0], 60, 40)
        finally:
            self._quiet = False

    def set_pixels_per_hour(self, value: float) -> None:
        value = int(max(MIN_PX_PER_HOUR, min(MAX_PX_PER_HOUR, round(value))))
        if value == self._px_per_hour:
            return
        hours_at_left = self._hours_at(self.viewport().width() / 2)
        self._px_per_hour = value
        selected = self.selected_job()
        self._rebuild()
        self.select_job(selected, centre=False)
        self._scroll_to_hours(hours_at_left, self.viewport().width() / 2)
        self.zoom_changed.emit(value)

    def zoom_in(self) -> None:
        self.set_pixels_per_hour(self._px_per_hour * 1.25)

    def zoom_out(self) -> None:
        self.set_pixels_per_hour(self._px_per_hour / 1.25)

    def zoom_to_fit(self) -> None:
        if self._plan is None or not self._plan.routes:
            return
        hours = self._span_hours()
        width = max(100, self.viewport().width() - self._label_width - LEFT_PAD - 20)
        self.set_pixels_per_hour(width / max(hours, 1))

    # ------------------------------------------------------------ events
    def mouseDoubleClickEvent(self, event) -> None:
        """Double-clicking a vehicle's name asks for its driver's name."""
        pos = event.position()
        if self._plan is not None and pos.x() < self._label_width - 6:
            row = int((self.mapToScene(pos.toPoint()).y() - AXIS_HEIGHT) // ROW_HEIGHT)
            if 0 <= row < self._plan.vehicles and pos.y() > AXIS_HEIGHT:
                self.vehicle_name_requested.emit(row + 1)
                return
        super().mouseDoubleClickEvent(event)

    def wheelEvent(self, event) -> None:
        if event.modifiers() & Qt.KeyboardModifier.ControlModifier:
            x = event.position().x()
            hours = self._hours_at(x)
            factor = 1.25 if event.angleDelta().y() > 0 else 1 / 1.25
            self.set_pixels_per_hour(self._px_per_hour * factor)
            self._scroll_to_hours(hours, x)
            event.accept()
            return
        super().wheelEvent(event)

    def resizeEvent(self, event) -> None:
        super().resizeEvent(event)
        self._pin()

    # ------------------------------------------------------------ geometry
    def _x(self, seconds: int) -> float:
        return self._label_width + LEFT_PAD + (seconds - self._t0) / 3600 * self._px_per_hour

    def _hours_at(self, viewport_x: float) -> float:
        scene_x = self.mapToScene(int(viewport_x), 0).x()
        return (self._t0 / 3600) + (scene_x - self._label_width - LEFT_PAD) / self._px_per_hour

    def _scroll_to_hours(self, hours: float, viewport_x: float) -> None:
        scene_x = self._label_width + LEFT_PAD + (hours - self._t0 / 3600) * self._px_per_hour
        bar = self.horizontalScrollBar()
        bar.setValue(int(scene_x - viewport_x))

    def _span(self) -> tuple[int, int]:
        plan = self._plan
        day = plan.day
        lo, hi = int(day.start.min()), int(day.end.max())
        s = day.settings
        if s.depot is not None:  # the vehicle days: leaving the depot, being back
            d = day.site_index[s.depot]
            first = np.fromiter((r[0] for r in plan.routes), np.int64, len(plan.routes))
            last = np.fromiter((r[-1] for r in plan.routes), np.int64, len(plan.routes))
            lo = min(lo, int((day.start[first] - day.travel[d, day.origin[first]]).min()))
            hi = max(hi, int((day.end[last] + day.travel[day.destination[last], d]).max()))
        for t in (s.day_start, s.day_end):
            if t is not None:
                lo, hi = min(lo, t), max(hi, t)
        return (math.floor(lo / 3600) * 3600, math.ceil(hi / 3600) * 3600)

    def _span_hours(self) -> float:
        lo, hi = self._span()
        return (hi - lo) / 3600

    # ------------------------------------------------------------ drawing
    def _rebuild(self) -> None:
        scene = self.scene()
        self._quiet = True
        scene.clear()
        self._quiet = False
        self._bars, self._row_of, self._drawn = {}, {}, set()
        self._label_panel, self._certificate_ids = None, None
        self._pinned_labels, self._pinned_axis = [], []
        if self._plan is None or not self._plan.routes:
            text = scene.addSimpleText(self._message)
            text.setBrush(QBrush(COLOURS["day"]))
            text.setPos(16, 16)
            scene.setSceneRect(0, 0, 400, 80)
            return
        self._t0, t1 = self._span()
        rows = len(self._plan.routes)
        self._label_width = self._measure_labels(rows)
        width = self._x(t1) + 16
        height = AXIS_HEIGHT + rows * ROW_HEIGHT + 8
        scene.setSceneRect(0, 0, width, height)
        self._t1 = t1
        self._draw_hours(t1, height)
        self._draw_day_limits(height)
        self._draw_label_panel(height)
        self._pin()  # draws the rows in view

    def _draw_rows_in_view(self) -> None:
        """Draw the rows in view and a few more above and below."""
        if self._plan is None or not self._plan.routes or self._label_panel is None:
            return
        top = self.mapToScene(0, 0).y()
        bottom = self.mapToScene(0, self.viewport().height()).y()
        first = int((top - AXIS_HEIGHT) // ROW_HEIGHT) - ROWS_AHEAD
        last = int((bottom - AXIS_HEIGHT) // ROW_HEIGHT) + ROWS_AHEAD
        for k in range(max(0, first), min(len(self._plan.routes), last + 1)):
            self._draw_row(k)

    def _draw_rows_of(self, job_ids) -> None:
        if self._plan is None or self._label_panel is None:
            return
        if not self._row_of:
            jobs = self._plan.day.jobs
            self._row_of = {jobs[j].id: k for k, route in enumerate(self._plan.routes)
                            for j in route}
        for job_id in job_ids:
            row = self._row_of.get(job_id)
            if row is not None:
                self._draw_row(row)

    def _draw_row(self, k: int) -> None:
        """The stripe, the vehicle's day and its name on row k (once)."""
        if k in self._drawn:
            return
        self._drawn.add(k)
        if k % 2:
            self.scene().addRect(QRectF(0, AXIS_HEIGHT + k * ROW_HEIGHT,
                                        self.scene().sceneRect().width(), ROW_HEIGHT),
                                 QPen(Qt.PenStyle.NoPen),
                                 QBrush(COLOURS["stripe"])).setZValue(-2)
        vehicle = vehicle_day(self._plan, k + 1)
        self._draw_route(k, vehicle)
        limit = self._plan.day.settings.max_day
        if limit is not None:
            self._draw_working_day(k, vehicle, limit, self._t1)
        self._draw_label(k)

    def _draw_hours(self, t1: int, height: float) -> None:
        scene = self.scene()
        axis = scene.addRect(QRectF(0, 0, self._x(t1) + 16, AXIS_HEIGHT),
                             QPen(Qt.PenStyle.NoPen), QBrush(COLOURS["axis"]))
        axis.setZValue(5)
        self._pinned_axis.append(axis)
        step = 1 if self._px_per_hour >= 40 else (2 if self._px_per_hour >= 22 else 4)
        grid_pen = QPen(COLOURS["grid"], 1)
        for hour in range(self._t0 // 3600, t1 // 3600 + 1):
            x = self._x(hour * 3600)
            scene.addLine(x, AXIS_HEIGHT, x, height, grid_pen).setZValue(-1)
            if hour % step == 0:
                label = QGraphicsSimpleTextItem(format_day_clock(hour * 3600), axis)
                label.setBrush(QBrush(COLOURS["label"]))
                label.setPos(x - label.boundingRect().width() / 2, 5)
            if self._px_per_hour >= 160:  # quarter-hour ticks when zoomed in
                for q in (1, 2, 3):
                    xq = x + q * self._px_per_hour / 4
                    scene.addLine(xq, AXIS_HEIGHT, xq, height,
                                  QPen(COLOURS["grid"], 1, Qt.PenStyle.DotLine)).setZValue(-1)

    def _draw_day_limits(self, height: float) -> None:
        s = self._plan.day.settings
        pen = QPen(COLOURS["day"], 1.5, Qt.PenStyle.DashLine)
        for t in (s.day_start, s.day_end):
            if t is not None:
                self.scene().addLine(self._x(t), AXIS_HEIGHT, self._x(t), height,
                                     pen).setZValue(0)

    def _draw_route(self, k: int, vehicle) -> None:
        """One vehicle's row: its empty drives (thin bars) and jobs, from the vehicle
        day the printed timeline uses too (:func:`~shipgui.core.fleet.schedule.vehicle_days`)."""
        day = self._plan.day
        scene = self.scene()
        y = AXIS_HEIGHT + k * ROW_HEIGHT + (ROW_HEIGHT - BAR_HEIGHT) / 2
        leg_brush = QBrush(COLOURS["leg"])
        leg_y = y + (BAR_HEIGHT - LEG_HEIGHT) / 2
        for drive in vehicle.drives:
            leg = scene.addRect(QRectF(self._x(drive.start), leg_y,
                                       drive.seconds / 3600 * self._px_per_hour, LEG_HEIGHT),
                                QPen(Qt.PenStyle.NoPen), leg_brush)
            leg.setToolTip(drive_tooltip(day, drive))
            leg.setZValue(1)
        font, metrics = self._bar_font()
        for j in vehicle.jobs:
            job = day.jobs[j]
            rect = QRectF(self._x(job.start), y, (job.end - job.start) / 3600
                          * self._px_per_hour, BAR_HEIGHT)
            if job.id in self._moves:
                self._draw_ghost(job, self._moves[job.id], y)
            bar = JobBar(rect, job.id, job_tooltip(day, job))
            bar.base_brush = QBrush(self._bar_colour(job.id))
            scene.addItem(bar)
            self._bars[job.id] = bar
            shown = bar_label(job.id, metrics, rect.width() - 6)
            if shown:
                text = QGraphicsSimpleTextItem(shown, bar)
                text.setFont(font)
                text.setBrush(QBrush(COLOURS["job_text"]))
                text.setPos(rect.x() + 4, rect.y() + (BAR_HEIGHT - metrics.height()) / 2)
                bar.label = shown

    def _draw_ghost(self, job, shift: int, y: float) -> None:
        """A dashed outline where a suggestion would move the job."""
        rect = QRectF(self._x(job.start + shift), y - 2, (job.end - job.start) / 3600
                      * self._px_per_hour, BAR_HEIGHT + 4)
        ghost = self.scene().addRect(rect, QPen(COLOURS["moved"], 1.5, Qt.PenStyle.DashLine),
                                     QBrush(COLOURS["ghost"]))
        way = "later" if shift > 0 else "earlier"
        ghost.setToolTip(f"Suggested: {job.id} {format_day_clock(job.start + shift)}–"
                         f"{format_day_clock(job.end + shift)} ({format_duration(abs(shift))} "
                         f"{way}); the customer must agree")
        ghost.setZValue(3)

    def _draw_working_day(self, k: int, vehicle, limit: int, t1: int) -> None:
        """A thin band under the row from leaving to being back, the room the limit
        leaves after it, and a mark where the limit would end the day."""
        scene = self.scene()
        no_pen = QPen(Qt.PenStyle.NoPen)
        y = AXIS_HEIGHT + (k + 1) * ROW_HEIGHT - WORKDAY_HEIGHT - 1
        start, end = vehicle.day_start, vehicle.day_end
        stop = min(start + limit, t1)  # beyond the drawn hours the mark is left out
        tip = working_day_tooltip(vehicle, limit)
        room = scene.addRect(QRectF(self._x(end), y, max(0.0, self._x(stop) - self._x(end)),
                                    WORKDAY_HEIGHT), no_pen, QBrush(COLOURS["workday_room"]))
        used = scene.addRect(QRectF(self._x(start), y, self._x(end) - self._x(start),
                                    WORKDAY_HEIGHT), no_pen, QBrush(COLOURS["workday"]))
        for item in (room, used):
            item.setToolTip(tip)
            item.setZValue(1)
        if start + limit <= t1:
            x = self._x(start + limit)
            mark = scene.addRect(QRectF(x - 1, y - 7, 2, WORKDAY_HEIGHT + 7), no_pen,
                                 QBrush(COLOURS["limit"]))
            mark.setToolTip(tip)
            mark.setZValue(1)

    def _bar_font(self) -> tuple[QFont, QFontMetricsF]:
        """The job ids' font (a point smaller) and its metrics, made once."""
        if self._bar_font_cache is None:
            font = QFont()
            font.setPointSizeF(max(7.0, font.pointSizeF() - 1))
            self._bar_font_cache = (font, QFontMetricsF(font))
        return self._bar_font_cache

    def _label(self, k: int) -> str:
        name = self._names.get(k + 1, "")
        return f"Vehicle {k + 1}" + (f" · {name}" if name else "")

    def _measure_labels(self, rows: int) -> float:
        metrics = QFontMetricsF(QFont())
        # Unnamed rows read "Vehicle N": the last one is the widest of them.
        named = [k - 1 for k in self._names if 0 < k <= rows]
        widest = max(metrics.horizontalAdvance(self._label(k)) for k in [rows - 1, *named])
        return min(MAX_LABEL_WIDTH, max(LABEL_WIDTH, widest + 22))

    def _draw_label(self, k: int) -> None:
        metrics = QFontMetricsF(QFont())
        text = metrics.elidedText(self._label(k), Qt.TextElideMode.ElideRight,
                                  self._label_width - 16)
        label = QGraphicsSimpleTextItem(text, self._label_panel)
        label.setBrush(QBrush(COLOURS["label"]))
        label.setPos(6, AXIS_HEIGHT + k * ROW_HEIGHT + (ROW_HEIGHT - metrics.height()) / 2)

    def _draw_label_panel(self, height: float) -> None:
        scene = self.scene()
        panel = scene.addRect(QRectF(0, 0, self._label_width - 6, height),
                              QPen(COLOURS["grid"]), QBrush(QColor("#ffffff")))
        panel.setZValue(6)
        panel.setToolTip("Double-click a vehicle to type its driver's name")
        self._label_panel = panel
        self._pinned_labels.append(panel)
        corner = scene.addRect(QRectF(0, 0, self._label_width - 6, AXIS_HEIGHT),
                               QPen(Qt.PenStyle.NoPen), QBrush(COLOURS["axis"]))
        corner.setZValue(7)
        self._pinned_labels.append(corner)
        self._pinned_axis.append(corner)

    def _bar_colour(self, job_id: str) -> QColor:
        if job_id in self._moves:
            return COLOURS["moved"]
        if not self._highlight_certificate:
            return COLOURS["job"]
        if self._certificate_ids is None:  # the proof's jobs: pairwise, and any weighted
            jobs = self._plan.day.jobs
            self._certificate_ids = set(self._plan.certificate_ids()) | {
                jobs[k].id for k, w in self._plan.certificate_weights if w > 0}
        return COLOURS["certificate" if job_id in self._certificate_ids else "muted"]

    def _colour_bars(self) -> None:
        if self._plan is None:
            return
        for job_id, bar in self._bars.items():
            bar.base_brush = QBrush(self._bar_colour(job_id))
            bar.update()

    def _pin(self, *_args) -> None:
        """Keep the vehicle names and the hour axis in view while scrolling, and
        draw the rows that come into view."""
        self._draw_rows_in_view()
        top_left = self.mapToScene(0, 0)
        for item in self._pinned_labels:
            item.setX(max(0.0, top_left.x()))
        for item in self._pinned_axis:
            item.setY(max(0.0, top_left.y()))

    def _on_selection(self) -> None:
        if self._quiet:
            return
        job_id = self.selected_job()
        if job_id is not None:
            self.job_selected.emit(job_id)
