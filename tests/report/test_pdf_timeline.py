"""The timeline picture: what each row shows, and how it splits across pages."""

from __future__ import annotations

from reportlab.graphics.shapes import Line, Rect, String

from shipgui.core import solve_day
from shipgui.report.timeline import MIN_ROWS_PER_PART, ROW_HEIGHT, Timeline, timeline_rows
from tests.support.pdf import small_day


def _shapes(drawing, kind):
    return [s for s in drawing.contents if isinstance(s, kind)]


def test_rows_hold_each_vehicle_route():
    plan = solve_day(small_day())
    rows = timeline_rows(plan)
    assert [r.vehicle for r in rows] == list(range(1, plan.vehicles + 1))
    assert [[job[2] for job in r.jobs] for r in rows] == plan.route_ids()
    for row in rows:  # with a depot every route has a pull-out or pull-in drive
        assert row.empty_drives
        for a, b in row.empty_drives:
            assert a < b


def test_drawing_shows_every_job_id():
    plan = solve_day(small_day())
    chart = Timeline(timeline_rows(plan))
    chart.wrap(500, 800)
    drawing = chart.drawing()
    texts = {s.text for s in _shapes(drawing, String)}
    assert {job.id for job in plan.day.jobs} <= texts
    assert len(_shapes(drawing, Rect)) >= plan.day.n
    assert any(getattr(line, "strokeDashArray", None) for line in _shapes(drawing, Line))


def test_split_keeps_axis_and_rows():
    plan = solve_day(small_day())
    rows = timeline_rows(plan) * 20  # 60 rows
    chart = Timeline(rows)
    width, height = chart.wrap(500, 400)
    parts = chart.split(500, 400)
    assert len(parts) == 2
    first, rest = parts
    assert len(first.rows) + len(rest.rows) == len(rows)
    assert first.hours == rest.hours == chart.hours
    assert first.wrap(500, 400)[1] <= 400
    assert height - first.wrap(500, 400)[1] == ROW_HEIGHT * len(rest.rows)
    tiny = chart.split(500, chart._fixed_height() + ROW_HEIGHT * (MIN_ROWS_PER_PART - 1))
    assert tiny == []
