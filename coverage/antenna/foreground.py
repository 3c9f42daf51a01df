"""The ground beyond the array: where each far-field ray reflects.

The ray that leaves at takeoff angle psi toward true bearing beta reflects
on the ground at the specular point x_s = z cot psi from the array (z the
height of the element's current centroid) and, more exactly, over the first
Fresnel zone around it. For a source at height z and an observer far away,
the zone is the ground where the path reflected at (x, y) (x along the
ray's bearing, y across it) is within half a wavelength of the specular one:

    sqrt(x^2 + y^2 + z^2) - x cos psi <= q,   q = z sin psi + lambda / 2.

Squared out (both sides are positive in the zone) this is the ellipse
((x - x_c) / a)^2 + (y / b)^2 <= 1 with x_c = q cos psi / sin^2 psi,
a = sqrt(q^2 - z^2 sin^2 psi) / sin^2 psi and half-width b = a sin psi: an
interval [x1, x2] = [x_c - a, x_c + a] in range, centred beyond the specular
point (x_c - x_s = lambda cos psi / (2 sin^2 psi)), and wide in proportion:
b / x_c ~ tan psi at low angles. For elements lower than lambda / 2 the zone
always holds the array's foot (x1 < 0).

A foreground sector is the ground of its wedge of true bearings [from, to)
(seen from the array's centre) beyond its ``from_m``. A ray's share of it is
the part of its zone's forward area (x > 0) that lies beyond ``from_m``
(x >= from_m, the range cut along the ray) and at bearings inside the
wedge, over the whole forward area. The affine map to the unit disk keeps
area ratios and turns the cut and each bearing line into straight chords,
so the share is a difference of closed-form disk areas at the wedge's two
edges (:func:`bearing_share`); no quadrature, and exact. A sector edge is
thus a blend in bearing some +-0.44 psi wide (the 1/4 to 3/4 width, at low
angles) and wider still at high angles, where the zone is close and wide;
far from the edges (the zone's forward part beyond ``from_m`` wholly on one
side) the share is the former range-only one. At elevation 0 the zone is a
line along the ray and an edge a step (one half on it).

Masks M_k(true bearing, elevation), one per distinct ground class k (the
array's own ground first), hold those shares; they are fractions in 0..1
that sum to 1 at every point (the wedges do not overlap). They depend on
true bearing and elevation only, never on the array's rotation. A pattern
with a foreground is the blend sum_k M_k G_k of the patterns G_k computed
with class k in the Fresnel reflection (the currents, the base impedances
and the radial loss stay those of the ground under the array). The blend is
taken in dBi, the quantity the planner averages, so that the orientation
sweep stays exact (see :mod:`lobeplan.plan.sweep`).

References
----------
Fresnel zones of a ground reflection: ITU-R Recommendation P.526
(propagation by diffraction, first Fresnel zone: the locus of a half-wave
path excess) and J. D. Kraus, *Antennas*, 2nd ed., sec. 12-2 (reflection of
a vertically polarized wave); the zone's ellipse follows from the path
excess by elementary analytic geometry, as derived above; areas of circular
segments and the affine map of an ellipse to a disk are elementary geometry.
"""
from __future__ import annotations

import functools
import math

import numpy as np

from ..grid import AZIMUTH_DEG, ELEVATION_DEG, to_true_bearing
from .model import ArrayOption, ArraySpec, ForegroundSector, Ground
from .mom import C0_M_S, solve_elements
from .pattern import GAIN_FLOOR_DBI, ArrayResult, coupled_elements, gains_from_currents_dbi

__all__ = ["ground_classes", "current_centroid_m", "fresnel_interval_m", "share_beyond", "fresnel_ellipse_m",
           "bearing_share", "sector_share", "foreground_masks", "class_gains_dbi", "blend_true_bearing"]


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


def fresnel_ellipse_m(height_m: float, wavelength_m: float, elevation_deg) -> tuple[np.ndarray, np.ndarray,
                                                                                    np.ndarray]:
    """The first Fresnel zone seen from above: centre and semi-axes of its ellipse.

    The zone {sqrt(x^2 + y^2 + z^2) - x cos psi <= q}, q = z sin psi + lambda/2
    (x along the ray's bearing, y across it), squared out, is
    ((x - x_c) / a)^2 + (y / b)^2 <= 1 with

        x_c = q cos psi / sin^2 psi,  a = sqrt(q^2 - z^2 sin^2 psi) / sin^2 psi,
        b = a sin psi,

    so that [x_c - a, x_c + a] is :func:`fresnel_interval_m`.

    Returns
    -------
    centre_m, along_m, across_m : ndarray, shape (n,)
        x_c, a and b; infinite where the elevation is 0.
    """
    x1, x2 = fresnel_interval_m(height_m, wavelength_m, elevation_deg)
    s = np.sin(np.radians(np.asarray(elevation_deg, dtype=float)))
    centre, along = 0.5 * (x1 + x2), 0.5 * (x2 - x1)
    with np.errstate(invalid="ignore"):  # inf * 0 at elevation 0: the zone is a line, its width infinite
        return centre, along, np.where(np.isfinite(along), along * s, np.inf)


def _disk_area(t: np.ndarray) -> np.ndarray:
    """Antiderivative of sqrt(1 - t^2): the area under the unit circle's upper arc."""
    t = np.clip(t, -1.0, 1.0)
    return 0.5 * (t * np.sqrt(1.0 - t * t) + np.arcsin(t))


def _disk_below_line(x0: np.ndarray, kappa: np.ndarray, tau: np.ndarray) -> np.ndarray:
    """Area of the unit disk with X >= x0 and Y <= tau (X + kappa), in closed form.

    The vertical extent at X is clip(tau (X + kappa) + w, 0, 2 w), w = sqrt(1 - X^2):
    nothing, the whole chord or the part under the line, changing only where
    the line crosses the circle. Each piece between those crossings is
    integrated exactly; arrays broadcast.
    """
    x0, kappa, tau = np.broadcast_arrays(np.asarray(x0, float), np.asarray(kappa, float), np.asarray(tau, float))
    t2 = tau * tau
    root = np.sqrt(np.maximum(1.0 + t2 * (1.0 - kappa * kappa), 0.0))
    start = np.clip(x0, -1.0, 1.0)
    lo = np.clip((-t2 * kappa - root) / (1.0 + t2), start, 1.0)
    hi = np.clip((-t2 * kappa + root) / (1.0 + t2), start, 1.0)
    total = np.zeros(x0.shape)
    for u, v in ((start, lo), (lo, hi), (hi, np.ones(x0.shape))):
        mid = 0.5 * (u + v)
        line = tau * (mid + kappa)
        w = np.sqrt(np.maximum(1.0 - mid * mid, 0.0))
        chord = 2.0 * (_disk_area(v) - _disk_area(u))
        under = tau * (0.5 * (v * v - u * u) + kappa * (v - u)) + (_disk_area(v) - _disk_area(u))
        total += np.where(v <= u, 0.0, np.where(line >= w, chord, np.where(line <= -w, 0.0, under)))
    return total


def bearing_share(height_m: float, wavelength_m: float, elevation_deg, from_m: float, offset_deg) -> np.ndarray:
    """Share of the zone's forward area beyond ``from_m`` within ``offset_deg`` clockwise of the ray.

    The cumulative distribution, over bearing from the array's centre, of the
    part of the first Fresnel zone (:func:`fresnel_ellipse_m`) that lies
    forward (x > 0) and beyond ``from_m`` (x >= from_m), divided by the whole
    forward area: from 0 at -90 deg to :func:`share_beyond` at 90. The
    ellipse is symmetric about the ray, so clockwise and anticlockwise are
    alike. At elevation 0 the zone is a line along the ray: a step, one half
    at offset 0.

    Parameters
    ----------
    height_m, wavelength_m : float
    elevation_deg : array_like
        Takeoff angles; broadcasts with ``offset_deg``.
    from_m : float
        Where the ground in question begins, from the array's centre.
    offset_deg : array_like
        Bearing seen from the array's centre less the ray's bearing (deg);
        -90 or less gives 0, 90 or more the whole share.

    Returns
    -------
    ndarray
        Fractions in 0..1, the broadcast shape.

    Notes
    -----
    The affine map X = (x - x_c) / a, Y = y / b takes the ellipse to the
    unit disk, the array's centre to (-x_c / a, 0), the cut x >= from_m to
    X >= (from_m - x_c) / a and the bearing line y = x tan(offset) to
    Y = (a / b) tan(offset) (X + x_c / a); areas scale by a b alike, so the
    share is a ratio of two closed-form disk areas (:func:`_disk_below_line`,
    :func:`_segment`).
    """
    el, off = np.broadcast_arrays(np.asarray(elevation_deg, float), np.asarray(offset_deg, float))
    x1, x2 = (v.reshape(el.shape) for v in fresnel_interval_m(height_m, wavelength_m, el.ravel()))
    whole = share_beyond(x1, x2, from_m)
    centre, along, across = fresnel_ellipse_m(height_m, wavelength_m, el)
    flat = ~np.isfinite(along)  # elevation 0: the zone is a line along the ray, a step in bearing
    step = np.where(off > 0.0, 1.0, np.where(off < 0.0, 0.0, 0.5))
    along = np.where(flat, 1.0, np.maximum(along, 1e-9))
    kappa = np.where(flat, 0.0, centre / along)
    x0 = np.where(flat, 0.0, (max(from_m, 0.0) - np.where(flat, 0.0, centre)) / along)
    # the offsets +-90 deg themselves are taken below, where tan would overflow
    tau = np.tan(np.radians(np.clip(off, -90.0 + 1e-9, 90.0 - 1e-9))) * along / np.where(flat, 1.0, across)
    part = _disk_below_line(x0, kappa, tau) / np.maximum(math.pi * _segment(-kappa), 1e-300)
    part = np.where(off >= 90.0, whole, np.where(off <= -90.0, 0.0, np.minimum(part, whole)))
    return np.clip(np.where(flat, step * whole, part), 0.0, 1.0)


def sector_share(sector: ForegroundSector, height_m: float, wavelength_m: float, elevation_deg) -> np.ndarray:
    """Share of one sector's ground in the reflection of every ray, (n_el, 360).

    The sector's ground is the wedge of bearings [from, to) (clockwise, from
    the array's centre) beyond ``from_m``. A ray toward bearing beta reflects
    on it with the share of its zone's forward area that falls there: with
    C = :func:`bearing_share` and the edges' offsets w = edge - beta wrapped
    into -180..180, C(w_to) - C(w_from), plus the whole share beyond
    ``from_m`` when the wedge runs on past the back of the ray
    (w_from + span >= 180). Bearings are the grid's whole degrees 0..359.
    """
    span = (sector.to_deg - sector.from_deg) % 360.0
    if span == 0.0:
        span = 360.0
    el = np.asarray(elevation_deg, dtype=float)
    whole = share_beyond(*fresnel_interval_m(height_m, wavelength_m, el), sector.from_m)
    # C is 0 at offsets of -90 deg or less, the whole share at 90 or more:
    # only offsets inside the forward half-plane need the zone's area
    edges = [sector.from_deg] if float(span).is_integer() else [sector.from_deg, sector.from_deg + span]
    c = []
    for edge in edges:
        off = np.broadcast_to((edge - AZIMUTH_DEG + 180.0) % 360.0 - 180.0, (el.size, AZIMUTH_DEG.size))
        ce = np.where(off >= 90.0, whole[:, None], 0.0)
        need = (np.abs(off) < 90.0) & (whole > 0.0)[:, None]
        ce[need] = bearing_share(height_m, wavelength_m, np.broadcast_to(el[:, None], off.shape)[need],
                                 sector.from_m, off[need])
        c.append(ce)
    if len(c) == 1:  # the far edge sees the same offsets, span bearings later
        c.append(np.roll(c[0], int(span), axis=1))
    first = (sector.from_deg - AZIMUTH_DEG + 180.0) % 360.0 - 180.0
    return np.clip(c[1] - c[0] + np.where(first + span >= 180.0, whole[:, None], 0.0), 0.0, 1.0)


@functools.lru_cache(maxsize=64)
def _masks(spec: ArraySpec, freq_hz: float) -> np.ndarray:
    classes = ground_classes(spec)
    masks = np.zeros((len(classes), ELEVATION_DEG.size, AZIMUTH_DEG.size))
    masks[0] = 1.0
    if spec.foreground:
        z = current_centroid_m(spec.height_m, spec.radius_m, freq_hz)
        if spec.radials is not None and not spec.radials.buried:
            z += spec.radials.height_m   # the element stands on its raised hub
        for sector in spec.foreground:
            share = sector_share(sector, z, C0_M_S / freq_hz, ELEVATION_DEG)
            masks[classes.index(sector.ground)] += share
            masks[0] -= share
        # the wedges do not overlap (site.py), so the shares sum to at most 1; round-off aside
        masks[0] = np.clip(masks[0], 0.0, 1.0)
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
