"""What the app says reads right for one of anything: '1 job', '1 vehicle', never
'these 1 jobs'; and failed writes are said in plain words."""

from __future__ import annotations

import errno
import re

import pytest
from PySide6.QtWidgets import QLabel

from shipgui.core import Job, Settings, Site
from shipgui.core.document import DayDocument
from shipgui.gui.wording import count, os_error_text
from tests.support.gui import load_and_wait

ONE_OF = re.compile(r"(?<![\d.,])1\s+(jobs|vehicles|problems|sites|travel times)\b|these 1\b")


def test_count():
    assert [count(n, "job") for n in (0, 1, 2)] == ["0 jobs", "1 job", "2 jobs"]
    assert count(1, "travel time") == "1 travel time" and count(3, "is") == "3 are"


def _texts(window) -> list[str]:
    texts = [label.text() for label in window.findChildren(QLabel) if label.text()]
    texts += [window.statusBar().currentMessage(), window.certificate.summary.text()]
    texts += [window.answer.status.text(), window.answer.tradeoff_text]
    return texts


def test_a_day_of_one_job_reads_in_the_singular(qtbot, window):
    document = DayDocument([Job("J1", "A", "A", 8 * 3600, 9 * 3600, row=2)],
                           [Site("A", "Only stop", x_km=0.0, y_km=0.0)], {},
                           Settings(turnaround=600), sources={"jobs": "/invented/one.csv",
                                                              "sites": "/invented/s.csv"})
    plan = load_and_wait(qtbot, window, document)
    assert plan is not None and plan.vehicles == 1
    window.proof_action.trigger()
    texts = _texts(window)
    assert [t for t in texts if ONE_OF.search(t)] == []
    assert window.answer.vehicles.caption.text() == "vehicle needed"
    assert "least possible with 1 vehicle" in window.answer.deadhead.caption.text()
    assert "1 job" in window.answer.status.text().replace("\u00a0", " ")
    assert window.inputs_panel.sites_row.name.text() == "s.csv (1 site)"


def test_the_check_above_can_fail():
    assert ONE_OF.search("No vehicle can do two of these 1 job")
    assert ONE_OF.search("Up to date · 1 jobs") and not ONE_OF.search("21 jobs")


@pytest.mark.parametrize("code, words", [
    (errno.ENOSPC, "the disk is full"), (errno.EROFS, "the disk is read-only"),
    (errno.EACCES, "you are not allowed to write there")])
def test_write_failures_in_plain_words(code, words):
    assert os_error_text(OSError(code, "Writing canceled by application", "/x/.tmp")) == words
