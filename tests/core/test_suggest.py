"""What would save a vehicle: every suggestion re-solved by an outside reference."""

import networkx as nx
import numpy as np
import pytest

from shipgui.core import Job, Settings, build_day, can_follow_matrix, solve_day
from shipgui.core.demo import load_demo
from shipgui.core.fleet.suggest import moved_day, suggest_moves
from tests.support.days import random_day, rebuild


def _nx_fleet(day) -> int:
    """Fewest vehicles by networkx's Hopcroft-Karp on the split graph (Fulkerson,
    "Note on Dilworth's decomposition theorem", Proc. AMS 7(4), 1956: n minus a
    maximum matching)."""
    follows = can_follow_matrix(day)
    g = nx.Graph()
    g.add_nodes_from(range(2 * day.n))
    rows, cols = follows.nonzero()
    g.add_edges_from(zip(rows.tolist(), (cols + day.n).tolist()))
    matching = nx.bipartite.hopcroft_karp_matching(g, top_nodes=range(day.n))
    return day.n - len(matching) // 2


def _check(day, search, max_move):
    before = _nx_fleet(day)
    assert search.vehicles == before
    minutes = [s.moved_seconds for s in search.suggestions]
    assert minutes == sorted(minutes)  # fewest moved minutes first
    for suggestion in search.suggestions:
        assert suggestion.vehicles == before - 1
        # Built again from the files' point of view (every check of build_day) and
        # solved by networkx.
        moved = rebuild(day, jobs=moved_day(day, suggestion.moves).jobs)
        assert _nx_fleet(moved) == before - 1
        for move in suggestion.moves:
            assert 0 < abs(move.shift) <= max_move and move.shift % 60 == 0
            assert day.jobs[move.job].movable


@pytest.mark.parametrize("seed", range(60))
def test_every_suggestion_saves_a_vehicle_by_networkx(seed):
    rng = np.random.default_rng(seed)
    day = random_day(int(rng.integers(2, 60)), int(rng.integers(1, 6)), seed=seed,
                     classes=1 + seed % 2, turnaround_min=int(rng.integers(0, 15)))
    max_move = int(rng.choice([5, 15, 30, 60])) * 60
    _check(day, suggest_moves(day, 5, max_move=max_move), max_move)


@pytest.mark.parametrize("max_minutes", [15, 30, 60])
def test_demo_suggestions_save_a_vehicle(max_minutes):
    day = load_demo()
    search = suggest_moves(day, 5, max_move=max_minutes * 60)
    assert search.suggestions  # the demo has near misses within a quarter of an hour
    _check(day, search, max_minutes * 60)


def _planted(minutes_short: int, **options):
    """Two jobs at one yard overlapping by ``minutes_short``: moving the second one
    later by that much lets one vehicle do both.  Three more vehicles' work sits at a
    far site where nothing can be moved to help (invented data)."""
    jobs = [Job("EARLY", "Y", "Y", 8 * 3600, 10 * 3600, movable=False),
            Job("LATE", "Y", "Y", (10 * 60 - minutes_short) * 60, 12 * 3600, **options)]
    jobs += [Job(f"FAR{k}", "F", "F", 6 * 3600, 16 * 3600, movable=False) for k in range(3)]
    travel = {("Y", "F"): (3 * 3600, 0), ("F", "Y"): (3 * 3600, 0)}
    return build_day(jobs, [], travel, settings=Settings())


def test_a_planted_twenty_minute_move_is_found():
    day = _planted(20)
    assert solve_day(day).vehicles == 5
    search = suggest_moves(day, 5, max_move=60 * 60)
    first = search.suggestions[0]
    assert [(day.jobs[m.job].id, m.shift) for m in first.moves] == [("LATE", 20 * 60)]
    assert first.vehicles == 4
    assert all(len(s.moves) == 1 or s.moved_seconds > 20 * 60 for s in search.suggestions)


def test_limits_and_fixed_slots_are_respected():
    assert suggest_moves(_planted(20), 5, max_move=15 * 60).suggestions == ()
    assert suggest_moves(_planted(20, movable=False), 5).suggestions == ()


def test_a_day_that_cannot_save_a_vehicle_gets_no_suggestions():
    jobs = [Job(f"J{k}", "Y", "Y", 8 * 3600, 18 * 3600) for k in range(3)]
    search = suggest_moves(build_day(jobs, [], {}), 5)
    assert search.suggestions == () and search.vehicles == 3 and search.complete


@pytest.mark.parametrize("seed", range(40))
def test_jobs_in_every_largest_set_by_brute_force(seed):
    # Brute force: every antichain of the order listed by networkx.antichains; the
    # jobs in all of the largest ones against the overlap of the two extremes.
    from shipgui.core.fleet.precedence import class_indexes
    from shipgui.core.fleet.suggest import _ClassSearch
    rng = np.random.default_rng(300 + seed)
    day = random_day(int(rng.integers(1, 13)), int(rng.integers(1, 4)), seed=seed)
    follows = can_follow_matrix(day)
    dag = nx.DiGraph()
    dag.add_nodes_from(range(day.n))
    dag.add_edges_from(zip(*follows.nonzero()))
    sets = [set(a) for a in nx.antichains(dag)]
    width = max(len(a) for a in sets)
    largest = [a for a in sets if len(a) == width]
    expected = sorted(set.intersection(*largest))
    plan = solve_day(day)
    search = _ClassSearch(day, class_indexes(day)[0], list(plan.certificate), 3600,
                          lambda: None)
    assert sorted(search.in_every_largest()) == expected
    for a in range(day.n):  # with one job left out
        rest = [s for s in sets if a not in s]
        top = max(len(s) for s in rest) if rest else 0
        if top == width:
            want = sorted(set.intersection(*[s for s in rest if len(s) == top]))
            assert sorted(search.in_every_largest((a,))) == want
