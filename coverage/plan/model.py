"""Input types of the planner (validated in ``lobeplan.site``)."""
from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Orientation"]


@dataclass(frozen=True, slots=True)
class Orientation:
    """Which baseline bearings to evaluate.

    ``fixed_deg`` None means sweep 0..360 at ``step_deg``. ``allowed_deg``
    holds lot constraints as (from, to) bearing ranges clockwise, wrap allowed;
    empty means every bearing is allowed.
    """

    fixed_deg: float | None = None
    step_deg: float = 1.0
    allowed_deg: tuple[tuple[float, float], ...] = ()
