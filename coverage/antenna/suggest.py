"""Suggested phasing: element currents that maximise a target over the coupled model.

Element 1 carries 1 A at 0 deg; the amplitudes (0.2 to 5) and phases of the
others are searched, the base currents driven as forced currents into the
coupled elements (ground loss included) at 1 W, and the far field taken over
real ground. Targets:

- ``gain``: gain along the baseline (array-frame azimuth 0) at
  :data:`SUGGEST_ELEVATION_DEG`;
- ``front-to-back``: that gain against the opposite bearing at the same
  elevation, credited up to :data:`FB_CREDIT_DB` (deeper nulls are not
  worth more), plus a fifth of the forward gain, so that of the currents
  with a deep enough null the one that also sends the most forward wins;
  the forward gain may not fall more than :data:`FORWARD_MARGIN_DB` below
  one vertical's at that elevation (a pure null search accepts a starved
  main beam);
- ``goals``: the mean gain over the goals' need weights (rotated into the
  array frame for the given baseline bearing), each weighted as the plan
  weights it, with the gain floored at -30 dBi as in the plan's score.

The search: a coarse scan of progressive phasings (every element lagging
its neighbour along the baseline by the same step), then Nelder-Mead from
the best few over all amplitudes and phases.

For two elements d apart, array-factor theory puts the rear null where the
second element lags by 180 deg - k d cos(elevation) (Balanis, *Antenna
Theory*, 3rd ed., sec. 6.2): -45 deg at 3/8 wavelength in the horizontal
plane, not the -135 deg of "the spacing in degrees".

References
----------
J. A. Nelder and R. Mead, "A simplex method for function minimization",
Computer Journal 7 (1965) 308-313 (through scipy.optimize.minimize).
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from ..grid import ELEVATION_DEG
from .feed import drive_forced
from .mom import CoupledElements
from .model import Ground
from .pattern import RATIO_CAP_DB, gain_from_currents_dbi, gain_toward_dbi

__all__ = ["TARGETS", "SUGGEST_ELEVATION_DEG", "FB_CREDIT_DB", "FORWARD_MARGIN_DB", "Suggestion",
           "suggest_currents"]

TARGETS = ("gain", "front-to-back", "goals")
SUGGEST_ELEVATION_DEG = 10.0
"""Elevation of the forward and back directions: a low takeoff angle for long
paths (common practice: most DX arrives below 15 deg on HF)."""
FB_CREDIT_DB = 35.0
FORWARD_MARGIN_DB = 3.0
_SCORE_FLOOR_DBI = -30.0


@dataclass(frozen=True, slots=True)
class Suggestion:
    """Suggested relative base currents and what they give (1 W input).

    ``gain_dbi`` is the forward gain (baseline direction, the suggestion
    elevation); ``front_to_back_db`` against the opposite bearing; for the
    goals target ``goal_mean_gain_dbi`` is the weighted mean gain over the
    needs (None otherwise).
    """

    target: str
    amplitude: tuple[float, ...]
    phase_deg: tuple[float, ...]
    gain_dbi: float
    front_to_back_db: float
    goal_mean_gain_dbi: float | None


def _currents(x: np.ndarray, n: int) -> np.ndarray:
    amp = np.concatenate([[1.0], np.exp(np.clip(x[: n - 1], math.log(0.2), math.log(5.0)))])
    ph = np.concatenate([[0.0], x[n - 1:]])
    return amp * np.exp(1j * ph)


def suggest_currents(sol: CoupledElements, z_base_ohm: np.ndarray, ground: Ground, target: str,
                     goal_weights=None, vertical_dbi: float | None = None) -> Suggestion:
    """Search the currents that maximise ``target``.

    Parameters
    ----------
    sol : CoupledElements
    z_base_ohm : ndarray of complex, shape (n_el, n_el)
        Coupled base impedances with the base loss.
    ground : Ground
    target : {"gain", "front-to-back", "goals"}
    goal_weights : ndarray, shape (91, 360), optional
        For ``goals``: the pooled need weights in the array frame (each
        goal's weights times its goal weight), any positive scale.

    Returns
    -------
    Suggestion
    """
    if target not in TARGETS:
        raise ValueError(f"unknown target {target!r}")
    n = sol.n_elements
    el = int(np.argmin(np.abs(ELEVATION_DEG - SUGGEST_ELEVATION_DEG)))
    if target == "goals":
        if goal_weights is None or not float(np.sum(goal_weights)) > 0:
            raise ValueError("the goals target needs need weights")
        w = np.asarray(goal_weights, dtype=float) / float(np.sum(goal_weights))

    def figures(i):
        d = drive_forced(z_base_ohm, i)
        g = gain_toward_dbi(sol, ground, d.base_current_a, 1.0, el, [0.0, 180.0])
        return d, float(g[0]), float(min(g[0] - g[1], RATIO_CAP_DB))

    def cost(x):
        i = _currents(x, n)
        try:
            d, fwd, fb = figures(i)
        except ValueError:
            return 1e9
        if target == "gain":
            return -fwd
        if target == "front-to-back":
            short = 0.0 if vertical_dbi is None else max(0.0, vertical_dbi - FORWARD_MARGIN_DB - fwd)
            return -(min(fb, FB_CREDIT_DB) + 0.2 * fwd) + 10.0 * short
        g = gain_from_currents_dbi(sol, ground, d.base_current_a, 1.0)
        return -float(np.sum(w * np.maximum(g, _SCORE_FLOOR_DBI)))

    # coarse scan: equal amplitudes, every element lagging by the same step
    # per metre along the baseline (a progressive phasing)
    along = sol.positions_m[:, 0] - sol.positions_m[0, 0]
    span = max(float(np.max(np.abs(along))), 1e-9)
    starts = []
    for taper in (0.5, 1.0, 2.0):   # the far end weaker, equal, stronger
        for step in np.radians(np.arange(-180.0, 180.0, 15.0)):
            amp = np.log(taper) * along[1:] / span
            x = np.concatenate([amp, step * along[1:] / (span if n > 2 else 1.0)])
            starts.append((cost(x), x))
    starts.sort(key=lambda s: s[0])
    from scipy.optimize import minimize   # imported here only: the rest of feed does not need it

    best = None
    for _, x0 in starts[:4]:
        res = minimize(cost, x0, method="Nelder-Mead",
                       options={"xatol": 1e-4, "fatol": 1e-6, "maxiter": 400 * (n - 1), "adaptive": n > 2})
        if best is None or res.fun < best.fun:
            best = res
    i = _currents(best.x, n)
    d, fwd, fb = figures(i)
    mean = None
    if target == "goals":
        g = gain_from_currents_dbi(sol, ground, d.base_current_a, 1.0)
        mean = float(np.sum(w * np.maximum(g, _SCORE_FLOOR_DBI)))
    rel = i / i[0]
    return Suggestion(target, tuple(float(abs(x)) for x in rel),
                      tuple(float((math.degrees(math.atan2(x.imag, x.real)) + 180.0) % 360.0 - 180.0) for x in rel),
                      fwd, fb, mean)
