"""The printed plan's pages: which sections, in which order, holding which jobs."""

from __future__ import annotations

import pytest

from shipgui.core import Settings, solve_day
from shipgui.core.model import Job
from shipgui.report import CAUTION, build_pdf_bytes, build_route_sheet
from tests.support.days import regional_day
from tests.support.pdf import (
    HOUR,
    MIN,
    classify,
    ids_in,
    make_day,
    page_texts,
    sections,
    small_day,
    two_site_travel,
)


def _check_layout(plan, texts):
    """Summary first, then each vehicle's sheet in order, then the proof; nothing else."""
    order = [classify(t) for t in texts]
    found = sections(texts)
    expected_sections = ([("summary", 0)] + [("route", v) for v in range(1, plan.vehicles + 1)]
                         + [("certificate", 0)])
    assert list(found) == expected_sections
    for pages in found.values():  # each section is one unbroken run of pages
        assert pages == list(range(pages[0], pages[-1] + 1))
    assert len(order) == sum(len(p) for p in found.values())
    return found


def _check_jobs_on_sheets(plan, texts, found):
    """Every job id is on exactly one route sheet: its own vehicle's."""
    all_ids = [job.id for job in plan.day.jobs]
    seen: dict[str, int] = {}
    for vehicle, route_ids in enumerate(plan.route_ids(), start=1):
        text = "\n".join(texts[p] for p in found[("route", vehicle)])
        on_sheet = ids_in(text, all_ids)
        assert on_sheet == set(route_ids)
        for job_id in on_sheet:
            assert job_id not in seen, f"{job_id} on sheets {seen[job_id]} and {vehicle}"
            seen[job_id] = vehicle
    assert set(seen) == set(all_ids)


def _certificate_text(texts, found):
    return "\n".join(texts[p] for p in found[("certificate", 0)])


def test_small_day_page_count_is_exact():
    plan = solve_day(small_day())
    texts = page_texts(build_pdf_bytes(plan))
    assert plan.vehicles == 3
    assert len(texts) == 1 + plan.vehicles + 1
    found = _check_layout(plan, texts)
    _check_jobs_on_sheets(plan, texts, found)


def test_demo_sections_and_jobs(demo_plan, demo_pages):
    found = _check_layout(demo_plan, demo_pages)
    _check_jobs_on_sheets(demo_plan, demo_pages, found)
    # 28 timeline rows do not fit under the facts: the timeline continues on page 2.
    assert len(found[("summary", 0)]) == 2
    assert "timeline (continued)" in demo_pages[1]


def test_demo_certificate_lists_exactly_its_jobs(demo_plan, demo_pages):
    found = sections(demo_pages)
    text = _certificate_text(demo_pages, found)
    all_ids = [job.id for job in demo_plan.day.jobs]
    assert ids_in(text, all_ids) == set(demo_plan.certificate_ids())
    n = demo_plan.vehicles
    statement = (f"No vehicle can do two of these {n} jobs, so at least {n} vehicles are "
                 f"needed; this plan uses {n}, so it is the minimum.")
    assert statement in " ".join(text.split())
    assert "Dilworth" in text and "Annals of Mathematics 51(1), 1950" in text
    assert demo_plan.day.fingerprint in text


def test_every_page_has_footer(demo_plan, demo_pages):
    total = len(demo_pages)
    for number, text in enumerate(demo_pages, start=1):
        flat = " ".join(text.split())
        assert f"page {number} of {total}" in flat
        assert CAUTION in flat
        assert demo_plan.day.fingerprint in flat
        assert "Plan date: not given" in flat


def test_plan_date_is_printed():
    from datetime import date
    day = make_day([Job("D1", "A", "B", 8 * HOUR, 9 * HOUR)], travel=two_site_travel(),
                   plan_date=date(2031, 3, 14))
    texts = page_texts(build_pdf_bytes(solve_day(day)))
    assert "Vehicle plan for Fri 2031-03-14" in texts[0]
    assert all("Plan date: Fri 2031-03-14" in t for t in texts)
    assert "at least 1 vehicle is needed" in " ".join(texts[-1].split())


def test_long_route_continues_with_repeated_header():
    # One vehicle does 70 back-to-back jobs at one site: far more than a page.
    jobs = [Job(f"L{k:02d}", "A", "A", 6 * HOUR + k * 15 * MIN, 6 * HOUR + k * 15 * MIN + 10 * MIN,
                notes="Unload at bay 3 and wait for the signed delivery note " * 2)
            for k in range(70)]
    plan = solve_day(make_day(jobs, travel=two_site_travel(), settings=Settings()))
    assert plan.vehicles == 1
    texts = page_texts(build_pdf_bytes(plan))
    found = _check_layout(plan, texts)
    route_pages = found[("route", 1)]
    assert len(route_pages) >= 3
    for page in route_pages[1:]:
        assert "Vehicle 1 (continued)" in texts[page]
    for page in route_pages:  # the table header repeats on every page with stops
        if ids_in(texts[page], [job.id for job in jobs]):
            assert "Empty drive first" in " ".join(texts[page].split())
    _check_jobs_on_sheets(plan, texts, found)


def test_pair_sentences_for_small_certificate():
    plan = solve_day(small_day())
    texts = page_texts(build_pdf_bytes(plan))
    text = " ".join(_certificate_text(texts, sections(texts)).split())
    a, b = plan.certificate_ids()[:2]
    # small_day's three jobs all run at 07:30 (the shared words of core.fleet.explain).
    assert f"They overlap: {b} starts at 07:15, while {a} is still running (until 08:00)." \
        in text
    assert ids_in(text, [j.id for j in plan.day.jobs]) == set(plan.certificate_ids())


def test_different_classes_are_explained():
    jobs = [Job("C1", "A", "A", 8 * HOUR, 9 * HOUR, vehicle_class="tipper"),
            Job("C2", "A", "A", 12 * HOUR, 13 * HOUR, vehicle_class="flatbed")]
    plan = solve_day(make_day(jobs, travel=two_site_travel()))
    assert plan.vehicles == 2
    texts = page_texts(build_pdf_bytes(plan))
    text = " ".join(_certificate_text(texts, sections(texts)).split())
    assert "C1 needs a 'tipper' vehicle and C2 a 'flatbed' vehicle." in text


def test_large_certificate_stays_bounded():
    plan = solve_day(regional_day(160, 40, seed=3))
    assert plan.vehicles > 30
    texts = page_texts(build_pdf_bytes(plan))
    found = _check_layout(plan, texts)
    _check_jobs_on_sheets(plan, texts, found)
    text = _certificate_text(texts, found)
    assert ids_in(text, [j.id for j in plan.day.jobs]) == set(plan.certificate_ids())
    n = plan.vehicles
    assert f"All {n * (n - 1) // 2} pairs" in " ".join(text.split())
    # One row per job (closest miss), not one per pair: a few rows per page at most.
    assert len(found[("certificate", 0)]) <= 2 + n // 8


def test_route_sheet_rejects_unknown_vehicle():
    plan = solve_day(small_day())
    with pytest.raises(ValueError, match="vehicle 4 is not in this plan"):
        build_route_sheet(plan, 4)
    with pytest.raises(ValueError):
        build_route_sheet(plan, 0)


def test_day_without_jobs_prints_a_short_plan():
    plan = solve_day(make_day([], travel={}))
    texts = page_texts(build_pdf_bytes(plan))
    assert [classify(t)[0] for t in texts] == ["summary", "certificate"]
    assert "The input has no jobs, so no vehicle is needed." in texts[-1]
