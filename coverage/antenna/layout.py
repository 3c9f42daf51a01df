"""Element positions of the named layouts, in the array frame (DESIGN.md).

(along, across) in metres: along points along the baseline bearing, across
90 deg clockwise from it; element 1 at the origin.
"""
from __future__ import annotations

__all__ = ["layout_positions_m"]


def layout_positions_m(layout: str, spacing_m: float | None = None, elements: int | None = None,
                       custom_m=None) -> tuple[tuple[float, float], ...]:
    """Positions of every element for a layout.

    Parameters
    ----------
    layout : {"single", "pair", "line", "square", "custom"}
    spacing_m : float, optional
        Neighbour spacing (pair, line) or side (square).
    elements : int, optional
        Number of elements of a ``line`` (at least 2).
    custom_m : sequence of (along, across), optional
        The positions of a ``custom`` layout, returned as given.

    Returns
    -------
    tuple of (float, float)
    """
    if layout == "single":
        return ((0.0, 0.0),)
    if layout == "custom":
        if not custom_m:
            raise ValueError("custom layout needs positions")
        return tuple((float(a), float(b)) for a, b in custom_m)
    if spacing_m is None or not spacing_m > 0:
        raise ValueError(f"{layout} layout needs a positive spacing")
    s = float(spacing_m)
    if layout == "pair":
        return ((0.0, 0.0), (s, 0.0))
    if layout == "line":
        if elements is None or elements < 2:
            raise ValueError("line layout needs at least 2 elements")
        return tuple((i * s, 0.0) for i in range(int(elements)))
    if layout == "square":
        return ((0.0, 0.0), (s, 0.0), (s, s), (0.0, s))
    raise ValueError(f"unknown layout {layout!r}")
