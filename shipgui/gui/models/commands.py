"""Undo commands: each user edit is one small command that calls a document method."""

from __future__ import annotations

from datetime import date
from pathlib import Path

from PySide6.QtGui import QUndoCommand

from shipgui.core import Job, Settings, Site, format_clock
from shipgui.core.document import DayDocument
from shipgui.core.drivers import Driver

__all__ = ["EditJobField", "AddJob", "DeleteJobs", "ChangeSettings", "ChangePlanDate",
           "AttachSites", "AttachTravel", "NameDriver", "MoveSlots", "FIELD_LABELS"]

FIELD_LABELS = {
    "id": "id", "origin": "origin", "destination": "destination", "start": "start",
    "end": "end", "vehicle_class": "vehicle class", "customer": "customer",
    "reference": "reference", "notes": "notes", "priority": "priority",
    "movable": "movable",
}


def _shown(name: str, value) -> str:
    if name in ("start", "end"):
        return format_clock(value)
    if name == "movable":
        return "yes" if value else "no"
    if name == "priority":
        return f"{value:g}"
    text = str(value)
    return f"'{text[:20]}…'" if len(text) > 20 else f"'{text}'"


class EditJobField(QUndoCommand):
    """Change one field of one job, e.g. "Set start of J050 to 06:30"."""

    def __init__(self, document: DayDocument, row: int, name: str, value) -> None:
        job = document.jobs[row]
        super().__init__(f"Set {FIELD_LABELS[name]} of {job.id} to {_shown(name, value)}")
        self._document = document
        self._row = row
        self._name = name
        self._new = value
        self._old = getattr(job, name)

    def redo(self) -> None:
        self._document.set_job_field(self._row, self._name, self._new)

    def undo(self) -> None:
        self._document.set_job_field(self._row, self._name, self._old)


class AddJob(QUndoCommand):
    def __init__(self, document: DayDocument, row: int, job: Job) -> None:
        super().__init__(f"Add job {job.id}")
        self._document = document
        self._row = row
        self._job = job

    def redo(self) -> None:
        self._document.insert_job(self._row, self._job)

    def undo(self) -> None:
        self._document.remove_job(self._row)


class DeleteJobs(QUndoCommand):
    """Delete one or more jobs in one step."""

    def __init__(self, document: DayDocument, rows: list[int]) -> None:
        rows = sorted(set(rows))
        ids = [document.jobs[r].id for r in rows]
        text = f"Delete job {ids[0]}" if len(ids) == 1 else (
            f"Delete {len(ids)} jobs ({', '.join(ids[:3])}{', …' if len(ids) > 3 else ''})")
        super().__init__(text)
        self._document = document
        self._removed = [(r, document.jobs[r]) for r in rows]

    def redo(self) -> None:
        for row, _job in reversed(self._removed):
            self._document.remove_job(row)

    def undo(self) -> None:
        for row, job in self._removed:
            self._document.insert_job(row, job)


class ChangeSettings(QUndoCommand):
    def __init__(self, document: DayDocument, settings: Settings, text: str) -> None:
        super().__init__(text)
        self._document = document
        self._old = document.settings
        self._new = settings

    def redo(self) -> None:
        self._document.set_settings(self._new)

    def undo(self) -> None:
        self._document.set_settings(self._old)


class ChangePlanDate(QUndoCommand):
    def __init__(self, document: DayDocument, plan_date: date | None, text: str) -> None:
        super().__init__(text)
        self._document = document
        self._old = document.plan_date
        self._new = plan_date

    def redo(self) -> None:
        self._document.set_plan_date(self._new)

    def undo(self) -> None:
        self._document.set_plan_date(self._old)


class _AttachCompanion(QUndoCommand):
    kind = ""

    def __init__(self, document: DayDocument, value, source: str | None) -> None:
        name = Path(source).name if source else None
        super().__init__(f"Attach {self.kind} file {name}" if name
                         else f"Remove {self.kind} file")
        self._document = document
        self._new = (value, source)
        self._old = (getattr(document, self.kind), document.sources.get(self.kind))

    def _apply(self, value, source) -> None:
        raise NotImplementedError

    def redo(self) -> None:
        self._apply(*self._new)

    def undo(self) -> None:
        self._apply(*self._old)


class AttachSites(_AttachCompanion):
    kind = "sites"

    def __init__(self, document: DayDocument, sites: list[Site], source: str | None) -> None:
        super().__init__(document, sites, source)

    def _apply(self, value, source) -> None:
        self._document.set_sites(value, source)


class AttachTravel(_AttachCompanion):
    kind = "travel"

    def _apply(self, value, source) -> None:
        self._document.set_travel(value, source)


class NameDriver(QUndoCommand):
    """Give a vehicle's route a driver (tied to the route's jobs), or clear it."""

    def __init__(self, document: DayDocument, vehicle: int, jobs: frozenset[str],
                 current: Driver | None, name: str) -> None:
        super().__init__(f"Name vehicle {vehicle} '{name}'" if name
                         else f"Clear name of vehicle {vehicle}")
        self._document = document
        self._old = current
        self._new = Driver(name, jobs) if name else None

    def redo(self) -> None:
        self._document.replace_driver(self._old, self._new)

    def undo(self) -> None:
        self._document.replace_driver(self._new, self._old)


class MoveSlots(QUndoCommand):
    """Move several jobs' slots in one step (a suggestion that saves a vehicle).

    ``moves``: (job id, seconds) pairs; start and end shift together.
    """

    def __init__(self, document: DayDocument, moves: list[tuple[str, int]]) -> None:
        parts = [f"{job_id} {'+' if shift > 0 else '−'}{abs(shift) // 60} min"
                 for job_id, shift in moves]
        super().__init__(f"Move {', '.join(parts)}")
        self._document = document
        jobs = {j.id: j for j in document.jobs}
        self._old = {job_id: (jobs[job_id].start, jobs[job_id].end) for job_id, _ in moves}
        self._new = {job_id: (jobs[job_id].start + shift, jobs[job_id].end + shift)
                     for job_id, shift in moves}

    def redo(self) -> None:
        self._document.move_jobs(self._new)

    def undo(self) -> None:
        self._document.move_jobs(self._old)
