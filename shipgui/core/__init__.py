"""The planning model and algorithms, headless: the standard library, numpy,
scipy and numba only (never Qt or reportlab); openpyxl is imported only when a
spreadsheet is read or written.

The folders follow the data: ``io`` reads files into checked records,
:mod:`.day` builds the validated day, ``fleet`` computes the minimum fleet and
its routes, ``workday`` plans under a longest working day, :mod:`.planner`
picks between the two, ``export`` writes the results.  :mod:`.document` is the
day being edited in the app (no Qt), :mod:`.drivers` ties driver names to routes.
"""

from .clock import format_clock, format_minutes, parse_clock, parse_minutes
from .day import build_day, load_day
from .errors import InputError, InputErrors, PlanNotVerified, Problem
from .fleet.precedence import can_follow_matrix, follow_slack, prefix_index
from .fleet.verify import check_plan
from .io.readers import read_jobs, read_sites, read_travel
from .model import Day, Job, Plan, Settings, Site
from .planner import Cancelled, solve_day

__all__ = [
    "Cancelled", "Day", "InputError", "InputErrors", "Job", "Plan", "PlanNotVerified",
    "Problem", "Settings", "Site", "build_day", "can_follow_matrix", "check_plan",
    "follow_slack", "format_clock", "format_minutes", "load_day", "parse_clock",
    "parse_minutes", "prefix_index", "read_jobs", "read_sites", "read_travel", "solve_day",
]
