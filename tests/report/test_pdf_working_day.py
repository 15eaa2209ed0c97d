"""The printed plan under a working-day limit: the summary states the limit, the
fleet, the bound and whether it is proven; every route sheet its working day and
the limit; the proof pages the pairs with reasons, and the weights with how to
read them and the independent check's verdict, run again for the printout."""

from __future__ import annotations

import dataclasses
import re

import pytest

from shipgui.core import Job, Settings, Site, build_day, solve_day
from shipgui.core.demo import load_demo
from shipgui.core.model import Day
from shipgui.core.workday.explain import weight_text, weights_total_text
from shipgui.report import build_pdf_bytes
from tests.support.days import depot_day
from tests.support.pdf import page_texts

HOUR = 3600


def _with_limit(day: Day, hours: float) -> Day:
    settings = dataclasses.replace(day.settings, max_day=int(hours * HOUR))
    return Day(day.jobs, day.site_ids, day.sites, day.travel, settings, day.warnings,
               plan_date=day.plan_date, sources=day.sources, fingerprint=day.fingerprint)


def _flat(text: str) -> str:
    return re.sub(r"\s+", " ", text)


@pytest.fixture(scope="module")
def demo_11h():
    plan = solve_day(_with_limit(load_demo(), 11), time_limit=60)
    assert (plan.vehicles, plan.lower_bound) == (39, 39)  # the demo's calibration
    return plan


@pytest.fixture(scope="module")
def demo_11h_pages(demo_11h):
    return [_flat(t) for t in page_texts(build_pdf_bytes(demo_11h))]


@pytest.fixture(scope="module")
def weights_plan():
    plan = solve_day(_with_limit(depot_day(20, 5, seed=23, span_h=(5, 13)), 6), time_limit=20)
    assert plan.certificate_weights and plan.proven_minimum
    return plan


def _sheets(pages: list[str]) -> list[str]:
    return [p for p in pages if "Route sheet — vehicle" in p]


def _proof(pages: list[str]) -> str:
    """The proof section's text (the page header is read after the page's body)."""
    return " ".join(p for p in pages if "Proof of the vehicles needed" in p)


def test_summary_states_the_limit_the_fleet_and_that_it_is_proven(demo_11h_pages):
    summary = demo_11h_pages[0]
    assert "39 vehicles cover all 150 jobs, every working day within 11 h." in summary
    assert "No plan with fewer vehicles within that limit exists" in summary
    assert "Longest working day 11 h, leaving the depot to being back" in summary
    assert "not a legal default" in summary and "rest rules are set by local law" in summary
    assert "39: proven minimum for an 11 h working day" in summary
    assert "The plan meets the proven bound" in summary  # not an exhaustive search
    assert "28 vehicles; the limit costs 11 more" in summary
    assert "every route can be driven within the working-day limit" in summary


def test_every_route_sheet_shows_its_working_day_and_the_limit(demo_11h, demo_11h_pages):
    sheets = _sheets(demo_11h_pages)
    numbers = {int(m) for p in sheets for m in re.findall(r"vehicle (\d+) of 39", p)}
    assert numbers == set(range(1, 40))
    for page in sheets:
        found = re.search(r"working day (?:(\d+) h )?(\d+) min \(limit 11 h\)", page)
        if not found:  # a long route's continuation page carries no header box
            assert "(continued)" in page, page
            continue
        minutes = int(found[1] or 0) * 60 + int(found[2])
        # As printed: leave rounded down, back rounded up; a day within the limit
        # to the second may print a minute over, and the sheet says why.
        assert minutes <= 11 * 60 or (minutes <= 11 * 60 + 2 and "rounded outwards" in page)
    assert sum("(limit 11 h)" in p for p in sheets) == demo_11h.vehicles


def test_proof_pages_give_the_pairs_reasons_under_the_limit(demo_11h, demo_11h_pages):
    proof = _proof(demo_11h_pages)
    n = len(demo_11h.certificate)
    assert "Why 39 vehicles is the minimum for an 11 h working day" in proof
    assert f"The {n} jobs no two of which fit one working day" in proof
    assert f"Of the {n * (n - 1) // 2} pairs:" in proof
    assert "could follow, but together make a working day longer than 11 h" in proof
    # Each job with its nearest fit; the working-day reason is printed where it applies.
    assert "longer than the 11 h limit" in proof
    assert "Fischetti" in proof and "fingerprint" in proof
    assert "Dilworth" not in proof  # that theorem is the proof without a limit only


def test_a_plan_not_proven_says_both_figures_in_print(demo_11h):
    stopped = dataclasses.replace(demo_11h, bound=37, workday=dataclasses.replace(
        demo_11h.workday, status="stopped"))
    pages = [_flat(t) for t in page_texts(build_pdf_bytes(stopped))]
    assert "No plan within that limit has fewer than 37" in pages[0]
    assert "the minimum is 37 to 39: the search was stopped" in pages[0]
    assert "39 planned; at least 37 needed (proven)" in pages[0]
    assert "the limit costs 9 to 11 more" in pages[0]
    proof = _proof(pages)
    assert "Why at least 37 vehicles are needed within an 11 h working day" in proof
    assert "This plan uses 39: the minimum is 37 to 39 (the search was stopped)." in proof


def test_weights_are_printed_with_how_to_read_them_and_the_check(weights_plan):
    pages = [_flat(t) for t in page_texts(build_pdf_bytes(weights_plan))]
    proof = _proof(pages)
    total = weights_total_text(weights_plan.certificate_weights)
    assert f"The weights: {len(weights_plan.certificate_weights)} jobs" in proof
    assert "How to read the weights" in proof
    assert "No working day within the 6 h limit carries more than 1" in proof
    assert f"Sum {total}" in proof
    for k, weight in weights_plan.certificate_weights:
        assert re.search(rf"{weights_plan.day.jobs[k].id} .*? {re.escape(weight_text(weight))}"
                         r"( |$)", proof)
    assert "Independent check: passed." in proof and "so none carries more than 1" in proof
    assert f"their sum proves at least {weights_plan.lower_bound}" in proof
    assert "1/2" in proof


def test_the_printed_check_is_run_again_on_the_printed_weights(weights_plan):
    # Weights no valid route could carry: the printout's own check says so, even for
    # a plan object that claims to be verified.
    heavier = tuple((k, w * 1.5) for k, w in weights_plan.certificate_weights)
    forged = dataclasses.replace(weights_plan, certificate_weights=heavier)
    proof = " ".join(_flat(t) for t in page_texts(build_pdf_bytes(forged)))
    assert "Independent check: FAILED" in proof and "carries more than 1" in proof


def test_a_middle_sized_proof_prints_every_pair_in_a_table():
    day = depot_day(40, 6, seed=1, max_day_min=420, span_h=(5, 14))
    plan = solve_day(day, time_limit=20)
    assert 12 < len(plan.certificate) <= 30 and not plan.certificate_weights
    proof = _proof([_flat(t) for t in page_texts(build_pdf_bytes(plan))])
    assert "How to read the table" in proof
    assert "a time such as 12:40 is the working day of one vehicle doing both" in proof
    assert re.search(r"\b\d{1,2}:\d\d\b", proof.split("How to read the table")[1])


def test_a_day_over_the_limit_only_by_rounding_says_so_on_its_sheet():
    # Leave 06:00:30, back 17:00:30: exactly the 11 h limit, printed 06:00 to 17:01.
    day = build_day([Job("W1", "D", "D", 6 * HOUR + 30, 17 * HOUR + 30)],
                    [Site("D", x_km=0.0, y_km=0.0)], {},
                    settings=Settings(depot="D", max_day=11 * HOUR))
    plan = solve_day(day, time_limit=10)
    assert plan.vehicles == 1 and plan.verified
    [sheet] = _sheets([_flat(t) for t in page_texts(build_pdf_bytes(plan))])
    assert "working day 11 h 01 min (limit 11 h)" in sheet
    assert "only because the times are rounded outwards: the day itself is 11 h 00 min or " \
        "less" in sheet
    # Within the limit as printed: no such line.
    early = build_day([Job("W1", "D", "D", 6 * HOUR, 17 * HOUR)],
                      [Site("D", x_km=0.0, y_km=0.0)], {},
                      settings=Settings(depot="D", max_day=11 * HOUR))
    [sheet] = _sheets([_flat(t) for t in page_texts(build_pdf_bytes(solve_day(early,
                                                                               time_limit=10)))])
    assert "working day 11 h 00 min (limit 11 h)" in sheet and "rounded outwards" not in sheet
