"""The "Jobs not served" page under a working-day limit: the weights proof."""

from __future__ import annotations

import dataclasses

from shipgui.core import solve_day
from shipgui.core.demo import load_demo
from shipgui.core.model import Day
from shipgui.report import build_pdf_bytes
from tests.support.pdf import page_texts


def test_jobs_not_served_page_explains_the_weights_proof():
    demo = load_demo()
    day = Day(demo.jobs, demo.site_ids, demo.sites, demo.travel,
              dataclasses.replace(demo.settings, max_day=11 * 3600, vehicles=36))
    plan = solve_day(day, time_limit=20)
    assert plan.verified and plan.shortfall.unserved
    text = "\n".join(page_texts(build_pdf_bytes(plan)))
    assert "Jobs not served: hand on or rebook" in text
    assert "each job below has a weight" in text and "36 vehicles carry at most 36" in text
    assert "its own search for the heaviest route" in text.replace("\n", " ")
    for k in plan.shortfall.unserved:
        assert day.jobs[k].id in text
