"""Drivers follow their route's jobs, whatever number the route gets; splits,
merges and emptied routes are said."""

from __future__ import annotations

from shipgui.core.drivers import Driver, drivers_from_numbers, names_by_vehicle, place_drivers


def _ann(*jobs):
    return Driver("Ann", frozenset(jobs))


def test_a_name_follows_its_jobs_to_another_number():
    places = place_drivers([_ann("J1", "J2")], [["J7"], ["J1", "J2"]])
    assert names_by_vehicle(places) == {2: "Ann"} and places[0].note == ""


def test_jobs_added_or_taken_away_keep_the_name_quietly():
    assert place_drivers([_ann("J1", "J2")], [["J0", "J1", "J2", "J3"]])[0].vehicle == 1
    assert place_drivers([_ann("J1", "J2", "J9")], [["J5"], ["J1"]])[0].vehicle == 2


def test_a_split_route_keeps_the_name_where_most_jobs_went_and_says_so():
    [place] = place_drivers([_ann("J1", "J2", "J3")], [["J3"], ["J1", "J2"], ["J4"]])
    assert place.vehicle == 2
    assert place.note == ("An edit split Ann's route: its jobs are now on vehicles 1 and 2; "
                          "Ann stays with vehicle 2, which has most of them.")


def test_merged_routes_keep_one_name_and_say_where_the_other_went():
    bo = Driver("Bo", frozenset({"J5"}))
    ann, bo_place = place_drivers([_ann("J1", "J2"), bo], [["J1", "J5", "J2"]])
    assert (ann.vehicle, bo_place.vehicle) == (1, None)
    assert ann.note == "Ann's route (vehicle 1) now also does jobs of Bo's route."
    assert bo_place.note.startswith("Bo's route was merged into Ann's (vehicle 1)")


def test_a_route_whose_jobs_are_gone_has_no_vehicle():
    [place] = place_drivers([_ann("J1")], [["J2"]])
    assert place.vehicle is None and "None of the jobs of Ann's route" in place.note


def test_two_names_never_share_a_route():
    places = place_drivers([_ann("J1"), Driver("Bo", frozenset({"J1"}))], [["J1"], ["J2"]])
    assert [p.vehicle for p in places] == [1, None]


def test_names_of_old_plan_files_are_placed_by_vehicle_number():
    drivers = drivers_from_numbers({2: "Ann", 9: "Gone", 1: ""})
    assert drivers == (Driver("Ann", vehicle=2), Driver("Gone", vehicle=9))
    places = place_drivers(drivers, [["J1"], ["J2"]])
    assert names_by_vehicle(places) == {2: "Ann"}
