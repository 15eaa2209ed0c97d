"""What a driver and a manager read: day marks, the date, figures that add up, site
details, long waits, the proof at a glance, long values and characters the font lacks."""

from __future__ import annotations

import io
import re
from datetime import date

import pypdf
import pytest

from shipgui.core import Settings, solve_day
from shipgui.core.clock import format_duration
from shipgui.core.fleet.schedule import vehicle_days
from shipgui.core.io.validation import MAX_FIELD_CHARS, MAX_ID_CHARS
from shipgui.core.model import Job, Site
from shipgui.report import PrintLayoutError, build_pdf_bytes
from shipgui.report import text as report_text
from tests.support.pdf import HOUR, MIN, make_day, page_texts, sections, small_day


def _flat(text: str) -> str:
    return " ".join(text.split())


def _route_text(texts, vehicle=1) -> str:
    return _flat("\n".join(texts[p] for p in sections(texts)[("route", vehicle)]))


def _depot_day(jobs, *, sites=None, travel=None, plan_date=None, turnaround=10 * MIN):
    sites = sites or [Site("YARD", "Quarry yard"), Site("A", "Pelling mill"),
                      Site("B", "Ashgrove school")]
    travel = travel or {("YARD", "A"): 20, ("A", "YARD"): 20, ("YARD", "B"): 40,
                        ("B", "YARD"): 40, ("A", "B"): 30, ("B", "A"): 30}
    settings = Settings(turnaround=turnaround, depot="YARD")
    return make_day(jobs, sites, travel, settings=settings, plan_date=plan_date)


def test_times_after_midnight_carry_a_day_mark_and_the_date():
    day = _depot_day([Job("N1", "A", "B", 22 * HOUR, 24 * HOUR + 55 * MIN)],
                     plan_date=date(2026, 3, 2))
    texts = page_texts(build_pdf_bytes(solve_day(day)))
    sheet = _route_text(texts)
    assert "00:55 +1" in sheet and "24:55" not in sheet
    assert "01:35 +1" in sheet  # back at the yard: 40 min later
    assert "Times marked “+1”: the next day, Tue 2026-03-03." in sheet
    assert all("Plan date: Mon 2026-03-02" in t for t in texts)


def test_title_never_reads_not_given():
    data = build_pdf_bytes(solve_day(small_day()))
    title = pypdf.PdfReader(io.BytesIO(data)).metadata.title
    assert title == "Vehicle plan"


def test_sheet_figures_add_up_as_printed():
    # Drives of 10.4 min: each prints as 11 min, three of them as 33 min (not 31.2 -> 32).
    travel = {("YARD", "A"): 10.4, ("A", "YARD"): 10.4, ("YARD", "B"): 10.4,
              ("B", "YARD"): 10.4, ("A", "B"): 10.4, ("B", "A"): 10.4}
    day = _depot_day([Job("F1", "A", "B", 8 * HOUR, 9 * HOUR),
                      Job("F2", "A", "A", 10 * HOUR, 11 * HOUR)], travel=travel)
    plan = solve_day(day)
    (v,) = vehicle_days(plan)
    assert v.deadhead == 3 * 624
    sheet = _route_text(page_texts(build_pdf_bytes(plan)))
    assert "empty driving 33 min" in sheet
    assert sheet.count("11 min") == 3
    # Leaves 07:49 (by the minute, earlier), back 11:11 (later): 3 h 22 min.
    assert "07:49" in sheet and "11:11" in sheet and "working day 3 h 22 min" in sheet


def test_driver_once_registration_line_and_km():
    sites = [Site("YARD", "Quarry yard", x_km=0, y_km=0), Site("A", "Pelling mill", x_km=10,
                                                                 y_km=0),
             Site("B", "Ashgrove school", x_km=10, y_km=20)]
    day = _depot_day([Job("K1", "A", "B", 8 * HOUR, 10 * HOUR)], sites=sites)
    sheet = _route_text(page_texts(build_pdf_bytes(solve_day(day))))
    assert sheet.count("Driver:") == 1 and "Registration:" in sheet
    # 10 + 20 + 22.4 km straight, times 1.2 = 62.8 km: "about 63 km in all".
    assert "about 63 km in all" in sheet
    assert "12 km" in sheet  # the pull-out: 10 km x 1.2


def test_site_details_are_printed_for_the_driver():
    sites = [Site("YARD", "Quarry yard"),
             Site("A", "Pelling mill", contact="Ada Brackwater", phone="01632 960 555",
                  opening_hours="07:00-16:00", access_notes="Gate code 4711, mind the weir"),
             Site("B", "Ashgrove school")]
    day = _depot_day([Job("K1", "A", "B", 8 * HOUR, 10 * HOUR)], sites=sites)
    sheet = _route_text(page_texts(build_pdf_bytes(solve_day(day))))
    assert "Ada Brackwater · 01632 960 555" in sheet
    assert "Open: 07:00-16:00" in sheet and "Access: Gate code 4711, mind the weir" in sheet


def test_long_waits_say_whether_the_depot_is_within_reach():
    day = _depot_day([Job("W1", "A", "B", 8 * HOUR, 9 * HOUR),
                      Job("W2", "A", "A", 13 * HOUR, 14 * HOUR),
                      Job("W3", "A", "A", 14 * HOUR + 20 * MIN, 15 * HOUR)])
    sheet = _route_text(page_texts(build_pdf_bytes(solve_day(day))))
    # Free 09:10, drive on 12:30; via the yard: 40 min there, 20 min back out.
    assert ("Wait 3 h 20 min at Ashgrove school: free from 09:10, drive on by 12:30. "
            "Time to go back to Quarry yard in between: about 2 h 50 min there.") in sheet
    assert sheet.count("Wait ") == 1  # 14:10 to 14:20 is no long wait


def test_summary_counts_vehicles_per_class():
    jobs = [Job("R1", "A", "A", 8 * HOUR, 9 * HOUR, vehicle_class="reefer"),
            Job("R2", "A", "A", 8 * HOUR, 9 * HOUR, vehicle_class="reefer"),
            Job("T1", "B", "B", 8 * HOUR, 9 * HOUR, vehicle_class="tipper")]
    texts = page_texts(build_pdf_bytes(solve_day(_depot_day(jobs))))
    assert "Vehicles by class reefer 2 · tipper 1" in _flat(texts[0])
    proof = _flat("\n".join(texts[p] for p in sections(texts)[("certificate", 0)]))
    assert "By vehicle class: reefer: 2 vehicles and 2 of these jobs; tipper: 1 vehicle" in proof


def test_proof_at_a_glance_with_nearest_misses():
    # M1 ends 09:00 at B; with 10 min turnaround and 30 min drive the vehicle is at A
    # at 09:40: M2 (09:35) is 5 min short; M3 overlaps M1.
    day = _depot_day([Job("M1", "A", "B", 8 * HOUR, 9 * HOUR),
                      Job("M2", "A", "A", 9 * HOUR + 35 * MIN, 10 * HOUR),
                      Job("M3", "A", "A", 8 * HOUR + 30 * MIN, 12 * HOUR)])
    plan = solve_day(day)
    assert plan.vehicles == 3
    texts = page_texts(build_pdf_bytes(plan))
    proof = _flat("\n".join(texts[p] for p in sections(texts)[("certificate", 0)]))
    assert "At a glance" in proof and "Nearest misses" in proof
    assert "M1 then M2 cannot follow: 5 min short" in proof
    assert "At 08:30, 2 of these jobs are running at the same time" in proof
    assert "They overlap: M3 starts at 08:30, while M1 is still running" in proof


@pytest.mark.parametrize("spaces", [False, True])
def test_values_at_the_length_limit_print_cut_on_every_page(spaces):
    def big(seed: str) -> str:
        return (f"{seed} word " * 2000)[:MAX_FIELD_CHARS] if spaces else seed * MAX_FIELD_CHARS

    # Ids (site, job, vehicle class) have their own, shorter limit.
    sites = [Site("Y" * MAX_ID_CHARS, big("yard"), big("addr"), contact=big("c"),
                  phone=big("p"), opening_hours=big("o"), access_notes=big("n")),
             Site("A", big("mill"), big("lane"))]
    jobs = [Job(("J" * (MAX_ID_CHARS - 1)) + str(k), sites[0].id, "A", (8 + 2 * k) * HOUR,
                (9 + 2 * k) * HOUR, vehicle_class="c" * MAX_ID_CHARS, customer=big("cust"),
                reference=big("ref"), notes=big("note")) for k in range(2)]
    travel = {(sites[0].id, "A"): 30, ("A", sites[0].id): 30}
    day = make_day(jobs, sites, travel, settings=Settings(depot=sites[0].id, turnaround=0))
    texts = page_texts(build_pdf_bytes(solve_day(day)))
    assert all(re.search(r"page \d+ of \d+", t) for t in texts)
    assert "characters in all]" in " ".join(texts)


def test_layout_failure_is_said_plainly(monkeypatch):
    monkeypatch.setitem(report_text.LIMITS, "notes", 1_000_000)  # switch the cut off
    day = _depot_day([Job("L1", "A", "B", 8 * HOUR, 9 * HOUR, notes="x" * 10_000)])
    with pytest.raises(PrintLayoutError) as caught:
        build_pdf_bytes(solve_day(day))
    assert "too long to fit on a page" in str(caught.value)
    assert "Flowable" not in str(caught.value) and "Paragraph" not in str(caught.value)


def test_emoji_and_full_width_characters_print_visibly():
    day = _depot_day([Job("Ｅ１", "A", "B", 8 * HOUR, 9 * HOUR, customer="Fern 🚚 Hollow",
                          notes="中 delivery ❤️ 👍🏽")])
    text = _flat(" ".join(page_texts(build_pdf_bytes(solve_day(day)))))
    assert "E1" in text  # full-width letters and digits print as plain ones
    assert "Fern [delivery truck] Hollow" in text
    assert "[U+4E2D] delivery ❤" in text  # the font has the heart itself
    assert "[thumbs up sign]" in text  # the skin-tone modifier adds nothing visible


def test_printable_keeps_what_the_font_has():
    assert report_text.printable("Łódź Πέτρος → café") == "Łódź Πέτρος → café"
    assert format_duration(0) == "0 min"
