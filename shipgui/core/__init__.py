"""The planning model and algorithms.  Imports only the standard library, numpy,
scipy and networkx (never Qt or reportlab), so it runs headless; openpyxl is
imported only when a spreadsheet is read or written."""

from .clock import format_clock, format_minutes, parse_clock, parse_minutes
from .errors import InputError, InputErrors, PlanNotVerified, Problem
from .model import Day, Job, Plan, Settings, Site
from .precedence import can_follow_matrix, follow_slack, prefix_index
from .readers import build_day, load_day, read_jobs, read_sites, read_travel
from .solve import Cancelled, solve_day
from .verify import check_plan

__all__ = [
    "Cancelled", "Day", "InputError", "InputErrors", "Job", "Plan", "PlanNotVerified",
    "Problem", "Settings", "Site", "build_day", "can_follow_matrix", "check_plan",
    "follow_slack", "format_clock", "format_minutes", "load_day", "parse_clock",
    "parse_minutes", "prefix_index", "read_jobs", "read_sites", "read_travel", "solve_day",
]
