"""Hop geometry on a spherical Earth: takeoff angle, longest hop, mode lists.

Every function takes numpy arrays (or scalars) and broadcasts them; nothing
here knows about the ionosphere beyond a reflection height.

References
----------
K. Davies, *Ionospheric Radio*, Peter Peregrinus (1990), ch. 6: the
mirror-reflection geometry over a curved Earth used below.

ITU-R Recommendation P.533, *Method for the prediction of the performance of
HF circuits*: elevation angle from hop length and reflection height in the
same form (section 5.1; section number from memory).
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = [
    "EARTH_RADIUS_KM",
    "elevation_deg",
    "incidence_secant",
    "longest_hop_km",
    "min_hops",
    "Modes",
    "path_modes",
]

EARTH_RADIUS_KM = 6371.0
"""Mean Earth radius of the spherical model (km); the long path uses it too."""


def elevation_deg(ground_range_km, height_km):
    """Takeoff (elevation) angle of one hop by mirror reflection.

    Parameters
    ----------
    ground_range_km : array_like
        Ground range of one hop (km), >= 0.
    height_km : array_like
        Mirror reflection height (km), > 0. Broadcast against the range.

    Returns
    -------
    ndarray
        Elevation angle in degrees, 0..90; negative where the hop is longer
        than a ray leaving along the horizon can cover.

    Notes
    -----
    Delta = atan(cot(theta) - (R / (R + h)) csc(theta)), theta = d / (2 R).
    At zero range the ray goes straight up (90 deg).

    References
    ----------
    Davies (1990), ch. 6; ITU-R P.533 (same form).
    """
    d = np.asarray(ground_range_km, dtype=float)
    h = np.asarray(height_km, dtype=float)
    theta = d / (2.0 * EARTH_RADIUS_KM)
    ratio = EARTH_RADIUS_KM / (EARTH_RADIUS_KM + h)
    # atan2 form: tan(Delta) = (cos theta - ratio) / sin theta, exact at d = 0
    return np.degrees(np.arctan2(np.cos(theta) - ratio, np.sin(theta)))


def incidence_secant(elevation_deg_, height_km):
    """Secant of the angle of incidence at a layer for a given takeoff angle.

    Parameters
    ----------
    elevation_deg_ : array_like
        Takeoff angle at the ground (deg).
    height_km : array_like
        Layer height (km).

    Returns
    -------
    ndarray
        sec i, where sin i = R cos(Delta) / (R + h) (the curved-Earth form of
        the secant law).

    References
    ----------
    Davies (1990), ch. 6 (secant law with the Earth's curvature).
    """
    cos_el = np.cos(np.radians(np.asarray(elevation_deg_, dtype=float)))
    sin_i = EARTH_RADIUS_KM * cos_el / (EARTH_RADIUS_KM + np.asarray(height_km, dtype=float))
    return 1.0 / np.sqrt(1.0 - sin_i * sin_i)


def longest_hop_km(height_km, min_elevation_deg=3.0):
    """Longest single-hop ground range for a minimum takeoff angle.

    Parameters
    ----------
    height_km : array_like
        Mirror reflection height (km).
    min_elevation_deg : array_like
        Lowest takeoff angle allowed (deg).

    Returns
    -------
    ndarray
        d_max = 2 R (acos(R cos(Delta) / (R + h)) - Delta), km.

    References
    ----------
    Davies (1990), ch. 6 (the same triangle as :func:`elevation_deg`).
    """
    h = np.asarray(height_km, dtype=float)
    el = np.radians(np.asarray(min_elevation_deg, dtype=float))
    return 2.0 * EARTH_RADIUS_KM * (np.arccos(EARTH_RADIUS_KM * np.cos(el) / (EARTH_RADIUS_KM + h)) - el)


def min_hops(distance_km, height_km, min_elevation_deg=3.0):
    """Fewest equal hops that cover a path at or above a minimum elevation.

    Parameters
    ----------
    distance_km : array_like
        Path length along the ground (km).
    height_km, min_elevation_deg : array_like
        As in :func:`longest_hop_km`; broadcast against ``distance_km``.

    Returns
    -------
    ndarray of int
        n >= 1 with distance / n <= d_max.
    """
    d = np.asarray(distance_km, dtype=float)
    dmax = longest_hop_km(height_km, min_elevation_deg)
    # a hair of tolerance so that a path of exactly n d_max needs n hops
    n = np.ceil(d / dmax - 1e-9)
    return np.maximum(n, 1).astype(int)


@dataclass(frozen=True, slots=True)
class Modes:
    """Candidate propagation modes of many paths.

    Attributes
    ----------
    layer : tuple of str, length n_modes
        "F2" or "E" for each column.
    hops : ndarray of int, shape (n_paths, n_modes) (S + (n_modes,) in general)
        Number of hops of each mode on each path (0 where the mode does not
        exist, e.g. an E mode on a path longer than ``max_e_distance_km``).
    elevation_deg : ndarray, shape (n_paths, n_modes)
        Takeoff angle of each mode; NaN where the mode does not exist.
    """

    layer: tuple[str, ...]
    hops: np.ndarray
    elevation_deg: np.ndarray


def path_modes(distance_km, f2_height_km=300.0, e_height_km=110.0, min_elevation_deg=3.0,
               extra_f2_hops=2, extra_e_hops=1, max_e_distance_km=4000.0):
    """The F2 and E modes of paths: hop counts and takeoff angles.

    For each layer the lowest-order mode (fewest hops meeting the minimum
    elevation) and a number of higher-order ones are listed, F2 first, each
    column one order: F2 n0, F2 n0+1, ..., E m0, E m0+1, ...

    Parameters
    ----------
    distance_km : array_like, any shape S (written (n_paths,) below)
        Path lengths (km).
    f2_height_km, e_height_km : float or array_like, broadcastable to S
        Reflection heights of the two layers (km).
    min_elevation_deg : float
        Lowest usable takeoff angle (deg).
    extra_f2_hops, extra_e_hops : int
        How many orders above the lowest to list for each layer.
    max_e_distance_km : float
        E modes are listed only up to this path length (ITU-R P.533 takes
        E modes up to 4000 km; from memory).

    Returns
    -------
    Modes

    References
    ----------
    ITU-R P.533, sections 5.1-5.2 (mode selection; from memory).
    """
    d = np.atleast_1d(np.asarray(distance_km, dtype=float))
    cols_layer: list[str] = []
    cols_hops: list[np.ndarray] = []
    cols_el: list[np.ndarray] = []
    for layer, h, extra in (("F2", f2_height_km, extra_f2_hops), ("E", e_height_km, extra_e_hops)):
        h = np.broadcast_to(np.asarray(h, dtype=float), d.shape)
        n0 = min_hops(d, h, min_elevation_deg)
        exists = np.ones(d.shape, bool) if layer == "F2" else d <= max_e_distance_km
        for k in range(extra + 1):
            n = n0 + k
            el = elevation_deg(d / n, h)
            cols_layer.append(layer)
            cols_hops.append(np.where(exists, n, 0))
            cols_el.append(np.where(exists, el, np.nan))
    return Modes(tuple(cols_layer), np.stack(cols_hops, axis=-1), np.stack(cols_el, axis=-1))
