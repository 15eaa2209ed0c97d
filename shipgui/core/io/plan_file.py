"""The ``.shipgui`` plan file: every input of a day, its settings and the names
given to vehicles, as JSON with a ``schema_version``.

Read with the same care as the CSV files (never pickle, never eval; every
problem named with its record and field) and written crash-safely.  Reading
and writing only: the day is built from the result by
:func:`shipgui.core.day.build_day`.
"""

from __future__ import annotations

import json
import math
import stat
from datetime import date
from pathlib import Path

from ..clock import MAX_WORKING_DAY, format_clock, format_clock_or_none, parse_clock
from ..drivers import Driver, drivers_from_numbers
from ..errors import InputError, InputErrors, Problem
from ..model import SITE_DETAILS, DayInputs, Job, Settings, Site
from .files import write_bytes_atomic
from .readers import parse_priority

__all__ = ["FORMAT", "SCHEMA_VERSION", "PLAN_SUFFIX", "inputs_to_json", "inputs_from_json",
           "plan_file_bytes", "write_plan_file", "read_plan_json", "read_plan_file"]

FORMAT = "shipgui-plan"
SCHEMA_VERSION = 1
PLAN_SUFFIX = ".shipgui"
MAX_PLAN_BYTES = 64 * 1024 * 1024  # a 200 000-job day is about 40 MB of JSON


def inputs_to_json(inputs: DayInputs) -> dict:
    """The plan file's JSON record of ``inputs``."""
    s = inputs.settings
    return {
        "format": FORMAT,
        "schema_version": SCHEMA_VERSION,
        "plan_date": inputs.plan_date.isoformat() if inputs.plan_date else None,
        "inputs": {
            "jobs": [_job_record(j) for j in inputs.jobs],
            "sites": [{"site": x.id, "name": x.name, "address": x.address, "lat": x.lat,
                       "lon": x.lon, "x_km": x.x_km, "y_km": x.y_km,
                       **{k: getattr(x, k) for k in SITE_DETAILS if getattr(x, k)}}
                      for x in inputs.sites],
            "travel": [{"from": a, "to": b, "seconds": sec}
                       for (a, b), (sec, _row) in inputs.travel.items()],
        },
        "settings": {"turnaround_seconds": s.turnaround, "depot": s.depot,
                     "day_start": format_clock_or_none(s.day_start),
                     "day_end": format_clock_or_none(s.day_end),
                     "speed_kmh": s.speed_kmh, "circuity": s.circuity,
                     "vehicles": s.vehicles,
                     "class_vehicles": {c: k for c, k in s.class_vehicles},
                     "max_day_seconds": s.max_day},
        "drivers": [{"name": d.name, "jobs": sorted(d.jobs)} if d.jobs or d.vehicle is None
                    else {"name": d.name, "vehicle": d.vehicle} for d in inputs.drivers],
        "sources": dict(inputs.sources),
    }


def _job_record(j: Job) -> dict:
    record = {"job": j.id, "origin": j.origin, "destination": j.destination,
              "start": format_clock(j.start), "end": format_clock(j.end),
              "vehicle_class": j.vehicle_class, "customer": j.customer,
              "reference": j.reference, "notes": j.notes}
    # Only where set, so days without them are saved as before.
    if j.priority != 1:
        record["priority"] = j.priority
    if not j.movable:
        record["movable"] = False
    return record


def plan_file_bytes(inputs: DayInputs) -> bytes:
    """The plan file's bytes (UTF-8 JSON)."""
    text = json.dumps(inputs_to_json(inputs), indent=2, ensure_ascii=False) + "\n"
    return text.encode("utf-8")


def write_plan_file(inputs: DayInputs, path: str | Path) -> None:
    """Save ``inputs`` as a plan file, all or nothing; OSError says why not."""
    write_bytes_atomic(path, plan_file_bytes(inputs))


class _Reader:
    """Collects the problems of one plan document."""

    def __init__(self, path: str) -> None:
        self.path = path
        self.problems: list[Problem] = []

    def add(self, message: str, row: int | None = None, column: str | None = None) -> None:
        self.problems.append(Problem(message, self.path, row, column))

    def text(self, record: dict, key: str, row: int, *, required: bool = False) -> str:
        value = record.get(key, "")
        if value is None:
            value = ""
        if not isinstance(value, str):
            self.add(f"'{key}' should be text", row, key)
            return ""
        if required and not value.strip():
            self.add(f"'{key}' is empty", row, key)
        return value.strip()

    def clock(self, value, row: int | None, key: str) -> int | None:
        try:
            parsed = parse_clock(str(value))
        except ValueError as exc:
            self.add(str(exc), row, key)
            return None
        if parsed.seconds is None:
            self.add(f"'{value}' should be a clock time HH:MM", row, key)
        return parsed.seconds

    def number(self, value, row: int | None, key: str, *, optional: bool = True,
               low: float = -1e9, high: float = 1e9):
        if value is None and optional:
            return None
        if isinstance(value, bool) or not isinstance(value, int | float) \
                or not math.isfinite(value) or not low <= value <= high:
            self.add(f"'{key}' should be a number between {low:g} and {high:g}", row, key)
            return None
        return value


def _records(reader: _Reader, inputs: dict, key: str) -> list[dict]:
    records = inputs.get(key, [])
    if not isinstance(records, list) or not all(isinstance(r, dict) for r in records):
        reader.add(f"'inputs.{key}' should be a list of records", None, key)
        return []
    return records


def _read_jobs(reader: _Reader, records: list[dict]) -> list[Job]:
    jobs, seen = [], set()
    for row, r in enumerate(records, start=1):
        job_id = reader.text(r, "job", row, required=True)
        origin = reader.text(r, "origin", row, required=True)
        start = reader.clock(r.get("start"), row, "start")
        end = reader.clock(r.get("end"), row, "end")
        if job_id in seen:
            reader.add(f"job '{job_id}' is listed twice", row, "job")
        seen.add(job_id)
        if start is not None and end is not None and end <= start:
            reader.add(f"job '{job_id}' ends before or when it starts", row, "end")
        texts = {k: reader.text(r, k, row) for k in
                 ("destination", "vehicle_class", "customer", "reference", "notes")}
        extra = _job_options(reader, r, row)
        if start is not None and end is not None and job_id and origin and extra is not None:
            texts["destination"] = texts["destination"] or origin
            jobs.append(Job(job_id, origin, start=start, end=end, row=row, **texts, **extra))
    return jobs


def _job_options(reader: _Reader, record: dict, row: int) -> dict | None:
    """Priority and movable of one job record (defaults when absent)."""
    priority = record.get("priority", 1)
    movable = record.get("movable", True)
    ok = True
    if isinstance(priority, bool) or not isinstance(priority, int | float):
        reader.add("'priority' should be a number", row, "priority")
        ok = False
    else:
        try:
            priority = parse_priority(repr(priority))
        except ValueError as exc:
            reader.add(str(exc), row, "priority")
            ok = False
    if not isinstance(movable, bool):
        reader.add("'movable' should be true or false", row, "movable")
        ok = False
    return {"priority": priority, "movable": movable} if ok else None


def _read_sites(reader: _Reader, records: list[dict]) -> list[Site]:
    sites = []
    for row, r in enumerate(records, start=1):
        site_id = reader.text(r, "site", row, required=True)
        coords = {k: reader.number(r.get(k), row, k, low=-limit, high=limit)
                  for k, limit in (("lat", 90), ("lon", 180), ("x_km", 1e5), ("y_km", 1e5))}
        details = {k: reader.text(r, k, row) for k in SITE_DETAILS}
        sites.append(Site(site_id, reader.text(r, "name", row), reader.text(r, "address", row),
                          **coords, **details))
    return sites


def _read_travel(reader: _Reader, records: list[dict]) -> dict:
    travel = {}
    for row, r in enumerate(records, start=1):
        a = reader.text(r, "from", row, required=True)
        b = reader.text(r, "to", row, required=True)
        seconds = r.get("seconds")
        if isinstance(seconds, bool) or not isinstance(seconds, int) \
                or not 0 <= seconds <= 100_000 * 60:
            reader.add("'seconds' should be a whole number, zero or more", row, "seconds")
            continue
        travel[(a, b)] = (seconds, row)
    return travel


def _read_settings(reader: _Reader, raw: dict) -> Settings:
    if not isinstance(raw, dict):
        reader.add("'settings' should be a record", None, "settings")
        return Settings()
    turnaround = reader.number(raw.get("turnaround_seconds", 0), None, "turnaround_seconds",
                               optional=False, low=0, high=24 * 3600)
    day = {k: None if raw.get(k) is None else reader.clock(raw[k], None, k)
           for k in ("day_start", "day_end")}
    speed = reader.number(raw.get("speed_kmh"), None, "speed_kmh", low=0.1, high=1000)
    circuity = reader.number(raw.get("circuity"), None, "circuity", low=1, high=100)
    max_day = _read_max_day(reader, raw.get("max_day_seconds"))
    defaults = Settings()
    depot = raw.get("depot") or None
    return Settings(turnaround=int(turnaround or 0),
                    depot=str(depot) if depot else None, **day,
                    speed_kmh=float(speed or defaults.speed_kmh),
                    circuity=float(circuity or defaults.circuity), max_day=max_day,
                    **_vehicle_limits(reader, raw))


def _vehicle_limits(reader: _Reader, raw: dict) -> dict:
    """The vehicles available (one number, or per class) of the settings record."""
    def count(value, key: str) -> int | None:
        if isinstance(value, bool) or not isinstance(value, int) or not 1 <= value <= 100_000:
            reader.add(f"'{key}' should be a whole number of vehicles, 1 or more", None, key)
            return None
        return value
    total = raw.get("vehicles")
    if total is not None:
        total = count(total, "vehicles")
    per_class = raw.get("class_vehicles") or {}
    if not isinstance(per_class, dict):
        reader.add("'class_vehicles' should be a record of class: vehicles", None,
                   "class_vehicles")
        per_class = {}
    pairs = tuple((str(c), k) for c, v in sorted(per_class.items())
                  if (k := count(v, "class_vehicles")) is not None)
    return {"vehicles": total, "class_vehicles": pairs}


def _read_max_day(reader: _Reader, value) -> int | None:
    """The longest working day: absent or null is no limit (files saved before the
    limit existed read as none); otherwise whole seconds, more than 0, at most 24 h."""
    if value is None:
        return None
    if isinstance(value, bool) or not isinstance(value, int) \
            or not 0 < value <= MAX_WORKING_DAY:
        reader.add("'max_day_seconds' (the longest working day) should be a whole number of "
                   f"seconds from 1 to {MAX_WORKING_DAY} (24 h), or null for no limit",
                   None, "max_day_seconds")
        return None
    return value


def inputs_from_json(data, path: str) -> DayInputs:
    """The inputs in parsed plan-file JSON; raises InputErrors naming every problem."""
    reader = _Reader(path)
    if not isinstance(data, dict) or data.get("format") != FORMAT:
        hint = (" It looks like an exported plan; open the plan document (.shipgui) or "
                "the jobs CSV instead." if isinstance(data, dict) and "routes" in data else "")
        raise InputError(f"this is not a shipgui plan document.{hint}", file=path)
    _check_version(data.get("schema_version"), path)
    inputs = data.get("inputs") if isinstance(data.get("inputs"), dict) else {}
    jobs = _read_jobs(reader, _records(reader, inputs, "jobs"))
    sites = _read_sites(reader, _records(reader, inputs, "sites"))
    travel = _read_travel(reader, _records(reader, inputs, "travel"))
    settings = _read_settings(reader, data.get("settings", {}))
    drivers = _read_drivers(reader, data)
    plan_date = None
    if data.get("plan_date"):
        try:
            plan_date = date.fromisoformat(str(data["plan_date"]))
        except ValueError:
            reader.add("'plan_date' should be a date like 2026-12-02", None, "plan_date")
    if not jobs and not reader.problems:
        reader.add("the plan document has no jobs")
    if reader.problems:
        raise InputErrors(reader.problems)
    raw_sources = data.get("sources")
    sources = ({str(k): str(v) for k, v in raw_sources.items()}
               if isinstance(raw_sources, dict) else {})
    return DayInputs(tuple(jobs), tuple(sites), travel, settings, plan_date, sources, drivers)


def _read_drivers(reader: _Reader, data: dict) -> tuple[Driver, ...]:
    """Driver names tied to their routes' jobs; files before that kept
    ``driver_names`` by vehicle number, tied to jobs at the first plan."""
    if "drivers" not in data:
        names = data.get("driver_names", {})
        return drivers_from_numbers(
            {int(k): str(v) for k, v in names.items()
             if str(k).isascii() and str(k).isdigit() and len(str(k)) < 7}
            if isinstance(names, dict) else {})
    records = data["drivers"]
    if not isinstance(records, list) or not all(isinstance(r, dict) for r in records):
        reader.add("'drivers' should be a list of records", None, "drivers")
        return ()
    drivers = []
    for row, r in enumerate(records, start=1):
        name = reader.text(r, "name", row, required=True)
        jobs, vehicle = r.get("jobs", []), r.get("vehicle")
        if not isinstance(jobs, list) or not all(isinstance(j, str) for j in jobs):
            reader.add("'jobs' should be a list of job ids", row, "jobs")
        elif vehicle is not None and (isinstance(vehicle, bool) or not isinstance(vehicle, int)
                                      or not 1 <= vehicle <= 1_000_000):
            reader.add("'vehicle' should be a vehicle number", row, "vehicle")
        elif name:
            drivers.append(Driver(name, frozenset(jobs), vehicle if not jobs else None))
    return tuple(drivers)


def _check_version(version, path: str) -> None:
    """A clear word for plans from a newer shipgui, and for damaged version fields."""
    if isinstance(version, bool) or not isinstance(version, int):
        raise InputError(f"the plan document is damaged: its format version {version!r} is "
                         "not a whole number", file=path)
    if version > SCHEMA_VERSION:
        raise InputError(f"this plan was saved by a newer version of shipgui (plan format "
                         f"version {version}; this program reads up to version "
                         f"{SCHEMA_VERSION}). Update shipgui to open it; the file was not "
                         "changed.", file=path)
    if version < 1:
        raise InputError(f"plan document version {version} is not supported (this program "
                         f"reads versions 1 to {SCHEMA_VERSION})", file=path)


def read_plan_json(path: str | Path):
    """The parsed JSON of a plan document (never pickle, never eval); InputError if the
    file cannot be read or is not JSON."""
    path = Path(path)
    try:
        info = path.stat()
        if not stat.S_ISREG(info.st_mode):
            raise InputError("this is not an ordinary file", file=str(path))
        if info.st_size > MAX_PLAN_BYTES:
            raise InputError(f"the file is {info.st_size // (1024 * 1024)} MB; a plan document "
                             "is never that big", file=str(path))
        text = path.read_bytes()[:MAX_PLAN_BYTES + 1].decode("utf-8")
    except InputError:
        raise
    except (OSError, UnicodeDecodeError) as exc:
        raise InputError(f"cannot read the file: {exc}", file=str(path)) from None
    try:
        return json.loads(text)
    except json.JSONDecodeError as exc:
        raise InputError(f"the plan document is damaged (not valid JSON: {exc.msg})",
                         file=str(path), row=exc.lineno) from None
    except (ValueError, RecursionError):  # absurd numbers or nesting
        raise InputError("the plan document is damaged (not a plan's JSON)",
                         file=str(path)) from None


def read_plan_file(path: str | Path) -> DayInputs:
    """Read a plan file; InputError(s) name every problem."""
    return inputs_from_json(read_plan_json(path), str(path))
