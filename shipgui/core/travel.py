"""Travel times between sites: given, estimated from coordinates, then closed.

Estimates are great-circle distance (haversine) or planar distance, times a
circuity factor, divided by an average speed.  The matrix is then replaced by
its shortest-path closure so that it obeys the triangle inequality: a vehicle
may always drive via a third site.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.sparse.csgraph import csgraph_from_dense, shortest_path

__all__ = ["EARTH_RADIUS_KM", "haversine_km", "central_angle", "estimate_seconds",
           "close_travel", "site_distance_km"]

# Mean Earth radius (IUGG), 6371.0088 km; Moritz, "Geodetic Reference System
# 1980", Bulletin Geodesique 54 (1980) gives the parameters it derives from.
EARTH_RADIUS_KM = 6371.0088


def central_angle(lat1, lon1, lat2, lon2) -> np.ndarray:
    """Great-circle central angle in radians by the haversine formula.

    Sinnott, "Virtues of the Haversine", Sky and Telescope 68(2), 1984, p. 159.
    Arguments in degrees; broadcasts like numpy.
    """
    p1, p2 = np.radians(lat1), np.radians(lat2)
    dp = p2 - p1
    dl = np.radians(lon2) - np.radians(lon1)
    h = np.sin(dp / 2) ** 2 + np.cos(p1) * np.cos(p2) * np.sin(dl / 2) ** 2
    return 2 * np.arcsin(np.sqrt(np.clip(h, 0.0, 1.0)))


def haversine_km(lat1, lon1, lat2, lon2) -> np.ndarray:
    """Great-circle distance in km on a sphere of the mean Earth radius."""
    return EARTH_RADIUS_KM * central_angle(lat1, lon1, lat2, lon2)


def site_distance_km(a, b, circuity: float) -> float | None:
    """Estimated road distance between two sites (straight line times ``circuity``);
    None unless both have coordinates of the same kind.  ``a`` and ``b`` are
    :class:`~shipgui.core.model.Site` records or None."""
    if a is None or b is None:
        return None
    if a.has_latlon and b.has_latlon:
        km = float(haversine_km(a.lat, a.lon, b.lat, b.lon))
    elif a.has_xy and b.has_xy:
        km = math.hypot(a.x_km - b.x_km, a.y_km - b.y_km)
    else:
        return None
    return km * circuity


def estimate_seconds(km: np.ndarray, *, speed_kmh: float, circuity: float) -> np.ndarray:
    """Road time in whole seconds (rounded up) for straight-line distances in km."""
    if not (speed_kmh > 0 and math.isfinite(speed_kmh)):
        raise ValueError("average speed must be a positive number of km/h")
    if not (circuity >= 1 and math.isfinite(circuity)):
        raise ValueError("circuity factor must be at least 1")
    # Round to microseconds before rounding up, so float noise (737.9999999 s for
    # 12.3 min) does not turn into an extra second.
    seconds = np.asarray(km, dtype=float) * circuity / speed_kmh * 3600.0
    return np.ceil(np.round(seconds, 6)).astype(np.int64)


def close_travel(travel: np.ndarray) -> tuple[np.ndarray, int]:
    """Shortest-path closure of a travel matrix in seconds.

    Returns the closed matrix and the number of ordered pairs it shortened.
    Entries that are negative mean "no direct value" (must not remain).
    Floyd-Warshall via scipy.sparse.csgraph (Floyd, "Algorithm 97: Shortest
    path", CACM 5(6), 1962); sums of whole seconds stay exact in float64.
    """
    t = np.asarray(travel, dtype=np.int64)
    dense = np.where(t < 0, np.inf, t.astype(float))
    np.fill_diagonal(dense, 0.0)
    if t.shape[0] == 0:
        return t.copy(), 0
    # csgraph_from_dense keeps zero-minute pairs as edges (a dense zero would mean "none").
    graph = csgraph_from_dense(dense, null_value=np.inf)
    closed = shortest_path(graph, method="FW", directed=True)
    shortened = int(np.count_nonzero((closed < dense) & (t >= 0)))
    if not np.all(np.isfinite(closed)):
        raise ValueError("some sites cannot be reached from others")
    return closed.astype(np.int64), shortened
