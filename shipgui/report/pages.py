"""Page templates: every page gets a header naming its section and a footer with the
page count, plan date, input fingerprint and the caution line.

Sections mark their first page with a zero-size :class:`SectionStart`; the
header is drawn at the end of each page, so a page that did not start a section
knows it is a continuation ("Vehicle 3 (continued)").  "Page x of y" is drawn
when the document is saved, once the total is known.
"""

from __future__ import annotations

from reportlab.pdfgen.canvas import Canvas
from reportlab.platypus import BaseDocTemplate, Flowable, Frame, PageTemplate

from shipgui.core.caution import CAUTION

from .styles import (
    FONT,
    FONT_BOLD,
    FOOTER_HEIGHT,
    HEADER_HEIGHT,
    INK,
    MARGIN,
    MID_GREY,
    PAGE_SIZE,
)
from .text import fit_text

__all__ = ["CAUTION", "SectionStart", "PlanDocTemplate", "PAGE_TEMPLATES"]


PAGE_TEMPLATES = ("summary", "route", "certificate")


class SectionStart(Flowable):
    """Zero-size marker: the page it lands on starts a section with this header."""

    def __init__(self, title: str, *, detail: str = "", continued: str | None = None):
        super().__init__()
        self.title = title
        self.detail = detail
        self.continued = continued or f"{title} (continued)"

    def wrap(self, available_width, available_height):
        return 0, 0

    def draw(self):
        pass


class _PageCountCanvas(Canvas):
    """Holds pages back until save so each can say "page x of y"."""

    def __init__(self, *args, **kwargs):
        super().__init__(*args, **kwargs)
        self._held_pages: list[dict] = []

    def showPage(self):
        self._held_pages.append(dict(self.__dict__))
        self._startPage()

    def save(self):
        total = len(self._held_pages)
        for state in self._held_pages:
            self.__dict__.update(state)
            self.setFont(FONT, 8)
            self.setFillColor(INK)
            self.drawRightString(PAGE_SIZE[0] - MARGIN, MARGIN,
                                 f"page {self._pageNumber} of {total}")
            super().showPage()
        super().save()


class PlanDocTemplate(BaseDocTemplate):
    """A4 document with one named page template per section of the plan."""

    def __init__(self, target, *, plan_date: str, fingerprint: str, title: str):
        super().__init__(target, pagesize=PAGE_SIZE, leftMargin=MARGIN, rightMargin=MARGIN,
                         topMargin=MARGIN + HEADER_HEIGHT,
                         bottomMargin=MARGIN + FOOTER_HEIGHT, invariant=1,
                         title=title, author="shipgui", creator="shipgui",
                         subject="Vehicle plan, route sheets and proof of minimum fleet")
        self.plan_date = plan_date
        self.fingerprint = fingerprint
        self._section: SectionStart | None = None
        self._section_page = 0
        frame = Frame(self.leftMargin, self.bottomMargin, self.width, self.height,
                      leftPadding=0, rightPadding=0, topPadding=0, bottomPadding=0, id="body")
        self.addPageTemplates([PageTemplate(id=name, frames=[frame], onPageEnd=self._decorate)
                               for name in PAGE_TEMPLATES])

    def afterFlowable(self, flowable):
        if isinstance(flowable, SectionStart):
            self._section = flowable
            self._section_page = self.page

    def build_story(self, story) -> None:
        self.build(story, canvasmaker=_PageCountCanvas)

    def _decorate(self, canv: Canvas, doc) -> None:
        canv.saveState()
        self._draw_header(canv)
        self._draw_footer(canv)
        canv.restoreState()

    def _draw_header(self, canv: Canvas) -> None:
        section = self._section
        if section is None:
            return
        first = self._section_page == self.page
        width, height = PAGE_SIZE
        top = height - MARGIN - 11
        left_width = (width - 2 * MARGIN) * 0.6
        canv.setFillColor(INK)
        canv.setFont(FONT_BOLD, 11)
        canv.drawString(MARGIN, top, fit_text(section.title if first else section.continued,
                                              FONT_BOLD, 11, left_width))
        canv.setFont(FONT, 9)
        canv.drawRightString(width - MARGIN, top,
                             fit_text(section.detail, FONT, 9, width - 2 * MARGIN - left_width))
        canv.setStrokeColor(INK)
        canv.setLineWidth(0.6)
        canv.line(MARGIN, top - 5, width - MARGIN, top - 5)

    def _draw_footer(self, canv: Canvas) -> None:
        width = PAGE_SIZE[0]
        base = MARGIN
        canv.setStrokeColor(MID_GREY)
        canv.setLineWidth(0.4)
        canv.line(MARGIN, base + 22, width - MARGIN, base + 22)
        canv.setFillColor(INK)
        canv.setFont(FONT, 7.5)
        canv.drawString(MARGIN, base + 12, CAUTION)
        canv.setFont(FONT, 8)
        canv.drawString(MARGIN, base, f"Plan date: {self.plan_date}  \u00b7  "
                                      f"input fingerprint {self.fingerprint}")
