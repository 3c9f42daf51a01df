"""Where to drive the stakes: element and junction positions for a chosen bearing.

Element 1 stands at the station's position. For a baseline bearing theta
(clockwise from true north) the along axis points to theta and the across
axis to theta + 90 deg, so

    north = along cos(theta) - across sin(theta)
    east  = along sin(theta) + across cos(theta)

(metres, a local level plane). Latitude and longitude follow from the
geodesic that leaves the station at bearing atan2(east, north) for
hypot(north, east) metres (WGS84); over a lot of tens of metres that agrees
with the local plane to far under a millimetre.

References
----------
C. F. F. Karney, "Algorithms for geodesics", J. Geodesy 87 (2013) 43-55
(pyproj.Geod, the direct problem).
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..geo.paths import GEOD

__all__ = ["Stake", "Run", "StakingPlan", "staking_plan", "to_north_east_m"]


@dataclass(frozen=True, slots=True)
class Stake:
    """One point on the ground: an element base ("1", "2", ...) or "junction"."""

    name: str
    along_m: float
    across_m: float
    north_m: float
    east_m: float
    lat_deg: float
    lon_deg: float


@dataclass(frozen=True, slots=True)
class Run:
    """The straight run from the junction to one element, and each state's line on it."""

    element: int
    run_m: float
    bearing_deg: float
    line_m: dict


@dataclass(frozen=True, slots=True)
class StakingPlan:
    option: str
    orientation_deg: float
    elements: tuple[Stake, ...]
    junction: Stake
    runs: tuple[Run, ...]


def to_north_east_m(along_m, across_m, orientation_deg: float):
    """(north, east) in metres of array-frame points for a baseline bearing."""
    t = math.radians(orientation_deg)
    a = np.asarray(along_m, dtype=float)
    c = np.asarray(across_m, dtype=float)
    return a * math.cos(t) - c * math.sin(t), a * math.sin(t) + c * math.cos(t)


def _stake(name, along, across, theta, lon0, lat0) -> Stake:
    n, e = to_north_east_m(along, across, theta)
    n, e = float(n), float(e)
    dist = math.hypot(n, e)
    if dist == 0.0:
        lon, lat = lon0, lat0
    else:
        lon, lat, _ = GEOD.fwd(lon0, lat0, math.degrees(math.atan2(e, n)), dist)
    return Stake(name, float(along), float(across), n, e, float(lat), float(lon))


def staking_plan(option_name: str, positions_m, junction_m, orientation_deg: float, lon_deg: float,
                 lat_deg: float, lines_by_state: dict | None = None) -> StakingPlan:
    """Stakes for every element and the junction, and the runs between them.

    Parameters
    ----------
    option_name : str
    positions_m : sequence of (along, across), metres; element 1 at the origin
    junction_m : (along, across), metres
    orientation_deg : float
        Bearing of the along axis.
    lon_deg, lat_deg : float
        Where element 1 stands (the station).
    lines_by_state : dict, optional
        State name -> line length per element (m), shown with each run.
    """
    theta = float(orientation_deg) % 360.0
    els = tuple(_stake(str(i + 1), a, c, theta, lon_deg, lat_deg) for i, (a, c) in enumerate(positions_m))
    junction = _stake("junction", junction_m[0], junction_m[1], theta, lon_deg, lat_deg)
    runs = []
    for i, s in enumerate(els):
        dn, de = s.north_m - junction.north_m, s.east_m - junction.east_m
        runs.append(Run(i + 1, math.hypot(dn, de), math.degrees(math.atan2(de, dn)) % 360.0,
                        {k: float(v[i]) for k, v in (lines_by_state or {}).items()}))
    return StakingPlan(option_name, theta, els, junction, tuple(runs))
