"""The timeline's words: tooltips of bars, drives and working days, and the id
written on a job's bar."""

from __future__ import annotations

from PySide6.QtCore import Qt
from PySide6.QtGui import QFontMetricsF

from shipgui.core.clock import format_day_clock, format_duration
from shipgui.core.workday.explain import format_limit, shown_day_minutes

__all__ = ["drive_tooltip", "working_day_tooltip", "bar_label", "job_tooltip"]


def drive_tooltip(day, drive) -> str:
    if drive.kind == "back":
        return f"Empty drive back to the depot, {format_duration(drive.seconds)}"
    origin = "the depot" if drive.kind == "out" else day.site_label(drive.origin)
    return (f"Empty drive {format_duration(drive.seconds)} from {origin} "
            f"to {day.site_label(drive.destination)}")


def working_day_tooltip(vehicle, limit: int) -> str:
    """'Working day 10 h 32 min (05:40–16:12), limit 11 h: 28 min to spare'."""
    length = shown_day_minutes(vehicle.day_start, vehicle.day_end)
    spare = limit // 60 - length
    room = f"{format_duration(spare * 60)} to spare" if spare > 0 else "no time to spare"
    return (f"Vehicle {vehicle.vehicle}: working day {format_duration(length * 60)} "
            f"({format_day_clock(vehicle.day_start - vehicle.day_start % 60)}–"
            f"{format_day_clock(-(-vehicle.day_end // 60) * 60)}), limit "
            f"{format_limit(limit)}: {room}")


def bar_label(job_id: str, metrics: QFontMetricsF, room: float) -> str:
    """The id if it fits, else its end ("…0141": ids of a day usually differ at the
    end), else nothing; zooming in makes room for the whole id."""
    if metrics.horizontalAdvance(job_id) <= room:
        return job_id
    shown = metrics.elidedText(job_id, Qt.TextElideMode.ElideLeft, room)
    kept = len(shown) - 1  # characters besides the ellipsis
    return shown if kept >= min(3, len(job_id) - 1) and shown.startswith("…") else ""


def job_tooltip(day, job) -> str:
    lines = [f"{job.id}: {format_day_clock(job.start)}–{format_day_clock(job.end)}",
             f"{day.site_label(job.origin)} → {day.site_label(job.destination)}"]
    if job.customer:
        lines.append(job.customer)
    if job.notes:
        lines.append(job.notes)
    return "\n".join(lines)
