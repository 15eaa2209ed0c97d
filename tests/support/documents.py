"""Small invented days as app documents, shared by core and GUI tests."""

from __future__ import annotations

from shipgui.core import Job, Settings, Site
from shipgui.core.document import DayDocument


def small_document() -> DayDocument:
    """Four jobs on three invented sites, 6 km apart on a line (about 9 min by road)."""
    sites = [Site("A", "North stop", x_km=0.0, y_km=0.0),
             Site("B", "Middle stop", x_km=6.0, y_km=0.0),
             Site("C", "South stop", x_km=12.0, y_km=0.0)]
    hour = 3600
    jobs = [Job("J1", "A", "B", 8 * hour, 9 * hour, row=2),
            Job("J2", "B", "C", 9 * hour + 1800, 10 * hour, row=3),
            Job("J3", "A", "A", 8 * hour + 1800, 11 * hour, row=4),
            Job("J4", "C", "A", 10 * hour + 1800, 12 * hour, row=5)]
    return DayDocument(jobs, sites, {}, Settings(turnaround=600),
                       sources={"jobs": "/invented/small-jobs.csv"})
