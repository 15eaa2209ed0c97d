import math

import numpy as np
import pytest

from shipgui.core.travel import central_angle, close_travel, estimate_seconds, haversine_km


def test_aviation_formulary_lax_jfk():
    # Williams, "Aviation Formulary" (worked example): LAX 33°57'N 118°24'W to
    # JFK 40°38'N 73°47'W is 0.623585 rad, about 2144 nm.
    lax = (33 + 57 / 60, -(118 + 24 / 60))
    jfk = (40 + 38 / 60, -(73 + 47 / 60))
    d = float(central_angle(*lax, *jfk))
    assert d == pytest.approx(0.623585, abs=2e-6)
    nm = d * 180 * 60 / math.pi  # one nautical mile per minute of arc
    assert nm == pytest.approx(2144, abs=1)


@pytest.mark.parametrize("a, b", [
    ((51.5074, -0.1278), (48.8566, 2.3522)),
    ((40.7128, -74.0060), (34.0522, -118.2437)),
    ((-33.8688, 151.2093), (-37.8136, 144.9631)),
    ((59.3293, 18.0686), (60.1699, 24.9384)),
    ((35.6762, 139.6503), (34.6937, 135.5023)),
])
def test_haversine_close_to_wgs84_geodesic(a, b):
    # Reference: geographiclib's WGS-84 geodesic (Karney, "Algorithms for
    # geodesics", J. Geodesy 87, 2013); a sphere is within 0.5 % of it.
    from geographiclib.geodesic import Geodesic
    exact_km = Geodesic.WGS84.Inverse(*a, *b)["s12"] / 1000
    assert float(haversine_km(*a, *b)) == pytest.approx(exact_km, rel=0.005)


def test_estimate_rounds_up_to_whole_seconds():
    # 10 km * 1.2 / 50 km/h = 0.24 h = 864 s exactly; 10.001 km must round up.
    assert estimate_seconds(np.array([10.0]), speed_kmh=50, circuity=1.2)[0] == 864
    assert estimate_seconds(np.array([10.001]), speed_kmh=50, circuity=1.2)[0] == 865


def test_closure_shortens_and_counts():
    t = np.array([[0, 10, 100], [10, 0, 10], [100, 10, 0]])
    closed, shortened = close_travel(t)
    assert closed[0, 2] == 20 and closed[2, 0] == 20
    assert shortened == 2


def test_closure_keeps_zero_minute_pairs():
    t = np.array([[0, 0, 50], [0, 0, 0], [50, 0, 0]])
    closed, shortened = close_travel(t)
    assert closed[0, 2] == 0 and shortened == 2


def test_closure_satisfies_triangle_inequality():
    rng = np.random.default_rng(3)
    t = rng.integers(0, 1000, (12, 12))
    np.fill_diagonal(t, 0)
    closed, _ = close_travel(t)
    for b in range(12):
        assert np.all(closed <= closed[:, b, None] + closed[None, b, :])
