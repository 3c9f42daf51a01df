"""Receiving figures of a pattern: the sky mean, directivity and the RDF.

On the low bands the noise a receiving antenna hears comes from the whole
sky (atmospheric and man-made noise arriving from every direction), so what
sets the signal-to-noise ratio is not the gain toward the wanted station
but how much more the antenna hears from there than from the sky at large.
This module measures that against the solid-angle-weighted mean gain over
the upper hemisphere, both taken over the site's ground:

    mean = (1 / 2 pi) int_0^{2 pi} int_0^{pi/2} G(el, az) cos(el) d el d az
    D(el, az) = G(el, az) / mean               (directivity over the sky)
    RDF = 10 log10 ( max_az G(el_rdf, az) / mean )

``RDF`` (the receiving directivity factor) is the directivity toward the
beam at the takeoff angle ``el_rdf`` (``rdf_elevation_deg`` of ``[array]``).
Losses (ground, lines) scale G and the mean alike, so they cancel: a short,
lossy receiving element has the same directivity as a lossless one.

The integral is the trapezoid rule over the 1 deg grid of
:mod:`lobeplan.grid`, normalised by the same rule applied to an isotropic
pattern, so a constant gain has a mean of exactly itself.

References
----------
C. A. Balanis, *Antenna Theory*, 3rd ed., sec. 2.5-2.7 (radiation intensity,
directivity as intensity over its average over the sphere; here the average
is over the hemisphere above the ground, where the noise comes from).
"""
from __future__ import annotations

import numpy as np

from ..grid import ELEVATION_DEG

__all__ = ["DEFAULT_RDF_ELEVATION_DEG", "sky_weights", "sky_mean_gain_dbi", "directivity_dbi",
           "rdf_db"]

DEFAULT_RDF_ELEVATION_DEG = 20.0
"""Takeoff angle of the RDF when the site gives none (deg): a low-band DX angle."""


def sky_weights() -> np.ndarray:
    """Solid-angle weights of the grid's elevation rows, shape (91,), summing to 1.

    cos(el) d el with the trapezoid rule (half weight on the first and last
    row); every azimuth column has the same width, so a row's weight is
    shared equally by its 360 azimuths.
    """
    w = np.cos(np.radians(ELEVATION_DEG))
    w[0] *= 0.5
    w[-1] *= 0.5
    return w / w.sum()


_SKY_W = sky_weights()
_SKY_W.flags.writeable = False


def sky_mean_gain_dbi(gain_dbi: np.ndarray) -> float:
    """Solid-angle-weighted mean gain over the upper hemisphere, dBi.

    Parameters
    ----------
    gain_dbi : ndarray, shape (91, 360) or (91,)
        Gain over the grid; a 1-D row is an omnidirectional pattern (one
        value per elevation).

    Returns
    -------
    float
        10 log10 of the mean of the linear gain.
    """
    g = 10.0 ** (np.asarray(gain_dbi, dtype=float) / 10.0)
    per_row = g.mean(axis=-1) if g.ndim == 2 else g
    return float(10.0 * np.log10(np.sum(_SKY_W * per_row)))


def directivity_dbi(gain_dbi: np.ndarray) -> np.ndarray:
    """Directivity over the sky mean, dB, on the same grid as ``gain_dbi``."""
    g = np.asarray(gain_dbi, dtype=float)
    return g - sky_mean_gain_dbi(g)


def rdf_db(gain_dbi: np.ndarray, elevation_deg: float = DEFAULT_RDF_ELEVATION_DEG) -> float:
    """Receiving directivity factor: beam gain at ``elevation_deg`` over the sky mean, dB.

    Parameters
    ----------
    gain_dbi : ndarray, shape (91, 360) or (91,)
    elevation_deg : float
        Takeoff angle of the beam, deg; linear between grid rows.

    Returns
    -------
    float
        10 log10 (max over azimuth of G at that elevation / sky mean).
    """
    g = np.asarray(gain_dbi, dtype=float)
    row_max = g.max(axis=-1) if g.ndim == 2 else g
    lin = 10.0 ** (row_max / 10.0)
    beam = float(np.interp(float(elevation_deg), ELEVATION_DEG, lin))
    return float(10.0 * np.log10(beam)) - sky_mean_gain_dbi(g)
