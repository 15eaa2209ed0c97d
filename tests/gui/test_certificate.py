"""The proof in plain words: summary sentence, pair explanations, pairs model."""

from __future__ import annotations

import dataclasses
import itertools
import re

from PySide6.QtTest import QAbstractItemModelTester

from shipgui.core import Job, solve_day
from shipgui.core.demo import load_demo
from shipgui.core.fleet.explain import explain_pair as core_explain_pair
from shipgui.gui.panels.certificate_panel import (
    CertificatePanel,
    PairColumn,
    PairsModel,
    certificate_summary,
    explain_pair,
)
from tests.support.documents import small_document


def test_summary_sentence():
    plan = solve_day(small_document().build())
    assert certificate_summary(plan).startswith(
        "No vehicle can do two of these 2 jobs, so at least 2 vehicles are needed; "
        "this plan uses 2.")
    assert "checked independently" in certificate_summary(plan)


def test_pair_running_at_the_same_time():
    day = small_document().build()
    text = explain_pair(day, 0, 2)  # J1 08:00-09:00, J3 08:30-11:00
    assert text == "They overlap: J3 starts at 08:30, while J1 is still running (until 09:00)."


def test_pair_short_by_turnaround_and_drive():
    doc = small_document()
    doc.jobs[1] = dataclasses.replace(doc.jobs[1], start=9 * 3600 + 900)  # J2 at 09:15 from B
    day = doc.build()
    text = explain_pair(day, 0, 1)
    assert text.startswith("After J1 ends at 09:00 at Middle stop, the 10 min turnaround "
                           "brings the vehicle there at 09:10, in time for J2")
    doc.jobs[1] = dataclasses.replace(doc.jobs[1], origin="C", start=9 * 3600 + 900)
    day = doc.build()
    text = explain_pair(day, 0, 1)
    # 6 km x 1.2 / 50 km/h = 8.64 min: there at 09:18:39, so 4 min short (rounded up).
    assert "the 9 min drive to South stop" in text and "4 min after J2 starts (09:15)" in text


def test_panel_says_it_as_the_printout_does(qapp):
    # Whole minutes rounded up, overlap said as overlap (not "Short by 171.6 min").
    doc = small_document()
    doc.jobs[1] = dataclasses.replace(doc.jobs[1], origin="C", start=9 * 3600 + 900)
    plan = solve_day(doc.build())
    model = PairsModel()
    model.set_plan(plan)
    labels = {model.pair(r): model.index(r, PairColumn.SHORT_BY).data()
              for r in range(model.rowCount())}
    reasons = {model.pair(r): model.index(r, PairColumn.REASON).data()
               for r in range(model.rowCount())}
    for (a, b), label in labels.items():
        assert label in ("overlap", "different vehicle classes") or re.fullmatch(
            r"cannot follow: \d+ min short", label), label
        index = {j.id: k for k, j in enumerate(plan.day.jobs)}
        assert reasons[(a, b)] == core_explain_pair(plan.day, index[a], index[b])


def test_pair_of_different_classes():
    doc = small_document()
    doc.jobs[0] = dataclasses.replace(doc.jobs[0], vehicle_class="tipper")
    assert "needs a 'tipper' vehicle" in explain_pair(doc.build(), 0, 2)


def test_pairs_model_lists_every_pair(qapp):
    plan = solve_day(load_demo())
    model = PairsModel()
    QAbstractItemModelTester(model, QAbstractItemModelTester.FailureReportingMode.Fatal)
    model.set_plan(plan)
    n = len(plan.certificate)
    assert model.rowCount() == n * (n - 1) // 2
    ids = plan.certificate_ids()  # sorted by start, as the rows are
    assert [model.pair(r) for r in range(model.rowCount())] == list(
        itertools.combinations(ids, 2))
    first, second = model.pair(0)
    assert first in plan.certificate_ids() and second in plan.certificate_ids()
    label = model.index(0, PairColumn.SHORT_BY).data()
    assert label == "overlap" or label.startswith("cannot follow: ")
    pairs = {model.pair(r) for r in range(model.rowCount())}
    assert len(pairs) == model.rowCount()  # every pair once
    assert model.index(0, PairColumn.REASON).data()
    model.set_plan(None)
    assert model.rowCount() == 0


def test_panel_emits_the_chosen_pair(qtbot):
    panel = CertificatePanel()
    qtbot.addWidget(panel)
    doc = small_document()
    doc.jobs.append(Job("J5", "A", "A", 8 * 3600 + 600, 8 * 3600 + 2400))
    plan = solve_day(doc.build())
    panel.set_plan(plan)
    assert "3 jobs" in panel.summary.text()
    with qtbot.waitSignal(panel.pair_selected, timeout=1000) as blocker:
        panel.table.selectRow(0)
    assert set(blocker.args) <= set(plan.certificate_ids())
