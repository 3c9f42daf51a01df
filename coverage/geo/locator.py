"""Maidenhead locators: 2, 4, 6 or 8 characters <-> latitude/longitude.

References
----------
The Maidenhead locator system (open standard of the trade): fields of
20 x 10 deg (letters A-R), squares of 2 x 1 deg (digits), subsquares of
5' x 2.5' (letters A-X), extended squares of 30" x 15" (digits).
"""
from __future__ import annotations

import re

__all__ = ["locator_to_latlon", "latlon_to_locator", "is_locator"]

_PATTERN = re.compile(r"^[A-R]{2}(?:[0-9]{2}(?:[A-X]{2}(?:[0-9]{2})?)?)?$")

# (longitude step, latitude step, characters per pair) per pair of characters
_STEPS = ((20.0, 10.0, 18), (2.0, 1.0, 10), (2.0 / 24, 1.0 / 24, 24), (2.0 / 240, 1.0 / 240, 10))


def is_locator(text: str) -> bool:
    return bool(_PATTERN.match(text.strip().upper()))


def locator_to_latlon(locator: str) -> tuple[float, float]:
    """Centre of the locator's square as (lat_deg, lon_deg).

    Raises ``ValueError`` for a malformed locator.
    """
    loc = locator.strip().upper()
    if not _PATTERN.match(loc):
        raise ValueError(f"{locator!r} is not a Maidenhead locator of 2, 4, 6 or 8 characters")
    lon, lat = -180.0, -90.0
    for i in range(len(loc) // 2):
        a, b = loc[2 * i], loc[2 * i + 1]
        dlon, dlat, _ = _STEPS[i]
        if a.isdigit():
            lon += int(a) * dlon
            lat += int(b) * dlat
        else:
            lon += (ord(a) - ord("A")) * dlon
            lat += (ord(b) - ord("A")) * dlat
    dlon, dlat, _ = _STEPS[len(loc) // 2 - 1]
    return lat + dlat / 2.0, lon + dlon / 2.0


def latlon_to_locator(lat_deg: float, lon_deg: float, length: int = 6) -> str:
    """The locator of ``length`` characters (2, 4, 6 or 8) holding the point."""
    if length not in (2, 4, 6, 8):
        raise ValueError("locator length must be 2, 4, 6 or 8")
    if not (-90.0 <= lat_deg <= 90.0 and -180.0 <= lon_deg <= 180.0):
        raise ValueError("latitude must be in [-90, 90] and longitude in [-180, 180]")
    # The north pole and the antimeridian belong to the last square.
    lon = min(lon_deg + 180.0, 360.0 - 1e-9)
    lat = min(lat_deg + 90.0, 180.0 - 1e-9)
    out = []
    for i in range(length // 2):
        dlon, dlat, n = _STEPS[i]
        ilon = min(int(lon // dlon), n - 1)
        ilat = min(int(lat // dlat), n - 1)
        lon -= ilon * dlon
        lat -= ilat * dlat
        if i % 2 == 0:
            out.append(chr(ord("A") + ilon) + chr(ord("A") + ilat))
        else:
            out.append(f"{ilon}{ilat}")
    text = "".join(out)
    return text[:4] + text[4:6].lower() + text[6:] if length >= 6 else text
