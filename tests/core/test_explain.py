"""Why two jobs need two vehicles: one set of words, checked against the contract's
formula by hand, and the whole-certificate array functions against brute force."""

from __future__ import annotations

import itertools

import numpy as np
import pytest

from shipgui.core import Job, Settings, Site, build_day, follow_slack, solve_day
from shipgui.core.fleet.explain import (
    closest_partners,
    explain_pair,
    nearest_misses,
    pair_reason,
    peak_moment,
    reason_label,
)
from tests.support.days import random_day

MIN, HOUR = 60, 3600


def _day(jobs, turnaround=5 * MIN):
    sites = [Site("A", "Pelling mill"), Site("B", "Ashgrove school")]
    travel = {("A", "B"): (30 * MIN, 0), ("B", "A"): (30 * MIN, 0)}
    return build_day(jobs, sites, travel, settings=Settings(turnaround=turnaround))


def test_short_is_said_in_whole_minutes_rounded_up():
    # J1 ends 08:00 at B; 5 min turnaround + 30 min drive to A: there at 08:35,
    # J2 starts 08:23 -> 12 min short (the contract's formula, by hand).
    day = _day([Job("J1", "A", "B", 7 * HOUR, 8 * HOUR),
                Job("J2", "A", "A", 8 * HOUR + 23 * MIN, 9 * HOUR)])
    reason = pair_reason(day, 1, 0)  # either order of the arguments
    assert (reason.first, reason.second, reason.kind) == (0, 1, "short")
    assert -follow_slack(day, 0, 1) == 12 * MIN == reason.late
    assert reason_label(reason) == "cannot follow: 12 min short"
    text = explain_pair(day, 0, 1)
    assert "08:35" in text and "12 min after J2 starts (08:23)" in text
    assert "5 min turnaround" in text and "30 min drive to Pelling mill" in text


def test_a_few_seconds_short_is_never_zero_minutes():
    day = _day([Job("J1", "A", "B", 7 * HOUR, 8 * HOUR),
                Job("J2", "A", "A", 8 * HOUR + 35 * MIN - 1, 9 * HOUR)])
    assert reason_label(pair_reason(day, 0, 1)) == "cannot follow: 1 min short"


def test_overlap_is_said_as_overlap_not_short():
    day = _day([Job("J1", "A", "B", 7 * HOUR, 8 * HOUR),
                Job("J2", "B", "B", 7 * HOUR + 15 * MIN, 9 * HOUR)])
    reason = pair_reason(day, 0, 1)
    assert reason.kind == "overlap" and reason_label(reason) == "overlap"
    assert "short" not in explain_pair(day, 0, 1)
    assert "still running (until 08:00)" in explain_pair(day, 0, 1)


def test_next_day_times_carry_the_mark():
    day = _day([Job("J1", "A", "B", 23 * HOUR, 24 * HOUR + 30 * MIN),
                Job("J2", "A", "A", 25 * HOUR, 26 * HOUR)])
    text = explain_pair(day, 0, 1)
    assert "00:30 +1" in text and "01:05 +1" in text and "24:" not in text


def test_classes():
    day = _day([Job("J1", "A", "A", 7 * HOUR, 8 * HOUR, vehicle_class="reefer"),
                Job("J2", "A", "A", 9 * HOUR, 10 * HOUR)])
    reason = pair_reason(day, 0, 1)
    assert reason_label(reason) == "different vehicle classes"
    assert "'reefer'" in explain_pair(day, 0, 1)


def _brute_late(day, cert):
    """Seconds late for every same-class, non-overlapping pair, earlier first."""
    out = {}
    for i, j in itertools.combinations(cert, 2):
        r = pair_reason(day, i, j)
        if r.kind == "short":
            out[(r.first, r.second)] = r.late
    return out


@pytest.mark.parametrize("seed", range(12))
def test_nearest_misses_match_brute_force(seed):
    day = random_day(60, 5, seed=seed, classes=1 + seed % 2)
    cert = list(solve_day(day).certificate)
    brute = sorted((late, pair) for pair, late in _brute_late(day, cert).items())
    got = nearest_misses(day, cert, 7)
    assert [r.late for r in got] == [late for late, _ in brute[:7]]
    assert all(r.kind == "short" for r in got)


@pytest.mark.parametrize("seed", range(12))
def test_closest_partners_match_brute_force(seed):
    day = random_day(50, 4, seed=seed, classes=1 + seed % 3)
    cert = list(solve_day(day).certificate)
    got = closest_partners(day, cert)
    for a, i in enumerate(cert):
        options = [min(-follow_slack(day, i, j), -follow_slack(day, j, i))
                   for j in cert if j != i and day.vclass[i] == day.vclass[j]]
        if not options:
            assert got[a] == -1
            continue
        j = cert[got[a]]
        assert min(-follow_slack(day, i, j), -follow_slack(day, j, i)) == min(options)


@pytest.mark.parametrize("seed", range(8))
def test_peak_moment_is_the_most_jobs_at_once(seed):
    day = random_day(40, 3, seed=seed)
    jobs = np.arange(day.n)
    moment, running = peak_moment(day, jobs)
    counts = [int(np.sum((day.start <= t) & (day.end > t))) for t in day.start]
    assert len(running) == max(counts)
    assert np.all((day.start[running] <= moment) & (day.end[running] > moment))
