"""The one entry point that plans a day: with or without a working-day limit.

Without a limit the minimum fleet is exact and polynomial (:mod:`.fleet`);
with ``settings.max_day`` it is NP-hard and the answer is a plan with a proven
lower bound (:mod:`.workday`).  Both return a verified :class:`~.model.Plan`.
"""

from __future__ import annotations

from collections.abc import Callable

from .fleet.solve import Cancelled
from .fleet.solve import solve_day as solve_fleet
from .model import Day, Plan
from .workday.solve import DEFAULT_TIME_LIMIT, Progress, solve_workday

__all__ = ["solve_day", "Cancelled", "Progress", "DEFAULT_TIME_LIMIT"]


def solve_day(day: Day, *, kernel: str | None = None, least_deadhead: bool = True,
              tradeoff: int = 5, time_limit: float = DEFAULT_TIME_LIMIT,
              progress: Callable[[str], None] | None = None,
              cancelled: Callable[[], bool] | None = None,
              on_progress: Callable[[Progress], None] | None = None,
              fleet_first: Callable[[Plan], None] | None = None,
              least_deadhead_seconds: float | None = None) -> Plan:
    """Plan ``day``: the minimum fleet, or with a working-day limit the best plan
    found within ``time_limit`` seconds and a proven lower bound.

    Parameters
    ----------
    day : a validated day (:func:`shipgui.core.day.build_day`).
    kernel, least_deadhead, tradeoff : see :func:`shipgui.core.fleet.solve.solve_day`
        (used without a working-day limit).
    time_limit : seconds the working-day search may run before it keeps the
        best plan found (ignored without a limit, which is solved exactly).
    progress : called with a stage name between steps.
    cancelled : polled between steps.  Without a limit a true answer raises
        :class:`Cancelled`; with a limit the search stops and returns its best
        plan (its ``workday.status`` says "stopped").
    on_progress : with a limit, called with the best plan's vehicles and the
        proven bound each time either improves.
    fleet_first, least_deadhead_seconds : without a limit, the fleet and its
        proof handed over before the least-empty-driving stage, and that
        stage's time limit (see :func:`shipgui.core.fleet.solve.solve_day`).
    """
    if day.settings.max_day is None:
        return solve_fleet(day, kernel=kernel, least_deadhead=least_deadhead,
                           tradeoff=tradeoff, progress=progress, cancelled=cancelled,
                           fleet_first=fleet_first,
                           least_deadhead_seconds=least_deadhead_seconds)
    if progress is not None:
        progress("working-day search")
    plan = solve_workday(day, time_limit=time_limit, cancelled=cancelled,
                         on_progress=on_progress)
    if progress is not None:
        progress("verification")
    return plan
