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
from ..errors import InputError, ProblemCollector
from ..model import SITE_DETAILS, DayInputs, Job, Settings, Site, TravelPairs
from .files import write_bytes_atomic
from .readers import parse_priority
from .validation import (
    COORDINATE_RANGES,
    ID_COLUMNS,
    JOB_COLUMNS,
    MAX_TRAVEL_SECONDS,
    IdRegister,
    check_job,
    check_settings,
    check_site,
    check_text,
    check_travel,
)

__all__ = ["FORMAT", "SCHEMA_VERSION", "PLAN_SUFFIX", "inputs_to_json", "inputs_from_json",
           "plan_file_bytes", "write_plan_file", "read_plan_json", "read_plan_file"]

FORMAT = "shipgui-plan"
# Version 2 added what an older shipgui would silently drop: the longest working
# day, the vehicles available, drivers tied to their jobs, job priority and
# slot moves, rows of the source files.  An older program refuses a version-2
# file with a clear message rather than plan it without its limits; this one
# reads versions 1 and 2.
SCHEMA_VERSION = 2
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
                       "lon": x.lon, "x_km": x.x_km, "y_km": x.y_km, "row": x.row,
                       **{k: getattr(x, k) for k in SITE_DETAILS if getattr(x, k)}}
                      for x in inputs.sites],
            "travel": [{"from": a, "to": b, "seconds": sec, "row": row}
                       for (a, b), (sec, row) in inputs.travel.items()],
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
        # A file name the system could not decode holds stand-ins for its bytes
        # (lone surrogates), which UTF-8 cannot store: keep a readable form.
        "sources": {k: _storable(v) for k, v in inputs.sources.items()},
    }


def _job_record(j: Job) -> dict:
    record = {"job": j.id, "origin": j.origin, "destination": j.destination,
              "start": format_clock(j.start), "end": format_clock(j.end),
              "vehicle_class": j.vehicle_class, "customer": j.customer,
              "reference": j.reference, "notes": j.notes, "row": j.row}
    # Only where set, so days without them are saved as before.
    if j.priority != 1:
        record["priority"] = j.priority
    if not j.movable:
        record["movable"] = False
    return record


def _storable(text: str) -> str:
    return text.encode("utf-8", "replace").decode("utf-8")


def plan_file_bytes(inputs: DayInputs) -> bytes:
    """The plan file's bytes (UTF-8 JSON)."""
    text = json.dumps(inputs_to_json(inputs), indent=2, ensure_ascii=False) + "\n"
    return text.encode("utf-8")


def write_plan_file(inputs: DayInputs, path: str | Path) -> None:
    """Save ``inputs`` as a plan file, all or nothing; OSError says why not."""
    write_bytes_atomic(path, plan_file_bytes(inputs))


class _Reader:
    """Collects the problems of one plan document (up to the usual cap)."""

    def __init__(self, path: str) -> None:
        self.path = path
        self.issues = ProblemCollector()

    def add(self, message: str, row: int | None = None, column: str | None = None,
            job: str | None = None) -> None:
        self.issues.add(message, self.path, row, column, job)

    def text(self, record: dict, key: str, row: int | None, *, id_like: bool = False,
             required: bool = False) -> str | None:
        """The checked text of ``record[key]`` ('' when absent); None when refused."""
        value = record.get(key, "")
        if value is None:
            value = ""
        if not isinstance(value, str):
            self.add(f"'{key}' should be text", row, key)
            return None
        try:
            value = check_text(value, id_like=id_like)
        except ValueError as exc:
            self.add(str(exc), row, key)
            return None
        if required and not value:
            self.add(f"'{key}' is empty", row, key)
            return None
        return value

    def clock(self, value, row: int | None, key: str, job: str | None = None) -> int | None:
        if value is None or value == "":
            self.add(f"'{key}' is empty", row, key, job)
            return None
        if not isinstance(value, str):
            self.add(f"'{key}' should be a clock time HH:MM", row, key, job)
            return None
        try:
            parsed = parse_clock(value)
        except ValueError as exc:
            self.add(str(exc), row, key, job)
            return None
        if parsed.seconds is None:
            self.add(f"'{value}' should be a clock time HH:MM", row, key, job)
        return parsed.seconds

    def number(self, value, row: int | None, key: str, *, low: float, high: float,
               whole: bool = False) -> float | int | None:
        """A JSON number in [low, high]; huge integers (10**400) and infinities are
        refused like any value out of range, never converted."""
        if value is None:
            return None
        kind = "a whole number" if whole else "a number"
        if isinstance(value, bool) or not isinstance(value, int | float) \
                or (whole and not isinstance(value, int)) \
                or (isinstance(value, float) and not math.isfinite(value)) \
                or not low <= value <= high:
            self.add(f"'{key}' should be {kind} from {low:g} to {high:g}", row, key)
            return None
        return value

    def source_row(self, record: dict, row: int) -> int:
        """The record's row in the file it was first read from (kept for messages
        that name that file); 0 when unknown (added in the app, or an older plan)."""
        value = self.number(record.get("row"), row, "row", low=0, high=10**7, whole=True)
        return int(value or 0)

    def report(self, problems: list[tuple[str, str]], row: int | None,
               job: str | None = None) -> None:
        for column, message in problems:
            self.add(message, row, column, job)


def _records(reader: _Reader, inputs: dict, key: str) -> list[dict]:
    records = inputs.get(key, [])
    if not isinstance(records, list) or not all(isinstance(r, dict) for r in records):
        reader.add(f"'inputs.{key}' should be a list of records", None, key)
        return []
    return records


def _read_jobs(reader: _Reader, records: list[dict]) -> list[Job]:
    jobs = []
    ids = IdRegister("job")
    for row, r in enumerate(records, start=1):
        texts = {column: reader.text(r, column, row, id_like=column in ID_COLUMNS)
                 for column in JOB_COLUMNS}
        job_id = texts["job"] or None
        start = reader.clock(r.get("start"), row, "start", job_id)
        end = reader.clock(r.get("end"), row, "end", job_id)
        extra = _job_options(reader, r, row)
        if any(v is None for v in texts.values()) or None in (start, end, extra):
            continue
        job = Job(texts["job"], texts["origin"], texts["destination"] or texts["origin"],
                  start, end, texts["vehicle_class"], texts["customer"], texts["reference"],
                  texts["notes"], row=reader.source_row(r, row), **extra)
        problems = check_job(job)
        reader.report(problems, row, job_id)
        clash = ids.add(job.id, row) if job.id else None
        if clash:
            reader.add(clash, row, "job", job_id)
        elif not problems:
            jobs.append(job)
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
    ids = IdRegister("site")
    for row, r in enumerate(records, start=1):
        texts: dict = {k: reader.text(r, k, row, id_like=k == "site")
                 for k in ("site", "name", "address", *SITE_DETAILS)}
        coords = {k: reader.number(r.get(k), row, k, low=low, high=high)
                  for k, (low, high) in COORDINATE_RANGES.items()}
        bad = sum(r.get(k) is not None for k in coords) - sum(v is not None
                                                               for v in coords.values())
        if any(v is None for v in texts.values()) or bad:
            continue
        site = Site(texts["site"], texts["name"], texts["address"],
                    row=reader.source_row(r, row), **{k: texts[k] for k in SITE_DETAILS},
                    **{k: None if v is None else float(v) for k, v in coords.items()})
        problems = check_site(site)
        reader.report(problems, row)
        clash = ids.add(site.id, row) if site.id else None
        if clash:
            reader.add(clash, row, "site")
        elif not problems:
            sites.append(site)
    return sites


def _read_travel(reader: _Reader, records: list[dict]) -> TravelPairs:
    travel: TravelPairs = {}
    first: dict[tuple[str, str], int] = {}  # record of each pair, for messages
    for row, r in enumerate(records, start=1):
        a = reader.text(r, "from", row, id_like=True)
        b = reader.text(r, "to", row, id_like=True)
        seconds = reader.number(r.get("seconds"), row, "seconds", low=0,
                                high=MAX_TRAVEL_SECONDS, whole=True)
        if seconds is None and "seconds" in r and r["seconds"] is None:
            reader.add("'seconds' is empty", row, "seconds")
        if a is None or b is None or seconds is None:
            continue
        problems = check_travel(a, b, int(seconds))
        reader.report([("seconds" if c == "minutes" else c, m) for c, m in problems], row)
        if problems:
            continue
        if (a, b) in first:
            reader.add(f"the pair {a} -> {b} is listed twice (first in row {first[(a, b)]})",
                       row, "from")
            continue
        first[(a, b)] = row
        travel[(a, b)] = (int(seconds), reader.source_row(r, row))
    return travel


def _read_settings(reader: _Reader, raw) -> Settings:
    if not isinstance(raw, dict):
        reader.add("'settings' should be a record", None, "settings")
        return Settings()
    defaults = Settings()
    turnaround = reader.number(raw.get("turnaround_seconds", 0), None, "turnaround_seconds",
                               low=0, high=24 * 3600, whole=True)
    day = {k: None if raw.get(k) is None else reader.clock(raw[k], None, k)
           for k in ("day_start", "day_end")}
    speed = reader.number(raw.get("speed_kmh"), None, "speed_kmh", low=0.1, high=1000)
    circuity = reader.number(raw.get("circuity"), None, "circuity", low=1, high=100)
    max_day = _read_max_day(reader, raw.get("max_day_seconds"))
    depot = reader.text(raw, "depot", None, id_like=True) or None
    settings = Settings(turnaround=int(turnaround or 0), depot=depot, **day,
                        speed_kmh=float(speed or defaults.speed_kmh),
                        circuity=float(circuity or defaults.circuity), max_day=max_day,
                        **_vehicle_limits(reader, raw))
    names = {"turnaround": "turnaround_seconds"}
    reader.report([(names.get(k, k), m) for k, m in check_settings(settings)], None)
    return settings


def _read_names(reader: _Reader, raw, key: str, *, numbered: bool) -> dict:
    """driver_names (vehicle number -> name) or sources (file kind -> path)."""
    if raw is None:
        return {}
    if not isinstance(raw, dict):
        reader.add(f"'{key}' should be a record", None, key)
        return {}
    found: dict = {}
    for k, v in raw.items():
        try:
            check_text(k)
        except ValueError as exc:
            reader.add(f"a key {exc.args[0].removeprefix('the value')}", None, key)
            continue
        text = reader.text({f"{key}.{k}": v}, f"{key}.{k}", None)
        if not text:
            continue
        if not numbered:
            found[k] = text
        elif k.isascii() and k.isdigit() and len(k) < 7:
            found[int(k)] = text
    return found


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
    """The inputs in parsed plan-file JSON; raises InputErrors naming every problem
    (the same rules as the day files: :mod:`shipgui.core.io.validation`)."""
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
    sources = _read_names(reader, data.get("sources"), "sources", numbered=False)
    plan_date = None
    if data.get("plan_date"):
        try:
            plan_date = date.fromisoformat(str(data["plan_date"]))
        except ValueError:
            reader.add("'plan_date' should be a date like 2026-12-02", None, "plan_date")
    if not jobs and not reader.issues:
        reader.add("the plan document has no jobs")
    reader.issues.raise_if_any()
    return DayInputs(tuple(jobs), tuple(sites), travel, settings, plan_date, sources, drivers)


def _read_drivers(reader: _Reader, data: dict) -> tuple[Driver, ...]:
    """Driver names tied to their routes' jobs; files before that kept
    ``driver_names`` by vehicle number, tied to jobs at the first plan.  Names
    and job ids follow the text rules of every other value."""
    if "drivers" not in data:
        return drivers_from_numbers(
            _read_names(reader, data.get("driver_names"), "driver_names", numbered=True))
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
        elif not all(_clean(j, id_like=True) for j in jobs):
            reader.add("a job id in 'jobs' holds a control, broken or invisible character",
                       row, "jobs")
        elif vehicle is not None and (isinstance(vehicle, bool) or not isinstance(vehicle, int)
                                      or not 1 <= vehicle <= 1_000_000):
            reader.add("'vehicle' should be a vehicle number", row, "vehicle")
        elif name:
            drivers.append(Driver(name, frozenset(jobs), vehicle if not jobs else None))
    return tuple(drivers)


def _clean(text: str, *, id_like: bool = False) -> bool:
    try:
        check_text(text, id_like=id_like)
    except ValueError:
        return False
    return True


def _check_version(version, path: str) -> None:
    """A clear word for plans from a newer shipgui, and for damaged version fields."""
    if isinstance(version, bool) or not isinstance(version, int):
        shown = repr(version) if len(repr(version)) < 40 else "(a long value)"
        raise InputError(f"the plan document is damaged: its format version {shown} is "
                         "not a whole number", file=path)
    if version > 10**6:
        raise InputError("the plan document is damaged: its format version is an absurd "
                         "number", file=path)
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
        # A byte-order mark (some editors write one) is not part of the JSON.
        text = path.read_bytes()[:MAX_PLAN_BYTES + 1].decode("utf-8-sig")
    except InputError:
        raise
    except FileNotFoundError:
        raise InputError("the file does not exist", file=str(path)) from None
    except UnicodeDecodeError:
        raise InputError("the plan document is damaged (not UTF-8 text)", file=str(path)) \
            from None
    except OSError as exc:
        raise InputError(f"the file cannot be read ({exc.strerror or exc})",
                         file=str(path)) from None
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
