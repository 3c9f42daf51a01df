"""The ground beyond the array: where each far-field ray reflects.

The ray that leaves at takeoff angle psi toward true bearing a reflects on
the ground at the specular point x_s = z cot psi from the array (z the
height of the element's current centroid) and, more exactly, over the first
Fresnel zone around it. For a source at height z and an observer far away,
the zone is the stretch of ground where the reflected path is within half a
wavelength of the specular one:

    sqrt(x^2 + z^2) - x cos psi <= z sin psi + lambda / 2,

an interval [x1, x2] in range with x_{1,2} = (q cos psi -+ sqrt(q^2 - z^2
sin^2 psi)) / sin^2 psi, q = z sin psi + lambda / 2. Seen from above the zone
is an ellipse with that range axis; the share of its area (on the forward
side of the array) that lies beyond a sector's ``from_m`` is the share of
that sector's ground in the reflection.

Masks M_k(true bearing, elevation), one per distinct ground class k (the
array's own ground first), hold those shares; they are fractions in 0..1
that sum to 1 at every point. A pattern with a foreground is the blend
sum_k M_k G_k of the patterns G_k computed with class k in the Fresnel
reflection (the currents, the base impedances and the radial loss stay those
of the ground under the array). The blend is taken in dBi, the quantity the
planner averages, so that the orientation sweep stays exact (see
:mod:`lobeplan.plan.sweep`). The zone's width across the ray is not used: a
sector edge is sharp in bearing.

References
----------
Fresnel zones of a ground reflection: ITU-R Recommendation P.526
(propagation by diffraction, first Fresnel zone) and J. D. Kraus, *Antennas*,
2nd ed., sec. 12-2 (reflection of a vertically polarized wave);
the ellipse-segment area is elementary geometry.
"""
from __future__ import annotations

import functools
import math

import numpy as np

from ..grid import AZIMUTH_DEG, ELEVATION_DEG, to_true_bearing
from .model import ArrayOption, ArraySpec, ForegroundSector, Ground
from .mom import C0_M_S, solve_elements
from .pattern import GAIN_FLOOR_DBI, ArrayResult, coupled_elements, gains_from_currents_dbi

__all__ = ["ground_classes", "current_centroid_m", "fresnel_interval_m", "share_beyond", "sector_bearings",
           "foreground_masks", "class_gains_dbi", "blend_true_bearing"]


def ground_classes(spec: ArraySpec) -> tuple[Ground, ...]:
    """Distinct grounds the far field can reflect on: the array's own first."""
    out = [spec.ground]
    for s in spec.foreground:
        if s.ground not in out:
            out.append(s.ground)
    return tuple(out)


def current_centroid_m(height_m: float, radius_m: float, freq_hz: float) -> float:
    """Height of the centroid of |I(z)| on one element (moment-method current).

    About 0.36 h for a quarter-wave element (sinusoidal current: h - 1/k).
    """
    sol = solve_elements(height_m, radius_m, ((0.0, 0.0),), freq_hz)
    i = np.abs(sol.node_current[0, :, 0])
    z = sol.node_z_m
    return float(np.sum(i * z) / np.sum(i)) if np.sum(i) > 0 else 0.5 * height_m


def fresnel_interval_m(height_m: float, wavelength_m: float, elevation_deg) -> tuple[np.ndarray, np.ndarray]:
    """Range interval [x1, x2] of the first Fresnel zone of the ground reflection.

    Parameters
    ----------
    height_m : float
        Source height above the ground.
    wavelength_m : float
    elevation_deg : array_like, shape (n,)
        Takeoff angles; 0 gives x2 = inf.

    Returns
    -------
    x1, x2 : ndarray, shape (n,)
        Metres from the foot of the source along the ray's bearing; x1 may be
        negative (the zone reaches behind the source at low angles).
    """
    psi = np.radians(np.asarray(elevation_deg, dtype=float))
    s = np.sin(psi)
    c = np.cos(psi)
    q = height_m * s + 0.5 * wavelength_m
    root = np.sqrt(np.maximum(q * q - (height_m * s) ** 2, 0.0))
    with np.errstate(divide="ignore", invalid="ignore"):
        x1 = np.where(s > 1e-12, (q * c - root) / np.maximum(s * s, 1e-300), -0.5 * q)
        x2 = np.where(s > 1e-12, (q * c + root) / np.maximum(s * s, 1e-300), np.inf)
    return x1, x2


def _segment(t: np.ndarray) -> np.ndarray:
    """Share of an ellipse's area beyond the chord at t (in semi-axes from its centre)."""
    t = np.clip(t, -1.0, 1.0)
    return (np.arccos(t) - t * np.sqrt(1.0 - t * t)) / math.pi


def share_beyond(x1: np.ndarray, x2: np.ndarray, from_m: float) -> np.ndarray:
    """Share of the zone's forward area (x > 0) that lies beyond ``from_m``.

    Returns ndarray in 0..1, same shape as ``x1``; exactly 1 for ``from_m`` 0.
    """
    x1 = np.asarray(x1, dtype=float)
    x2 = np.asarray(x2, dtype=float)
    if from_m <= 0.0:
        return np.ones(x1.shape)
    out = np.ones(x1.shape)
    finite = np.isfinite(x2)
    xc = 0.5 * (x1[finite] + x2[finite])
    a = np.maximum(0.5 * (x2[finite] - x1[finite]), 1e-9)
    forward = _segment((0.0 - xc) / a)
    beyond = _segment((from_m - xc) / a)
    out[finite] = np.where(forward > 0, beyond / np.maximum(forward, 1e-300), (xc >= from_m).astype(float))
    return out


def sector_bearings(sector: ForegroundSector) -> np.ndarray:
    """Which whole-degree true bearings 0..359 a sector holds, half-open [from, to)."""
    span = (sector.to_deg - sector.from_deg) % 360.0
    if span == 0.0:
        span = 360.0
    return ((AZIMUTH_DEG - sector.from_deg) % 360.0) < span - 1e-9


@functools.lru_cache(maxsize=64)
def _masks(spec: ArraySpec, freq_hz: float) -> np.ndarray:
    classes = ground_classes(spec)
    masks = np.zeros((len(classes), ELEVATION_DEG.size, AZIMUTH_DEG.size))
    masks[0] = 1.0
    if spec.foreground:
        z = current_centroid_m(spec.height_m, spec.radius_m, freq_hz)
        x1, x2 = fresnel_interval_m(z, C0_M_S / freq_hz, ELEVATION_DEG)
        for sector in spec.foreground:
            k = classes.index(sector.ground)
            cols = sector_bearings(sector)
            share = share_beyond(x1, x2, sector.from_m)[:, None]
            masks[k][:, cols] += share
            masks[0][:, cols] -= share
    masks.flags.writeable = False
    return masks


def foreground_masks(spec: ArraySpec, freq_hz: float) -> np.ndarray:
    """Share of each ground class in the reflection, over true bearing and elevation.

    Returns
    -------
    ndarray, shape (n_class, 91, 360)
        Classes as in :func:`ground_classes` (the array's ground first);
        fractions in 0..1 summing to 1 over the classes. Read-only, cached.
    """
    return _masks(spec, float(freq_hz))


def class_gains_dbi(spec: ArraySpec, option: ArrayOption, result: ArrayResult) -> np.ndarray:
    """The result's pattern with each ground class in the far-field reflection.

    Returns
    -------
    ndarray, shape (n_class, 91, 360)
        dBi in the array frame, referred to the same input power; entry 0 is
        ``result.gain_dbi`` (the array's own ground).
    """
    classes = ground_classes(spec)
    sol = coupled_elements(spec, option, result.freq_hz)
    out = np.empty((len(classes),) + result.gain_dbi.shape)
    out[0] = result.gain_dbi
    if len(classes) > 1:
        out[1:] = gains_from_currents_dbi(sol, classes[1:], result.base_current_a, 1.0)
    return out


def blend_true_bearing(gains_frame_dbi: np.ndarray, masks: np.ndarray, orientation_deg: float) -> np.ndarray:
    """True-bearing gain for a fixed baseline bearing: sum_k M_k G_k (dBi).

    Parameters
    ----------
    gains_frame_dbi : ndarray, shape (n_class, 91, 360)
        Array frame, from :func:`class_gains_dbi`.
    masks : ndarray, shape (n_class, 91, 360)
        True bearings, from :func:`foreground_masks`.
    orientation_deg : float

    Returns
    -------
    ndarray, shape (91, 360)
        Over true bearings, floored at the pattern floor.
    """
    true = to_true_bearing(np.asarray(gains_frame_dbi, dtype=float), orientation_deg)
    return np.maximum(np.sum(masks * true, axis=0), GAIN_FLOOR_DBI)
