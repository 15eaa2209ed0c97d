"""Property tests (hypothesis): on any valid day the relation is a strict partial
order and every plan's certificate verifies."""

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from shipgui.core import Job, Settings, build_day, can_follow_matrix, check_plan, solve_day

# Kernel tests: CI runs them a second time as plain Python (NUMBA_DISABLE_JIT=1).
pytestmark = pytest.mark.kernels


@st.composite
def days(draw):
    n_sites = draw(st.integers(1, 4))
    names = [f"S{k}" for k in range(n_sites)]
    travel = {(a, b): (draw(st.integers(0, 3600)), 0) for a in names for b in names if a != b}
    n = draw(st.integers(1, 14))
    jobs = []
    for k in range(n):
        o, d = draw(st.sampled_from(names)), draw(st.sampled_from(names))
        start = draw(st.integers(0, 20 * 3600))
        length = draw(st.integers(1, 5 * 3600))
        jobs.append(Job(f"J{k}", o, d, start, start + length,
                        vehicle_class=draw(st.sampled_from(["", "", "van"]))))
    turnaround = draw(st.integers(0, 1800))
    # Jobs shorter than their own (closed) drive are input errors; stretch them.
    probe = build_day([Job("x", names[0], names[0], 0, 1)], [], travel)
    jobs = [Job(j.id, j.origin, j.destination, j.start,
                max(j.end, j.start + probe.travel_between(j.origin, j.destination)),
                j.vehicle_class) for j in jobs]
    return build_day(jobs, [], travel, settings=Settings(turnaround=turnaround))


@settings(max_examples=150, deadline=None)
@given(days())
def test_relation_is_a_strict_partial_order(day):
    m = can_follow_matrix(day).toarray()
    assert not np.any(np.diag(m))
    two_steps = (m.astype(int) @ m.astype(int)) > 0
    assert np.all(m[two_steps])  # transitive


@settings(max_examples=150, deadline=None)
@given(days())
def test_every_certificate_verifies(day):
    plan = solve_day(day)
    assert plan.verified
    assert check_plan(day, plan.routes, plan.certificate) == []
    assert len(plan.certificate) == plan.vehicles
