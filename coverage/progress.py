"""A progress bar on stderr for the longer runs (an edge module: it prints).

The bar stays silent for the first second, so quick runs print nothing; it
is off altogether when stderr is not a terminal or the caller asks for
machine-readable output (``--json``). The numerical core never sees it: it
is handed a ``progress(done, total)`` callback.
"""
from __future__ import annotations

import sys
import time
from typing import TextIO

__all__ = ["ProgressBar"]


class ProgressBar:
    """Work counter drawn as one self-overwriting line on a terminal.

    Parameters
    ----------
    total : float
        Units of work in the whole run (any unit; only ratios are shown).
    label : str
        Short text before the bar.
    enabled : bool
        False turns it off (e.g. with ``--json``).
    stream : file, optional
        Defaults to ``sys.stderr``; nothing is drawn unless it is a terminal.
    delay_s : float
        Nothing is drawn before this much time has passed.
    """

    width = 30

    def __init__(self, total: float, label: str = "", enabled: bool = True,
                 stream: TextIO | None = None, delay_s: float = 1.0) -> None:
        self.stream = sys.stderr if stream is None else stream
        isatty = getattr(self.stream, "isatty", None)
        self.enabled = bool(enabled) and bool(isatty and isatty())
        self.total = max(float(total), 1e-12)
        self.label = label
        self.delay_s = delay_s
        self.done = 0.0
        self._start = time.monotonic()
        self._last_draw = 0.0
        self._drawn = False

    def advance(self, units: float = 1.0) -> None:
        """Count ``units`` more work as done."""
        self.set(self.done + units)

    def set(self, done: float) -> None:
        """Set the work done so far."""
        self.done = min(max(float(done), 0.0), self.total)
        self._draw()

    def callback(self, base: float, span: float):
        """A ``progress(done, total)`` callback for the core, mapped onto
        ``base .. base + span`` of this bar."""

        def progress(done: int, total: int) -> None:
            self.set(base + span * (done / total if total else 1.0))

        return progress

    def _draw(self, force: bool = False) -> None:
        if not self.enabled:
            return
        now = time.monotonic()
        if not force and (now - self._start < self.delay_s or now - self._last_draw < 0.1):
            return
        self._last_draw = now
        frac = self.done / self.total
        filled = int(round(frac * self.width))
        bar = "#" * filled + "-" * (self.width - filled)
        self.stream.write(f"\r{self.label} [{bar}] {100 * frac:5.1f}%  {now - self._start:5.1f} s")
        self.stream.flush()
        self._drawn = True

    def close(self, complete: bool = True) -> None:
        """Finish the line (only if anything was drawn)."""
        if self._drawn:
            if complete:
                self.done = self.total
            self._draw(force=True)
            self.stream.write("\n")
            self.stream.flush()
            self._drawn = False

    def __enter__(self) -> "ProgressBar":
        return self

    def __exit__(self, exc_type, exc, tb) -> None:
        self.close(complete=exc_type is None)
