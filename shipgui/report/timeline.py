"""The timeline picture: one row per vehicle, a box per job, dashed empty driving.

Vector graphics in black and grey only, so it prints clearly in black and white.
The picture is a flowable that splits between rows when it does not fit a
page; every part repeats the hour axis and the legend, so each printed page
reads on its own.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from reportlab.graphics import renderPDF
from reportlab.graphics.shapes import Drawing, Line, Rect, String
from reportlab.lib import colors
from reportlab.pdfbase.pdfmetrics import stringWidth
from reportlab.platypus import Flowable

from shipgui.core.fleet.schedule import vehicle_days
from shipgui.core.model import Plan

from .styles import FAINT_GREY, FONT, FONT_BOLD, INK, LIGHT_GREY, MID_GREY

__all__ = ["TimelineRow", "timeline_rows", "Timeline"]

ROW_HEIGHT = 15.0
BAR_HEIGHT = 10.5
LABEL_WIDTH = 34.0
AXIS_HEIGHT = 14.0
LEGEND_HEIGHT = 20.0
ID_SIZE = 6.5
MIN_ROWS_PER_PART = 4


@dataclass(frozen=True)
class TimelineRow:
    """What one vehicle row shows: jobs (start, end, id) and empty drives (from, to)."""

    vehicle: int
    jobs: tuple[tuple[int, int, str], ...]
    empty_drives: tuple[tuple[int, int], ...]


def timeline_rows(plan: Plan) -> list[TimelineRow]:
    """One row per vehicle, from the shared vehicle-day builder
    (:func:`shipgui.core.fleet.schedule.vehicle_days`): an empty drive ends at the
    start of the job it leads to (the latest the driver can leave); the drive back
    to the depot starts when the last job ends."""
    day = plan.day
    return [TimelineRow(v.vehicle,
                        tuple((day.jobs[k].start, day.jobs[k].end, day.jobs[k].id)
                              for k in v.jobs),
                        tuple((d.start, d.end) for d in v.drives))
            for v in vehicle_days(plan)]


def _hour_range(rows: list[TimelineRow]) -> tuple[int, int]:
    times = [t for row in rows for job in row.jobs for t in job[:2]]
    times += [t for row in rows for drive in row.empty_drives for t in drive]
    first = math.floor(min(times) / 3600) if times else 0
    last = math.ceil(max(times) / 3600) if times else 1
    return first, max(last, first + 1)


class Timeline(Flowable):
    """The timeline of ``rows``; all parts of one picture share ``hours``."""

    def __init__(self, rows: list[TimelineRow], hours: tuple[int, int] | None = None):
        super().__init__()
        self.rows = rows
        self.hours = hours or _hour_range(rows)
        self.width = 0.0

    def _fixed_height(self) -> float:
        return 2 * AXIS_HEIGHT + LEGEND_HEIGHT

    def wrap(self, available_width, available_height):
        self.width = available_width
        return available_width, self._fixed_height() + ROW_HEIGHT * len(self.rows)

    def split(self, available_width, available_height):
        fits = int((available_height - self._fixed_height()) // ROW_HEIGHT)
        if fits >= len(self.rows):
            return [self]
        if fits < MIN_ROWS_PER_PART:
            return []
        return [Timeline(self.rows[:fits], self.hours), Timeline(self.rows[fits:], self.hours)]

    def draw(self):
        renderPDF.draw(self.drawing(), self.canv, 0, 0)

    def drawing(self) -> Drawing:
        """The part as a reportlab graphics Drawing (also handy to look at in tests)."""
        height = self._fixed_height() + ROW_HEIGHT * len(self.rows)
        picture = Drawing(self.width, height)
        top = height - AXIS_HEIGHT
        bottom = LEGEND_HEIGHT + AXIS_HEIGHT
        for k in range(len(self.rows)):
            if k % 2 == 1:
                picture.add(Rect(0, top - (k + 1) * ROW_HEIGHT, self.width, ROW_HEIGHT,
                                 fillColor=FAINT_GREY, strokeColor=None))
        self._draw_axis(picture, top, bottom)
        for k, row in enumerate(self.rows):
            self._draw_row(picture, row, top - (k + 1) * ROW_HEIGHT)
        self._draw_legend(picture)
        return picture

    def _x(self, seconds: float) -> float:
        first, last = self.hours
        span = self.width - LABEL_WIDTH - 6
        return LABEL_WIDTH + (seconds / 3600 - first) / (last - first) * span

    def _draw_axis(self, picture: Drawing, top: float, bottom: float) -> None:
        first, last = self.hours
        step = 1 if last - first <= 26 else 2
        picture.add(String(LABEL_WIDTH - 12, top + 4, "Veh.", fontName=FONT_BOLD,
                           fontSize=7, textAnchor="end"))
        for hour in range(first, last + 1):
            x = self._x(hour * 3600)
            major = hour % 6 == 0
            picture.add(Line(x, bottom, x, top, strokeColor=MID_GREY if major else LIGHT_GREY,
                             strokeWidth=0.6 if major else 0.35))
            if (hour - first) % step == 0:
                label = f"{hour % 24:02d}" + (f" {hour // 24:+d}" if hour % 24 == 0 and hour
                                              else "")
                for y in (top + 4, bottom - 10):
                    picture.add(String(x, y, label, fontName=FONT, fontSize=7,
                                       textAnchor="middle", fillColor=INK))

    def _draw_row(self, picture: Drawing, row: TimelineRow, y: float) -> None:
        mid = y + ROW_HEIGHT / 2
        picture.add(String(LABEL_WIDTH - 4, mid - 2.5, str(row.vehicle), fontName=FONT_BOLD,
                           fontSize=7.5, textAnchor="end"))
        for a, b in row.empty_drives:
            picture.add(Line(self._x(a), mid, self._x(b), mid, strokeColor=INK,
                             strokeWidth=1.1, strokeDashArray=[2.2, 1.6]))
        for start, end, job_id in row.jobs:
            x0 = self._x(start)
            width = max(self._x(end) - x0, 1.5)
            picture.add(Rect(x0, mid - BAR_HEIGHT / 2, width, BAR_HEIGHT,
                             fillColor=colors.white, strokeColor=INK, strokeWidth=0.6))
            if stringWidth(job_id, FONT, ID_SIZE) <= width - 2:
                picture.add(String(x0 + width / 2, mid - 2.2, job_id, fontName=FONT,
                                   fontSize=ID_SIZE, textAnchor="middle", fillColor=INK))

    def _draw_legend(self, picture: Drawing) -> None:
        y = 4
        x = LABEL_WIDTH
        picture.add(Rect(x, y, 26, BAR_HEIGHT, fillColor=colors.white, strokeColor=INK,
                         strokeWidth=0.6))
        picture.add(String(x + 13, y + 3, "J1", fontName=FONT, fontSize=ID_SIZE,
                           textAnchor="middle"))
        x += 32
        x = self._legend_text(picture, x, y, "job (id shown when it fits)") + 14
        picture.add(Line(x, y + BAR_HEIGHT / 2, x + 26, y + BAR_HEIGHT / 2, strokeColor=INK,
                         strokeWidth=1.1, strokeDashArray=[2.2, 1.6]))
        self._legend_text(picture, x + 32, y, "empty driving, drawn up to the job it leads to "
                          "(after the last job: back to the depot)")

    @staticmethod
    def _legend_text(picture: Drawing, x: float, y: float, text: str) -> float:
        picture.add(String(x, y + 3, text, fontName=FONT, fontSize=7))
        return x + stringWidth(text, FONT, 7)
