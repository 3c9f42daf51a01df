"""Fonts for names in any script: fall back through the installed fonts.

Goal and station names come from the user and may be in any script.
matplotlib (3.6 and later) falls back from one family to the next glyph by
glyph; ``setup`` lists every installed family that adds scripts to the
default one. A character that no installed font has is drawn as "?" (and
not left to matplotlib, which would warn once per glyph on stderr and draw
an empty box).
"""
from __future__ import annotations

import functools

__all__ = ["setup", "drawable"]

# families tried after the default, in order, where installed: they cover
# CJK, Indic, Thai, Hebrew, Arabic, Armenian, Georgian and more
_FALLBACKS = ("DejaVu Sans", "Noto Sans", "Noto Sans CJK JP", "Noto Sans CJK SC", "Noto Sans CJK KR",
              "Noto Sans Devanagari", "Noto Sans Thai", "Noto Sans Hebrew", "Noto Sans Arabic",
              "Noto Sans Armenian", "Noto Sans Georgian", "Noto Sans Bengali", "Noto Sans Tamil",
              "Droid Sans Fallback", "WenQuanYi Zen Hei", "Liberation Sans")


@functools.lru_cache(maxsize=1)
def _installed() -> tuple[tuple[str, str], ...]:
    from matplotlib import font_manager

    names: dict[str, str] = {}
    # the regular face of each family where there is one (its charmap is the fullest)
    for f in sorted(font_manager.fontManager.ttflist, key=lambda f: (f.style != "normal", f.weight != 400)):
        names.setdefault(f.name, f.fname)
    return tuple((n, names[n]) for n in _FALLBACKS if n in names)


@functools.lru_cache(maxsize=1)
def _charmap() -> frozenset[int]:
    from matplotlib.ft2font import FT2Font

    codes: set[int] = set()
    for _, path in _installed():
        try:
            codes.update(FT2Font(path).get_charmap())
        except Exception:  # an unreadable font file adds nothing
            continue
    return frozenset(codes)


def setup() -> None:
    """Make matplotlib fall back through the installed families (call before drawing)."""
    import matplotlib

    families = [n for n, _ in _installed()]
    if families:
        matplotlib.rcParams["font.family"] = families


@functools.lru_cache(maxsize=1024)
def drawable(text: str) -> str:
    """``text`` with every character no installed font can draw replaced by "?"."""
    have = _charmap()
    if not have:
        return text
    return "".join(c if c in "\n\t " or ord(c) in have else "?" for c in text)
