"""Site file (TOML) -> frozen dataclasses; all validation lives here."""
from __future__ import annotations

from dataclasses import dataclass

from .antenna.model import ArraySpec
from .geo.station import Station
from .plan.model import Orientation
from .propagation.model import PropagationSettings

__all__ = ["Band", "Goal", "Site", "load"]


@dataclass(frozen=True, slots=True)
class Band:
    name: str
    freq_hz: float
    edges_hz: tuple[float, float] | None = None  # for SWR; None: +-1.5 %


@dataclass(frozen=True, slots=True)
class Goal:
    """A region to serve. ``bands`` None means every band of the site.

    ``path`` is "short" or "long" ("both" in the file becomes two goals).
    ``key`` is the key path of the goal in the site file, for messages.
    """

    name: str
    region: str
    weight: float
    bands: tuple[str, ...] | None
    path: str
    clip: tuple[float, float, float, float] | None
    avoid: tuple[str, ...]
    avoid_weight: float
    key: str


@dataclass(frozen=True, slots=True)
class Site:
    file: str            # path of the site file, for messages
    base_dir: str        # folder relative file: regions resolve against
    station: Station
    array: ArraySpec
    orientation: Orientation
    bands: tuple[Band, ...]
    goals: tuple[Goal, ...]
    propagation: PropagationSettings

    def band(self, name: str) -> Band:
        for b in self.bands:
            if b.name == name:
                return b
        raise KeyError(name)

    def goal_bands(self, goal: Goal) -> tuple[Band, ...]:
        if goal.bands is None:
            return self.bands
        return tuple(b for b in self.bands if b.name in goal.bands)
