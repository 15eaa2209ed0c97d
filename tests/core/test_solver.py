"""The engine against outside references: networkx, brute force, textbook instances."""

import itertools

import networkx as nx
import numpy as np
import pytest

from shipgui.core import Job, build_day, can_follow_matrix, check_plan, solve_day
from shipgui.core.fleet.matching import available_kernels, maximum_matching
from shipgui.core.fleet.precedence import prefix_index_from_matrix
from tests.support.days import random_day, slot_day, tanker_day

# Kernel tests: CI runs them a second time as plain Python (NUMBA_DISABLE_JIT=1).
pytestmark = pytest.mark.kernels

KERNELS = available_kernels()


def _nx_width(day) -> int:
    """Minimum chain cover size by networkx's Hopcroft-Karp on the split graph
    (Fulkerson 1956: width = n - maximum matching)."""
    m = can_follow_matrix(day)
    g = nx.Graph()
    g.add_nodes_from(range(2 * day.n))
    r, c = m.nonzero()
    g.add_edges_from(zip(r.tolist(), (c + day.n).tolist()))
    matching = nx.bipartite.hopcroft_karp_matching(g, top_nodes=range(day.n))
    return day.n - len(matching) // 2


@pytest.mark.parametrize("seed", range(210))
def test_width_matches_networkx_on_random_days(seed):
    rng = np.random.default_rng(seed)
    day = random_day(int(rng.integers(1, 70)), int(rng.integers(1, 7)), seed=seed,
                     classes=int(rng.integers(1, 3)), turnaround_min=int(rng.integers(0, 15)))
    expected = _nx_width(day)
    for kernel in KERNELS:
        plan = solve_day(day, kernel=kernel)
        assert plan.verified, (kernel, plan.verification_failures)
        assert plan.vehicles == expected == len(plan.certificate)


@pytest.mark.parametrize("seed", range(40))
def test_certificate_is_a_maximum_antichain_by_brute_force(seed):
    # Brute force over every antichain listed by networkx.antichains.
    rng = np.random.default_rng(1000 + seed)
    day = random_day(int(rng.integers(1, 13)), int(rng.integers(1, 4)), seed=seed)
    m = can_follow_matrix(day)
    dag = nx.DiGraph()
    dag.add_nodes_from(range(day.n))
    dag.add_edges_from(zip(*m.nonzero()))
    largest = max(len(a) for a in nx.antichains(dag))
    plan = solve_day(day)
    assert plan.vehicles == largest
    cert = list(plan.certificate)
    assert not any(m[a, b] or m[b, a] for a, b in itertools.combinations(cert, 2))


def test_interval_partitioning_worked_instance():
    # Zero travel: fleet = maximum number of overlapping slots (interval
    # partitioning; Kleinberg & Tardos, Algorithm Design, 2005, section 4.1).
    hours = [(13, 15), (17, 22), (12, 17), (9, 10), (12, 15), (9, 11), (11, 14), (10, 15),
             (16, 19), (12, 14), (18, 23), (8, 11)]
    day = slot_day([("A", "A", a * 3600, b * 3600) for a, b in hours])
    plan = solve_day(day)
    assert plan.verified and plan.vehicles == 6


@pytest.mark.parametrize("seed", range(30))
def test_zero_travel_equals_max_overlap(seed):
    rng = np.random.default_rng(seed)
    n = int(rng.integers(1, 40))
    starts = rng.integers(0, 100, n)
    ends = starts + rng.integers(1, 30, n)
    day = slot_day([("A", "A", int(s) * 60, int(e) * 60) for s, e in zip(starts, ends)])
    events = sorted([(int(e), -1) for e in ends] + [(int(s), 1) for s in starts])
    depth = max(itertools.accumulate(d for _, d in events))  # ends before starts at ties
    assert solve_day(day).vehicles == depth


def test_tanker_example_no_earlier_than():
    assert solve_day(tanker_day(strict=False)).vehicles == 2


def test_tanker_example_strict_rule_needs_three():
    assert solve_day(tanker_day(strict=True)).vehicles == 3


@pytest.mark.parametrize("kernel", KERNELS)
def test_sperner_subsets_of_four(kernel):
    # Subsets of {1,2,3,4} under inclusion: width C(4,2) = 6 (Sperner, "Ein Satz
    # über Untermengen einer endlichen Menge", Math. Zeitschrift 27, 1928).
    subsets = [frozenset(c) for r in range(5) for c in itertools.combinations(range(4), r)]
    follows = np.array([[a < b for b in subsets] for a in subsets])
    matching = maximum_matching(prefix_index_from_matrix(follows), kernel=kernel)
    assert len(subsets) - matching.size == 6
    cert = [subsets[k] for k in matching.antichain]
    assert len(cert) == 6 and all(len(s) == 2 for s in cert)


def test_verification_rejects_tampered_plans():
    day = random_day(30, 3, seed=5)
    plan = solve_day(day)
    assert check_plan(day, plan.routes, plan.certificate) == []
    assert check_plan(day, plan.routes[1:], plan.certificate)          # a job lost
    assert check_plan(day, plan.routes, plan.certificate[1:])          # certificate short
    merged = [tuple(sorted(plan.routes[0] + plan.routes[1], key=lambda k: day.start[k]))]
    assert check_plan(day, merged + list(plan.routes[2:]), plan.certificate)
    if len(plan.routes[0]) > 1:  # a certificate with two jobs of one chain
        bad = (plan.routes[0][0], plan.routes[0][1]) + plan.certificate[2:]
        assert check_plan(day, plan.routes, bad)


def test_verification_names_each_broken_or_empty_vehicle():
    # Routes are checked all at once: the messages must still name the right
    # vehicles, in order, and a route that breaks across its end must not be
    # blamed on its neighbour.
    day = random_day(30, 3, seed=5)
    plan = solve_day(day)
    routes = [list(r) for r in plan.routes]
    long = [k for k, r in enumerate(routes) if len(r) > 1]
    assert len(long) >= 2
    a, b = long[0], long[1]
    routes[a] = routes[a][::-1]  # later job first: cannot follow
    routes.insert(b + 1, [])  # an empty vehicle after b (b keeps its number)
    failures = check_plan(day, [tuple(r) for r in routes], plan.certificate)
    assert f"vehicle {a + 1}: a job cannot follow the one before it" in failures
    assert f"vehicle {b + 2} has no jobs" in failures
    assert not any(f.startswith(f"vehicle {b + 1}") for f in failures)
    numbers = [int(f.split()[1].rstrip(":")) for f in failures if f.startswith("vehicle ")]
    assert numbers == sorted(numbers) == [a + 1, b + 2]


def test_vehicle_classes_never_mix():
    slots = [("A", "A", 0, 3600), ("A", "A", 7200, 9000)]
    jobs = [Job("J0", "A", "A", 0, 3600, "van"), Job("J1", "A", "A", 7200, 9000, "truck")]
    day = build_day(jobs, [], {})
    assert solve_day(day).vehicles == 2
    assert solve_day(slot_day(slots)).vehicles == 1


def test_deterministic_routes():
    day = random_day(200, 8, seed=11)
    a, b = solve_day(day), solve_day(day)
    assert a.routes == b.routes and a.certificate == b.certificate
