"""Input checks: every problem names file, row and column in plain words."""

import pytest

from shipgui.core import InputError, Settings, load_day

JOBS_HEADER = "job,origin,destination,start,end\n"
SITES = "site,name,x_km,y_km\nA,Alder yard,0,0\nB,Birch lane,25,0\n"  # 25 km: 36 min


def write(tmp_path, name, text, encoding="utf-8"):
    p = tmp_path / name
    p.write_bytes(text.encode(encoding) if isinstance(text, str) else text)
    return p


def load(tmp_path, jobs, sites=SITES, travel=None, **settings):
    j = write(tmp_path, "jobs.csv", jobs)
    s = write(tmp_path, "sites.csv", sites) if sites else None
    t = write(tmp_path, "travel.csv", travel) if travel else None
    return load_day(j, s, t, settings=Settings(**settings))


def problem(exc):
    return exc.value.problems[0]


def test_good_file_with_bom_crlf_semicolons_and_spaces(tmp_path):
    text = "\ufeff Job ; Origin ;destination; START ;end\r\nJ1; A ;B;07:00;08:00\r\n"
    day = load(tmp_path, text)
    assert day.jobs[0].id == "J1" and day.jobs[0].origin == "A"
    assert day.jobs[0].end - day.jobs[0].start == 3600


def test_duration_instead_of_end_and_default_destination(tmp_path):
    day = load(tmp_path, "job,origin,start,duration\nJ1,A,07:00,12.3\n")
    assert day.jobs[0].destination == "A"
    assert day.jobs[0].end - day.jobs[0].start == 738


def test_missing_column_is_named(tmp_path):
    with pytest.raises(InputError) as e:
        load(tmp_path, "job,start,end\nJ1,07:00,08:00\n")
    p = problem(e)
    assert p.column == "origin" and p.row == 1 and p.file.endswith("jobs.csv")


def test_all_problems_of_a_file_reported_together(tmp_path):
    text = JOBS_HEADER + "J1,A,B,7.00,08:00\nJ2,A,B,07:00,06:00\nJ1,A,B,07:00,09:00\n"
    with pytest.raises(InputError) as e:
        load(tmp_path, text)
    found = {(p.row, p.column) for p in e.value.problems}
    assert found == {(2, "start"), (3, "end"), (4, "job")}
    assert "ends" in str(e.value) and "listed twice" in str(e.value)


def test_end_before_start_hints_next_day_notation(tmp_path):
    with pytest.raises(InputError) as e:
        load(tmp_path, JOBS_HEADER + "J1,A,A,23:00,01:00\n")
    assert "25:30" in str(e.value)
    day = load(tmp_path, JOBS_HEADER + "J1,A,A,23:00,25:00\n")
    assert day.jobs[0].end == 25 * 3600


def test_slot_shorter_than_its_drive_names_the_job(tmp_path):
    with pytest.raises(InputError) as e:
        load(tmp_path, JOBS_HEADER + "J9,A,B,07:00,07:30\n")
    p = problem(e)
    assert p.job == "J9" and "job J9" in str(p) and "36 min" in p.message and p.row == 2


def test_control_characters_refused(tmp_path):
    with pytest.raises(InputError) as e:
        load(tmp_path, JOBS_HEADER + "J1\x07,A,B,07:00,09:00\n")
    assert problem(e).column == "job" and "control character" in problem(e).message


def test_binary_file_refused(tmp_path):
    with pytest.raises(InputError) as e:
        load(tmp_path, b"\x89PNG\r\n\x1a\n\x00\x00\x00")
    assert "not a text" in str(e.value)


def test_not_utf8_names_the_row(tmp_path):
    with pytest.raises(InputError) as e:
        text = JOBS_HEADER + "J1,A,B,07:00,09:00\nJ\xe9,A,B,07:00,09:00\n"
        load(tmp_path, text.encode("latin-1"))
    assert problem(e).row == 3 and "UTF-8" in problem(e).message


def test_missing_travel_pair_is_named(tmp_path):
    # B has no coordinates and no travel pair: the pair is named, with the fix.
    with pytest.raises(InputError) as e:
        load(tmp_path, JOBS_HEADER + "J1,A,B,07:00,09:00\n", sites="site,x_km,y_km\nA,0,0\nB,,\n")
    assert "A -> B" in str(e.value) and "coordinates" in str(e.value)


def test_travel_file_overrides_and_closure_is_reported(tmp_path):
    travel = "from,to,minutes\nA,B,50\nB,A,10\nA,C,5\nC,B,5\nB,C,60\nC,A,60\n"
    day = load(tmp_path, JOBS_HEADER + "J1,A,B,07:00,09:00\n", sites=None, travel=travel)
    assert day.travel_between("A", "B") == 600  # via C: 5 + 5 minutes
    assert day.shortened_pairs >= 1
    assert any("shortened" in w for w in day.warnings)


def test_depot_reachability_names_the_job_and_minutes(tmp_path):
    text = JOBS_HEADER + "J1,B,B,06:10,07:00\n"
    with pytest.raises(InputError) as e:
        load(tmp_path, text, depot="A", day_start=6 * 3600)
    assert "J1" in str(e.value) and "26 min" in str(e.value)  # 36 min drive, 10 min slack
    with pytest.raises(InputError) as e:
        load(tmp_path, JOBS_HEADER + "J2,B,B,07:00,21:40\n", depot="A", day_end=22 * 3600)
    assert "J2" in str(e.value) and "16 min" in str(e.value)


def test_iso_datetimes_with_plan_date(tmp_path):
    text = JOBS_HEADER + "J1,A,A,2026-12-02T22:00,2026-12-03T01:30\n"
    day = load(tmp_path, text)
    assert str(day.plan_date) == "2026-12-02"
    assert day.jobs[0].end == 25 * 3600 + 1800


def test_latlon_sites_estimate_travel(tmp_path):
    sites = "site,lat,lon\nA,10.0,20.0\nB,10.1,20.0\n"  # 0.1 degree: ~11.1 km
    day = load(tmp_path, JOBS_HEADER + "J1,A,B,07:00,09:00\n", sites=sites)
    km = 11.119
    assert day.travel_between("A", "B") == pytest.approx(km * 1.2 / 50 * 3600, abs=2)
    assert day.estimated_pairs == 2


def test_bad_site_coordinates(tmp_path):
    with pytest.raises(InputError) as e:
        load(tmp_path, JOBS_HEADER + "J1,A,A,07:00,09:00\n", sites="site,lat,lon\nA,95,0\n")
    assert problem(e).column == "lat" and problem(e).row == 2
