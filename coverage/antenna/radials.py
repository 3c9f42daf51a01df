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
  d = 2 pi rho / N, has the grid impedance Z_w = Z_i d + j omega mu0
  (d / 2 pi) ln(d / 2 pi a) (Wait's wire-grid formula with lossy wires; the
  log term zero where the wires touch), Z_i = (1 + j) R' the internal
  impedance per metre of the copper wire in the skin regime, R' from
  :func:`lobeplan.antenna.conductor.wire_resistance_ohm_per_m`;
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

How much rides on that limit (measured; quarter-wave element of radius
1e-3 wavelength, average soil, 2 mm wire 0.1 m down; ohm at 3.5 / 14 MHz
with the integral stopped at 0.5, 1 and 2 wavelengths):

=================  ======================  ======================
system             3.5 MHz                 14 MHz
=================  ======================  ======================
bare soil          63.2 / 71.1 / 79.0      98.9 / 111.2 / 123.5
120 x 0.3 wl       6.5 / 14.4 / 22.3       9.7 / 22.0 / 34.3
60 x 0.6 wl        5.2 / 12.2 / 20.1       5.6 / 16.5 / 28.8
=================  ======================  ======================

Each doubling adds Re(Z_g) ln 2 / 2 pi of bare soil (7.9 and 12.3 ohm): the
perfect-plane field falls as 1/rho and the integral has no end of its own.
The split is checked against the energy balance over bare soil: the
pattern's sky integral over average soil is 35 % (3.5 MHz) and 29 % (14 MHz)
of the perfect-ground power, a deficit of 28.0 and 30.9 ohm referred to the
base current; the soil's whole absorption, with the field bare soil really
has (Norton's ground-wave attenuation), is 78.6 and 96.2 ohm. Near zone plus
far-field deficit counts 1.16 and 1.35 times that: the split errs toward
loss, more on the higher bands, and never counts less than the soil takes.

Why radials beyond half a wavelength are not credited. Two published ways
were measured. (1) The difference of the screen's and the bare soil's
absorption beyond half a wavelength (the same power integral, with the
perfect-plane field, or Norton's attenuated one): 60 x 0.6 wl would save 0.6
to 0.8 ohm at 3.5 MHz and 0.7 to 1.5 ohm at 14 MHz, but 120 x 1 wl saves 3.4
to 4.5 and 3.9 to 8.3 ohm, more than its whole near-zone loss (2.0 and 1.8
ohm): the base resistance would go negative. What a screen saves out there
is sky power (a smaller reflection deficit at low angles), not a base
resistance, and belongs in the pattern (Wait's far-field compensation
theorem for a ground screen), which this module does not set. (2) Monteath's
impedance form, Re (1/I_0^2) int Z_s H_phi^2 dS, converges with no limit
(bare soil 55.7 and 79.6 ohm, settled by one wavelength), but with the
field's phase the ring from about 0.28 to 0.57 wavelength counts negative:
longer radials would raise the loss (113 radials on average soil at 3 MHz:
0.5 ohm at 0.25 wl, 2.0 ohm at 0.41 wl) and dense quarter-wave screens on
poor soil give less than nothing. It is the base-impedance change, the
screen's change of radiation included, and again needs a pattern that sees
the screen. Real radials longer than half a wavelength do help, mostly at
low angles; the model does not show it, and the radial table stops at 0.3
wavelength.

Neighbours (common practice): radials of neighbouring elements are cut where
they meet and bonded along the midline. So at each point of the plane the
screen is that of the nearest element (its Voronoi cell), with that
element's wire spacing there. Each element's loss is integrated over its own
field; the cross terms between the fields of different elements (which
depend on the switch state) are left out, so the loss stays one resistance
per base.

Copper. The wires' own loss is in Re(Z_s) through R' d; it is also
reported on its own. The parallel combination is a current divider: of the
surface current H_phi the wires carry K_w = H_phi Z_g / (Z_w + Z_g) (at
their depth: times the line's current ratio 1 / (cosh gt + Z_plane/Z_g
sinh gt)), each wire K_w d, and the copper takes R' d |K_w|^2 per unit area
(1/2 R' |I_w|^2 per metre of each wire, N wires d apart); the soil the
rest. Near the base the wires are close (Z_w << Z_g) and carry all of the
current crossing the circle, I(rho) = 2 pi rho H_phi, split among N
radials: the copper is the textbook R' L / N for a quarter-wave element,
and no separate term is needed for it. Far out, where the wires are sparse
and their reactance exceeds the soil's impedance, the soil carries most of
the current and the copper little; over sea water that holds beyond the
first metres, so thin wire there costs less than R' L / N suggests. With
2 mm copper over ordinary soil the copper is a few hundredths of an ohm,
against ohms in the soil; it becomes a large share only where a dense screen
has shielded the soil. A perfectly conducting wire (``wire_sigma_s_m =
inf``) gives the lossless grid exactly.

References
----------
J. R. Wait, "The impedance of a wire grid parallel to a dielectric
interface", IRE Trans. Microwave Theory Tech., MTT-5, 1957 (grid impedance;
the wires' series impedance per unit length times the spacing adds to it,
from memory).
S. Ramo, J. R. Whinnery and T. Van Duzer, *Fields and Waves in
Communication Electronics*, sec. 5.6 (internal impedance of a round wire,
from memory).
J. R. Wait and W. A. Pope, "Input resistance of L.F. unipole aerials",
Wireless Engineer 32, 1955 (radial screen in parallel with the soil, loss by
the compensation theorem).
G. D. Monteath, "Application of the compensation theorem to certain
radiation and propagation problems", Proc. IEE 98 (IV), 1951.
S. A. Schelkunoff and H. T. Friis, *Antennas: Theory and Practice*, 1952
(field of a sinusoidal current filament).
K. A. Norton, "The propagation of radio waves over the surface of the earth
and in the upper atmosphere", Proc. IRE 24, 1936 and 25, 1937 (ground-wave
attenuation function, used in the energy check; from memory).
J. R. Wait, "Effect of the ground screen on the field radiated from a
monopole", IRE Trans. Antennas Propag. AP-4, 1956 (the screen's effect on the
far field, not modelled here; from memory).
G. H. Brown, R. F. Lewis and J. Epstein, "Ground systems as a factor in
antenna efficiency", Proc. IRE 25, 1937 (the measurements the tests follow).
"""
from __future__ import annotations

import functools
import math
from dataclasses import dataclass

import numpy as np

from .conductor import COPPER_S_M, wire_resistance_ohm_per_m
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
    "wire_impedance_ohm_per_m",
    "radial_copper_loss_ohm",
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
    copper_ohm : ndarray, shape (n_el,), or None
        The part of ``ohm`` spent in the copper of buried radials (the rest
        is the soil's); None where it is not computed (given, elevated).
    """

    ohm: np.ndarray
    source: str
    copper_ohm: np.ndarray | None = None


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


def wire_impedance_ohm_per_m(freq_hz: float, wire_radius_m: float, sigma_s_m: float = COPPER_S_M) -> complex:
    """Internal series impedance per metre of a round radial wire.

    In the skin regime the internal impedance of a round wire is
    (1 + j) R_s / (2 pi a): its reactance equals its resistance. Below it
    (skin deeper than the radius) the direct-current resistance and the
    internal inductance mu0 / (8 pi) per metre hold.

    Parameters
    ----------
    freq_hz, wire_radius_m : float
    sigma_s_m : float
        Conductivity; ``math.inf`` is a perfect conductor (0 returned).

    Returns
    -------
    complex
        Ohm per metre.

    References
    ----------
    Ramo, Whinnery and Van Duzer, *Fields and Waves in Communication
    Electronics*, sec. 5.6 (internal impedance of a round wire, from memory).
    """
    if math.isinf(sigma_s_m):
        return 0j
    r = wire_resistance_ohm_per_m(freq_hz, wire_radius_m, sigma_s_m)
    r_dc = 1.0 / (sigma_s_m * math.pi * wire_radius_m ** 2)
    x = r if r > r_dc else 2.0 * math.pi * freq_hz * MU0_H_M / (8.0 * math.pi)
    return complex(r, x)


def _screen(ground: Ground, freq_hz: float, count: int, wire_radius_m: float, depth_m: float, rho_m,
            wire_sigma_s_m: float) -> tuple[np.ndarray, np.ndarray]:
    """Surface impedance over the screen and the wires' share of the surface field.

    Returns (Z_s, s) with Z_s in ohm and s = K_w / H_phi, the wires' surface
    current (A/m, smeared over the spacing) per unit of H_phi at the surface;
    both complex, shape of ``rho_m``.
    """
    rho = np.asarray(rho_m, dtype=float)
    omega = 2.0 * math.pi * freq_hz
    d = 2.0 * math.pi * rho / count
    z_i = wire_impedance_ohm_per_m(freq_hz, wire_radius_m, wire_sigma_s_m)
    z_w = z_i * d + 1j * omega * MU0_H_M * d / (2.0 * math.pi) * np.log(
        np.maximum(d / (2.0 * math.pi * wire_radius_m), 1.0))
    z_g = soil_surface_impedance_ohm(ground, freq_hz)
    if z_g == 0:
        return np.zeros(rho.shape, dtype=complex), np.zeros(rho.shape, dtype=complex)
    z_plane = z_w * z_g / (z_w + z_g)
    share = z_g / (z_w + z_g)          # current divider: the wires' part of the field at their depth
    if depth_m <= 0:
        return z_plane, share
    e = complex_permittivity(ground, freq_hz)
    gamma = 1j * 2.0 * math.pi * freq_hz / C0_M_S * np.sqrt(e - 1.0 + 0j)
    th = np.tanh(gamma * depth_m)
    z_top = z_g * (z_plane + z_g * th) / (z_g + z_plane * th)
    # H at the screen over H at the surface, 1 / (cosh gt + (Z_plane/Z_g) sinh gt), written
    # with exp(-gt) so that a deep screen in sea water does not overflow
    q = np.exp(-gamma * depth_m)
    r = z_plane / z_g
    down = 2.0 * q / ((1.0 + r) + (1.0 - r) * q * q)
    return z_top, share * down


def screen_surface_impedance_ohm(ground: Ground, freq_hz: float, count: int, wire_radius_m: float,
                                 depth_m: float, rho_m, wire_sigma_s_m: float = COPPER_S_M) -> np.ndarray:
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
    wire_sigma_s_m : float
        Conductivity of the wire, default copper; ``math.inf`` for a perfect
        conductor (the screen of a lossless grid).

    Returns
    -------
    ndarray of complex, shape (n,)
        Ohm; the grid impedance Z_w = Z_i d + j omega mu0 (d/2pi) ln(d/2pi a),
        d = 2 pi rho / N (the log term zero where the wires touch), Z_i the
        wire's internal impedance per metre, in parallel with the soil, seen
        through ``depth_m`` of soil.

    References
    ----------
    Wait (1957), wire-grid impedance, with the wires' own series impedance
    per unit length times the spacing (from memory); Wait and Pope (1955),
    screen in parallel with the soil.
    """
    return _screen(ground, freq_hz, count, wire_radius_m, depth_m, rho_m, wire_sigma_s_m)[0]


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
                 positions: tuple[tuple[float, float], ...], freq_hz: float,
                 wire_sigma_s_m: float = COPPER_S_M) -> tuple[np.ndarray, np.ndarray]:
    """(total, copper) loss per base, ohm, shape (n_el,) each."""
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
    r_wire = wire_impedance_ohm_per_m(freq_hz, wire_r, wire_sigma_s_m).real
    pos = np.asarray(positions, dtype=float)
    n_el = pos.shape[0]

    def rings(owner_rho, covered):
        """Re Z_s and the copper's part of it, 0 where the soil is bare."""
        z_s, share = _screen(ground, freq_hz, radials.count, wire_r, depth, owner_rho, wire_sigma_s_m)
        # copper: 1/2 R' |I_w|^2 per metre of wire, I_w = K_w d, wires d apart: R' d |K_w|^2 per area
        cu = r_wire * (2.0 * math.pi * owner_rho / radials.count) * np.abs(share) ** 2
        return np.where(covered, z_s.real, z_soil), np.where(covered, cu, 0.0)

    def integral(per_area):
        return 2.0 * math.pi * float(np.sum(w_rho * per_area * h2 * rho * rho))

    if n_el == 1:
        re_z, cu = rings(rho, inner)
        return np.array([integral(re_z)]), np.array([integral(cu)])
    total = np.empty(n_el)
    copper = np.empty(n_el)
    phi = np.arange(_N_PHI) * (2.0 * math.pi / _N_PHI)
    for i in range(n_el):
        px = pos[i, 0] + rho[:, None] * np.cos(phi)[None, :]
        py = pos[i, 1] + rho[:, None] * np.sin(phi)[None, :]
        dist = np.hypot(px[..., None] - pos[:, 0], py[..., None] - pos[:, 1])   # (n_rho, n_phi, n_el)
        owner = np.argmin(dist, axis=-1)   # radials cut at the midlines: the nearest element's screen
        own = owner == i
        owner_rho = np.where(own, rho[:, None], np.min(dist, axis=-1))
        covered = np.where(own, inner[:, None], owner_rho <= length)
        re_z, cu = rings(np.maximum(owner_rho, radius_m), covered)
        total[i] = integral(np.mean(re_z, axis=1))   # average over azimuth
        copper[i] = integral(np.mean(cu, axis=1))
    return total, copper


def _loss_args(radials, height_m, radius_m, positions_m, freq_hz):
    if not radials.buried:
        raise ValueError("elevated radials are not a surface impedance; see the site checks")
    pos = tuple((float(a), float(b)) for a, b in np.asarray(positions_m, dtype=float).reshape(-1, 2))
    return float(height_m), float(radius_m), pos, float(freq_hz)


def _read_only(x: np.ndarray) -> np.ndarray:
    x.flags.writeable = False
    return x


def radial_loss_ohm(ground: Ground, radials: Radials, height_m: float, radius_m: float, positions_m,
                    freq_hz: float, wire_sigma_s_m: float = COPPER_S_M) -> np.ndarray:
    """Loss resistance at each base of buried radials over real soil (soil and copper).

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
    wire_sigma_s_m : float
        Conductivity of the radial wire, default copper; ``math.inf`` leaves
        the copper out (a perfectly conducting screen).

    Returns
    -------
    ndarray, shape (n_el,)
        Ohm, referred to each base current; cached, read-only.

    References
    ----------
    Monteath (1951), compensation theorem; Wait and Pope (1955), screen in
    parallel with the soil; Wait (1957), grid impedance.
    """
    args = _loss_args(radials, height_m, radius_m, positions_m, freq_hz)
    return _read_only(_radial_loss(ground, radials, *args, float(wire_sigma_s_m))[0])


def radial_copper_loss_ohm(ground: Ground, radials: Radials, height_m: float, radius_m: float, positions_m,
                           freq_hz: float, wire_sigma_s_m: float = COPPER_S_M) -> np.ndarray:
    """The part of :func:`radial_loss_ohm` spent in the radial wires themselves.

    Same parameters and cache as :func:`radial_loss_ohm`; the rest of that
    loss is the soil's.

    Returns
    -------
    ndarray, shape (n_el,)
        Ohm, referred to each base current; read-only.
    """
    args = _loss_args(radials, height_m, radius_m, positions_m, freq_hz)
    return _read_only(_radial_loss(ground, radials, *args, float(wire_sigma_s_m))[1])


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
    args = (spec.ground, spec.radials, spec.height_m, spec.radius_m, positions, freq_hz)
    return GroundLoss(radial_loss_ohm(*args), "radials", radial_copper_loss_ohm(*args))
