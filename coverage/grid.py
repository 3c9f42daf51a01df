"""The one angular grid every pattern and need array lives on.

Rows are elevation 0..90 deg in 1 deg steps, columns azimuth 0..359 deg in
1 deg steps. Arrays shaped ``(N_ELEVATION, N_AZIMUTH)`` use it.
"""
from __future__ import annotations

import numpy as np

__all__ = ["ELEVATION_DEG", "AZIMUTH_DEG", "N_ELEVATION", "N_AZIMUTH", "to_true_bearing"]

ELEVATION_DEG = np.arange(0.0, 91.0, 1.0)
AZIMUTH_DEG = np.arange(0.0, 360.0, 1.0)
N_ELEVATION = ELEVATION_DEG.size
N_AZIMUTH = AZIMUTH_DEG.size
ELEVATION_DEG.flags.writeable = False
AZIMUTH_DEG.flags.writeable = False


def to_true_bearing(gain_frame: np.ndarray, orientation_deg: float) -> np.ndarray:
    """Resample array-frame rows onto true bearings 0..359 (linear, circular).

    True bearing = frame azimuth + baseline bearing. Works on any array whose
    last axis is the 360 azimuths (one row or the whole grid).
    """
    g = np.asarray(gain_frame, dtype=float)
    src = (AZIMUTH_DEG - orientation_deg) % 360.0
    lo = np.floor(src).astype(int) % N_AZIMUTH
    hi = (lo + 1) % N_AZIMUTH
    w = src - np.floor(src)
    return g[..., lo] * (1.0 - w) + g[..., hi] * w
