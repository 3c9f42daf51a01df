"""Loss resistance of a buried radial system, from its surface impedance.

The moment method stands every monopole on a perfect plane. A real radial
system over real soil is an imperfect plane with a surface impedance Z_s;
by the compensation theorem (Monteath) the power it takes from the field of
the perfect-plane solution is, to first order,

    P_loss = 1/2 int Re(Z_s) |H_phi|^2 dS,   R_loss = 2 P_loss / |I_0|^2,

with H_phi the magnetic field on the plane and I_0 the base current. The
loss appears as a series resistance at each base (referred to I_0).

H_phi on the plane comes in closed form from the element's own moment-method
current: every piecewise-sinusoidal triangle is a short sinusoidal dipole
whose near field is known exactly (Schelkunoff and Friis), so any height
(0.1 to 1.25 wavelength) is handled. For a quarter-wave element this is the
familiar |H_phi| = I_0 / (2 pi rho).

Surface impedance:

* a radial wire screen with N wires of radius a at radius rho, spacing
  d = 2 pi rho / N, has the grid impedance Z_w = j omega mu0 (d / 2 pi)
  ln(d / 2 pi a) (Wait's wire-grid formula; zero where the wires touch);
* the soil at grazing incidence has Z_g = eta0 sqrt(e - 1) / e, e the
  complex relative permittivity eps_r - j 60 sigma lambda;
* the screen is in parallel with the soil below it (Wait and Pope); a screen
  buried at depth t is seen through the soil layer above it, transformed as a
  line of impedance Z_g and propagation constant j k0 sqrt(e - 1).

Integration runs from the element's radius (where the ground current of a
bare element enters the soil) to half a wavelength: that is the zone whose
currents the radial system collects. Beyond it the far-field model owns the
ground, through the Fresnel reflection coefficient of the pattern (counting it
here too would count it twice). Radials longer than half a wavelength
therefore gain nothing in this model.

Neighbours (common practice): radials of neighbouring elements are cut where
they meet and bonded along the midline. So at each point of the plane the
screen is that of the nearest element (its Voronoi cell), with that
element's wire spacing there. Each element's loss is integrated over its own
field; the cross terms between the fields of different elements (which
depend on the switch state) are left out, so the loss stays one resistance
per base. The copper resistance of the wires themselves is not counted
(small beside the soil's at HF).

References
----------
J. R. Wait, "The impedance of a wire grid parallel to a dielectric
interface", IRE Trans. Microwave Theory Tech., MTT-5, 1957 (grid impedance).
J. R. Wait and W. A. Pope, "Input resistance of L.F. unipole aerials",
Wireless Engineer 32, 1955 (radial screen in parallel with the soil, loss by
the compensation theorem).
G. D. Monteath, "Application of the compensation theorem to certain
radiation and propagation problems", Proc. IEE 98 (IV), 1951.
S. A. Schelkunoff and H. T. Friis, *Antennas: Theory and Practice*, 1952
(field of a sinusoidal current filament).
G. H. Brown, R. F. Lewis and J. Epstein, "Ground systems as a factor in
antenna efficiency", Proc. IRE 25, 1937 (the measurements the tests follow).
"""
from __future__ import annotations

import functools
import math
from dataclasses import dataclass

import numpy as np

from .ground import complex_permittivity
from .model import DEFAULT_GROUND_LOSS_OHM, ArrayOption, ArraySpec, Ground, Radials
from .mom import C0_M_S, ETA0_OHM, solve_elements

__all__ = [
    "GroundLoss",
    "NEAR_ZONE_WAVELENGTHS",
    "ground_loss",
    "radial_loss_ohm",
    "plane_field_a_per_m",
    "soil_surface_impedance_ohm",
    "screen_surface_impedance_ohm",
]

MU0_H_M = ETA0_OHM / C0_M_S
NEAR_ZONE_WAVELENGTHS = 0.5
"""Outer radius of the ground-loss integral, in wavelengths (see the module docs)."""

_N_RHO = 160   # log-spaced radii per stretch of the integral (converged to < 0.1 %)
_N_PHI = 72    # azimuths around an element that has neighbours


@dataclass(frozen=True, slots=True, eq=False)
class GroundLoss:
    """Series loss resistance at each base and where it came from.

    Attributes
    ----------
    ohm : ndarray, shape (n_el,)
    source : str
        ``"radials"`` (computed from ``[array.radials]``) or ``"given"``
        (``ground_loss_ohm`` of the site, or its default).
    """

    ohm: np.ndarray
    source: str


def soil_surface_impedance_ohm(ground: Ground, freq_hz: float) -> complex:
    """Surface impedance of the bare soil at grazing incidence, eta0 sqrt(e - 1) / e.

    References
    ----------
    Wait and Pope (1955); the same Leontovich form as the Fresnel coefficient
    at grazing incidence (Kraus, *Antennas*, sec. 12-2).
    """
    if ground.perfect:
        return 0j
    e = complex_permittivity(ground, freq_hz)
    return complex(ETA0_OHM * np.sqrt(e - 1.0 + 0j) / e)


def screen_surface_impedance_ohm(ground: Ground, freq_hz: float, count: int, wire_radius_m: float,
                                 depth_m: float, rho_m) -> np.ndarray:
    """Surface impedance over a radial screen of ``count`` wires at radius ``rho_m``.

    Parameters
    ----------
    ground : Ground
    freq_hz : float
    count : int
        Number of radials (at least 1).
    wire_radius_m, depth_m : float
        Wire radius; burial depth (0 = on the surface).
    rho_m : array_like, shape (n,)
        Distances from the element's base.

    Returns
    -------
    ndarray of complex, shape (n,)
        Ohm; the grid impedance Z_w = j omega mu0 (d/2pi) ln(d/2pi a),
        d = 2 pi rho / N (zero where the wires touch), in parallel with the
        soil, seen through ``depth_m`` of soil.

    References
    ----------
    Wait (1957), wire-grid impedance; Wait and Pope (1955), screen in
    parallel with the soil.
    """
    rho = np.asarray(rho_m, dtype=float)
    omega = 2.0 * math.pi * freq_hz
    d = 2.0 * math.pi * rho / count
    z_w = 1j * omega * MU0_H_M * d / (2.0 * math.pi) * np.log(np.maximum(d / (2.0 * math.pi * wire_radius_m), 1.0))
    z_g = soil_surface_impedance_ohm(ground, freq_hz)
    if z_g == 0:
        return np.zeros(rho.shape, dtype=complex)
    z_plane = z_w * z_g / (z_w + z_g)
    if depth_m <= 0:
        return z_plane
    e = complex_permittivity(ground, freq_hz)
    gamma = 1j * 2.0 * math.pi * freq_hz / C0_M_S * np.sqrt(e - 1.0 + 0j)
    th = np.tanh(gamma * depth_m)
    return z_g * (z_plane + z_g * th) / (z_g + z_plane * th)


def plane_field_a_per_m(node_current_a: np.ndarray, segment_m: float, freq_hz: float, rho_m) -> np.ndarray:
    """H_phi on the ground plane of one monopole, from its moment-method current.

    Each piecewise-sinusoidal triangle (half-width dz, centred at z_n) is a
    sinusoidal dipole whose field is exact:
    H_phi = j I_m / (4 pi rho) [e^{-jkR+} + e^{-jkR-} - 2 cos(k dz) e^{-jkR0}],
    I_m = 1 / sin(k dz). On the plane a triangle and its image add, so the
    upper triangles count twice and the base triangle (already spanning its
    image) once.

    Parameters
    ----------
    node_current_a : ndarray of complex, shape (n_node,)
        Node currents (node 0 at the base, spacing ``segment_m``).
    segment_m, freq_hz : float
    rho_m : array_like, shape (n,)

    Returns
    -------
    ndarray of complex, shape (n,)
        A/m; 2 pi rho H_phi tends to the base current as rho -> 0 (Ampere).

    References
    ----------
    Schelkunoff and Friis (1952), field of a sinusoidal current element.
    """
    rho = np.asarray(rho_m, dtype=float)[:, None]
    k = 2.0 * math.pi * freq_hz / C0_M_S
    d = segment_m
    z = np.arange(node_current_a.size) * d
    def g(zz):
        return np.exp(-1j * k * np.sqrt(rho * rho + zz[None, :] ** 2))
    tri = (g(z + d) + g(z - d) - 2.0 * math.cos(k * d) * g(z)) * (1j / (4.0 * math.pi * rho * math.sin(k * d)))
    weight = np.full(z.size, 2.0)
    weight[0] = 1.0
    return tri @ (weight * np.asarray(node_current_a, dtype=complex))


def _log_grid(a: float, b: float, n: int) -> tuple[np.ndarray, np.ndarray]:
    """Radii and trapezoid weights (of d rho / rho) on [a, b], log-spaced."""
    if b <= a:
        return np.empty(0), np.empty(0)
    u = np.linspace(math.log(a), math.log(b), n)
    w = np.full(n, (u[-1] - u[0]) / (n - 1))
    w[0] *= 0.5
    w[-1] *= 0.5
    return np.exp(u), w


@functools.lru_cache(maxsize=256)
def _radial_loss(ground: Ground, radials: Radials, height_m: float, radius_m: float,
                 positions: tuple[tuple[float, float], ...], freq_hz: float) -> np.ndarray:
    wavelength_m = C0_M_S / freq_hz
    outer = NEAR_ZONE_WAVELENGTHS * wavelength_m
    sol = solve_elements(height_m, radius_m, ((0.0, 0.0),), freq_hz)
    nodes = sol.node_current[0, :, 0]
    length = min(radials.length_m, outer)
    r1, w1 = _log_grid(radius_m, length, _N_RHO)
    r2, w2 = _log_grid(max(length, radius_m), outer, _N_RHO)
    rho = np.concatenate([r1, r2])
    w_rho = np.concatenate([w1, w2])
    inner = np.concatenate([np.ones(r1.size, bool), np.zeros(r2.size, bool)])  # own screen, up to its tips
    h2 = np.abs(plane_field_a_per_m(nodes, sol.segment_m, freq_hz, rho)) ** 2
    z_soil = soil_surface_impedance_ohm(ground, freq_hz).real
    depth = radials.depth_m or 0.0
    wire_r = 0.5e-3 * radials.wire_diameter_mm
    pos = np.asarray(positions, dtype=float)
    n_el = pos.shape[0]
    out = np.empty(n_el)
    if n_el == 1:
        re_z = np.where(inner, screen_surface_impedance_ohm(ground, freq_hz, radials.count, wire_r,
                                                                    depth, rho).real, z_soil)
        out[0] = 2.0 * math.pi * float(np.sum(w_rho * re_z * h2 * rho * rho))
        return out
    phi = np.arange(_N_PHI) * (2.0 * math.pi / _N_PHI)
    for i in range(n_el):
        px = pos[i, 0] + rho[:, None] * np.cos(phi)[None, :]
        py = pos[i, 1] + rho[:, None] * np.sin(phi)[None, :]
        dist = np.hypot(px[..., None] - pos[:, 0], py[..., None] - pos[:, 1])   # (n_rho, n_phi, n_el)
        owner = np.argmin(dist, axis=-1)   # radials cut at the midlines: the nearest element's screen
        own = owner == i
        owner_rho = np.where(own, rho[:, None], np.min(dist, axis=-1))
        screen = screen_surface_impedance_ohm(ground, freq_hz, radials.count, wire_r, depth,
                                              np.maximum(owner_rho, radius_m)).real
        covered = np.where(own, inner[:, None], owner_rho <= length)
        re_z = np.where(covered, screen, z_soil)
        ring = np.mean(re_z, axis=1)  # average over azimuth
        out[i] = 2.0 * math.pi * float(np.sum(w_rho * ring * h2 * rho * rho))
    return out


def radial_loss_ohm(ground: Ground, radials: Radials, height_m: float, radius_m: float, positions_m,
                    freq_hz: float) -> np.ndarray:
    """Loss resistance at each base of buried radials over real soil.

    Parameters
    ----------
    ground : Ground
        Soil under the array.
    radials : Radials
        Buried (``depth_m``; 0 would be on the surface).
    height_m, radius_m : float
        The elements.
    positions_m : array_like, shape (n_el, 2)
    freq_hz : float

    Returns
    -------
    ndarray, shape (n_el,)
        Ohm, referred to each base current; cached, read-only.

    References
    ----------
    Monteath (1951), compensation theorem; Wait and Pope (1955), screen in
    parallel with the soil; Wait (1957), grid impedance.
    """
    if not radials.buried:
        raise ValueError("elevated radials are not a surface impedance; see the site checks")
    pos = tuple((float(a), float(b)) for a, b in np.asarray(positions_m, dtype=float).reshape(-1, 2))
    out = _radial_loss(ground, radials, float(height_m), float(radius_m), pos, float(freq_hz))
    out.flags.writeable = False
    return out


def ground_loss(spec: ArraySpec, option: ArrayOption | None, freq_hz: float) -> GroundLoss:
    """Series loss per base for an option (None: one vertical alone) on one band.

    ``spec.ground_loss_ohm`` overrides; otherwise the radials give it (buried:
    :func:`radial_loss_ohm`; elevated: :func:`lobeplan.antenna.elevated.elevated_loss_ohm`,
    each element's radials alone); without either the default of
    :data:`DEFAULT_GROUND_LOSS_OHM` holds.
    """
    positions = ((0.0, 0.0),) if option is None else option.positions_m
    n = len(positions)
    if spec.ground_loss_ohm is not None or spec.radials is None:
        value = DEFAULT_GROUND_LOSS_OHM if spec.ground_loss_ohm is None else spec.ground_loss_ohm
        return GroundLoss(np.full(n, float(value)), "given")
    r = spec.radials
    if not r.buried:
        from .elevated import elevated_loss_ohm  # the wire model; imported only when used

        one = elevated_loss_ohm(spec.ground, spec.height_m, spec.radius_m, r.height_m, r.count, r.length_m,
                                0.5e-3 * r.wire_diameter_mm, float(freq_hz))
        return GroundLoss(np.full(n, one), "radials")
    return GroundLoss(radial_loss_ohm(spec.ground, spec.radials, spec.height_m, spec.radius_m, positions,
                                      freq_hz), "radials")
