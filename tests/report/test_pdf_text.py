"""User text prints literally: markup characters, accents, Greek, Cyrillic, long notes."""

from __future__ import annotations

import string

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from shipgui.core import Settings, solve_day
from shipgui.core.model import Job, Site
from shipgui.report import build_pdf_bytes
from tests.support.pdf import HOUR, ids_in, make_day, page_texts, sections

NAMES = ["Ζωή Παπαδοπούλου", "Пётр Иванов", "Łódź Ściółka", "Ågot Ærøskøbing-Nuñez"]


def _flat(texts):
    return " ".join(" ".join(texts).split())


def _markup_day():
    sites = [Site("A", "Σταθμός <Βόρειος> & Νότιος", "Улица Ленина 5, Зеленоград"),
             Site("B", "Łódź Ściółka depot", "ul. Źródlana 7 & <dock 2>")]
    jobs = [
        Job("M1", "A", "B", 8 * HOUR, 10 * HOUR, customer="<b>R&D", reference="&amp; ref",
            notes="<font size=40>big</font> & \"quoted\"\nsecond line"),
        Job("M2", "B", "A", 8 * HOUR, 10 * HOUR, customer="Пётр Иванов",
            notes="Long note " + "with many words that must wrap inside the cell " * 12),
        Job("M3", "A", "A", 8 * HOUR, 9 * HOUR, customer="Ζωή Παπαδοπούλου",
            reference="X" * 120),
    ]
    return make_day(jobs, sites, {("A", "B"): 40, ("B", "A"): 40})


def test_markup_prints_literally():
    plan = solve_day(_markup_day())
    text = _flat(page_texts(build_pdf_bytes(plan)))
    assert "<b>R&D" in text
    assert "&amp; ref" in text
    assert "<font size=40>big</font> & \"quoted\"" in text
    assert "second line" in text
    assert "Σταθμός <Βόρειος> & Νότιος" in text
    assert "ul. Źródlana 7 & <dock 2>" in text
    assert "inside the cell" in text


def test_unicode_names_and_drivers_print():
    plan = solve_day(_markup_day())
    names = {v: NAMES[v - 1] for v in range(1, plan.vehicles + 1)}
    names[1] = "<i>Ann</i> & Co"
    texts = page_texts(build_pdf_bytes(plan, driver_names=names))
    flat = _flat(texts)
    for name in ["Пётр Иванов", "Ζωή Παπαδοπούλου", "Łódź Ściółka", "Улица Ленина 5"]:
        assert name in flat
    found = sections(texts)
    for vehicle, name in names.items():
        sheet = _flat([texts[p] for p in found[("route", vehicle)]])
        assert f"Driver: {name}" in sheet


def test_blank_driver_line_when_no_name():
    plan = solve_day(_markup_day())
    texts = page_texts(build_pdf_bytes(plan, driver_names={2: "   "}))
    found = sections(texts)
    for vehicle in range(1, plan.vehicles + 1):
        sheet = _flat([texts[p] for p in found[("route", vehicle)]])
        assert "Driver: ____" in sheet


_printable = st.text(alphabet=st.characters(blacklist_categories=("Cc", "Cs", "Co", "Cn")),
                     max_size=60)


@settings(max_examples=12, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(customer=_printable, notes=_printable, site_name=_printable,
       job_id=st.text(alphabet=string.ascii_letters + string.digits + "-_/.", min_size=1,
                      max_size=20))
def test_any_text_builds(customer, notes, site_name, job_id):
    jobs = [Job(job_id, "A", "B", 8 * HOUR, 9 * HOUR, customer=customer, notes=notes),
            Job(job_id + "x", "B", "A", 8 * HOUR, 9 * HOUR, reference=customer)]
    day = make_day(jobs, [Site("A", site_name, notes)], {("A", "B"): 30, ("B", "A"): 30},
                   settings=Settings())
    plan = solve_day(day)
    texts = page_texts(build_pdf_bytes(plan, driver_names={1: customer}))
    found = sections(texts)
    for vehicle, route in enumerate(plan.route_ids(), start=1):
        sheet = "\n".join(texts[p] for p in found[("route", vehicle)])
        assert set(route) <= ids_in(sheet, route)
