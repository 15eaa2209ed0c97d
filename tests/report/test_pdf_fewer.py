"""The "Jobs not served" and "What would save a vehicle" pages."""

import dataclasses

from shipgui.core import solve_day
from shipgui.core.demo import load_demo
from shipgui.core.fleet.suggest import suggest_moves
from shipgui.report import build_pdf_bytes
from tests.support.days import rebuild
from tests.support.pdf import ids_in, page_texts


def _short_demo(vehicles=25):
    day = load_demo()
    return rebuild(day, settings=dataclasses.replace(day.settings, vehicles=vehicles))


def test_jobs_not_served_page_lists_them_with_the_proof():
    plan = solve_day(_short_demo())
    texts = page_texts(build_pdf_bytes(plan))
    pages = [t for t in texts if "Jobs not served" in t]
    assert pages and texts.index(pages[0]) == 2  # right after the summary
    text = " ".join(pages)
    unserved = {plan.day.jobs[k].id for k in plan.shortfall.unserved}
    assert ids_in(text, unserved) == unserved
    assert "Why no more fit" in text and "25 + 122 = 147" in text
    assert "cover 147 of the 150 jobs" in " ".join(texts[0].split())
    # Nothing served twice and the routes still have their sheets.
    assert sum("Route sheet" in t for t in texts) >= plan.vehicles


def test_no_extra_pages_without_a_shortfall(demo_pages):
    assert not any("Jobs not served" in t or "What would save a vehicle" in t
                   for t in demo_pages)


def test_suggestions_page_and_same_bytes_twice():
    day = load_demo()
    plan = solve_day(day)
    search = suggest_moves(day, 3, max_move=30 * 60)
    first = build_pdf_bytes(plan, suggestions=search)
    again = build_pdf_bytes(plan, suggestions=suggest_moves(day, 3, max_move=30 * 60))
    assert first == again  # the search time is not printed, so the output is stable
    last = page_texts(first)[-1]
    assert "What would save a vehicle" in last and "customer agrees" in last
    moved = {day.jobs[m.job].id for s in search.suggestions for m in s.moves}
    assert ids_in(last, moved) == moved


def test_priorities_print_the_weighted_proof(tmp_path):
    day = load_demo()
    jobs = [dataclasses.replace(j, priority=(0.5, 1, 2.5)[k % 3])
            for k, j in enumerate(day.jobs)]
    plan = solve_day(rebuild(day, jobs=jobs, settings=dataclasses.replace(
        day.settings, vehicles=20)))
    assert plan.verified
    text = " ".join(t for t in page_texts(build_pdf_bytes(plan)) if "Jobs not served" in t)
    assert "Counted in full" in text and "Weight" in text
