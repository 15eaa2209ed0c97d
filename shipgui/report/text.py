"""Turning plan data into printable text.

Everything that came from an input file is user text, and three things can go
wrong with it on paper, each handled here once:

* markup: a Paragraph would read ``<b>R&D`` as a tag, so user text is escaped
  (:func:`esc`) and prints literally;
* characters the embedded font lacks (emoji, Chinese, Japanese, Korean) would
  print as empty boxes: compatibility forms are replaced by their plain
  equivalent (full-width ``Ａ１`` prints as ``A1``), anything else by a visible
  name in brackets (``[delivery truck]``, ``[U+4E2D]``) (:func:`printable`);
* length: a value may hold 10 000 characters, and a table row taller than a
  page cannot be laid out, so every user value is cut to a length that suits
  its place, with a mark that says so (:func:`clip`); words longer than a line
  are broken by the paragraph styles (``splitLongWords``).
"""

from __future__ import annotations

import math
import unicodedata
from datetime import date, timedelta
from functools import cache
from xml.sax.saxutils import escape

from reportlab.pdfbase import pdfmetrics
from reportlab.pdfbase.pdfmetrics import stringWidth

from shipgui.core.clock import day_mark, format_day_clock, format_duration
from shipgui.core.model import Day, Job

from .styles import FONT, FONT_BOLD, register_fonts

__all__ = ["esc", "esc_lines", "printable", "clip", "late_text", "slot_text", "site_block",
           "fit_text", "plan_date_text", "date_text", "day_mark_note", "source_names",
           "clock_down", "clock_up", "drive_minutes", "LIMITS"]

# Characters of one user value printed in each kind of place (more is cut with a mark).
LIMITS = {"label": 40, "id": 60, "name": 160, "text": 300, "notes": 800, "warning": 400,
          "file": 120}
_ELLIPSIS = "\u2026"


def esc(text: object, limit: int | None = None) -> str:
    """User text made safe for Paragraph markup (``&``, ``<``, ``>`` and quotes),
    printable in the embedded font, and cut to ``limit`` characters if given."""
    text = printable(str(text))
    if limit is not None:
        text = clip(text, limit)
    return escape(text, {'"': "&quot;"})


def esc_lines(text: str, limit: int | None = None) -> str:
    """Like :func:`esc`, keeping the writer's line breaks."""
    text = clip(str(text), limit) if limit is not None else str(text)
    return "<br/>".join(esc(line) for line in text.splitlines())


def clip(text: str, limit: int) -> str:
    """``text`` cut to about ``limit`` characters, with a mark saying how long it was."""
    if len(text) <= limit:
        return text
    return f"{text[:limit].rstrip()}{_ELLIPSIS} [cut: {len(text):,} characters in all]"


@cache
def _glyphs() -> frozenset[int]:
    """Code points both embedded faces can draw."""
    register_fonts()
    faces = [pdfmetrics.getFont(name).face for name in (FONT, FONT_BOLD)]
    return frozenset(faces[0].charToGlyph).intersection(*(f.charToGlyph for f in faces[1:]))


def printable(text: str) -> str:
    """``text`` with every character the font cannot draw replaced visibly."""
    glyphs = _glyphs()
    if all(ord(ch) in glyphs or ch in "\n\t" for ch in text):
        return text
    return "".join(ch if ord(ch) in glyphs or ch in "\n\t" else _stand_in(ch) for ch in text)


@cache
def _stand_in(ch: str) -> str:
    """What prints for a character the font lacks: its plain form where Unicode has
    one (full-width letters and digits), nothing for invisible joiners and
    variation selectors, else its name or code point in brackets."""
    plain = unicodedata.normalize("NFKC", ch)
    if plain != ch and all(ord(c) in _glyphs() for c in plain):
        return plain
    if unicodedata.category(ch) in ("Mn", "Me", "Cf", "Sk") or 0xFE00 <= ord(ch) <= 0xFE0F:
        return ""  # combining marks, zero-width joiners, emoji modifiers and selectors
    name = unicodedata.name(ch, "")
    if unicodedata.category(ch) == "So" and name:  # emoji and other symbols: say which
        return f"[{name.lower()}]"
    return f"[U+{ord(ch):04X}]"


def late_text(seconds_short: int) -> str:
    """How late a vehicle would be; never rounds a shortfall down to zero."""
    return format_duration(max(seconds_short, 1))


def slot_text(job: Job) -> str:
    return f"{format_day_clock(job.start)}\u2013{format_day_clock(job.end)}"


def site_block(day: Day, site_id: str, *, address_size: float = 7,
               details: bool = False) -> str:
    """Paragraph markup: the site's name in bold, its address (if known) small below,
    and with ``details`` the contact, phone, opening hours and access notes."""
    site = day.sites.get(site_id)
    lines = [f"<b>{esc(day.site_label(site_id), LIMITS['name'])}</b>"]
    small = []
    if site is not None and site.address:
        small.append(esc(site.address, LIMITS["name"]))
    if details and site is not None:
        person = " \u00b7 ".join(esc(v, LIMITS["name"]) for v in (site.contact, site.phone)
                                 if v)
        if person:
            small.append(person)
        if site.opening_hours:
            small.append("Open: " + esc(site.opening_hours, LIMITS["name"]))
        if site.access_notes:
            small.append("Access: " + esc(site.access_notes, LIMITS["text"]))
    lines += [f"<font size={address_size}>{line}</font>" for line in small]
    return "<br/>".join(lines)


def fit_text(text: str, font: str, size: float, width: float) -> str:
    """``text`` cut with an ellipsis so that it fits ``width`` points (canvas drawing)."""
    text = printable(text)
    if stringWidth(text, font, size) <= width:
        return text
    low, high = 0, min(len(text), int(width / (size * 0.2)) + 1)  # no glyph is narrower
    while low < high:  # the longest prefix that fits with the ellipsis
        middle = (low + high + 1) // 2
        if stringWidth(text[:middle] + _ELLIPSIS, font, size) <= width:
            low = middle
        else:
            high = middle - 1
    return text[:low] + _ELLIPSIS if low else ""


def date_text(value: date) -> str:
    """A date as printed: weekday and ISO date, 'Mon 2026-03-02'."""
    return f"{value:%a} {value.isoformat()}"


def plan_date_text(day: Day) -> str:
    return date_text(day.plan_date) if day.plan_date else "not given"


def day_mark_note(day: Day, times) -> str:
    """A line explaining the day marks among ``times`` (seconds), or ''."""
    marks = sorted({day_mark(t) for t in times} - {""}, key=int)
    if not marks:
        return ""
    parts = []
    for mark in marks:
        when = {"+1": "the next day", "-1": "the day before"}.get(mark, f"{mark} days")
        if day.plan_date is not None:
            when += f", {date_text(day.plan_date + timedelta(days=int(mark)))}"
        parts.append(f"\u201c{mark}\u201d: {when}")
    return "Times marked " + "; ".join(parts) + "."


def clock_down(seconds: int) -> str:
    """A clock time to the whole minute, earlier: for when to leave."""
    return format_day_clock(seconds - seconds % 60)


def clock_up(seconds: int) -> str:
    """A clock time to the whole minute, later: for when the vehicle is back."""
    return format_day_clock(math.ceil(seconds / 60) * 60)


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
