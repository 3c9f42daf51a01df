"""Elevated radials: one element and its radial wires in a thin-wire moment method.

The element (a vertical of height h standing on the hub at height z_r) and
its N horizontal radials of length L are straight wires, split into
segments and carrying triangle (rooftop) current functions; the hub joins
the vertical and every radial with one junction function per radial, so
the current is continuous there (Kirchhoff). The feed is a delta gap
between the hub and the vertical. The matrix is Galerkin on the mixed
potential form of the electric-field integral equation,

    Z_mn = j omega mu/4pi int int f_m . f_n G - j/(4 pi omega eps) int int (div f_m)(div f_n) G,

G = exp(-jkR)/R with the reduced thin-wire kernel R = sqrt(|r - r'|^2 + a^2);
the inner integrals use u = asinh(s/rho) along each source segment, which
makes them smooth near the wire.

The soil enters twice. The wires see it by its reflection: the images of a
perfect plane (horizontal currents reversed, vertical ones kept, charges
reversed) weighted by the soil's normal-incidence reflection (n - 1)/(n + 1),
n = sqrt(e) (the reflection-coefficient approximation, taken at the
specular point straight below, where a low wire meets its own image; 1 over
a perfect ground). And the soil takes power: Re(Z_g) |H_t|^2 / 2 per unit
area (Leontovich; as in the compensation theorem of the buried case,
:mod:`.radials`) out to half a wavelength, with H_t the tangential field at
the surface, (1 + (n - 1)/(n + 1)) times the field of the wires alone, from
the Biot-Savart law with retardation. Over a perfect plane the return current
under a low wire would crowd into a strip as narrow as the wire's height; in
real soil it spreads over about the soil's complex image depth |1/gamma|
(gamma = j k0 sqrt(e - 1); Wait's complex image), so the distance to each
wire in the field's 1/R^3 kernel is taken as sqrt(rho^2 + |1/gamma|^2). This
is an approximation of ours, stated here: it matters when the radials are
lower than about that depth (a few metres in average soil at HF, centimetres
in sea water). The result is a loss resistance at the base, referred to the
base current, which the planner adds in series like the buried radials' loss.

What is *not* modelled (stated where the loss is shown): the coupling
between elements and the element's base impedance stay those of the
monopoles over the perfect plane (the main moment method); the radials of
neighbouring elements are not in each other's solution; the radials' own
far field is not in the pattern; the reflection is taken at normal incidence
for every pair of wire segments (exact for a perfect ground, coarsest for
segments far apart, whose image is seen at grazing incidence).

References
----------
S. M. Rao, D. R. Wilton and A. W. Glisson, "Electromagnetic scattering by
surfaces of arbitrary shape", IEEE Trans. AP-30, 1982 (mixed-potential
Galerkin with rooftop functions; here on wires).
R. F. Harrington, *Field Computation by Moment Methods*, 1968, ch. 4 (thin
wires, the reduced kernel).
G. D. Monteath, Proc. IEE 98 (IV), 1951 (compensation theorem).
Balanis, *Antenna Theory*, 3rd ed., sec. 4.7 (image theory).
"""
from __future__ import annotations

import functools
import math
from dataclasses import dataclass

import numpy as np

from .ground import complex_permittivity
from .model import Ground
from .mom import C0_M_S, ETA0_OHM
from .radials import NEAR_ZONE_WAVELENGTHS, soil_surface_impedance_ohm

__all__ = ["ElevatedSolution", "solve_elevated", "elevated_loss_ohm", "image_factor"]

_GO_T, _GO_W = np.polynomial.legendre.leggauss(6)    # test points per segment
_GI_T, _GI_W = np.polynomial.legendre.leggauss(10)   # source points per segment (in u)
_MU0 = ETA0_OHM / C0_M_S
_EPS0 = 1.0 / (ETA0_OHM * C0_M_S)


@dataclass(frozen=True, slots=True, eq=False)
class ElevatedSolution:
    """Currents on one element with elevated radials, over a perfect plane.

    Attributes
    ----------
    freq_hz : float
    input_impedance_ohm : complex
        At the hub, per the delta gap.
    seg_start_m, seg_end_m : ndarray, shape (n_seg, 3)
    seg_current_a : ndarray of complex, shape (n_seg, 2)
        Current along each segment's direction at its start and end, for
        1 A base current (linear in between).
    """

    freq_hz: float
    input_impedance_ohm: complex
    seg_start_m: np.ndarray
    seg_end_m: np.ndarray
    seg_current_a: np.ndarray


def _geometry(height_m, hub_m, count, length_m, wavelength_m):
    """Segments and basis functions. Returns (start, end, bases, n_junction)."""
    n_v = max(6, math.ceil(20.0 * height_m / wavelength_m))
    n_r = max(4, math.ceil(20.0 * length_m / wavelength_m))
    hub = np.array([0.0, 0.0, hub_m])
    starts, ends = [], []
    for i in range(n_v):
        starts.append(hub + [0.0, 0.0, height_m * i / n_v])
        ends.append(hub + [0.0, 0.0, height_m * (i + 1) / n_v])
    radial_first = []
    for j in range(count):
        phi = 2.0 * math.pi * j / count
        d = np.array([math.cos(phi), math.sin(phi), 0.0])
        radial_first.append(len(starts))
        for i in range(n_r):
            starts.append(hub + d * length_m * i / n_r)
            ends.append(hub + d * length_m * (i + 1) / n_r)
    # a basis: list of (segment, sign, shape) with shape +1 rising (0 -> 1 along
    # the segment), -1 falling (1 -> 0)
    bases = [[(j0, -1.0, -1), (0, 1.0, -1)] for j0 in radial_first]  # junctions: radial in, vertical up
    for i in range(1, n_v):
        bases.append([(i - 1, 1.0, 1), (i, 1.0, -1)])
    for j0 in radial_first:
        for i in range(1, n_r):
            bases.append([(j0 + i - 1, 1.0, 1), (j0 + i, 1.0, -1)])
    return np.array(starts), np.array(ends), bases, count, n_v


def _segment_integrals(k, start, end, radius_m, src_start, src_end):
    """int int over test segment p and source segment q of shape products times G.

    Returns (I_rr, I_rf, I_fr, I_ff, I_00), each (n_p, n_q): r = rising,
    f = falling shape on (test, source); 00 = both constant.
    """
    tp = end - start
    lp = np.linalg.norm(tp, axis=1)
    tq = src_end - src_start
    lq = np.linalg.norm(tq, axis=1)
    uq = tq / lq[:, None]
    xs = 0.5 * (_GO_T + 1.0)                                  # test parameter in 0..1
    obs = start[:, None, :] + xs[None, :, None] * tp[:, None, :]           # (p, i, 3)
    rel = obs[:, :, None, :] - src_start[None, None, :, :]                 # (p, i, q, 3)
    s0 = np.einsum("piqc,qc->piq", rel, uq)
    perp2 = np.maximum(np.einsum("piqc,piqc->piq", rel, rel) - s0 * s0, 0.0)
    rho = np.sqrt(perp2 + radius_m * radius_m)
    u_lo = np.arcsinh((0.0 - s0) / rho)
    u_hi = np.arcsinh((lq[None, None, :] - s0) / rho)
    half = 0.5 * (u_hi - u_lo)
    u = 0.5 * (u_hi + u_lo)[..., None] + half[..., None] * _GI_T              # (p, i, q, g)
    s = s0[..., None] + rho[..., None] * np.sinh(u)
    r = rho[..., None] * np.cosh(u)
    g = np.exp(-1j * k * r) * (half[..., None] * _GI_W)                    # ds/R = du
    rise_q = s / lq[None, None, :, None]
    j0 = np.sum(g, axis=-1)                                                 # (p, i, q)
    jr = np.sum(g * rise_q, axis=-1)
    jf = j0 - jr
    wt = 0.5 * _GO_W[None, :, None] * lp[:, None, None]
    rise_p = xs[None, :, None]
    i00 = np.sum(wt * j0, axis=1)
    irr = np.sum(wt * rise_p * jr, axis=1)
    irf = np.sum(wt * rise_p * jf, axis=1)
    ifr = np.sum(wt * (1.0 - rise_p) * jr, axis=1)
    iff = np.sum(wt * (1.0 - rise_p) * jf, axis=1)
    return irr, irf, ifr, iff, i00


@functools.lru_cache(maxsize=64)
def solve_elevated(height_m: float, radius_m: float, hub_m: float, count: int, length_m: float,
                   wire_radius_m: float, freq_hz: float, ground: Ground | None = None) -> ElevatedSolution:
    """Solve one vertical on a hub at ``hub_m`` with ``count`` horizontal radials.

    Parameters
    ----------
    height_m, radius_m : float
        The vertical (above the hub) and its radius.
    hub_m : float
        Height of the hub and the radials above the ground plane.
    count : int
        Number of radials (2 or more), equally spaced in azimuth.
    length_m, wire_radius_m : float
        Each radial's length and wire radius.
    freq_hz : float
    ground : Ground, optional
        The soil below, by its reflection: the images are weighted by
        image_factor (see :func:`image_factor`); None or a perfect ground
        gives the exact images of a perfect plane.

    Returns
    -------
    ElevatedSolution
        Cached; for 1 A at the base of the vertical.

    References
    ----------
    Rao, Wilton and Glisson (1982); Harrington (1968), ch. 4; image theory.
    """
    lam = C0_M_S / freq_hz
    k = 2.0 * math.pi / lam
    omega = 2.0 * math.pi * freq_hz
    start, end, bases, n_junction, n_v = _geometry(height_m, hub_m, count, length_m, lam)
    n_seg = start.shape[0]
    # each test segment sits on its own wire's surface (the vertical and the radials differ)
    seg_radius = np.full(n_seg, wire_radius_m)
    seg_radius[:n_v] = radius_m
    t = (end - start) / np.linalg.norm(end - start, axis=1)[:, None]
    length = np.linalg.norm(end - start, axis=1)

    def blocks(src_start, src_end, src_t, sign):
        out_a = np.zeros((n_seg, n_seg, 2, 2), dtype=complex)
        out_q = np.zeros((n_seg, n_seg), dtype=complex)
        for rad in np.unique(seg_radius):
            rows = seg_radius == rad
            irr, irf, ifr, iff, i00 = _segment_integrals(k, start[rows], end[rows], float(rad), src_start, src_end)
            dot = (t[rows] @ src_t.T) * sign
            # index [.., a, b]: a = test shape (0 rise, 1 fall), b = source shape
            out_a[rows, :, 0, 0] = dot * irr
            out_a[rows, :, 0, 1] = dot * irf
            out_a[rows, :, 1, 0] = dot * ifr
            out_a[rows, :, 1, 1] = dot * iff
            out_q[rows] = sign * i00
        return out_a, out_q

    img = np.array([1.0, 1.0, -1.0])
    a_dir, q_dir = blocks(start, end, t, 1.0)
    # image segment: mirrored points, tangent (tx, ty, -tz); image current = -(shape) along it
    a_img, q_img = blocks(start * img, end * img, t * img, -image_factor(ground, freq_hz))
    a_tot = a_dir + a_img
    q_tot = q_dir + q_img
    n_b = len(bases)
    z = np.zeros((n_b, n_b), dtype=complex)
    for m, bm in enumerate(bases):
        for n, bn in enumerate(bases):
            acc = 0j
            for pm, sm, hm in bm:
                for pn, sn, hn in bn:
                    am = 0 if hm > 0 else 1
                    an = 0 if hn > 0 else 1
                    acc += (1j * omega * _MU0 / (4 * math.pi)) * sm * sn * a_tot[pm, pn, am, an]
                    acc -= (1j / (4 * math.pi * omega * _EPS0)) * (sm * hm / length[pm]) * (sn * hn / length[pn]) \
                        * q_tot[pm, pn]
            z[m, n] = acc
    v = np.zeros(n_b, dtype=complex)
    v[:n_junction] = 1.0
    c = np.linalg.solve(z, v)
    i_base = complex(np.sum(c[:n_junction]))
    c = c / i_base
    seg_i = np.zeros((n_seg, 2), dtype=complex)
    for coef, b in zip(c, bases):
        for p, sgn, shape in b:
            if shape > 0:
                seg_i[p, 1] += sgn * coef
            else:
                seg_i[p, 0] += sgn * coef
    for a in (start, end, seg_i):
        a.flags.writeable = False
    return ElevatedSolution(float(freq_hz), complex(1.0 / i_base), start, end, seg_i)


def image_factor(ground: Ground | None, freq_hz: float) -> complex:
    """Weight of the images against those of a perfect plane: (n - 1) / (n + 1), n = sqrt(e).

    The reflection of the soil at normal incidence (the reflection-coefficient
    approximation at the specular point straight below, where a low wire meets
    its own image); 1 for a perfect ground. The tangential H at the surface is
    then (1 + factor) times the wires' own.

    References
    ----------
    E. K. Miller, A. J. Poggio, G. J. Burke and E. S. Selden, "Analysis of wire
    antennas in the presence of a conducting half-space", Canadian J. Phys.
    50, 1972 (reflection-coefficient approximation); Fresnel coefficients:
    Kraus, *Antennas*, sec. 12-2.
    """
    if ground is None or ground.perfect:
        return 1.0 + 0j
    n = np.sqrt(complex_permittivity(ground, freq_hz) + 0j)
    return complex((n - 1.0) / (n + 1.0))


def _ground_field(sol: ElevatedSolution, points: np.ndarray, k: float, spread_m: float = 0.0) -> np.ndarray:
    """Tangential H of the wires alone on the plane z = 0, shape (n, 3).

    ``spread_m`` spreads the peak under a wire over that distance (the soil's
    complex image depth): the distance to a segment's line is taken as
    sqrt(rho^2 + spread^2) in the 1/R^3 kernel.
    """
    start, end, cur = sol.seg_start_m, sol.seg_end_m, sol.seg_current_a
    tq = end - start
    lq = np.linalg.norm(tq, axis=1)
    uq = tq / lq[:, None]
    rel = points[:, None, :] - start[None, :, :]                            # (n, q, 3)
    s0 = np.einsum("nqc,qc->nq", rel, uq)
    perp2 = np.maximum(np.einsum("nqc,nqc->nq", rel, rel) - s0 * s0, 0.0)
    rho = np.sqrt(perp2 + max(spread_m * spread_m, 1e-18))
    u_lo = np.arcsinh(-s0 / rho)
    u_hi = np.arcsinh((lq[None, :] - s0) / rho)
    half = 0.5 * (u_hi - u_lo)
    u = 0.5 * (u_hi + u_lo)[..., None] + half[..., None] * _GI_T
    s = s0[..., None] + rho[..., None] * np.sinh(u)
    r = rho[..., None] * np.cosh(u)
    frac = s / lq[None, :, None]
    i_s = cur[None, :, 0, None] * (1.0 - frac) + cur[None, :, 1, None] * frac
    # Biot-Savart with retardation: dH = I ds (t x R) (1 + jkR) e^{-jkR} / (4 pi R^3);
    # t x R is constant along the segment, ds / R^3 = du / (rho^2 cosh^2 u)
    kern = i_s * (1.0 + 1j * k * r) * np.exp(-1j * k * r) / (rho[..., None] ** 2 * np.cosh(u) ** 2)
    integral = np.sum(kern * (half[..., None] * _GI_W), axis=-1)           # (n, q)
    cross = np.cross(uq[None, :, :], rel)                                   # (n, q, 3)
    h = np.einsum("nq,nqc->nc", integral, cross) / (4.0 * math.pi)
    h[:, 2] = 0.0
    return h


@functools.lru_cache(maxsize=64)
def elevated_loss_ohm(ground: Ground, height_m: float, radius_m: float, hub_m: float, count: int,
                      length_m: float, wire_radius_m: float, freq_hz: float) -> float:
    """Soil loss at the base of one element with elevated radials, ohm.

    P = 1/2 int Re(Z_g) |H_t|^2 dS over the ground within half a wavelength,
    H_t the surface field of :func:`solve_elevated` (over this soil) for 1 A
    at the base; R = 2 P. The
    radials' N-fold symmetry lets one sector stand for all; azimuths cluster
    under the radial, where the field peaks.

    References
    ----------
    Monteath (1951); Wait and Pope (1955) for Z_g; Miller et al. (1972) for
    the reflection-coefficient approximation.
    """
    re_zg = soil_surface_impedance_ohm(ground, freq_hz).real
    if re_zg == 0.0:
        return 0.0
    lam = C0_M_S / freq_hz
    # complex image depth |1/gamma| of the soil: the return current under a wire
    # spreads over about this, not into the sharp peak of a perfect plane
    e = complex_permittivity(ground, freq_hz)
    spread = float(abs(1.0 / (1j * 2.0 * math.pi / lam * np.sqrt(e - 1.0 + 0j))))
    k = 2.0 * math.pi / lam
    sol = solve_elevated(height_m, radius_m, hub_m, count, length_m, wire_radius_m, freq_hz, ground)
    surface = 1.0 + image_factor(ground, freq_hz)  # H at the surface: the wires' own and their weighted image
    outer = NEAR_ZONE_WAVELENGTHS * lam
    u = np.linspace(math.log(radius_m), math.log(outer), 140)
    w_u = np.full(u.size, (u[-1] - u[0]) / (u.size - 1))
    w_u[[0, -1]] *= 0.5
    rho = np.exp(u)
    # azimuth within half a sector (symmetry), clustered toward the radial at 0
    half_sector = math.pi / count
    x, wx = np.polynomial.legendre.leggauss(24)
    tt = 0.5 * (x + 1.0)
    stretch = 4.0
    phi = half_sector * np.sinh(stretch * tt) / math.sinh(stretch)
    w_phi = half_sector * 0.5 * wx * stretch * np.cosh(stretch * tt) / math.sinh(stretch)
    pts = np.stack([np.outer(rho, np.cos(phi)), np.outer(rho, np.sin(phi)), np.zeros((rho.size, phi.size))], -1)
    h = surface * _ground_field(sol, pts.reshape(-1, 3), k, spread).reshape(rho.size, phi.size, 3)
    h2 = np.sum(np.abs(h) ** 2, axis=-1)
    area = (w_u * rho * rho)[:, None] * w_phi[None, :]          # rho drho dphi = rho^2 du dphi
    return float(2 * count * re_zg * np.sum(area * h2))       # 2N half-sectors; R = 2P/|I|^2 with P = 1/2 ...
