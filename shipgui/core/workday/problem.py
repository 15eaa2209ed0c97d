"""One vehicle class of a day with a working-day limit, in the arrays the solvers use.

A vehicle's working day runs from leaving the depot to being back: for a route
from job f to job l that is ``back[l] - leave[f]`` with

    leave[j] = start[j] - T[depot, origin_j]      (start[j] without a depot)
    back[j]  = end[j] + T[destination_j, depot]   (end[j] without a depot)

so it depends on the first and the last job only (contract section 5).  With
the travel matrix closed under shortest paths, dropping jobs from a valid route
leaves a valid route: the links still hold (the relation is transitive) and
the working day does not grow, because ``leave`` never falls and ``back``
never rises along a route (triangle inequality, and every job's slot is at
least its own drive).  The solvers lean on this: the heaviest route never
needs a job of weight zero.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..fleet.precedence import PrefixIndex, prefix_index
from ..model import Day

__all__ = ["WorkdayClass", "workday_classes", "working_days", "leave_and_back"]


def leave_and_back(day: Day) -> tuple[np.ndarray, np.ndarray]:
    """(leave, back) of every job of the day, in seconds (see the module docstring)."""
    depot = day.settings.depot
    if depot is None:
        return day.start.astype(np.int64), day.end.astype(np.int64)
    d = day.site_index[depot]
    leave = day.start - day.travel[d, day.origin]
    back = day.end + day.travel[day.destination, d]
    return leave.astype(np.int64), back.astype(np.int64)


def working_days(day: Day, routes) -> list[int]:
    """Working day of each route (seconds): back of its last job minus leave of its first."""
    leave, back = leave_and_back(day)
    return [int(back[r[-1]] - leave[r[0]]) for r in routes]


@dataclass(frozen=True, eq=False)
class WorkdayClass:
    """The jobs of one vehicle class, locally numbered in start order.

    Attributes
    ----------
    jobs : (m,) global job index of each local job, sorted by (start, end, index).
    start, end, ready, leave, back : (m,) seconds; ``ready`` is end + turnaround.
    index : the "can follow" relation among the local jobs in prefix form
        (:class:`~shipgui.core.fleet.precedence.PrefixIndex` built on ``jobs``,
        so its local numbers are these).
    limit : the longest working day in seconds.
    """

    jobs: np.ndarray
    start: np.ndarray
    end: np.ndarray
    ready: np.ndarray
    leave: np.ndarray
    back: np.ndarray
    origin: np.ndarray
    destination: np.ndarray
    index: PrefixIndex
    limit: int

    @property
    def m(self) -> int:
        return len(self.jobs)

    def fits(self, i: np.ndarray, j: np.ndarray, travel: np.ndarray) -> np.ndarray:
        """Elementwise, local jobs: can j follow i, and do both fit one working day?"""
        follows = self.ready[i] + travel[self.destination[i], self.origin[j]] <= self.start[j]
        return follows & (i != j) & (self.back[j] - self.leave[i] <= self.limit)


def workday_classes(day: Day, limit: int) -> list[WorkdayClass]:
    """One :class:`WorkdayClass` per vehicle class of ``day``."""
    leave, back = leave_and_back(day)
    ready_all = day.end + day.settings.turnaround
    classes = []
    for c in range(len(day.class_names)):
        members = np.flatnonzero(day.vclass == c)
        order = np.lexsort((members, day.end[members], day.start[members]))
        jobs = members[order].astype(np.int64)
        classes.append(WorkdayClass(
            jobs=jobs, start=day.start[jobs].astype(np.int64), end=day.end[jobs].astype(np.int64),
            ready=ready_all[jobs].astype(np.int64), leave=leave[jobs], back=back[jobs],
            origin=day.origin[jobs].astype(np.int64),
            destination=day.destination[jobs].astype(np.int64),
            index=prefix_index(day, jobs), limit=int(limit)))
    return classes
