"""The one angular grid every pattern and need array lives on.

Rows are elevation 0..90 deg in 1 deg steps, columns azimuth 0..359 deg in
1 deg steps. Arrays shaped ``(N_ELEVATION, N_AZIMUTH)`` use it.
"""
from __future__ import annotations

import numpy as np

__all__ = ["ELEVATION_DEG", "AZIMUTH_DEG", "N_ELEVATION", "N_AZIMUTH"]

ELEVATION_DEG = np.arange(0.0, 91.0, 1.0)
AZIMUTH_DEG = np.arange(0.0, 360.0, 1.0)
N_ELEVATION = ELEVATION_DEG.size
N_AZIMUTH = AZIMUTH_DEG.size
ELEVATION_DEG.flags.writeable = False
AZIMUTH_DEG.flags.writeable = False
