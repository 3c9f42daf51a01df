"""Real ground in the far field: the Fresnel coefficients for both polarizations.

Near the array a buried radial system is taken as a perfect plane (the moment
method uses images) plus a series loss resistance at each base; elevated
radials are wires over the soil (:mod:`.elevated`), whose horizontal currents
also radiate horizontal polarization. Far away the
ground is a homogeneous half space that reflects the downward ray with the
plane-wave Fresnel coefficient. The surface (ground) wave is not modelled: it
carries no power at the elevations that matter for sky-wave work.

References
----------
J. D. Kraus, *Antennas*, 2nd ed., sec. 12-2 (reflection of a vertically
polarized wave from a flat imperfect ground).
ITU-R Recommendation P.527, *Electrical characteristics of the surface of the
Earth* (ground classes).
"""
from __future__ import annotations

import numpy as np

from .model import Ground

__all__ = ["complex_permittivity", "reflection_vertical", "reflection_horizontal"]

_C0_M_S = 299_792_458.0


def complex_permittivity(ground: Ground, freq_hz: float) -> complex:
    """Relative complex permittivity eps_r - j 60 sigma lambda (e^{j omega t}).

    Parameters
    ----------
    ground : Ground
    freq_hz : float

    Returns
    -------
    complex
        Meaningless for ``ground.perfect`` (infinite conductivity).
    """
    wavelength_m = _C0_M_S / freq_hz
    return complex(ground.eps_r, -60.0 * ground.sigma_s_m * wavelength_m)


def reflection_vertical(ground: Ground, freq_hz: float, elevation_deg) -> np.ndarray:
    """Plane-wave reflection coefficient for vertical polarization.

    Rv = (e sin psi - sqrt(e - cos^2 psi)) / (e sin psi + sqrt(e - cos^2 psi)),
    psi the grazing (elevation) angle, e the complex relative permittivity.
    The principal square root is the decaying wave for e^{j omega t}.
    A perfect ground gives +1 everywhere.

    Parameters
    ----------
    ground : Ground
    freq_hz : float
    elevation_deg : array_like, shape (n,)

    Returns
    -------
    ndarray of complex, shape (n,)

    References
    ----------
    Kraus, *Antennas*, 2nd ed., sec. 12-2; the same form appears in ITU-R texts.
    """
    return _fresnel(ground, freq_hz, elevation_deg, vertical=True)


def reflection_horizontal(ground: Ground, freq_hz: float, elevation_deg) -> np.ndarray:
    """Plane-wave reflection coefficient for horizontal polarization (E parallel to the ground).

    Rh = (sin psi - sqrt(e - cos^2 psi)) / (sin psi + sqrt(e - cos^2 psi));
    a perfect ground gives -1 everywhere (the tangential field reverses).
    Only the horizontal currents of elevated radials radiate this way.

    Parameters
    ----------
    ground : Ground
    freq_hz : float
    elevation_deg : array_like, shape (n,)

    Returns
    -------
    ndarray of complex, shape (n,)

    References
    ----------
    Kraus, *Antennas*, 2nd ed., sec. 12-2 (horizontal polarization).
    """
    return _fresnel(ground, freq_hz, elevation_deg, vertical=False)


def _fresnel(ground: Ground, freq_hz: float, elevation_deg, vertical: bool) -> np.ndarray:
    """(a sin psi - root) / (a sin psi + root), root = sqrt(e - cos^2 psi), a = e (vertical) or 1."""
    psi = np.radians(np.asarray(elevation_deg, dtype=float))
    if ground.perfect:
        return np.full(psi.shape, 1.0 if vertical else -1.0, dtype=complex)
    e = complex_permittivity(ground, freq_hz)
    s = (e if vertical else 1.0) * np.sin(psi)
    root = np.sqrt(e - np.cos(psi) ** 2 + 0j)
    return (s - root) / (s + root)
