"""MUF, control points, day-to-day spread and daytime absorption.

Pure numpy; the ionosphere itself comes from :mod:`.climatology`.

References
----------
ITU-R Recommendation P.533, *Method for the prediction of the performance of
HF circuits*: control points (section 3; from memory).
ITU-R Recommendation P.1240, *ITU-R methods of basic MUF, operational MUF
and ray-path prediction*: the F2 basic MUF with its distance function, the
gyrofrequency term and the reference hop d_max; the decile factors of the
MUF (formula constants and decile values from memory, not re-read).
K. Davies, *Ionospheric Radio* (1990), ch. 6: secant law with curvature.
P. L. George and P. A. Bradley (1974), "A new method of predicting the
ionospheric absorption of high frequency waves at oblique incidence",
*Telecommunication Journal* 41, 307-312: the semi-empirical absorption form
(as quoted by Davies 1990, ch. 7; constants from memory). ITU-R P.533
builds its absorption term on the same form (its noon factor and diurnal
exponent come from figures we do not have; we keep George and Bradley's
index and take P.533's night floor of the diurnal factor, from memory).
"""
from __future__ import annotations

import numpy as np
from scipy.special import ndtr

from .hops import elevation_deg, incidence_secant

__all__ = [
    "F2_DECILE_FACTORS",
    "E_DECILE_FACTORS",
    "f2_decile_factors",
    "p1240_dmax_km",
    "p1240_f2_muf",
    "ABSORPTION_HEIGHT_KM",
    "ABSORPTION_NIGHT_FLOOR",
    "P1240_DMAX_LIMIT_KM",
    "GYROFREQUENCY_MHZ",
    "secant_law_muf",
    "open_probability",
    "control_point_distances_km",
    "control_points",
    "absorption_index",
    "absorption_db",
]

# Decile ratios of the F2 MUF (lower, upper) by day and by night, at low and
# middle (|dip latitude| <= 40 deg) and at high (>= 60 deg) geomagnetic
# latitudes. ITU-R P.1240 tabulates these by season, local time, latitude
# and solar activity; the values here are round numbers from memory in the
# table's pattern (night and high latitudes vary more), not re-read.
_F2_DECILES = {("day", "mid"): (0.85, 1.15), ("night", "mid"): (0.80, 1.22),
               ("day", "high"): (0.80, 1.20), ("night", "high"): (0.72, 1.30)}

E_DECILE_FACTORS = (0.95, 1.05)
"""Lower and upper decile of the E-layer MUF over its monthly median; the E
layer varies far less from day to day (ITU-R P.1240, from memory)."""

F2_DECILE_FACTORS = _F2_DECILES[("day", "mid")]
"""Lower and upper decile of the day-to-day F2 MUF over its monthly median
by day at low and middle geomagnetic latitudes (ITU-R P.1240, values from
memory); :func:`f2_decile_factors` widens them by night and toward the
poles."""

P1240_DMAX_LIMIT_KM = 4000.0
"""P.1240 caps the reference hop length d_max at 4000 km (from memory)."""

ABSORPTION_NIGHT_FLOOR = 0.02
"""Lowest value of the diurnal factor cos(0.881 chi)^1.3 of the absorption
index: ITU-R P.533 keeps a small night-time absorption this way (value
from memory)."""

ABSORPTION_HEIGHT_KM = 100.0
"""Height at which the ray's incidence angle enters the absorption (D/E
region), as in George and Bradley (1974)."""

GYROFREQUENCY_MHZ = 1.2
"""Electron gyrofrequency at absorption heights, a typical mid-latitude
value (from memory; it ranges about 0.8..1.6 MHz over the globe). The
climatology uses the IGRF field at each control point instead; this is the
default of :func:`absorption_db` only."""

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


def p1240_dmax_km(fof2_mhz, foe_mhz, m3000f2):
    """Reference hop length d_max of ITU-R P.1240's F2 basic MUF (km).

    Parameters
    ----------
    fof2_mhz, foe_mhz, m3000f2 : array_like
        foF2 (MHz), foE (MHz) and the M(3000)F2 factor at a control point.

    Returns
    -------
    ndarray
        d_max = 4780 + (12610 + 2140/x^2 - 49720/x^4 + 688900/x^6)(1/B - 0.303)
        km, capped at 4000 km (and kept above 1000 km so that the distance
        function stays defined), with x = foF2/foE (at least 2) and B from
        :func:`_p1240_b`.

    References
    ----------
    ITU-R P.1240, the F2-layer basic MUF (constants from memory).
    """
    x = _p1240_x(fof2_mhz, foe_mhz)
    return _p1240_dmax(x, _p1240_b(m3000f2, x))


def _p1240_dmax(x, b):
    u = 1.0 / (x * x)
    d = 4780.0 + (12610.0 + u * (2140.0 + u * (-49720.0 + u * 688900.0))) * (1.0 / b - 0.303)
    return np.clip(d, 1000.0, P1240_DMAX_LIMIT_KM)


def _p1240_x(fof2_mhz, foe_mhz):
    fo = np.asarray(fof2_mhz, dtype=float)
    foe = np.maximum(np.asarray(foe_mhz, dtype=float), 1e-3)
    return np.maximum(fo / foe, 2.0)


def _p1240_b(m3000f2, x):
    m = np.asarray(m3000f2, dtype=float)
    return m - 0.124 + (m * m - 4.0) * (0.0215 + 0.005 * np.sin(7.854 / x - 1.9635))


def _p1240_c(hop_km, dmax_km):
    z = 1.0 - 2.0 * np.asarray(hop_km, dtype=float) / dmax_km
    # 0.74 - 0.591 z - 0.424 z^2 - 0.090 z^3 + 0.088 z^4 + 0.181 z^5 + 0.096 z^6, by Horner
    c = 0.096
    for a in (0.181, 0.088, -0.090, -0.424, -0.591, 0.74):
        c = c * z + a
    return c


def p1240_f2_muf(fof2_mhz, foe_mhz, m3000f2, hop_km, gyrofrequency_mhz):
    """F2 basic MUF of one hop by ITU-R P.1240 (MHz).

    Parameters
    ----------
    fof2_mhz, foe_mhz, m3000f2 : array_like
        Layer parameters at the control point.
    hop_km : array_like
        Hop length d (km), at most d_max (longer hops are split by the
        caller: the lowest-order mode has ceil(D / d_max) hops).
    gyrofrequency_mhz : array_like
        Electron gyrofrequency at 300 km at the control point (MHz).

    Returns
    -------
    ndarray
        MUF(d) = [1 + (C_d / C_3000)(B - 1)] foF2 + (fH / 2)(1 - d / d_max),
        with C_d the distance polynomial in Z = 1 - 2 d / d_max
        (C = 0 at d = 0 and 1 at d = d_max), so that the MUF at vertical
        incidence is foF2 + fH/2, the extraordinary-wave critical
        frequency.

    References
    ----------
    ITU-R P.1240, the F2-layer basic MUF (constants from memory); Davies
    (1990) ch. 5 (fx = fo + fH/2 for fo >> fH).
    """
    fo = np.asarray(fof2_mhz, dtype=float)
    x = _p1240_x(fo, foe_mhz)
    b = _p1240_b(m3000f2, x)
    dmax = _p1240_dmax(x, b)
    d = np.minimum(np.asarray(hop_km, dtype=float), dmax)
    ratio = _p1240_c(d, dmax) / _p1240_c(3000.0, dmax)
    fh = np.asarray(gyrofrequency_mhz, dtype=float)
    return (1.0 + ratio * (b - 1.0)) * fo + 0.5 * fh * (1.0 - d / dmax)


def f2_decile_factors(solar_zenith_deg, dip_latitude_deg):
    """Lower and upper decile ratios of the day-to-day F2 MUF.

    Parameters
    ----------
    solar_zenith_deg, dip_latitude_deg : array_like
        At the control point (deg); broadcast together.

    Returns
    -------
    lower, upper : ndarray
        Day values below a solar zenith angle of 90 deg, night values above
        105 deg, linear in between; middle-latitude values up to 40 deg of
        magnetic dip latitude, high-latitude ones from 60 deg, linear in
        between (see ``_F2_DECILES``).

    References
    ----------
    ITU-R P.1240, the table of MUF decile ratios (values from memory, in
    the table's pattern; season and solar activity are not resolved).
    """
    chi = np.asarray(solar_zenith_deg, dtype=float)
    lat = np.abs(np.asarray(dip_latitude_deg, dtype=float))
    night = np.clip((chi - 90.0) / 15.0, 0.0, 1.0)
    high = np.clip((lat - 40.0) / 20.0, 0.0, 1.0)
    out = []
    for k in (0, 1):
        mid_v = (1 - night) * _F2_DECILES[("day", "mid")][k] + night * _F2_DECILES[("night", "mid")][k]
        high_v = (1 - night) * _F2_DECILES[("day", "high")][k] + night * _F2_DECILES[("night", "high")][k]
        out.append((1 - high) * mid_v + high * high_v)
    return out[0], out[1]


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
    decile_factors : (array_like, array_like)
        Lower and upper decile over the median, broadcast against the
        frequencies and MUFs.

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
        sigma = np.where(x < 0.0, (1.0 - np.asarray(lower)) / _Z_DECILE,
                         (np.asarray(upper) - 1.0) / _Z_DECILE)
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
        I = (1 + 0.0037 R12) max(cos(0.881 chi)^1.3, 0.02): by night
        (0.881 chi past 90 deg, about chi > 102 deg) the diurnal factor
        keeps P.533's floor, a small residual night absorption.

    References
    ----------
    George and Bradley (1974); Davies (1990), ch. 7 (constants from memory);
    ITU-R P.533 (the night floor of the diurnal factor, from memory).
    """
    c = np.cos(np.radians(0.881 * np.asarray(solar_zenith_deg, dtype=float)))
    diurnal = np.maximum(np.clip(c, 0.0, None) ** 1.3, ABSORPTION_NIGHT_FLOOR)
    return (1.0 + 0.0037 * float(sunspot_number)) * diurnal


def absorption_db(freq_mhz, elevation_deg_, hops, index, gyrofrequency_mhz=GYROFREQUENCY_MHZ):
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
        Absorption index :func:`absorption_index`, averaged over the
        reflection points of the path's hops.
    gyrofrequency_mhz : array_like
        Electron gyrofrequency at absorption heights (MHz).

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
    denom = (float(freq_mhz) + np.asarray(gyrofrequency_mhz, dtype=float)) ** 1.98 + 10.2
    return np.asarray(hops, dtype=float) * 677.2 * np.asarray(index, dtype=float) * sec_phi / denom

