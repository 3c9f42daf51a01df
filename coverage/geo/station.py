"""The station: where the array stands."""
from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Station"]


@dataclass(frozen=True, slots=True)
class Station:
    """Station position on WGS84, degrees; ``locator`` as given (or derived)."""

    name: str
    lat_deg: float
    lon_deg: float
    locator: str
