"""The day being edited, as plain state (no Qt): the app's document.

The document keeps the raw inputs (jobs, sites, travel pairs, settings) rather
than a validated :class:`~shipgui.core.model.Day`, because an edit may make the
day invalid for a while; :meth:`DayDocument.build` turns the inputs into a Day
(or raises :class:`~shipgui.core.errors.InputErrors`).  Undo commands call the mutating
methods; listeners hear about each change before and after it happens so that a
table model can announce inserted and removed rows correctly.
"""

from __future__ import annotations

import dataclasses
from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from datetime import date
from pathlib import Path

from .clock import parse_clock, resolve_clock
from .day import build_inputs
from .drivers import Driver, DriverPlace, place_drivers
from .io.plan_file import read_plan_file, write_plan_file
from .io.readers import parse_movable, parse_priority
from .io.validation import ID_COLUMNS, IdRegister, check_job, check_text
from .model import Day, DayInputs, Job, Settings, Site

__all__ = ["Change", "DayDocument", "JOB_FIELDS"]

JOB_FIELDS = ("id", "origin", "destination", "start", "end", "vehicle_class",
              "customer", "reference", "notes", "priority", "movable")


@dataclass(frozen=True)
class Change:
    """What changed: ``kind`` is one of "job", "insert", "remove", "reset", "inputs"."""

    kind: str
    row: int = -1
    field: str = ""


Listener = Callable[[Change, bool], None]  # (change, done): done is False before, True after


@dataclass
class DayDocument:
    """Jobs, sites, travel pairs and settings of one day, plus names for vehicles."""

    jobs: list[Job] = field(default_factory=list)
    sites: list[Site] = field(default_factory=list)
    travel: dict[tuple[str, str], tuple[int, int]] = field(default_factory=dict)
    settings: Settings = field(default_factory=Settings)
    plan_date: date | None = None
    sources: dict[str, str] = field(default_factory=dict)
    drivers: list[Driver] = field(default_factory=list)
    path: Path | None = None  # the plan file, once saved or opened
    _listeners: list[Listener] = field(default_factory=list, repr=False, compare=False)

    # ------------------------------------------------------------ listeners
    def subscribe(self, listener: Listener) -> None:
        self._listeners.append(listener)

    def unsubscribe(self, listener: Listener) -> None:
        self._listeners.remove(listener)

    def _notify(self, change: Change, done: bool) -> None:
        for listener in list(self._listeners):
            listener(change, done)

    # ------------------------------------------------------------ reading
    @property
    def title(self) -> str:
        """A short name for the window title."""
        if self.path is not None:
            return self.path.name
        if "jobs" in self.sources:
            return Path(self.sources["jobs"]).name
        return "Untitled day"

    def row_of(self, job_id: str) -> int:
        """Row of the job with this id, or -1."""
        for row, job in enumerate(self.jobs):
            if job.id == job_id:
                return row
        return -1

    def has_job_id(self, job_id: str, *, except_row: int = -1) -> bool:
        return any(j.id == job_id for r, j in enumerate(self.jobs) if r != except_row)

    def checked_value(self, row: int, name: str, text: str) -> str | int | float | bool:
        """The value to store for ``text`` typed into field ``name`` of job ``row``.

        The same rules as the day files and plan files
        (:mod:`shipgui.core.io.validation`); ``ValueError`` with a sentence for
        the dispatcher when the value is refused.
        """
        if name not in JOB_FIELDS:
            raise KeyError(name)
        job = self.jobs[row]
        column = "job" if name == "id" else name
        value: str | int | float | bool
        try:
            if name in ("start", "end"):
                value = self._clock(text)
            elif name == "priority":
                value = parse_priority(text.strip() or "1")
            elif name == "movable":
                value = parse_movable(text)
            else:
                value = check_text(text, id_like=column in ID_COLUMNS)
                if name == "destination" and not value:
                    value = job.origin
        except ValueError as exc:
            raise ValueError(_sentence(job.id, exc)) from None
        changed = dataclasses.replace(job, **{name: value})
        problems = check_job(changed)
        if problems:
            mine = [m for c, m in problems if c == column] or [m for _c, m in problems]
            raise ValueError(_sentence(job.id, mine[0]))
        if name == "id":
            self._check_new_id(row, str(value))
        return value

    def _clock(self, text: str) -> int:
        parsed = parse_clock(text)  # ValueError with a readable reason
        if parsed.seconds is not None:
            return parsed.seconds
        if self.plan_date is None:
            raise ValueError(f"'{text.strip()}': type a clock time HH:MM (25:30 is 01:30 next "
                             "day), or set the plan date to type dates")
        return resolve_clock(parsed, self.plan_date)

    def _check_new_id(self, row: int, job_id: str) -> None:
        others = IdRegister("job")
        for k, other in enumerate(self.jobs):
            if k != row:
                others.add(other.id)
        clash = others.find(job_id)
        if clash is None:
            return
        if clash[0] == job_id:
            raise ValueError(f"There is already a job {job_id}; job ids must be unique.")
        raise ValueError(f"'{job_id}' looks the same as job {clash[0]} but is written with "
                         "other characters; job ids must differ visibly.")

    def new_job_id(self) -> str:
        """An id not used yet: N1, N2, ..."""
        used = {j.id for j in self.jobs}
        k = 1
        while f"N{k}" in used:
            k += 1
        return f"N{k}"

    def inputs(self) -> DayInputs:
        """A copy of the current inputs (safe to hand to another thread)."""
        return DayInputs(tuple(self.jobs), tuple(self.sites), dict(self.travel),
                         self.settings, self.plan_date, dict(self.sources),
                         tuple(self.drivers))

    @classmethod
    def from_inputs(cls, inputs: DayInputs, path: Path | None = None) -> DayDocument:
        return cls(list(inputs.jobs), list(inputs.sites), dict(inputs.travel), inputs.settings,
                   inputs.plan_date, dict(inputs.sources), list(inputs.drivers), path)

    @classmethod
    def open(cls, path: str | Path) -> DayDocument:
        """Open a plan file; InputError(s) name every problem."""
        return cls.from_inputs(read_plan_file(path), Path(path))

    def save(self, path: str | Path) -> None:
        """Write the plan file (all or nothing; OSError says why not)."""
        write_plan_file(self.inputs(), path)

    def build(self) -> Day:
        """A validated day from the current inputs; raises InputErrors."""
        return build_inputs(self.inputs())

    # ------------------------------------------------------------ editing
    def set_job_field(self, row: int, name: str, value: str | int) -> None:
        """Replace one field of one job (the value is already checked)."""
        if name not in JOB_FIELDS:
            raise KeyError(name)
        change = Change("job", row, name)
        self._notify(change, False)
        self.jobs[row] = dataclasses.replace(self.jobs[row], **{name: value})
        self._notify(change, True)

    def move_jobs(self, slots: dict[str, tuple[int, int]]) -> None:
        """Give jobs new slots, job id -> (start, end) (one change per job)."""
        for job_id, (start, end) in slots.items():
            row = self.row_of(job_id)
            change = Change("job", row, "start")
            self._notify(change, False)
            self.jobs[row] = dataclasses.replace(self.jobs[row], start=start, end=end)
            self._notify(change, True)

    def insert_job(self, row: int, job: Job) -> None:
        change = Change("insert", row)
        self._notify(change, False)
        self.jobs.insert(row, job)
        self._notify(change, True)

    def remove_job(self, row: int) -> Job:
        change = Change("remove", row)
        self._notify(change, False)
        job = self.jobs.pop(row)
        self._notify(change, True)
        return job

    def set_settings(self, settings: Settings) -> None:
        change = Change("inputs", field="settings")
        self._notify(change, False)
        self.settings = settings
        self._notify(change, True)

    def set_plan_date(self, plan_date: date | None) -> None:
        """The plan's date (printed on every page); job times stay as they are."""
        change = Change("inputs", field="plan_date")
        self._notify(change, False)
        self.plan_date = plan_date
        self._notify(change, True)

    def set_sites(self, sites: list[Site], source: str | None) -> None:
        self._set_companion("sites", sites, source)

    def set_travel(self, travel: dict[tuple[str, str], tuple[int, int]],
                   source: str | None) -> None:
        self._set_companion("travel", travel, source)

    def _set_companion(self, kind: str, value, source: str | None) -> None:
        change = Change("inputs", field=kind)
        self._notify(change, False)
        setattr(self, kind, value)
        if source:
            self.sources[kind] = source
        else:
            self.sources.pop(kind, None)
        self._notify(change, True)

    def replace_driver(self, old: Driver | None, new: Driver | None) -> None:
        """Put ``new`` where ``old`` was (either may be None: add, or remove)."""
        change = Change("inputs", field="drivers")
        self._notify(change, False)
        at = self.drivers.index(old) if old in self.drivers else len(self.drivers)
        if old in self.drivers:
            self.drivers.remove(old)
        if new is not None:
            self.drivers.insert(at, new)
        self._notify(change, True)

    def place_drivers(self, routes: Sequence[Sequence[str]]) -> list[DriverPlace]:
        """Where each driver is in a plan with these routes (job ids); names kept by
        vehicle number (old plan files) are tied to their route's jobs now."""
        places = place_drivers(self.drivers, routes)
        for k, place in enumerate(places):
            if place.driver.vehicle is not None and place.vehicle is not None:
                tied = Driver(place.driver.name, frozenset(routes[place.vehicle - 1]))
                self.drivers[self.drivers.index(place.driver)] = tied
                places[k] = dataclasses.replace(place, driver=tied)
        return places

    def replace_all(self, other: DayDocument) -> None:
        """Take over every input of ``other`` (opening a new day in this window)."""
        change = Change("reset")
        self._notify(change, False)
        for f in dataclasses.fields(self):
            if f.name != "_listeners":
                setattr(self, f.name, getattr(other, f.name))
        self._notify(change, True)


def _sentence(job_id: str, reason: object) -> str:
    """A refusal for the dispatcher: 'Job J1: the value ...'."""
    text = str(reason)
    return f"Job {job_id}: {text}" if job_id else text[:1].upper() + text[1:]
