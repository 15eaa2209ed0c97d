"""The command line: ``shipgui solve``, ``shipgui demo``, and the desktop app.

Exit status: 0 solved; 2 bad input or bad arguments (one message naming the
file, row and column; no traceback); 1 anything else, including a plan that
failed its independent verification.  No output file is written or changed
unless the whole solve succeeded.
"""

from __future__ import annotations

import argparse
import math
import os
import sys
import time
from dataclasses import replace
from datetime import date
from pathlib import Path

from shipgui import __version__
from shipgui.core import InputError, Settings, format_clock, format_minutes, solve_day
from shipgui.core.caution import CAUTION
from shipgui.core.clock import (
    NUMBER_FORMS,
    format_day_clock,
    format_duration,
    parse_clock,
    parse_decimal,
    parse_length,
    parse_minutes,
)
from shipgui.core.day import build_inputs
from shipgui.core.demo import DEMO_SETTINGS, demo_files
from shipgui.core.export.plan_json import plan_to_json
from shipgui.core.fleet.deadhead import TRADEOFF_SHOWN, tradeoff_rows
from shipgui.core.fleet.schedule import class_counts
from shipgui.core.fleet.shortfall import priority_text
from shipgui.core.fleet.solve import LEAST_DEADHEAD_SECONDS
from shipgui.core.fleet.suggest import DEFAULT_MAX_MOVE, SuggestionSearch, suggest_moves
from shipgui.core.io.files import name_refused, write_files_atomic, write_problem
from shipgui.core.io.plan_file import PLAN_SUFFIX, read_plan_file
from shipgui.core.io.readers import read_inputs
from shipgui.core.io.tables import parse_delimiter
from shipgui.core.model import (
    DEFAULT_CIRCUITY,
    DEFAULT_SPEED_KMH,
    Day,
    DayInputs,
    Plan,
    priority_units,
)
from shipgui.core.planner import DEFAULT_TIME_LIMIT
from shipgui.core.prepare import (
    FAMILIES,
    LATER,
    Preparation,
    kernels_ready,
    needs_later,
    warm,
)
from shipgui.core.workday.explain import limit_cost_text, search_text
from shipgui.terminal import ProgressLine


class UsageError(Exception):
    """Bad arguments: exit 2 with this message."""


class _Parser(argparse.ArgumentParser):
    def error(self, message: str):  # one line, exit 2, no traceback
        raise UsageError(f"{self.prog}: {message}")


# Checked ranges of the number options: wide enough for any real day, narrow
# enough that no option can make the arithmetic meaningless (common practice).
MAX_TURNAROUND_MIN = 24 * 60
SPEED_KMH = (1.0, 300.0)
CIRCUITY = (1.0, 5.0)
MAX_COST = 1e9
MAX_TRADEOFF = 50
# The CLI prints this many certificate ids; the rest go to --json / --pdf.
CERTIFICATE_IDS_SHOWN = 30


def _number(option: str, low: float, high: float):
    """An argparse type: a finite number in [low, high], else exit 2 naming the range."""
    def parse(text: str) -> float:
        try:  # the one number form of the input files: 12.5 or 12,5
            value = float(parse_decimal(text))
        except ValueError:
            raise argparse.ArgumentTypeError(f"'{text}' is not a number ({NUMBER_FORMS})") \
                from None
        if not (math.isfinite(value) and low <= value <= high):
            raise argparse.ArgumentTypeError(f"'{text}' is not a number from {low:g} to "
                                             f"{high:g}")
        return value
    parse.__name__ = option  # argparse names the type in its message
    return parse


def _count(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        value = -1
    if not 0 <= value <= MAX_TRADEOFF:
        raise argparse.ArgumentTypeError(f"'{text}' is not a whole number from 0 to "
                                         f"{MAX_TRADEOFF}")
    return value


def _plan_date(text: str) -> date:
    try:
        if len(text) != 10:
            raise ValueError
        return date.fromisoformat(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"'{text}' is not a date YYYY-MM-DD") from None


def _solve_parser() -> argparse.ArgumentParser:
    p = _Parser(prog="shipgui solve",
                description="Minimum vehicles, routes and proof for a day of jobs.")
    p.add_argument("jobs", help="jobs file (CSV or XLSX), or a plan file saved by the app "
                   "(.shipgui; it carries its sites, travel and settings)")
    p.add_argument("--sites", help="sites file (names, addresses, coordinates)")
    p.add_argument("--travel", help="travel file (from, to, minutes)")
    p.add_argument("--sheet", metavar="NAME", help="sheet of the jobs workbook (default: first)")
    p.add_argument("--sites-sheet", metavar="NAME", help="sheet of the sites workbook")
    p.add_argument("--travel-sheet", metavar="NAME", help="sheet of the travel workbook")
    p.add_argument("--delimiter", metavar="D",
                   help="CSV delimiter: comma, semicolon or tab (default: read from the header)")
    p.add_argument("--turnaround", metavar="MIN",
                   help="minutes between one job's end and the next job's drive "
                   f"(default 0, at most {MAX_TURNAROUND_MIN})")
    p.add_argument("--depot", metavar="SITE", help="site the vehicles start from and return to")
    p.add_argument("--day-start", metavar="HH:MM", help="earliest departure from the depot")
    p.add_argument("--day-end", metavar="HH:MM", help="latest return to the depot")
    p.add_argument("--speed", metavar="KMH", type=_number("--speed", *SPEED_KMH),
                   help=f"average speed for estimated travel (default {DEFAULT_SPEED_KMH:g}; "
                   f"{SPEED_KMH[0]:g} to {SPEED_KMH[1]:g})")
    p.add_argument("--circuity", metavar="F", type=_number("--circuity", *CIRCUITY),
                   help=f"road distance / straight distance (default {DEFAULT_CIRCUITY:g}; "
                   f"{CIRCUITY[0]:g} to {CIRCUITY[1]:g})")
    _add_common(p)
    return p


def _add_common(p: argparse.ArgumentParser) -> None:
    """Options of both `solve` and `demo`: the plan date, the plan's extras, outputs."""
    p.add_argument("--date", metavar="YYYY-MM-DD", type=_plan_date,
                   help="the plan's date, printed on every page (default: the date of the "
                   "jobs file's date-times, if it has any)")
    p.add_argument("--max-day", metavar="H:MM",
                   help="longest working day of one vehicle and its driver, depot to depot "
                   "(e.g. 11:00 or 660 minutes; default: no limit). Drivers' hours and rest "
                   "rules are set by local law: this is your input, never a legal default")
    p.add_argument("--time-limit", metavar="S", type=_number("--time-limit", 0.1, 86400),
                   default=DEFAULT_TIME_LIMIT,
                   help="seconds the search may run with --max-day before it keeps the best "
                   f"plan found (default {DEFAULT_TIME_LIMIT:g}; it stops earlier once proven)")
    p.add_argument("--least-deadhead", action=argparse.BooleanOptionalAction, default=True,
                   help="among minimum-fleet plans, pick one with the least empty driving "
                   "(default; --no-least-deadhead keeps any minimum-fleet routes)")
    p.add_argument("--least-deadhead-time", metavar="S",
                   type=_number("--least-deadhead-time", 0, 86400),
                   default=LEAST_DEADHEAD_SECONDS,
                   help="seconds the search for the least empty driving may run before it "
                   "keeps minimum-fleet routes, with a note (default "
                   f"{LEAST_DEADHEAD_SECONDS:g}; 0 for no limit)")
    p.add_argument("--tradeoff", metavar="N", type=_count, default=TRADEOFF_SHOWN,
                   help=f"also price up to N extra vehicles (default {TRADEOFF_SHOWN}; "
                   f"0 for none; at most {MAX_TRADEOFF})")
    p.add_argument("--vehicle-cost", metavar="COST", type=_number("--vehicle-cost", 0, MAX_COST),
                   help="cost of one vehicle-day, to find the cheapest fleet size")
    p.add_argument("--empty-hour-cost", metavar="COST",
                   type=_number("--empty-hour-cost", 0, MAX_COST),
                   help="cost of one hour of empty driving, to find the cheapest fleet size")
    p.add_argument("--json", metavar="OUT.json", help="write the plan as JSON")
    p.add_argument("--pdf", metavar="OUT.pdf",
                   help="write the summary, driver sheets and the proof as a PDF")
    p.add_argument("--routes", metavar="OUT.csv|OUT.xlsx",
                   help="write one row per job with vehicle and sequence (for spreadsheets)")
    p.add_argument("--verbose", action="store_true", help="print timings per stage")
    _add_fleet(p)


MAX_SUGGESTIONS = 50  # more is a list nobody reads; each one is a solve to check


def _add_fleet(p: argparse.ArgumentParser) -> None:
    p.add_argument("--vehicles", metavar="K|CLASS=K", action="append",
                   help="vehicles available: one number, or CLASS=K per vehicle class "
                   "(repeat it); when fewer than needed, the jobs of the most priority are "
                   "served and the rest listed")
    p.add_argument("--suggest", metavar="N", type=int,
                   help="look for up to N sets of slot moves that would save a vehicle")
    p.add_argument("--max-move", metavar="MIN",
                   help=f"largest move of one job for --suggest, in minutes (default "
                   f"{DEFAULT_MAX_MOVE // 60})")


def _vehicle_limits(values: list[str] | None) -> dict:
    """Settings fields for ``--vehicles`` (empty when not given)."""
    if not values:
        return {}
    total, per_class = None, {}
    for text in values:
        name, sep, count = text.rpartition("=")
        try:
            k = int(count.strip())
        except ValueError:
            raise UsageError(f"--vehicles {text}: give a whole number of vehicles, or "
                             "CLASS=K") from None
        if k < 1:
            raise UsageError(f"--vehicles {text}: at least 1 vehicle is needed")
        if not sep:
            if total is not None:
                raise UsageError("--vehicles: give one number, or CLASS=K for each class")
            total = k
        elif not name.strip():
            raise UsageError(f"--vehicles {text}: the class name is missing before '='")
        elif name.strip() in per_class:
            raise UsageError(f"--vehicles: class '{name.strip()}' is given twice")
        else:
            per_class[name.strip()] = k
    if total is not None and per_class:
        raise UsageError("--vehicles: give either one number for all vehicles or CLASS=K "
                         "per class, not both")
    return {"vehicles": total, "class_vehicles": tuple(sorted(per_class.items()))}


def _suggest_options(args: argparse.Namespace) -> tuple[int, int]:
    """(how many suggestions, largest move in seconds); (0, ...) without --suggest."""
    count = getattr(args, "suggest", None)
    text = getattr(args, "max_move", None)
    if count is None:
        if text is not None:
            raise UsageError("--max-move goes with --suggest N")
        return 0, DEFAULT_MAX_MOVE
    if not 1 <= count <= MAX_SUGGESTIONS:
        raise UsageError(f"--suggest: ask for 1 to {MAX_SUGGESTIONS} suggestions")
    if getattr(args, "max_day", None) is not None:
        raise UsageError("--suggest together with --max-day is not yet supported")
    max_move = DEFAULT_MAX_MOVE
    if text is not None:
        try:
            max_move = parse_minutes(text, allow_zero=False)
        except ValueError as exc:
            raise UsageError(f"--max-move: {exc}") from None
    return count, max_move


def _settings(args: argparse.Namespace, base: Settings) -> Settings:
    """``base`` with the settings given on the command line."""
    def clock(option: str, text: str | None, default: int | None) -> int | None:
        if text is None:
            return default
        try:
            value = parse_clock(text)
        except ValueError as exc:
            raise UsageError(f"{option}: {exc}") from None
        if value.seconds is None:
            raise UsageError(f"{option}: give a clock time HH:MM")
        return value.seconds
    given = {name: getattr(args, name, None) for name in
             ("turnaround", "depot", "day_start", "day_end", "speed", "circuity", "max_day",
              "vehicles")}
    args = argparse.Namespace(**given)
    max_day = base.max_day
    if args.max_day is not None:
        try:
            max_day = parse_length(args.max_day)
        except ValueError as exc:
            raise UsageError(f"--max-day: {exc}") from None
    turnaround = base.turnaround
    if args.turnaround is not None:
        try:
            turnaround = parse_minutes(args.turnaround)
        except ValueError as exc:
            raise UsageError(f"--turnaround: {exc}") from None
        if turnaround > MAX_TURNAROUND_MIN * 60:
            raise UsageError(f"--turnaround: at most {MAX_TURNAROUND_MIN} minutes (a day)")
    depot = args.depot if args.depot is not None else base.depot
    day_start = clock("--day-start", args.day_start, base.day_start)
    day_end = clock("--day-end", args.day_end, base.day_end)
    if (day_start is not None or day_end is not None) and not depot:
        raise UsageError("--day-start and --day-end need --depot")
    if day_start is not None and day_end is not None and day_end <= day_start:
        raise UsageError("--day-end must be after --day-start (use 25:00 for 01:00 next day)")
    speed = base.speed_kmh if args.speed is None else args.speed
    circuity = base.circuity if args.circuity is None else args.circuity
    if not (math.isfinite(speed) and speed > 0):
        raise UsageError("--speed must be more than 0 km/h")
    if not (math.isfinite(circuity) and circuity >= 1):
        raise UsageError("--circuity must be at least 1")
    limits = _vehicle_limits(args.vehicles)
    return replace(base, turnaround=turnaround, depot=depot, day_start=day_start,
                   day_end=day_end, speed_kmh=speed, circuity=circuity, max_day=max_day,
                   **limits)


OUTPUT_OPTIONS = ("json", "pdf", "routes")


def _check_outputs(args: argparse.Namespace, inputs: list[str | None]) -> None:
    """Refuse, before any work, outputs that would overwrite an input or each other,
    or that cannot be written (exit 2 with the reason)."""
    sources = {os.path.realpath(p) for p in inputs if p}
    routes = getattr(args, "routes", None)
    if routes and Path(routes).suffix.lower() not in (".csv", ".xlsx"):
        raise UsageError(f"--routes {routes}: the name must end in .csv or .xlsx")
    seen: dict[str, str] = {}
    for option in OUTPUT_OPTIONS:
        out = getattr(args, option, None)
        if out is None:
            continue
        if not out.strip():
            raise UsageError(f"--{option}: give a file name")
        path = os.path.realpath(out)  # links resolved: two names for one file clash
        if path in sources:
            raise UsageError(f"--{option} {out}: that is an input file; choose another name")
        if path in seen:
            raise UsageError(f"--{option} {out}: the same file as --{seen[path]}; "
                             "give each output its own name")
        seen[path] = option
        problem = _output_problem(Path(path))
        if problem:
            raise UsageError(f"--{option} {out}: {problem}")


def _output_problem(path: Path) -> str:
    """Why ``path`` (links resolved) cannot be written, or ''."""
    folder = path.parent
    try:
        limit = os.pathconf(folder, "PC_NAME_MAX")
    except (AttributeError, OSError, ValueError):
        limit = 255
    if len(os.fsencode(path.name)) > limit:
        return (f"the name is too long for this file system ({len(os.fsencode(path.name))} "
                f"bytes; at most {limit})")
    try:
        if not folder.is_dir():
            return f"the folder {folder} does not exist"
        if path.is_dir():
            return "that is a folder"
        if path.exists() and not path.is_file():
            return "that is not a regular file; choose a file name"
    except OSError as exc:
        return write_problem(exc)
    if not os.access(folder, os.W_OK):
        return f"permission denied: cannot create files in {folder}"
    if path.exists() and not os.access(path, os.W_OK):
        return "the file is read-only"
    return ""


def _cost_model(plan: Plan, args: argparse.Namespace) -> dict | None:
    """Cheapest fleet size over the trade-off points for the given unit costs."""
    if args.vehicle_cost is None and args.empty_hour_cost is None:
        return None
    vehicle, hour = args.vehicle_cost or 0.0, args.empty_hour_cost or 0.0
    # Exactly k vehicles out: each one counts at the vehicle cost.
    points = plan.tradeoff_exact or ((plan.vehicles, plan.deadhead_seconds),)
    costs = [{"vehicles": k, "cost": round(k * vehicle + d / 3600 * hour, 2)}
             for k, d in points]
    cheapest = min(costs, key=lambda c: (c["cost"], c["vehicles"]))
    return {"vehicle_cost": vehicle, "empty_hour_cost": hour, "costs": costs,
            "cheapest_vehicles": cheapest["vehicles"]}


def _render_outputs(plan: Plan, args: argparse.Namespace,
                    suggestions: SuggestionSearch | None = None) -> dict[str, bytes]:
    outputs: dict[str, bytes] = {}
    if args.json:
        outputs[args.json] = plan_to_json(plan, cost_model=_cost_model(plan, args),
                                          suggestions=suggestions).encode("utf-8")
    if args.pdf:
        from shipgui.report import build_pdf_bytes
        outputs[args.pdf] = build_pdf_bytes(plan, suggestions=suggestions)
    if getattr(args, "routes", None):
        from shipgui.core.export.routes_table import (
            route_rows,
            routes_csv_bytes,
            routes_xlsx_bytes,
        )
        rows = route_rows(plan)
        xlsx = Path(args.routes).suffix.lower() == ".xlsx"
        outputs[args.routes] = routes_xlsx_bytes(rows) if xlsx else routes_csv_bytes(rows)
    return outputs


def _summary(plan: Plan, label: str, args: argparse.Namespace | None = None) -> str:
    """What the terminal shows: the answer, why not fewer, empty driving, warnings,
    the first vehicles; ``args`` names where the long lists went."""
    day = plan.day
    lines = [f"Day: {label} - {day.n} jobs, {len(day.site_ids)} sites"
             + (f", plan date {day.plan_date.isoformat()}" if day.plan_date else "")
             + f" (fingerprint {day.fingerprint})"]
    if not plan.verified:
        lines.append("PLAN FAILED ITS INDEPENDENT CHECK - do not use it:")
        lines.extend(f"  {f}" for f in plan.verification_failures)
        return "\n".join(lines)
    if plan.shortfall is not None and plan.shortfall.unserved:
        lines += _workday_lines(plan)[:1] if plan.workday is not None else []
        lines += _shortfall_lines(plan)
    elif plan.workday is not None:
        lines += _workday_lines(plan)
    else:
        lines.append(f"Vehicles needed: {plan.vehicles} (minimum; independently verified)")
    counts = class_counts(plan)
    if len(counts) > 1:
        lines.append("  by class: " + ", ".join(f"{name or '(no class)'} {count}"
                                                for name, count in counts))
    short_within_limit = plan.workday is not None and plan.shortfall is not None \
        and plan.shortfall.unserved
    if not short_within_limit:  # there the question is which jobs, not how few vehicles
        lines += _certificate_lines(plan, args) if not plan.certificate_weights \
            else _weights_lines(plan, args)
    lines += _deadhead_lines(plan)
    for w in day.warnings:
        lines.append(f"Warning: {w}")
    for number, route in enumerate(plan.routes[:5], start=1):
        jobs = [day.jobs[k] for k in route]
        lines.append(f"  vehicle {number}: {format_day_clock(jobs[0].start)} to "
                     f"{format_day_clock(jobs[-1].end)}  " + " ".join(j.id for j in jobs))
    if plan.vehicles > 5:
        lines.append(f"  ... and {plan.vehicles - 5} more vehicles (use --json or --pdf)")
    lines.append(CAUTION)
    return "\n".join(lines)


def _search_progress():
    """Improvements of the working-day search, on a terminal only (stderr)."""
    if not sys.stderr.isatty():
        return None

    def show(progress) -> None:
        print(f"  searching: {progress.vehicles} vehicles planned, at least "
              f"{progress.lower_bound} needed ({progress.seconds:.1f} s)", file=sys.stderr)
    return show


def _workday_lines(plan: Plan) -> list[str]:
    """The answer under a working-day limit: what is planned and what is proven."""
    info = plan.workday
    limit = format_duration(info.limit)
    span = "depot to depot" if plan.day.settings.depot else "first start to last end"
    lines = [f"Longest working day: {limit}, {span} (your setting; drivers' hours "
             "and rest rules are local law)"]
    if plan.proven_minimum:
        lines.append(f"Vehicles needed: {plan.vehicles} (proven minimum with working days of "
                     f"at most {limit}; independently verified)")
    else:
        why = search_text(info)
        lines.append(f"Vehicles: {plan.vehicles} planned, at least {plan.lower_bound} needed "
                     f"({why}; plan independently verified)")
        if info.minimum_by_search:
            lines.append(f"  {plan.vehicles} is the minimum: the search found no plan with "
                         "fewer, though the printed proof only reaches "
                         f"{plan.lower_bound}")
    lines.append(limit_cost_text(plan))
    return lines


def _weights_lines(plan: Plan, args: argparse.Namespace | None) -> list[str]:
    """The proof by weights: how to read it and where the numbers are."""
    total = sum(w for _, w in plan.certificate_weights)
    where = ("the JSON (certificate.weights)" if args is not None and args.json
             else "the JSON (--json FILE, key certificate.weights)")
    if args is not None and args.pdf:
        where += " and the PDF's proof pages"
    return [f"Why not fewer: {len(plan.certificate_weights)} jobs carry weights that add up "
            f"to {total:.2f}, and no working day within the limit carries more than 1 of "
            f"them, so at least {plan.lower_bound} vehicles are needed; the weights are in "
            f"{where}"]


def _certificate_lines(plan: Plan, args: argparse.Namespace | None) -> list[str]:
    """The proof's jobs, ten to a line; a long list is cut and says where it is whole."""
    ids = plan.certificate_ids()
    jobs = "job" if len(ids) == 1 else "jobs"
    reason = ("pairwise do not fit one working day (one cannot follow the other, or "
              "together they make too long a day)" if plan.workday is not None
              else "pairwise cannot share a vehicle")
    lines = [f"Why not fewer: these {len(ids)} {jobs} {reason}, so each needs its own:"]
    shown = ids if len(ids) <= CERTIFICATE_IDS_SHOWN else ids[:CERTIFICATE_IDS_SHOWN]
    for k in range(0, len(shown), 10):
        lines.append("  " + " ".join(shown[k:k + 10]))
    if len(shown) < len(ids):
        where = [f"{args.json} (certificate.jobs)"] if args is not None and args.json else []
        if args is not None and args.pdf:
            where.append(f"{args.pdf} (the proof pages)")
        lines.append(f"  ... and {len(ids) - len(shown)} more; the whole list is in "
                     + (" and ".join(where) if where else
                        "the JSON (--json FILE, key certificate.jobs) or the PDF (--pdf FILE)"))
    return lines


def _shortfall_lines(plan: Plan) -> list[str]:
    """What a limit on the vehicles leaves undone, and the proof in one line."""
    day, sf = plan.day, plan.shortfall
    s = day.settings
    available = (str(s.vehicles) if s.vehicles is not None
                 else ", ".join(f"{c}: {k}" for c, k in s.class_vehicles))
    ids = [day.jobs[k].id for k in sf.unserved]
    total = sum(priority_units(j) for j in day.jobs)
    lines = [f"Vehicles available: {available} ({sf.needed_for_all} needed to serve every "
             f"job); this plan uses {plan.vehicles}",
             f"Not served: {len(ids)} of {day.n} jobs, priority "
             f"{priority_text(total - sf.served_priority)} of {priority_text(total)} "
             "(hand them on or rebook them):"]
    lines += ["  " + " ".join(ids[k:k + 10]) for k in range(0, len(ids), 10)]
    within = " within the working-day limit" if plan.workday is not None else ""
    if sf.exact:
        lines.append(f"Served priority {priority_text(sf.served_priority)}: no plan with these "
                     f"vehicles{within} serves more (proof: --pdf or --json; independently "
                     "verified)")
    else:
        lines.append(f"Served priority {priority_text(sf.served_priority)}; no plan with these "
                     f"vehicles{within} serves more than {priority_text(sf.served_upper_bound)}"
                     " (proof: --pdf or --json; independently verified)")
    if plan.workday is None:
        lines.append(f"Vehicles used: {plan.vehicles}, the fewest for the jobs served")
    return lines


def _suggestion_lines(plan: Plan, search: SuggestionSearch) -> list[str]:
    jobs = plan.day.jobs
    head = (f"What would save a vehicle (slot moves of at most "
            f"{format_minutes(search.max_move)} min; {search.checked} move sets checked in "
            f"{search.seconds:.2f} s{'' if search.complete else ', search cut short'}):")
    if not search.suggestions:
        return [head, "  no moves within that limit save a vehicle"]
    lines = [head]
    for number, suggestion in enumerate(search.suggestions, start=1):
        parts = []
        for m in suggestion.moves:
            job = jobs[m.job]
            way = "later" if m.shift > 0 else "earlier"
            before = f"{format_day_clock(job.start)}-{format_day_clock(job.end)}"
            after = f"{format_day_clock(job.start + m.shift)}-{format_day_clock(job.end + m.shift)}"
            parts.append(f"{job.id} {before} -> {after} ({format_minutes(abs(m.shift))} min {way})")
        lines.append(f"  {number}. {'; '.join(parts)}: {suggestion.vehicles} vehicles")
    lines.append("  Each move changes a booked slot: the customer must agree first.")
    return lines


def _deadhead_lines(plan: Plan) -> list[str]:
    """Empty driving, and what more vehicles would save (each figure printed once)."""
    least = f" (the least possible with {plan.vehicles} vehicles)" if plan.least_deadhead else ""
    if plan.workday is not None:
        least = {"proven least": f" (the least possible with {plan.vehicles} vehicles "
                                 "within the working day)",
                 "searched": " (searched for less; not proven least for this fleet)"}.get(
            plan.workday.deadhead_status, " (not optimised: no time was left)")
    lines = [f"Empty driving: {format_duration(plan.deadhead_seconds)} in all{least}"]
    if plan.deadhead_note:
        lines.append(f"Note: {plan.deadhead_note} (--least-deadhead-time 0: no time limit)")
    for row in tradeoff_rows(plan, MAX_TRADEOFF)[1:]:
        note = f" (all {row.vehicles} out: {format_duration(row.exactly)})" \
            if row.exactly_differs else ""
        lines.append(f"  with at most {row.vehicles} vehicles: "
                     f"{format_duration(row.at_most)} empty driving{note}")
    return lines


def _input_options(args: argparse.Namespace) -> dict:
    """Sheets and delimiter for the readers, from the command line."""
    sheets = {kind: name for kind, name in (("jobs", getattr(args, "sheet", None)),
                                            ("sites", getattr(args, "sites_sheet", None)),
                                            ("travel", getattr(args, "travel_sheet", None)))
              if name}
    options: dict = {"sheets": sheets or None}
    if getattr(args, "delimiter", None):
        try:
            options["delimiter"] = parse_delimiter(args.delimiter)
        except ValueError as exc:
            raise UsageError(f"--delimiter: {exc}") from None
    return options


def _read(args: argparse.Namespace, files: dict[str, str | None],
          base: Settings) -> DayInputs:
    """The day's inputs: a plan file with its own settings, or the day files."""
    for kind, path in files.items():
        if path is not None and not path.strip():
            raise UsageError(f"--{kind}: give a file name" if kind != "jobs"
                             else "give the jobs file's name")
    if Path(files["jobs"] or "").suffix.lower() == PLAN_SUFFIX:
        given = [f"--{name.replace('_', '-')}" for name in
                 ("sites", "travel", "sheet", "sites_sheet", "travel_sheet", "delimiter")
                 if getattr(args, name, None)]
        if given:
            raise UsageError(f"{files['jobs']} is a plan file: it carries its own sites and "
                             f"travel times, so {given[0]} does not apply")
        inputs = read_plan_file(files["jobs"])
        # A plan file's times are relative to its day: --date may move it to another.
        return replace(inputs, settings=_settings(args, inputs.settings),
                       plan_date=args.date or inputs.plan_date)
    inputs = read_inputs(files["jobs"], files.get("sites"), files.get("travel"),
                         settings=_settings(args, base), **_input_options(args))
    return replace(inputs, plan_date=_checked_date(args.date, inputs))


def _checked_date(given: date | None, inputs: DayInputs) -> date | None:
    """The plan date: ``--date``, else the date of the jobs file's date-times.  When
    both are there they must agree: the file's times count from its own date."""
    found = inputs.plan_date
    if given is not None and found is not None and given != found:
        raise UsageError(f"--date {given.isoformat()}: the jobs file's date-times start on "
                         f"{found.isoformat()}; give that date or leave --date out")
    return given or found


def _start_preparation() -> Preparation | None:
    """On the first start, compile the kernels in child processes while the
    input is read (said once, on stderr, so that the wait is explained); this
    process compiles the matching family itself meanwhile (one start-up less)."""
    if kernels_ready():
        return None
    print("Preparing the solver for this computer (first start only, a few seconds)...",
          file=sys.stderr, flush=True)
    return Preparation(tuple(f for f in FAMILIES if f != "matching"))


def _read_and_prepare(args: argparse.Namespace, files: dict[str, str | None],
                      base: Settings, progress: ProgressLine) -> Day:
    progress.stage("reading")
    preparation = _start_preparation()
    try:
        day = build_inputs(_read(args, files, base))
        if preparation is not None:
            progress.stage("preparing")
            warm("matching")
            preparation.wait()
        if needs_later(day) and not kernels_ready(LATER):  # they build on the first ones
            preparation = Preparation(LATER)
            preparation.wait()
        return day
    finally:
        if preparation is not None:
            preparation.stop()


def _run_solve(args: argparse.Namespace, files: dict[str, str | None], base: Settings,
               label: str) -> int:
    _check_outputs(args, list(files.values()))
    count, max_move = _suggest_options(args)
    limit = args.least_deadhead_time or None
    t0 = time.perf_counter()
    progress = ProgressLine(limit_note=f"stops after {limit:g} s" if limit else "")
    try:
        day = _read_and_prepare(args, files, base, progress)
        if day.settings.max_day is not None:
            progress.close()  # a working-day search prints its own progress lines
        t1 = time.perf_counter()
        progress.stage("solving")
        plan = solve_day(day, least_deadhead=args.least_deadhead, tradeoff=args.tradeoff,
                         time_limit=args.time_limit, on_progress=_search_progress(),
                         progress=progress.stage, least_deadhead_seconds=limit)
    finally:
        progress.close()
    if not plan.verified:
        print(_summary(plan, label), file=sys.stderr)
        return 1
    search = suggest_moves(day, count, max_move=max_move) if count else None
    t2 = time.perf_counter()
    outputs = _render_outputs(plan, args, search)  # every output in memory first ...
    _write_outputs(outputs)  # ... then all of them, or none
    t3 = time.perf_counter()
    try:
        _report(plan, label, args, outputs, {"reading and checking input": t1 - t0,
                                             **plan.timings,
                                             **({"suggestions": search.seconds}
                                                if search else {}),
                                             "writing output": t3 - t2}, search)
    except BrokenPipeError:  # the reader stopped listening; the work is done
        _quiet_stdout()
    return 0


def _write_outputs(outputs: dict[str, bytes]) -> None:
    """Write all outputs or none; a name or place the system refuses is exit 2."""
    try:
        write_files_atomic(outputs)
    except OSError as exc:
        message = (f"shipgui: cannot write {exc.filename}: {write_problem(exc)}; "
                   "nothing was written")
        if name_refused(exc):
            raise UsageError(message) from None
        raise _WriteFailed(message) from None


class _WriteFailed(Exception):
    """Writing the outputs failed for a reason not in the arguments (exit 1)."""


def _report(plan: Plan, label: str, args: argparse.Namespace, outputs: dict[str, bytes],
            stages: dict[str, float], search: SuggestionSearch | None = None) -> None:
    print(_summary(plan, label, args))
    if search is not None:
        print("\n".join(_suggestion_lines(plan, search)))
    model = _cost_model(plan, args)
    if model:
        print(f"Cheapest fleet for the given costs: {model['cheapest_vehicles']} vehicles")
    for path in outputs:
        print(f"Wrote {path}")
    if args.verbose:
        print(f"Timings (kernel {plan.kernel}):")
        for name, seconds in stages.items():
            print(f"  {name:<28} {seconds * 1000:9.1f} ms")
    sys.stdout.flush()


def cmd_solve(argv: list[str]) -> int:
    args = _solve_parser().parse_args(argv)
    files = {"jobs": args.jobs, "sites": args.sites, "travel": args.travel}
    return _run_solve(args, files, Settings(), args.jobs)


def cmd_demo(argv: list[str]) -> int:
    p = _Parser(prog="shipgui demo", description="Solve the built-in invented demo day "
                "(depot, day and turnaround as printed on the first line).")
    _add_common(p)
    args = p.parse_args(argv)
    files = {k: str(v) for k, v in demo_files().items()}
    print("Demo: Brindlemoor Building Supply, an invented builders' merchant; depot YARD, "
          f"day {format_clock(DEMO_SETTINGS.day_start)}-{format_clock(DEMO_SETTINGS.day_end)}, "
          f"turnaround {format_minutes(DEMO_SETTINGS.turnaround)} min.")
    return _run_solve(args, files, DEMO_SETTINGS, "built-in demo day")


def _has_display() -> bool:
    return bool(os.environ.get("DISPLAY") or os.environ.get("WAYLAND_DISPLAY")
                or os.environ.get("QT_QPA_PLATFORM") or sys.platform in ("win32", "darwin"))


def cmd_gui(argv: list[str]) -> int:
    p = _Parser(prog="shipgui", description="shipgui: minimum fleet with proof. Commands: "
                "'shipgui solve JOBS.csv ...', 'shipgui demo'; with no command the desktop "
                "app opens.")
    p.add_argument("files", nargs="*", help="a plan file or a jobs CSV to open")
    p.add_argument("--demo", action="store_true", help="open the built-in demo day")
    p.add_argument("--screenshot", metavar="FILE.png",
                   help="render the window after solving, save it, and exit")
    p.add_argument("--version", action="version", version=f"shipgui {__version__}")
    args = p.parse_args(argv)
    if not _has_display() and not args.screenshot:
        print("No display found (DISPLAY/WAYLAND_DISPLAY unset): showing the headless "
              "summary instead of the window.")
        if args.demo or not args.files:
            return cmd_demo([])
        return cmd_solve(args.files[:1])
    try:
        from shipgui.gui.app import run
    except ImportError as exc:
        raise UsageError(f"the desktop app cannot start: {exc}") from None
    return run(args.files, demo=args.demo, screenshot=args.screenshot)


def main(argv: list[str] | None = None) -> int:
    argv = list(sys.argv[1:] if argv is None else argv)
    commands = {"solve": cmd_solve, "demo": cmd_demo}
    try:
        if argv and argv[0] in commands:
            return commands[argv[0]](argv[1:])
        return cmd_gui(argv)
    except UsageError as exc:
        print(str(exc), file=sys.stderr)
        return 2
    except InputError as exc:
        print(f"shipgui: input error: {exc}", file=sys.stderr)
        return 2
    except _WriteFailed as exc:
        print(str(exc), file=sys.stderr)
        return 1
    except KeyboardInterrupt:
        print("shipgui: interrupted", file=sys.stderr)
        return 1
    except BrokenPipeError:  # e.g. `shipgui demo | head -1` before the work was done
        _quiet_stdout()
        return 1
    except Exception as exc:  # noqa: BLE001 - the contract: no traceback, exit 1
        if os.environ.get("SHIPGUI_DEBUG"):
            raise
        print(f"shipgui: internal error ({type(exc).__name__}: {exc}); nothing was written. "
              "Set SHIPGUI_DEBUG=1 for details.", file=sys.stderr)
        return 1


def _quiet_stdout() -> None:
    """Send what is left for stdout nowhere: its reader has gone (the usual recipe,
    so that Python's final flush does not complain either)."""
    try:
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        os.close(devnull)
    except (OSError, ValueError):
        pass


if __name__ == "__main__":
    sys.exit(main())
