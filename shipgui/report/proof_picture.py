"""The proof at a glance: the certificate jobs on a time axis.

One bar per job (sorted by start); the jobs running at the busiest moment are
filled and a line marks that moment, so a reader sees at once that they
overlap.  For each other job, its nearest miss is drawn: a dashed line from
the end of the earlier job of the pair to when a vehicle could be at the later
job's start site, and a dotted drop to the later job's row, which lands after
that job has begun: it cannot be reached in time.  Black and grey only.
"""

from __future__ import annotations

import math

from reportlab.graphics.shapes import Drawing, Line, Rect, String
from reportlab.lib import colors
from reportlab.pdfbase.pdfmetrics import stringWidth

from shipgui.core.clock import format_day_clock
from shipgui.core.fleet.explain import closest_partners, pair_reason
from shipgui.core.model import Plan

from .styles import FONT, FONT_BOLD, INK, LIGHT_GREY, MID_GREY
from .text import fit_text

__all__ = ["peak_picture", "MAX_BARS"]

MAX_BARS = 40
ROW = 8.5
BAR = 6.0
LABEL = 58.0
AXIS = 14.0
DARK = colors.Color(0.35, 0.35, 0.35)


def peak_picture(plan: Plan, jobs: list[int], peak: int, width: float) -> Drawing:
    """``jobs`` (day indices, at most :data:`MAX_BARS`) on a time axis; the moment
    ``peak`` (seconds) marked, the jobs running then filled."""
    day = plan.day
    jobs = sorted(jobs, key=lambda k: (int(day.start[k]), k))
    reach = _reach_lines(plan, jobs, peak)
    times = [int(day.start[k]) for k in jobs] + [int(day.end[k]) for k in jobs]
    times += [t for _, _, t in reach] + [peak]
    first, last = math.floor(min(times) / 3600), math.ceil(max(times) / 3600)
    last = max(last, first + 1)
    height = AXIS * 2 + ROW * len(jobs) + 4
    picture = Drawing(width, height)
    span = width - LABEL - 8

    def x(seconds: float) -> float:
        return LABEL + (seconds / 3600 - first) / (last - first) * span

    top = height - AXIS
    _axis(picture, x, first, last, top, AXIS)
    for row, k in enumerate(jobs):
        y = top - (row + 1) * ROW + (ROW - BAR) / 2
        running = int(day.start[k]) <= peak < int(day.end[k])
        picture.add(String(LABEL - 4, y + 0.8, fit_text(day.jobs[k].id, FONT, 6, LABEL - 6),
                           fontName=FONT, fontSize=6, textAnchor="end"))
        picture.add(Rect(x(int(day.start[k])), y, max(x(int(day.end[k])) - x(int(day.start[k])),
                                                      1.2), BAR, strokeColor=INK,
                         strokeWidth=0.5, fillColor=DARK if running else colors.white))
    for a, b, arrive in reach:
        y = top - (jobs.index(a) + 1) * ROW + ROW / 2
        y_next = top - (jobs.index(b) + 1) * ROW + ROW / 2
        picture.add(Line(x(int(day.end[a])), y, x(arrive), y, strokeColor=INK,
                         strokeWidth=0.7, strokeDashArray=[2, 1.2]))
        picture.add(Line(x(arrive), y, x(arrive), y_next, strokeColor=MID_GREY,
                         strokeWidth=0.5, strokeDashArray=[0.6, 1.0]))
        picture.add(Line(x(arrive) - 1.5, y_next, x(arrive) + 1.5, y_next, strokeColor=INK,
                         strokeWidth=0.9))
    px = x(peak)
    picture.add(Line(px, AXIS, px, top, strokeColor=INK, strokeWidth=0.9))
    picture.add(String(px + 2, top + 3.5, f"{format_day_clock(peak)}", fontName=FONT_BOLD,
                       fontSize=6.5))
    return picture


def _reach_lines(plan: Plan, jobs: list[int], peak: int) -> list[tuple[int, int, int]]:
    """(earlier job, later job, when a vehicle could be at the later one's start site)
    for the nearest miss of each job not running at ``peak``."""
    day = plan.day
    partners = closest_partners(day, jobs)
    lines = {}
    for a, p in zip(jobs, partners.tolist()):
        if p < 0 or int(day.start[a]) <= peak < int(day.end[a]):
            continue
        reason = pair_reason(day, a, jobs[p])
        if reason.kind in ("short", "fits"):
            lines[(reason.first, reason.second)] = reason.arrive
    return [(a, b, arrive) for (a, b), arrive in sorted(lines.items())]


def _axis(picture: Drawing, x, first: int, last: int, top: float, bottom: float) -> None:
    step = 1 if last - first <= 16 else 2
    for hour in range(first, last + 1):
        major = hour % 24 == 0
        picture.add(Line(x(hour * 3600), bottom, x(hour * 3600), top,
                         strokeColor=MID_GREY if major else LIGHT_GREY,
                         strokeWidth=0.8 if major else 0.3))
        if (hour - first) % step == 0:
            label = f"{hour % 24:02d}" + (" +1" if hour >= 24 and major else "")
            width = stringWidth(label, FONT, 6)
            picture.add(String(x(hour * 3600) - width / 2, bottom - 8, label, fontName=FONT,
                               fontSize=6))
