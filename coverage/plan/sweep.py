"""Scores of every baseline bearing at once, by circular cross-correlation.

With the baseline along bearing theta, the gain toward true bearing a is the
array-frame gain at azimuth a - theta. The need-weighted gain sum

    S(theta) = sum_e sum_a W[e, a] G[e, (a - theta) mod 360]

is, row by row, a circular cross-correlation of the need weights with the
gain, so all 360 bearings come from one product of spectra per elevation
row and one inverse FFT: IFFT(sum_e FFT(W_e) conj(FFT(G_e))).

Ground beyond the array (``[[array.foreground]]``) depends on the true
bearing, so it cannot ride on the rotating gain. It rides on the weights
instead: with masks M_k[e, a] (the share of ground class k in the reflection
toward true bearing a at elevation e; sum_k M_k = 1) and G_k the array-frame
gain computed with class k in the far-field reflection, the blended gain is
sum_k M_k[e, a] G_k[e, (a - theta) mod 360], and

    S(theta) = sum_k sum_e sum_a (W M_k)[e, a] G_k[e, (a - theta) mod 360]
             = sum_k correlate(W M_k, G_k)(theta),

one correlation per distinct ground class: still exact, at K times the
spectra (K = 1 + the number of distinct foreground classes).

References
----------
Convolution theorem for the discrete Fourier transform (cyclic
cross-correlation), e.g. Oppenheim & Schafer, *Discrete-Time Signal
Processing*, ch. 8.
"""
from __future__ import annotations

from fractions import Fraction

import numpy as np

from ..grid import N_AZIMUTH

__all__ = ["GAIN_FLOOR_DBI", "floored", "spectrum", "correlate", "correlate_direct", "orientations",
           "weighted_quantile"]

GAIN_FLOOR_DBI = -30.0  # DESIGN.md Score: so that one null cannot dominate


def floored(gain_dbi: np.ndarray) -> np.ndarray:
    return np.maximum(np.asarray(gain_dbi, dtype=float), GAIN_FLOOR_DBI)


def spectrum(rows: np.ndarray) -> np.ndarray:
    """Real FFT along azimuth of an (elevation, azimuth) array."""
    return np.fft.rfft(np.asarray(rows, dtype=float), axis=-1)


def _resolution(step_deg: float) -> int:
    """Smallest m such that step_deg * m is a whole number (grid of 1/m deg)."""
    frac = Fraction(step_deg).limit_denominator(1000)
    return frac.denominator


def orientations(step_deg: float = 1.0) -> np.ndarray:
    """Baseline bearings 0 <= theta < 360 at ``step_deg``."""
    n = int(round(360.0 / step_deg))
    return np.arange(n) * step_deg


def correlate(weights_spec: np.ndarray, gain_spec: np.ndarray, step_deg: float = 1.0) -> np.ndarray:
    """S(theta) for every bearing at ``step_deg``, from the two spectra.

    Parameters
    ----------
    weights_spec, gain_spec : complex ndarray, shape (n_el, 181)
        ``spectrum`` of the need weights (true bearings) and of the gain
        (array frame), on the 1 deg grid.
    step_deg : float
        Bearing step. Steps finer than 1 deg (or not whole) are evaluated by
        zero-padding the spectrum, i.e. trigonometric interpolation of the
        1 deg result.

    Returns
    -------
    ndarray, shape (360 / step_deg,)
    """
    cross = np.sum(weights_spec * np.conj(gain_spec), axis=0)
    m = _resolution(step_deg)
    if m == 1:
        full = np.fft.irfft(cross, n=N_AZIMUTH)
    else:
        # zero-padded inverse: same coefficients, m times the samples
        padded = np.zeros(N_AZIMUTH * m // 2 + 1, dtype=complex)
        padded[: cross.size] = cross
        if N_AZIMUTH % 2 == 0:  # the Nyquist term splits between +-N/2
            padded[cross.size - 1] *= 0.5
        full = np.fft.irfft(padded, n=N_AZIMUTH * m) * m
    stride = int(round(step_deg * m))
    return full[::stride]


def correlate_direct(weights: np.ndarray, gain: np.ndarray, thetas_deg: np.ndarray) -> np.ndarray:
    """The same sum by brute force, one vectorised pass per bearing (whole degrees).

    The reference the FFT way is checked against, and the baseline of the
    sweep benchmark.
    """
    out = np.empty(len(thetas_deg))
    for i, theta in enumerate(thetas_deg):
        shift = int(round(theta)) % N_AZIMUTH
        # G[e, (a - theta) mod 360] is G rolled by +theta along azimuth
        out[i] = float(np.sum(weights * np.roll(gain, shift, axis=1)))
    return out


def weighted_quantile(values: np.ndarray, weights: np.ndarray, q: float) -> float | None:
    """Quantile ``q`` (0..1) of ``values`` under ``weights``; None when no weight."""
    v = np.ravel(values)
    w = np.ravel(weights)
    keep = w > 0
    if not keep.any():
        return None
    v, w = v[keep], w[keep]
    order = np.argsort(v, kind="stable")
    v, w = v[order], w[order]
    cum = np.cumsum(w)
    idx = int(np.searchsorted(cum, q * cum[-1], side="left"))
    return float(v[min(idx, v.size - 1)])
