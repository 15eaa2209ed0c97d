"""The one stylesheet of the printed plan: fonts, page geometry, paragraph and table styles.

Plain and print-friendly: black text on white, greys only, so every page reads the
same on a black-and-white office printer.  The font is DejaVu Sans, shipped in
``fonts/`` with its licence, because the built-in PDF fonts cannot print Greek,
Cyrillic or most accented Latin letters.
"""

from __future__ import annotations

from functools import cache
from pathlib import Path

from reportlab.lib import colors
from reportlab.lib.enums import TA_CENTER, TA_RIGHT
from reportlab.lib.pagesizes import A4
from reportlab.lib.styles import ParagraphStyle
from reportlab.lib.units import mm
from reportlab.pdfbase import pdfmetrics
from reportlab.pdfbase.ttfonts import TTFont
from reportlab.platypus import CondPageBreak, Flowable, Paragraph

__all__ = ["FONT", "FONT_BOLD", "PAGE_SIZE", "MARGIN", "HEADER_HEIGHT", "FOOTER_HEIGHT",
           "FRAME_WIDTH", "INK", "MID_GREY", "LIGHT_GREY", "FAINT_GREY", "register_fonts",
           "styles", "heading", "grid_table_style"]

FONT = "ShipguiSans"
FONT_BOLD = "ShipguiSans-Bold"
_FONT_DIR = Path(__file__).resolve().parent / "fonts"

PAGE_SIZE = A4
MARGIN = 15 * mm
HEADER_HEIGHT = 12 * mm
FOOTER_HEIGHT = 13 * mm
FRAME_WIDTH = PAGE_SIZE[0] - 2 * MARGIN

INK = colors.black
MID_GREY = colors.Color(0.45, 0.45, 0.45)
LIGHT_GREY = colors.Color(0.82, 0.82, 0.82)
FAINT_GREY = colors.Color(0.93, 0.93, 0.93)


@cache
def register_fonts() -> None:
    """Register the shipped TrueType fonts with reportlab (once per process)."""
    pdfmetrics.registerFont(TTFont(FONT, str(_FONT_DIR / "DejaVuSans.ttf")))
    pdfmetrics.registerFont(TTFont(FONT_BOLD, str(_FONT_DIR / "DejaVuSans-Bold.ttf")))
    # <b> inside a paragraph picks the bold face; there is no italic face shipped,
    # so italic falls back to the upright faces rather than failing.
    pdfmetrics.registerFontFamily(FONT, normal=FONT, bold=FONT_BOLD, italic=FONT,
                                  boldItalic=FONT_BOLD)


def _style(name: str, size: float, *, bold: bool = False, leading: float | None = None,
           **extra) -> ParagraphStyle:
    extra.setdefault("textColor", INK)
    return ParagraphStyle(name, fontName=FONT_BOLD if bold else FONT, fontSize=size,
                          leading=leading or round(size * 1.25, 1), **extra)


@cache
def styles() -> dict[str, ParagraphStyle]:
    """Named paragraph styles; built once, never modified by callers."""
    register_fonts()
    return {
        "title": _style("title", 17, bold=True, spaceAfter=4),
        "heading": _style("heading", 12, bold=True, spaceBefore=8, spaceAfter=4),
        "body": _style("body", 9.5, spaceAfter=4),
        "small": _style("small", 8, textColor=MID_GREY),
        "cell": _style("cell", 8.5, leading=10.5),
        "cell_small": _style("cell_small", 7.5, leading=9),
        "cell_head": _style("cell_head", 7.5, bold=True, leading=9),
        "cell_head_right": _style("cell_head_right", 7.5, bold=True, leading=9,
                                  alignment=TA_RIGHT),
        "cell_right": _style("cell_right", 8.5, leading=10.5, alignment=TA_RIGHT),
        "done": _style("done", 8.5, leading=17),
        "cell_center": _style("cell_center", 8.5, leading=10.5, alignment=TA_CENTER),
        "fact_label": _style("fact_label", 9, textColor=MID_GREY, leading=11.5),
        "fact_value": _style("fact_value", 9.5, leading=12),
        "time_big": _style("time_big", 13, bold=True, leading=15),
        "vehicle": _style("vehicle", 24, bold=True, leading=28),
        "driver": _style("driver", 12, leading=15),
        "box_label": _style("box_label", 7.5, textColor=MID_GREY, leading=9),
        "box_value": _style("box_value", 15, bold=True, leading=18),
        "statement": _style("statement", 11, bold=True, leading=14.5, spaceBefore=4,
                            spaceAfter=6),
    }


def heading(text: str, *, room: float = 100) -> list[Flowable]:
    """A section heading that starts a new page unless ``room`` points fit below it,
    so a heading is never left alone at the foot of a page."""
    return [CondPageBreak(room + 30), Paragraph(text, styles()["heading"])]


def grid_table_style(header_rows: int = 1) -> list[tuple]:
    """Commands shared by every ruled table: light rules, shaded repeated header."""
    return [
        ("FONT", (0, 0), (-1, -1), FONT, 8.5),
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("LINEBELOW", (0, 0), (-1, header_rows - 1), 0.8, INK),
        ("LINEBELOW", (0, header_rows), (-1, -1), 0.4, LIGHT_GREY),
        ("BACKGROUND", (0, 0), (-1, header_rows - 1), FAINT_GREY),
        ("LEFTPADDING", (0, 0), (-1, -1), 3),
        ("RIGHTPADDING", (0, 0), (-1, -1), 3),
        ("TOPPADDING", (0, 0), (-1, -1), 3),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 3),
    ]
