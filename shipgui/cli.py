"""The command line: ``shipgui solve``, ``shipgui demo``, and the desktop app.

Exit status: 0 solved; 2 bad input or bad arguments (one message naming the
file, row and column; no traceback); 1 anything else, including a plan that
failed its independent verification.  No output file is written or changed
unless the whole solve succeeded.
"""

from __future__ import annotations

import argparse
import os
import sys
import time
from dataclasses import replace
from pathlib import Path

from shipgui import __version__
from shipgui.core import InputError, Settings, format_clock, format_minutes, solve_day
from shipgui.core.caution import CAUTION
from shipgui.core.clock import format_duration, parse_clock, parse_minutes
from shipgui.core.day import build_inputs
from shipgui.core.demo import DEMO_SETTINGS, demo_files
from shipgui.core.export.plan_json import plan_to_json
from shipgui.core.io.files import write_bytes_atomic
from shipgui.core.io.plan_file import PLAN_SUFFIX, read_plan_file
from shipgui.core.io.readers import read_inputs
from shipgui.core.io.tables import parse_delimiter
from shipgui.core.model import DEFAULT_CIRCUITY, DEFAULT_SPEED_KMH, DayInputs, Plan


class UsageError(Exception):
    """Bad arguments: exit 2 with this message."""


class _Parser(argparse.ArgumentParser):
    def error(self, message: str):  # one line, exit 2, no traceback
        raise UsageError(f"{self.prog}: {message}")


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
    _add_common(p)
    return p


def _add_common(p: argparse.ArgumentParser) -> None:
    p.add_argument("--turnaround", metavar="MIN",
                   help="minutes between one job's end and the next job's drive (default 0)")
    p.add_argument("--depot", metavar="SITE", help="site the vehicles start from and return to")
    p.add_argument("--day-start", metavar="HH:MM", help="earliest departure from the depot")
    p.add_argument("--day-end", metavar="HH:MM", help="latest return to the depot")
    p.add_argument("--speed", metavar="KMH", type=float,
                   help=f"average speed for estimated travel (default {DEFAULT_SPEED_KMH:g})")
    p.add_argument("--circuity", type=float,
                   help=f"road distance / straight distance (default {DEFAULT_CIRCUITY:g})")
    _add_deadhead(p)
    p.add_argument("--vehicle-cost", metavar="COST", type=float,
                   help="cost of one vehicle-day, to find the cheapest fleet size")
    p.add_argument("--empty-hour-cost", metavar="COST", type=float,
                   help="cost of one hour of empty driving, to find the cheapest fleet size")
    p.add_argument("--json", metavar="OUT.json", help="write the plan as JSON")
    p.add_argument("--pdf", metavar="OUT.pdf", help="write driver sheets and the certificate")
    p.add_argument("--routes", metavar="OUT.csv|OUT.xlsx",
                   help="write one row per job with vehicle and sequence (for spreadsheets)")
    p.add_argument("--verbose", action="store_true", help="print timings per stage")


def _add_deadhead(p: argparse.ArgumentParser) -> None:
    p.add_argument("--least-deadhead", action=argparse.BooleanOptionalAction, default=True,
                   help="among minimum-fleet plans, pick one with the least empty driving "
                   "(default; --no-least-deadhead keeps any minimum-fleet routes)")
    p.add_argument("--tradeoff", metavar="N", type=int, default=5,
                   help="also price up to N extra vehicles (default 5; 0 for none)")


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
             ("turnaround", "depot", "day_start", "day_end", "speed", "circuity")}
    args = argparse.Namespace(**given)
    turnaround = base.turnaround
    if args.turnaround is not None:
        try:
            turnaround = parse_minutes(args.turnaround)
        except ValueError as exc:
            raise UsageError(f"--turnaround: {exc}") from None
    depot = args.depot if args.depot is not None else base.depot
    day_start = clock("--day-start", args.day_start, base.day_start)
    day_end = clock("--day-end", args.day_end, base.day_end)
    if (day_start is not None or day_end is not None) and not depot:
        raise UsageError("--day-start and --day-end need --depot")
    if day_start is not None and day_end is not None and day_end <= day_start:
        raise UsageError("--day-end must be after --day-start (use 25:00 for 01:00 next day)")
    speed = base.speed_kmh if args.speed is None else args.speed
    circuity = base.circuity if args.circuity is None else args.circuity
    if not speed > 0:
        raise UsageError("--speed must be more than 0 km/h")
    if not circuity >= 1:
        raise UsageError("--circuity must be at least 1")
    return Settings(turnaround=turnaround, depot=depot, day_start=day_start,
                    day_end=day_end, speed_kmh=speed, circuity=circuity)


def _check_outputs(args: argparse.Namespace, inputs: list[str | None]) -> None:
    """Refuse outputs that would overwrite an input or cannot be written."""
    sources = {Path(p).resolve() for p in inputs if p}
    routes = getattr(args, "routes", None)
    if routes and Path(routes).suffix.lower() not in (".csv", ".xlsx"):
        raise UsageError(f"--routes {routes}: the name must end in .csv or .xlsx")
    for option in ("json", "pdf", "routes"):
        out = getattr(args, option, None)
        if not out:
            continue
        path = Path(out).resolve()
        if path in sources:
            raise UsageError(f"--{option} {out}: that is an input file; choose another name")
        if not path.parent.is_dir():
            raise UsageError(f"--{option} {out}: the folder {path.parent} does not exist")
        if path.is_dir():
            raise UsageError(f"--{option} {out}: that is a folder")


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


def _render_outputs(plan: Plan, args: argparse.Namespace) -> dict[str, bytes]:
    outputs: dict[str, bytes] = {}
    if args.json:
        outputs[args.json] = plan_to_json(plan, cost_model=_cost_model(plan, args)
                                          ).encode("utf-8")
    if args.pdf:
        from shipgui.report import build_pdf_bytes
        outputs[args.pdf] = build_pdf_bytes(plan)
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


def _summary(plan: Plan, label: str) -> str:
    day = plan.day
    lines = [f"Day: {label} - {day.n} jobs, {len(day.site_ids)} sites"
             + (f", plan date {day.plan_date.isoformat()}" if day.plan_date else "")
             + f" (fingerprint {day.fingerprint})"]
    if not plan.verified:
        lines.append("PLAN FAILED ITS INDEPENDENT CHECK - do not use it:")
        lines.extend(f"  {f}" for f in plan.verification_failures)
        return "\n".join(lines)
    lines.append(f"Vehicles needed: {plan.vehicles} (minimum; independently verified)")
    lines.append(f"Why not fewer: these {len(plan.certificate)} jobs pairwise cannot share "
                 "a vehicle, so each needs its own:")
    ids = plan.certificate_ids()
    for k in range(0, len(ids), 10):
        lines.append("  " + " ".join(ids[k:k + 10]))
    least = f" (the least possible with {plan.vehicles} vehicles)" if plan.least_deadhead else ""
    lines.append(f"Empty driving: {format_duration(plan.deadhead_seconds)} in all{least}")
    for (vehicles, dead), (_, exact) in zip(plan.tradeoff[1:], plan.tradeoff_exact[1:]):
        note = "" if exact == dead else f" (all {vehicles} out: {format_duration(exact)})"
        lines.append(f"  with at most {vehicles} vehicles: {format_duration(dead)} "
                     f"empty driving{note}")
    for w in day.warnings:
        lines.append(f"Warning: {w}")
    for number, route in enumerate(plan.routes[:5], start=1):
        jobs = [day.jobs[k] for k in route]
        lines.append(f"  vehicle {number}: {format_clock(jobs[0].start)}-"
                     f"{format_clock(jobs[-1].end)}  " + " ".join(j.id for j in jobs))
    if plan.vehicles > 5:
        lines.append(f"  ... and {plan.vehicles - 5} more vehicles (use --json or --pdf)")
    lines.append(CAUTION)
    return "\n".join(lines)


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
    if Path(files["jobs"] or "").suffix.lower() == PLAN_SUFFIX:
        given = [f"--{name.replace('_', '-')}" for name in
                 ("sites", "travel", "sheet", "sites_sheet", "travel_sheet", "delimiter")
                 if getattr(args, name, None)]
        if given:
            raise UsageError(f"{files['jobs']} is a plan file: it carries its own sites and "
                             f"travel times, so {given[0]} does not apply")
        inputs = read_plan_file(files["jobs"])
        return replace(inputs, settings=_settings(args, inputs.settings))
    return read_inputs(files["jobs"], files.get("sites"), files.get("travel"),
                       settings=_settings(args, base), **_input_options(args))


def _run_solve(args: argparse.Namespace, files: dict[str, str | None], base: Settings,
               label: str) -> int:
    _check_outputs(args, list(files.values()))
    t0 = time.perf_counter()
    day = build_inputs(_read(args, files, base))
    t1 = time.perf_counter()
    plan = solve_day(day, least_deadhead=args.least_deadhead, tradeoff=max(0, args.tradeoff))
    if not plan.verified:
        print(_summary(plan, label), file=sys.stderr)
        return 1
    t2 = time.perf_counter()
    outputs = _render_outputs(plan, args)
    for path, data in outputs.items():
        write_bytes_atomic(path, data)
    t3 = time.perf_counter()
    print(_summary(plan, label))
    model = _cost_model(plan, args)
    if model:
        print(f"Cheapest fleet for the given costs: {model['cheapest_vehicles']} vehicles")
    for path in outputs:
        print(f"Wrote {path}")
    if args.verbose:
        stages = {"reading and checking input": t1 - t0, **plan.timings,
                  "writing output": t3 - t2}
        print(f"Timings (kernel {plan.kernel}):")
        for name, seconds in stages.items():
            print(f"  {name:<28} {seconds * 1000:9.1f} ms")
    return 0


def cmd_solve(argv: list[str]) -> int:
    args = _solve_parser().parse_args(argv)
    files = {"jobs": args.jobs, "sites": args.sites, "travel": args.travel}
    return _run_solve(args, files, Settings(), args.jobs)


def cmd_demo(argv: list[str]) -> int:
    p = _Parser(prog="shipgui demo", description="Solve the built-in invented demo day.")
    p.add_argument("--json", metavar="OUT.json")
    p.add_argument("--pdf", metavar="OUT.pdf")
    p.add_argument("--routes", metavar="OUT.csv|OUT.xlsx")
    p.add_argument("--verbose", action="store_true")
    _add_deadhead(p)
    p.add_argument("--vehicle-cost", metavar="COST", type=float)
    p.add_argument("--empty-hour-cost", metavar="COST", type=float)
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
    except KeyboardInterrupt:
        print("shipgui: interrupted", file=sys.stderr)
        return 1
    except Exception as exc:  # noqa: BLE001 - the contract: no traceback, exit 1
        if os.environ.get("SHIPGUI_DEBUG"):
            raise
        print(f"shipgui: internal error ({type(exc).__name__}: {exc}); nothing was written. "
              "Set SHIPGUI_DEBUG=1 for details.", file=sys.stderr)
        return 1


if __name__ == "__main__":
    sys.exit(main())
