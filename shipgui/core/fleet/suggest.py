"""What would save a vehicle: small slot moves after which one vehicle fewer is needed.

A move shifts a job's start and end together.  The fleet is the width of the
"can follow" order, class by class; it drops by one only when every largest
set of mutually incompatible jobs is broken (Dilworth).  The certificate shows
where to look:

* A suggestion must move a certificate job: otherwise the certificate stays a
  set of that many incompatible jobs.
* One move of job j can only help when j is in *every* largest set.  j is,
  exactly when the order with j cut loose from every other job (so it needs a
  vehicle of its own) still needs no more vehicles than before.
* Moving j later, it can follow more jobs (and be followed by fewer); the
  relation only changes where j's start passes another job's "ready here"
  time, and losing relations never helps.  So the shifts worth trying are
  those moments, rounded out to whole minutes, from the first one that lets j
  follow another certificate job (before that the certificate stays intact);
  earlier likewise.

Single moves are tried first, in order of minutes moved, each by computing the
fleet of the changed class (a maximum matching on the prefix form, patched for
the moved jobs).  When fewer than asked are found, pairs of moves of two
certificate jobs are tried, fewest total minutes first and only for pairs that
meet every largest set, including the near misses of the proof table (a pair
of certificate jobs a few minutes short of fitting, the gap split between
them); at most ``_PAIR_WORK`` pairs.  Every suggestion found is then checked by
building the changed day and solving it with the normal solver.
"""

from __future__ import annotations

import dataclasses
import math
import time
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from ..errors import InputError
from ..model import Day
from ._hk_kernel import Links, Prefixes, hk_match
from .matching import maximum_matching
from .precedence import PrefixIndex, class_indexes, prefix_index

__all__ = ["Move", "Suggestion", "SuggestionSearch", "suggest_moves", "moved_day",
           "DEFAULT_MAX_MOVE"]

DEFAULT_MAX_MOVE = 60 * 60  # seconds
_PAIR_WORK = 3000  # fleets computed in the pair search, at most, per vehicle class
_PAIR_SHIFTS = 2  # shifts each way per job combined into pairs
_FAR = 1 << 40  # a time no job is near: cuts a job loose
_GROUP_KEY = 1 << 42  # more than any time here: (group, time) as one sortable number


@dataclass(frozen=True)
class Move:
    """Job ``job`` (index into the day's jobs) shifted by ``shift`` seconds (start and
    end together; negative: earlier)."""

    job: int
    shift: int


@dataclass(frozen=True)
class Suggestion:
    """Moves after which ``vehicles`` are needed (one fewer than now), checked by
    solving the changed day."""

    moves: tuple[Move, ...]
    vehicles: int

    @property
    def moved_seconds(self) -> int:
        return sum(abs(m.shift) for m in self.moves)


@dataclass(frozen=True)
class SuggestionSearch:
    """The suggestions, fewest moved minutes first, and how the search went."""

    suggestions: tuple[Suggestion, ...]
    vehicles: int  # needed now
    max_move: int  # seconds
    seconds: float  # time the search took
    checked: int  # move sets whose fleet was computed
    complete: bool  # False when the pair search stopped at its limit


def suggest_moves(day: Day, count: int = 5, *, max_move: int = DEFAULT_MAX_MOVE,
                  check: Callable[[], None] | None = None) -> SuggestionSearch:
    """Up to ``count`` sets of slot moves (each job by at most ``max_move`` seconds,
    only jobs whose ``movable`` is true) after which one vehicle fewer is needed.

    Raises nothing for a day where nothing helps: the list is then empty.
    ``check`` is called now and then (it may raise to stop the search).
    """
    from .solve import solve_day  # the normal solver, also for the final check

    if day.settings.max_day is not None:
        raise InputError("looking for moves that save a vehicle under a working-day limit "
                         "is not yet supported")
    t0 = time.perf_counter()
    check = check or (lambda: None)
    # The fleet that serves every job, whatever vehicles are available.
    day = dataclasses.replace(day, settings=dataclasses.replace(
        day.settings, vehicles=None, class_vehicles=()))
    plan = solve_day(day, least_deadhead=False)
    certificate = set(plan.certificate)
    found: list[tuple[Move, ...]] = []
    checked, complete = 0, True
    for index in class_indexes(day):
        local = [k for k in range(index.m) if int(index.jobs[k]) in certificate]
        search = _ClassSearch(day, index, local, max_move, check)
        moves = search.singles(count)
        if len(moves) < count:
            moves += search.pairs(count - len(moves), moves)
        found += [tuple(Move(int(index.jobs[j]), d) for j, d in m) for m in moves]
        checked += search.checked
        complete = complete and search.complete
    found.sort(key=lambda moves: (sum(abs(m.shift) for m in moves), len(moves),
                                  [(m.job, m.shift) for m in moves]))
    suggestions = []
    for moves in found:
        if len(suggestions) == count:
            break
        check()
        solved = solve_day(moved_day(day, moves), least_deadhead=False)
        if solved.verified and solved.vehicles == plan.vehicles - 1:
            suggestions.append(Suggestion(moves, solved.vehicles))
    return SuggestionSearch(tuple(suggestions), plan.vehicles, max_move,
                            time.perf_counter() - t0, checked, complete)


def moved_day(day: Day, moves) -> Day:
    """The day with the moves applied.  Travel stays closed and a shift keeps each
    job's own drive, so the only check the files' day had that a move can break
    is the depot's day, which the search keeps to (``_windows``)."""
    jobs = list(day.jobs)
    for move in moves:
        job = jobs[move.job]
        jobs[move.job] = dataclasses.replace(job, start=job.start + move.shift,
                                             end=job.end + move.shift)
    return dataclasses.replace(day, jobs=tuple(jobs), fingerprint="")


class _Relation:
    """The "can follow" order of one class in prefix form, with a maximum matching
    kept as the warm start for changed orders: links between unchanged jobs stay
    valid, so a few augmenting paths finish the matching again."""

    def __init__(self, day: Day) -> None:
        self.index = prefix_index(day, np.arange(day.n))
        self.group_of = np.empty(day.n, dtype=np.int64)
        self.group_of[self.index.order] = self.index.group_of_position()
        self.start = day.start.astype(np.int64)
        self.ready = (day.end + day.settings.turnaround).astype(np.int64)
        self.origin = day.origin
        self.travel = day.travel
        self.succ = maximum_matching(self.index, day=day).succ

    def largest(self, shifts: dict[int, int], loose: tuple[int, ...]) -> tuple[int, np.ndarray]:
        """(vehicles needed, a largest set of incompatible jobs as a mask) with
        ``shifts`` applied and the ``loose`` jobs cut off from every other job.  The
        set is the one König's construction gives from the matching's last search,
        the same for every maximum matching (the side nearest the chain starts)."""
        start, ready = self.start.copy(), self.ready.copy()
        for j, d in shifts.items():
            start[j] += d
            ready[j] += d
        for j in loose:
            start[j] = -_FAR
            ready[j] = _FAR
        changed = tuple(shifts) + loose
        index = _patched(self.index, self.group_of, start, ready, self.origin, self.travel,
                         changed)
        succ, pred = self.succ.copy(), np.full(index.m, -1, dtype=np.int64)
        linked = np.flatnonzero(succ >= 0)
        pred[succ[linked]] = linked
        for j in changed:
            if succ[j] >= 0:
                pred[succ[j]] = -1
                succ[j] = -1
            if pred[j] >= 0:
                succ[pred[j]] = -1
                pred[j] = -1
        reached_pos, reached_right = hk_match(
            Prefixes(index.order, index.group_start, index.latest), Links(succ, pred))
        reached_left = np.zeros(index.m, dtype=bool)
        reached_left[index.order[reached_pos]] = True
        return index.m - int(np.count_nonzero(succ >= 0)), reached_right & ~reached_left


def _class_days(day: Day, jobs: np.ndarray) -> tuple[Day, Day]:
    """The class's jobs as a day of their own, and the same day with time running
    backwards (end becomes start, origin and destination swap, travel reversed):
    its order is the reverse order, so its König set is the other extreme."""
    own = [day.jobs[int(k)] for k in jobs]
    back = [dataclasses.replace(j, origin=j.destination, destination=j.origin,
                                start=-j.end, end=-j.start) for j in own]
    return (Day(tuple(own), day.site_ids, day.sites, day.travel, day.settings),
            Day(tuple(back), day.site_ids, day.sites, day.travel.T, day.settings))


class _ClassSearch:
    """The search within one vehicle class (local job numbers of ``index``)."""

    def __init__(self, day: Day, index: PrefixIndex, certificate: list[int], max_move: int,
                 check: Callable[[], None]) -> None:
        self.index = index
        self.check = check
        jobs = index.jobs
        own, back = _class_days(day, jobs)
        self.forward, self.backward = _Relation(own), _Relation(back)
        self.start = self.forward.start
        self.ready = self.forward.ready
        self.origin = own.origin
        self.dest = own.destination
        self.travel = day.travel
        self.certificate = certificate
        self.width = len(certificate)
        self.movable = [day.jobs[int(jobs[j])].movable for j in range(index.m)]
        self.windows = _windows(day, jobs, max_move)
        self.checked = 0
        self.complete = True
        self.pair_work = 0

    # ------------------------------------------------------------ fleet
    def fleet(self, shifts: dict[int, int]) -> int:
        """Vehicles the class needs with ``shifts`` (local job -> seconds) applied."""
        self.checked += 1
        return self.forward.largest(shifts, ())[0]

    def in_every_largest(self, loose: tuple[int, ...] = ()) -> list[int]:
        """The jobs in every largest set of incompatible jobs once the ``loose`` jobs
        are left out.  The largest sets form a lattice (Dilworth, "Some
        combinatorial problems on partially ordered sets", Proc. Symposia in
        Applied Mathematics 10, 1960); a job in its least and its greatest element
        is in every element between them, so the answer is the overlap of the two
        extremes: König's set of the order and of the reversed order."""
        self.checked += 2
        _, low = self.forward.largest({}, loose)
        _, high = self.backward.largest({}, loose)
        both = low & high
        both[list(loose)] = False
        return np.flatnonzero(both).tolist()

    # ------------------------------------------------------------ candidates
    def shifts(self, j: int) -> list[int]:
        """Shifts of job j worth trying (see the module docstring), whole minutes."""
        if not self.movable[j]:
            return []
        others = np.arange(self.index.m) != j
        cert = np.zeros(self.index.m, dtype=bool)
        cert[self.certificate] = True
        cert[j] = False
        # j later: it can follow i once start_j + d >= ready_i + T[dest_i, origin_j].
        later = self.ready + self.travel[self.dest, self.origin[j]] - self.start[j]
        # j earlier: i can follow it once ready_j + d + T[dest_j, origin_i] <= start_i.
        earlier = self.start - self.travel[self.dest[j], self.origin] - self.ready[j]
        low, high = self.windows[j]
        out = []
        first = later[cert & (later > 0)]
        if len(first):
            gains = later[others & (later >= first.min())]
            out += sorted({_minutes_up(g) for g in gains.tolist()})
        first = earlier[cert & (earlier < 0)]
        if len(first):
            gains = earlier[others & (earlier <= first.max())]
            out += sorted({-_minutes_up(-g) for g in gains.tolist()}, reverse=True)
        return [d for d in out if low <= d <= high and d != 0]

    # ------------------------------------------------------------ searches
    def singles(self, count: int) -> list[tuple[tuple[int, int], ...]]:
        """Up to ``count`` single moves that save a vehicle, fewest minutes first; at
        most one per job and direction (the smallest)."""
        always = [j for j in self.in_every_largest() if self.movable[j]]
        tries = sorted((abs(d), j, d) for j in always for d in self.shifts(j))
        found, done = [], set()
        for _, j, d in tries:
            if (j, d > 0) in done:
                continue
            self.check()
            if self.fleet({j: d}) < self.width:
                found.append(((j, d),))
                done.add((j, d > 0))
                if len(found) == count:
                    break
        return found

    def pairs(self, count: int, singles) -> list[tuple[tuple[int, int], ...]]:
        """Up to ``count`` pairs of moves that save a vehicle, fewest total minutes
        first, leaving out pairs that contain a single move found already.

        Only pairs of jobs that meet every largest set can help: a with b in every
        largest set that a is not in (or a in all of them, and b a certificate
        job).  For such a pair: their ``_PAIR_SHIFTS`` smallest shifts each way
        combined, and the split of their gap when one nearly fits after the other.
        """
        known = {move for found in singles for move in found}
        always = set(self.in_every_largest())
        movable = [j for j in self.certificate if self.movable[j]]
        options = {j: _smallest_each_way(self.shifts(j)) for j in movable}
        pairs = set()
        for a in movable:
            self.check()
            partners = movable if a in always else self.in_every_largest((a,))
            pairs.update((min(a, b), max(a, b)) for b in partners
                         if b != a and self.movable[b] and b in options)
        tries = []
        for a, b in sorted(pairs):
            tries += _combinations(a, options[a], b, options[b], known)
            tries += self._closing(a, b) + self._closing(b, a)
        tries.sort()
        found = []
        for _, moves in tries:
            if len(found) == count:
                break
            if self.pair_work >= _PAIR_WORK:
                self.complete = False
                break
            self.check()
            self.pair_work += 1
            if self.fleet(dict(moves)) < self.width:
                found.append(moves)
        return found

    def _closing(self, a: int, b: int) -> list[tuple[int, tuple]]:
        """Close the gap for b to follow a by moving a earlier and b later by about
        half each (a near miss of the certificate)."""
        if not (self.movable[a] and self.movable[b]):
            return []
        short = int(self.ready[a] + self.travel[self.dest[a], self.origin[b]] - self.start[b])
        if short <= 0:
            return []
        total = _minutes_up(short)
        half = 60 * (total // 120)
        if not half:  # one minute: a single move, tried as such
            return []
        moves = ((a, -half), (b, total - half))
        if any(not self.windows[j][0] <= d <= self.windows[j][1] for j, d in moves):
            return []
        return [(total, tuple(sorted(moves)))]


def _combinations(a, shifts_a, b, shifts_b, known) -> list[tuple[int, tuple]]:
    return [(abs(da) + abs(db), ((a, da), (b, db))) for da in shifts_a if (a, da) not in known
            for db in shifts_b if (b, db) not in known]


def _smallest_each_way(shifts: list[int]) -> list[int]:
    later = sorted(d for d in shifts if d > 0)[:_PAIR_SHIFTS]
    earlier = sorted((d for d in shifts if d < 0), reverse=True)[:_PAIR_SHIFTS]
    return later + earlier


def _minutes_up(seconds: int) -> int:
    """Seconds rounded up to whole minutes (a move a dispatcher can agree to)."""
    return 60 * math.ceil(seconds / 60)


def _windows(day: Day, jobs: np.ndarray, max_move: int) -> list[tuple[int, int]]:
    """Per job, the shifts allowed: at most ``max_move`` either way, within the plan
    day's two days, and reachable from and back to the depot in its day."""
    s = day.settings
    low = np.full(len(jobs), -max_move, dtype=np.int64)
    high = np.full(len(jobs), max_move, dtype=np.int64)
    start, end = day.start[jobs], day.end[jobs]
    low = np.maximum(low, -start)
    high = np.minimum(high, 48 * 3600 - end)
    if s.depot is not None:
        d = day.site_index[s.depot]
        if s.day_start is not None:
            low = np.maximum(low, s.day_start + day.travel[d, day.origin[jobs]] - start)
        if s.day_end is not None:
            high = np.minimum(high, s.day_end - day.travel[day.destination[jobs], d] - end)
    return list(zip(low.tolist(), high.tolist()))


def _patched(index: PrefixIndex, group_of: np.ndarray, start: np.ndarray, ready: np.ndarray,
             origin: np.ndarray, travel: np.ndarray, changed: tuple[int, ...]) -> PrefixIndex:
    """``index`` with the times of the ``changed`` jobs replaced: their groups are
    sorted again and those columns recomputed, and their own rows recomputed."""
    order, latest = index.order.copy(), index.latest.copy()
    gs, sites = index.group_start, index.group_site
    for g in sorted({int(group_of[j]) for j in changed}):
        a, b = gs[g], gs[g + 1]
        segment = order[a:b][np.argsort(ready[order[a:b]], kind="stable")]
        order[a:b] = segment
        p = np.searchsorted(ready[segment], start - travel[sites[g], origin], side="right") - 1
        latest[:, g] = np.where(p >= 0, p + a, -1)
    groups = np.arange(len(sites), dtype=np.int64) * _GROUP_KEY
    keys = np.repeat(groups, np.diff(gs)) + ready[order]  # increasing
    for j in changed:
        p = np.searchsorted(keys, groups + start[j] - travel[sites, origin[j]], side="right") - 1
        latest[j] = np.where(p >= gs[:-1], p, -1)
    return PrefixIndex(index.jobs, order, gs, sites, latest)

