"""The demo day: an invented builders' merchant (every name and place is made up)."""

from __future__ import annotations

from importlib import resources
from pathlib import Path

from .model import Day, Settings
from .readers import load_day

__all__ = ["DEMO_SETTINGS", "demo_files", "load_demo", "resource_path"]

# Depot and working day of the invented yard; 10 min turnaround between jobs.
DEMO_SETTINGS = Settings(turnaround=10 * 60, depot="YARD", day_start=5 * 3600,
                         day_end=27 * 3600)


def resource_path(*parts: str) -> Path:
    """A file under resources/, installed (shipgui.resources) or in a source checkout."""
    try:
        base = Path(str(resources.files("shipgui.resources")))
        if base.joinpath(*parts).exists():
            return base.joinpath(*parts)
    except (ModuleNotFoundError, TypeError):
        pass
    return Path(__file__).resolve().parents[2].joinpath("resources", *parts)


def demo_files() -> dict[str, Path]:
    return {name: resource_path("demo", f"{name}.csv") for name in ("jobs", "sites", "travel")}


def load_demo() -> Day:
    files = demo_files()
    return load_day(files["jobs"], files["sites"], files["travel"], settings=DEMO_SETTINGS)
