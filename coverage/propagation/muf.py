"""MUF, control points, day-to-day spread and daytime absorption.

Pure numpy; the ionosphere itself comes from :mod:`.climatology`.

References
----------
ITU-R Recommendation P.533, *Method for the prediction of the performance of
HF circuits*: control points (section 3; from memory).
ITU-R Recommendation P.1240, *ITU-R methods of basic MUF, operational MUF
and ray-path prediction*: decile factors of the MUF (values from memory).
K. Davies, *Ionospheric Radio* (1990), ch. 6: secant law with curvature.
P. L. George and P. A. Bradley (1974), "A new method of predicting the
ionospheric absorption of high frequency waves at oblique incidence",
*Telecommunication Journal* 41, 307-312: the semi-empirical absorption form
(as quoted by Davies 1990, ch. 7; constants from memory).
"""
from __future__ import annotations

import numpy as np
from scipy.special import ndtr

from .hops import elevation_deg, incidence_secant

__all__ = [
    "F2_DECILE_FACTORS",
    "E_DECILE_FACTORS",
    "ABSORPTION_HEIGHT_KM",
    "GYROFREQUENCY_MHZ",
    "secant_law_muf",
    "m3000_muf",
    "open_probability",
    "control_point_distances_km",
    "control_points",
    "absorption_index",
    "absorption_db",
]

F2_DECILE_FACTORS = (0.85, 1.15)
"""Lower and upper decile of the day-to-day F2 MUF over its monthly median
(ITU-R P.1240, values from memory; the Recommendation tabulates them by
season, time and latitude, we keep the typical pair)."""

E_DECILE_FACTORS = (0.95, 1.05)
"""The same for the E layer, which varies far less from day to day
(ITU-R P.1240, from memory)."""

ABSORPTION_HEIGHT_KM = 100.0
"""Height at which the ray's incidence angle enters the absorption (D/E
region), as in George and Bradley (1974)."""

GYROFREQUENCY_MHZ = 1.2
"""Electron gyrofrequency at absorption heights, a typical mid-latitude
value (from memory; it ranges about 0.8..1.6 MHz over the globe)."""

_Z_DECILE = 1.2815515655446004  # standard normal 90th percentile


def secant_law_muf(fo_mhz, ground_range_km, height_km):
    """MUF of one hop by the secant law with the Earth's curvature.

    Parameters
    ----------
    fo_mhz : array_like
        Critical frequency of the reflecting layer (MHz).
    ground_range_km : array_like
        Hop length (km).
    height_km : array_like
        Mirror reflection height (km).

    Returns
    -------
    ndarray
        MUF = fo sec i (MHz), sin i = R cos(Delta) / (R + h), Delta the
        takeoff angle of the hop.

    References
    ----------
    Davies (1990), ch. 6; ITU-R P.1240 (the basic MUF in terms of the
    critical frequency and the obliquity factor).
    """
    el = elevation_deg(ground_range_km, height_km)
    return np.asarray(fo_mhz, dtype=float) * incidence_secant(el, height_km)


def m3000_muf(fo_mhz, m3000f2, ground_range_km, height_km):
    """F2 MUF of one hop anchored on the M(3000)F2 factor.

    The monthly-median maps give the MUF at 3000 km directly,
    MUF(3000)F2 = foF2 M(3000)F2 (the definition of the factor). Other hop
    lengths scale between foF2 at vertical incidence and that value with
    the curved-Earth secant law at the reflection height:

        MUF(d) = foF2 [1 + (M(3000)F2 - 1) (sec i(d) - 1) / (sec i(3000) - 1)]

    so that a thick, low-M layer is not credited with the plain secant
    law's larger obliquity. This is the structure of ITU-R P.1240's basic
    MUF, 1 + (C_d / C_3000)(B - 1), with the distance function C taken from
    the secant law (our simplification; P.1240's own C_d is a polynomial).

    Parameters
    ----------
    fo_mhz : array_like
        foF2 (MHz).
    m3000f2 : array_like
        M(3000)F2 factor.
    ground_range_km : array_like
        Hop length (km).
    height_km : array_like
        Mirror reflection height (km), e.g. hmF2.

    Returns
    -------
    ndarray
        MUF (MHz).

    References
    ----------
    ITU-R P.1240 (basic MUF, from memory); ITU-R P.1239 and URSI Handbook
    of Ionogram Interpretation (M(3000)F2 = MUF(3000)F2 / foF2); Davies
    (1990), ch. 6.
    """
    sec_d = incidence_secant(elevation_deg(ground_range_km, height_km), height_km)
    sec_3000 = incidence_secant(elevation_deg(3000.0, height_km), height_km)
    m = np.asarray(m3000f2, dtype=float)
    return np.asarray(fo_mhz, dtype=float) * (1.0 + (m - 1.0) * (sec_d - 1.0) / (sec_3000 - 1.0))


def open_probability(freq_mhz, median_muf_mhz, decile_factors=F2_DECILE_FACTORS):
    """Probability that the day's MUF is above the operating frequency.

    The day-to-day MUF is taken as normally distributed about its monthly
    median, with separate spreads below and above chosen so that the lower
    and upper deciles fall at ``median * decile_factors``.

    Parameters
    ----------
    freq_mhz : array_like
        Operating frequency (MHz).
    median_muf_mhz : array_like
        Monthly-median MUF (MHz); 0 or NaN means no mode.
    decile_factors : (float, float)
        Lower and upper decile over the median.

    Returns
    -------
    ndarray
        Probability in 0..1: 0.5 at the median, 0.9 at the lower decile,
        0.1 at the upper decile.

    References
    ----------
    ITU-R P.1240 (decile factors); ITU-R P.533 uses the same split normal
    form for the probability of the MUF exceeding a frequency (from memory).
    """
    f = np.asarray(freq_mhz, dtype=float)
    m = np.asarray(median_muf_mhz, dtype=float)
    lower, upper = decile_factors
    with np.errstate(divide="ignore", invalid="ignore"):
        x = f / m - 1.0
        sigma = np.where(x < 0.0, (1.0 - lower) / _Z_DECILE, (upper - 1.0) / _Z_DECILE)
        p = 1.0 - ndtr(x / sigma)
    return np.where(np.isfinite(m) & (m > 0.0), p, 0.0)


def control_point_distances_km(distance_km, hop_km):
    """Where along a path the ionosphere is sampled (ITU-R P.533).

    Parameters
    ----------
    distance_km : array_like, shape S
        Path length (km).
    hop_km : array_like, broadcastable to S
        Length of one hop of the lowest-order F2 mode (km); used beyond
        4000 km only.

    Returns
    -------
    ndarray, shape S + (2,)
        Distances from the station of the two control points: up to 2000 km
        both at the midpoint; up to 4000 km 1000 km from each end; beyond,
        half a hop from each end.

    References
    ----------
    ITU-R P.533, table of control points (from memory).
    """
    d = np.asarray(distance_km, dtype=float)
    hop = np.broadcast_to(np.asarray(hop_km, dtype=float), d.shape)
    first = np.where(d <= 2000.0, d / 2.0, np.where(d <= 4000.0, 1000.0, hop / 2.0))
    return np.stack([first, d - first], axis=-1)


def control_points(station_lon_deg, station_lat_deg, bearing_deg, along_km):
    """Positions of points along the great circle leaving the station.

    Parameters
    ----------
    station_lon_deg, station_lat_deg : float
        The station (deg, WGS84).
    bearing_deg : array_like, shape S
        Bearing of each path at the station (deg from true north); for the
        long path this is the long-path bearing.
    along_km : array_like, shape S + (k,)
        Distances from the station along each path (km).

    Returns
    -------
    lons_deg, lats_deg : ndarray, shape S + (k,)

    Notes
    -----
    The geodesic direct problem on WGS84 (pyproj, Karney's algorithm); for a
    long path the geodesic simply continues past the antipode.
    """
    from pyproj import Geod  # light, but keep the import local to the use

    along = np.asarray(along_km, dtype=float)
    az = np.broadcast_to(np.asarray(bearing_deg, dtype=float)[..., None], along.shape)
    lon0 = np.full(along.shape, float(station_lon_deg))
    lat0 = np.full(along.shape, float(station_lat_deg))
    lon, lat, _ = Geod(ellps="WGS84").fwd(lon0.ravel(), lat0.ravel(), az.ravel(), along.ravel() * 1000.0)
    return np.asarray(lon).reshape(along.shape), np.asarray(lat).reshape(along.shape)


def absorption_index(solar_zenith_deg, sunspot_number):
    """Absorption index I of George and Bradley at one point.

    Parameters
    ----------
    solar_zenith_deg : array_like
        Solar zenith angle at the point (deg).
    sunspot_number : float
        12-month smoothed sunspot number R12.

    Returns
    -------
    ndarray
        I = (1 + 0.0037 R12) cos(0.881 chi)^1.3, zero once 0.881 chi passes
        90 deg (about chi > 102 deg: night; night absorption is neglected).

    References
    ----------
    George and Bradley (1974); Davies (1990), ch. 7 (constants from memory).
    """
    c = np.cos(np.radians(0.881 * np.asarray(solar_zenith_deg, dtype=float)))
    return (1.0 + 0.0037 * float(sunspot_number)) * np.clip(c, 0.0, None) ** 1.3


def absorption_db(freq_mhz, elevation_deg_, hops, index):
    """Non-deviative absorption of a mode (dB), George and Bradley form.

    Parameters
    ----------
    freq_mhz : float
        Operating frequency (MHz).
    elevation_deg_ : array_like
        Takeoff angle of the mode (deg).
    hops : array_like
        Number of hops (each passes the absorbing region twice; the form
        below is per hop).
    index : array_like
        Absorption index :func:`absorption_index`, averaged over the path's
        control points.

    Returns
    -------
    ndarray
        L = n 677.2 I sec(phi) / ((f + fH)^1.98 + 10.2) dB, phi the angle
        of incidence at 100 km.

    References
    ----------
    George and Bradley (1974); Davies (1990), ch. 7; ITU-R P.533 uses a
    form of the same family (constants from memory).
    """
    sec_phi = incidence_secant(elevation_deg_, ABSORPTION_HEIGHT_KM)
    denom = (float(freq_mhz) + GYROFREQUENCY_MHZ) ** 1.98 + 10.2
    return np.asarray(hops, dtype=float) * 677.2 * np.asarray(index, dtype=float) * sec_phi / denom

