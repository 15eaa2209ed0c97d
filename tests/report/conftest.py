"""Shared fixtures: the demo plan and its PDF, built once per test session."""

from __future__ import annotations

import pytest

from shipgui.core import solve_day
from shipgui.core.demo import load_demo
from shipgui.report import build_pdf_bytes
from tests.support.pdf import page_texts


@pytest.fixture(scope="session")
def demo_plan():
    return solve_day(load_demo())


@pytest.fixture(scope="session")
def demo_pdf(demo_plan):
    return build_pdf_bytes(demo_plan)


@pytest.fixture(scope="session")
def demo_pages(demo_pdf):
    return page_texts(demo_pdf)
