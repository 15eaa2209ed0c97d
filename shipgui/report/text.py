"""Turning plan data into printable text.

Everything that came from an input file is user text: it is escaped before it
goes into a Paragraph (whose markup would otherwise read ``<b>R&D`` as a tag),
so any customer, site or note prints literally and never breaks the build.
"""

from __future__ import annotations

import math
from xml.sax.saxutils import escape

from reportlab.pdfbase.pdfmetrics import stringWidth

from shipgui.core import format_clock
from shipgui.core.clock import format_duration as duration_text
from shipgui.core.model import Day, Job

__all__ = ["esc", "esc_lines", "duration_text", "late_text", "slot_text", "site_block",
           "fit_text", "plan_date_text", "source_names", "clock_down", "clock_up",
           "drive_minutes"]


def esc(text: object) -> str:
    """User text made safe for Paragraph markup (``&``, ``<``, ``>`` and quotes)."""
    return escape(str(text), {'"': "&quot;"})


def esc_lines(text: str) -> str:
    """Like :func:`esc`, keeping the writer's line breaks."""
    return "<br/>".join(esc(line) for line in str(text).splitlines())


def late_text(seconds_short: int) -> str:
    """How late a vehicle would be; never rounds a shortfall down to zero."""
    return duration_text(max(seconds_short, 1))


def slot_text(job: Job) -> str:
    return f"{format_clock(job.start)}\u2013{format_clock(job.end)}"


def site_block(day: Day, site_id: str, *, address_size: float = 7) -> str:
    """Paragraph markup: the site's name in bold, its address (if known) small below."""
    site = day.sites.get(site_id)
    name = f"<b>{esc(day.site_label(site_id))}</b>"
    if site is not None and site.address:
        return f"{name}<br/><font size={address_size}>{esc(site.address)}</font>"
    return name


def fit_text(text: str, font: str, size: float, width: float) -> str:
    """``text`` cut with an ellipsis so that it fits ``width`` points (canvas drawing)."""
    if stringWidth(text, font, size) <= width:
        return text
    while text and stringWidth(text + "\u2026", font, size) > width:
        text = text[:-1]
    return text + "\u2026" if text else ""


def plan_date_text(day: Day) -> str:
    return day.plan_date.isoformat() if day.plan_date else "not given"


def clock_down(seconds: int) -> str:
    """A clock time to the whole minute, earlier: for when to leave."""
    return format_clock(seconds - seconds % 60)


def clock_up(seconds: int) -> str:
    """A clock time to the whole minute, later: for when the vehicle is back."""
    return format_clock(math.ceil(seconds / 60) * 60)


def drive_minutes(seconds: int) -> str:
    """An estimated drive in whole minutes, rounded up so a driver is never short."""
    return f"{math.ceil(seconds / 60)} min"


def source_names(day: Day) -> list[tuple[str, str]]:
    """(kind, file name) of each input file; folders are left out to keep lines short."""
    names = []
    for kind in ("jobs", "sites", "travel"):
        path = day.sources.get(kind)
        if path:
            names.append((kind, str(path).replace("\\", "/").rsplit("/", 1)[-1]))
    return names
