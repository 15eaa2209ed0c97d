"""Small invented days for the PDF tests (all names made up), and helpers to read a
PDF back with pypdf."""

from __future__ import annotations

import io
import re

import pypdf

from shipgui.core import Settings, build_day
from shipgui.core.model import Job, Site

MIN = 60
HOUR = 3600


def make_day(jobs, sites=(), travel=None, *, settings=None, **kwargs):
    """``build_day`` with travel given in minutes: {(a, b): minutes}."""
    travel_seconds = {pair: (minutes * MIN, 0) for pair, minutes in (travel or {}).items()}
    return build_day(list(jobs), list(sites), travel_seconds,
                     settings=settings or Settings(turnaround=5 * MIN), **kwargs)


def two_site_travel(a="A", b="B", minutes=30):
    return {(a, b): minutes, (b, a): minutes}


def small_day():
    """Five jobs between a yard and two sites; three vehicles are needed."""
    sites = [Site("YARD", "Fernhollow yard", "2 Quarry Lane, Fernhollow"),
             Site("A", "Pelling mill", "14 Weir Street, Pelling"),
             Site("B", "Ashgrove school", "")]
    travel = {("YARD", "A"): 20, ("A", "YARD"): 20, ("YARD", "B"): 25, ("B", "YARD"): 25,
              ("A", "B"): 30, ("B", "A"): 30}
    jobs = [
        Job("K1", "A", "B", 7 * HOUR, 8 * HOUR, customer="Tallow & Sons", reference="R-1"),
        Job("K2", "B", "A", 7 * HOUR + 15 * MIN, 8 * HOUR, customer="Brackwater Farm"),
        Job("K3", "A", "A", 7 * HOUR + 30 * MIN, 9 * HOUR, notes="Ring at the side gate"),
        Job("K4", "B", "B", 9 * HOUR, 10 * HOUR),
        Job("K5", "A", "B", 10 * HOUR, 11 * HOUR),
    ]
    settings = Settings(turnaround=5 * MIN, depot="YARD", day_start=5 * HOUR,
                        day_end=20 * HOUR)
    return make_day(jobs, sites, travel, settings=settings)


def page_texts(data: bytes) -> list[str]:
    return [page.extract_text() for page in pypdf.PdfReader(io.BytesIO(data)).pages]


_ROUTE = re.compile(r"Route sheet \u2014 vehicle (\d+) of (\d+)")
_CONTINUED = re.compile(r"Vehicle (\d+) \(continued\)")


def classify(text: str) -> tuple[str, int]:
    """(section, vehicle number or 0) of a page, read from its header."""
    if "Vehicle plan \u2014 summary" in text or "Vehicle plan \u2014 timeline" in text:
        return "summary", 0
    if m := _ROUTE.search(text):
        return "route", int(m[1])
    if m := _CONTINUED.search(text):
        return "route", int(m[1])
    if "Proof that the fleet is minimum" in text:
        return "certificate", 0
    raise AssertionError(f"page without a known header: {text[:200]!r}")


def sections(texts: list[str]) -> dict[tuple[str, int], list[int]]:
    """Page indices of each section, in order."""
    found: dict[tuple[str, int], list[int]] = {}
    for index, text in enumerate(texts):
        found.setdefault(classify(text), []).append(index)
    return found


def ids_in(text: str, ids) -> set[str]:
    """Which of ``ids`` occur in ``text`` as whole tokens."""
    return {i for i in ids if re.search(rf"(?<![\w-]){re.escape(i)}(?![\w-])", text)}
