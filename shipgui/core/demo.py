"""The demo day: an invented builders' merchant (every name and place is made up)."""

from __future__ import annotations

from pathlib import Path

from shipgui.resources import resource_path

from .day import load_day
from .model import Day, Settings

__all__ = ["DEMO_SETTINGS", "demo_files", "load_demo"]

# Depot and working day of the invented yard; 10 min turnaround between jobs.
DEMO_SETTINGS = Settings(turnaround=10 * 60, depot="YARD", day_start=5 * 3600,
                         day_end=27 * 3600)


def demo_files() -> dict[str, Path]:
    return {name: resource_path("demo", f"{name}.csv") for name in ("jobs", "sites", "travel")}


def load_demo() -> Day:
    files = demo_files()
    return load_day(files["jobs"], files["sites"], files["travel"], settings=DEMO_SETTINGS)
