"""The shipped font: present with its licence, and registered under our own names."""

from __future__ import annotations

from pathlib import Path

from reportlab.pdfbase import pdfmetrics

import shipgui.report
from shipgui.report.styles import FONT, FONT_BOLD, register_fonts

FONT_DIR = Path(shipgui.report.__file__).parent / "fonts"


def test_fonts_and_licence_ship_with_the_package():
    for name in ("DejaVuSans.ttf", "DejaVuSans-Bold.ttf"):
        assert (FONT_DIR / name).stat().st_size > 100_000
    licence = (FONT_DIR / "LICENSE").read_text(encoding="utf-8")
    assert "Bitstream" in licence and "Permission is hereby granted" in licence


def test_font_covers_greek_cyrillic_and_polish():
    register_fonts()
    for font in (FONT, FONT_BOLD):
        face = pdfmetrics.getFont(font).face
        for ch in "ΖωήПётрŁódźŚciółka☐→–·":
            assert ord(ch) in face.charToGlyph, (font, ch)
