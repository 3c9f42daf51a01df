"""Sunrise and sunset in UT, for the grey-line marks of the schedule figure.

References
----------
J. W. Spencer (1971), "Fourier series representation of the position of the
sun", *Search* 2(5), 172: the declination and equation-of-time series.
NOAA Global Monitoring Laboratory, "General Solar Position Calculations":
the same series with the sunrise hour angle for a zenith of 90.833 deg
(refraction and the Sun's radius), accurate to a minute or two at middle
latitudes.
"""
from __future__ import annotations

import datetime as _dt

import numpy as np

__all__ = ["SUNRISE_ZENITH_DEG", "sunrise_sunset_utc"]

SUNRISE_ZENITH_DEG = 90.833
"""Zenith angle of the Sun's centre at rise and set: 34' of refraction and
16' of semi-diameter (common practice, almanacs)."""


def sunrise_sunset_utc(lon_deg, lat_deg, year: int, month: int, day: int = 15):
    """UT of sunrise and sunset on one day at many places.

    Parameters
    ----------
    lon_deg, lat_deg : array_like, shape S
        Places (deg, east and north positive).
    year, month, day : int
        The civil date (UT).

    Returns
    -------
    rise_h, set_h : ndarray, shape S
        Hours UT in 0..24 (the event may fall on the UT day before or after;
        it is wrapped into 0..24). NaN where the Sun does not rise or set
        that day (polar night or midnight sun).

    References
    ----------
    Spencer (1971); NOAA, "General Solar Position Calculations".
    """
    lon = np.asarray(lon_deg, dtype=float)
    lat = np.radians(np.asarray(lat_deg, dtype=float))
    doy = _dt.date(int(year), int(month), int(day)).timetuple().tm_yday
    leap = (year % 4 == 0 and year % 100 != 0) or year % 400 == 0
    g = 2.0 * np.pi / (366.0 if leap else 365.0) * (doy - 1)  # fractional year at 12 h UT: (hour-12)/24 = 0
    eqtime_min = 229.18 * (0.000075 + 0.001868 * np.cos(g) - 0.032077 * np.sin(g)
                           - 0.014615 * np.cos(2 * g) - 0.040849 * np.sin(2 * g))
    decl = (0.006918 - 0.399912 * np.cos(g) + 0.070257 * np.sin(g) - 0.006758 * np.cos(2 * g)
            + 0.000907 * np.sin(2 * g) - 0.002697 * np.cos(3 * g) + 0.00148 * np.sin(3 * g))
    cos_ha = (np.cos(np.radians(SUNRISE_ZENITH_DEG)) / (np.cos(lat) * np.cos(decl))
              - np.tan(lat) * np.tan(decl))
    ok = np.abs(cos_ha) <= 1.0
    ha_deg = np.degrees(np.arccos(np.clip(cos_ha, -1.0, 1.0)))
    rise = (720.0 - 4.0 * (lon + ha_deg) - eqtime_min) / 60.0
    sets = (720.0 - 4.0 * (lon - ha_deg) - eqtime_min) / 60.0
    return np.where(ok, np.mod(rise, 24.0), np.nan), np.where(ok, np.mod(sets, 24.0), np.nan)
