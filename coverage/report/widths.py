"""Column widths for the text tables: a column is as wide as its widest name.

Names (goals, bands, options, states) are never cut: a table widens
instead, so that "East Australia (long path)" reads whole.
"""
from __future__ import annotations

__all__ = ["width"]


def width(least: int, values) -> int:
    """The widest of ``values`` (as text), and at least ``least`` characters."""
    return max([least, *(len(str(v)) for v in values)])
