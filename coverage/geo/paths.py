"""Great-circle bearings and distances from the station, short and long path.

References
----------
C. F. F. Karney, "Algorithms for geodesics", J. Geodesy 87 (2013) 43-55,
as implemented by pyproj.Geod on the WGS84 ellipsoid.
"""
from __future__ import annotations

import numpy as np
from pyproj import Geod

from .station import Station

__all__ = ["EARTH_RADIUS_KM", "GEOD", "inverse", "goal_paths", "bearing_arc"]

EARTH_RADIUS_KM = 6371.0  # the sphere of the hop geometry and the long path
GEOD = Geod(ellps="WGS84")


def inverse(lon1_deg: float, lat1_deg: float, lons_deg: np.ndarray, lats_deg: np.ndarray,
            geod: Geod = GEOD) -> tuple[np.ndarray, np.ndarray]:
    """Forward azimuth (deg, 0..360) and distance (km) from one point to many."""
    lons = np.asarray(lons_deg, dtype=float)
    lats = np.asarray(lats_deg, dtype=float)
    az, _, dist_m = geod.inv(np.full_like(lons, lon1_deg), np.full_like(lats, lat1_deg), lons, lats)
    return np.mod(np.asarray(az), 360.0), np.asarray(dist_m) / 1000.0


def goal_paths(station: Station, lons_deg: np.ndarray, lats_deg: np.ndarray, path: str = "short"
               ) -> tuple[np.ndarray, np.ndarray]:
    """Bearing (deg) and distance (km) to each point along the short or long path.

    Long path: bearing + 180 deg and distance = 2 pi R - short distance with
    R = 6371 km (exact on a sphere; on the ellipsoid it is off by tens of km,
    which does not matter at HF).
    """
    bearing, dist = inverse(station.lon_deg, station.lat_deg, lons_deg, lats_deg)
    if path == "long":
        return np.mod(bearing + 180.0, 360.0), 2.0 * np.pi * EARTH_RADIUS_KM - dist
    if path != "short":
        raise ValueError(f"path must be 'short' or 'long', not {path!r}")
    return bearing, dist


def bearing_arc(bearing_deg: np.ndarray) -> tuple[float, float, float]:
    """Smallest clockwise arc holding every bearing: (start, end, median).

    The arc starts just after the largest gap between neighbouring bearings,
    so a region straddling north gives e.g. (350, 10), not (10, 350). The
    median is taken along the arc.
    """
    b = np.sort(np.mod(np.asarray(bearing_deg, dtype=float), 360.0))
    if b.size == 0:
        raise ValueError("no bearings")
    gaps = np.diff(np.concatenate([b, [b[0] + 360.0]]))
    i = int(np.argmax(gaps))
    start = b[(i + 1) % b.size]
    end = b[i]
    unwrapped = np.mod(b - start, 360.0)
    median = float(np.mod(start + np.median(unwrapped), 360.0))
    return float(start), float(end), median
