"""Elevated radials: the whole array of verticals and radial wires in one thin-wire moment method.

Each element (a vertical of height h standing on its hub at height z_r)
and its N horizontal radials are straight wires, split into segments and
carrying triangle (rooftop) current functions; the hub joins the vertical
and every radial with one junction function per radial, so the current is
continuous there (Kirchhoff). Each element is fed by a delta gap between
its hub and its vertical: those gaps are the ports of the base impedance
matrix. All elements and all their radials are in one solution, so the
radials set each element's base impedance, take part in the coupling
between elements and radiate. The matrix is Galerkin on the mixed
potential form of the electric-field integral equation,

    Z_mn = j omega mu/4pi int int f_m . f_n G - j/(4 pi omega eps) int int (div f_m)(div f_n) G
           + int R' f_m f_n dl,

G = exp(-jkR)/R with the reduced thin-wire kernel R = sqrt(|r - r'|^2 + a^2),
a the thicker of the two wires' radii; the inner integrals use
u = asinh(s/rho) along each source segment, which makes them smooth near
the wire; pairs more than two segment lengths apart take a coarser rule.
R' is the copper resistance of the radial wire per metre (skin effect,
:mod:`.conductor`); the verticals are lossless. The mesh starts at 40
segments per wavelength and is doubled until one element's Z11 moves by
under 1 % (:func:`elevated_mesh`, at most 80 per wavelength).

Neighbours: a radial that would reach past the midline between its element
and another (the perpendicular bisector of their bases) stops 2 % of that
distance short of it and is not bonded there (elevated radial tips carry
the highest voltage and are insulated in practice). The first radial of
each element points along the baseline, the others every 360/N deg
clockwise.

The soil enters three times. The wires see it by its reflection: the images
of a perfect plane (horizontal currents reversed, vertical ones kept, charges
reversed) weighted by the soil's normal-incidence reflection (n - 1)/(n + 1),
n = sqrt(e) (the reflection-coefficient approximation, taken at the
specular point straight below, where a low wire meets its own image; 1 over
a perfect ground). The far field reflects on it with the Fresnel
coefficients of the pattern: R_v for the vertical polarization, R_h for the
horizontal one that the radials' net horizontal currents radiate
(:func:`radiation_vectors`). And the soil takes power: Re(Z_g) |H_t|^2 / 2
per unit area (Leontovich; as in the compensation theorem of the buried
case, :mod:`.radials`) out to half a wavelength, with H_t the tangential
field at the surface, (1 + (n - 1)/(n + 1)) times the field of the wires
alone, from the Biot-Savart law with retardation. Over a perfect plane the
return current under a low wire would crowd into a strip as narrow as the
wire's height; in real soil it spreads over about the soil's complex image
depth |1/gamma| (gamma = j k0 sqrt(e - 1); Wait's complex image), so the field
is read on a plane below the surface, where the radials at height z_r are
sqrt(z_r^2 + |1/gamma|^2) away. One plane for every wire keeps Ampere's law
(the whole return current is spread, none lost) and lets a dense, low screen
cancel the vertical's field there, as a buried screen does. This is an approximation of ours, stated here: it
matters when the radials are lower than about that depth (a few metres in
average soil at HF, centimetres in sea water). The result is a loss
resistance at the base, referred to the base current, which the planner
adds in series like the buried radials' loss.

What is *not* modelled (stated where the loss is shown): the soil's loss is
computed for each element with its own radials alone (the neighbours'
radials and the cross terms between elements' fields are left out, as for
buried radials); the reflection the wires see is taken at normal incidence
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
from scipy import sparse

from .conductor import wire_resistance_ohm_per_m
from .ground import complex_permittivity
from .model import Ground
from .mom import C0_M_S, ETA0_OHM
from .radials import NEAR_ZONE_WAVELENGTHS, soil_surface_impedance_ohm

__all__ = ["ElevatedSolution", "ElevatedArray", "solve_elevated", "solve_elevated_array", "radial_directions",
           "elevated_loss_ohm", "copper_loss_ohm", "ElevatedMesh", "elevated_mesh", "array_mesh", "segment_count",
           "SEGMENT_BUDGET", "SEGMENT_LIMIT", "image_factor", "radiation_vectors", "MIDLINE_GAP"]

# Quadrature of the Galerkin pair integrals: near pairs (segments within
# about two segment lengths of each other, and every segment with itself and
# its image close by) get the fine rule; the rest 3 x 3 points, and pairs
# over six lengths apart 2 x 2, whose error on a kernel this smooth at that
# distance is under 1e-4 (a test compares a whole solution with the fine
# rule everywhere).
_NEAR_T, _NEAR_TW = np.polynomial.legendre.leggauss(6)    # test points per segment
_NEAR_S, _NEAR_SW = np.polynomial.legendre.leggauss(10)   # source points per segment (in u)
_FAR_T, _FAR_TW = np.polynomial.legendre.leggauss(3)   # pairs beyond the near ones
_FAR_S, _FAR_SW = np.polynomial.legendre.leggauss(3)
_FAREST = np.polynomial.legendre.leggauss(2)            # pairs over six segment lengths apart
_FAREST_FACTOR = 6.0
_GI_T, _GI_W = _NEAR_S, _NEAR_SW                        # source rule of the surface field
_FF_T, _FF_W = np.polynomial.legendre.leggauss(3)       # far field: 3 points per stretch of a wire
_FF_STRETCH_WAVELENGTHS = 0.1                            # ... no longer than this
_NEAR_FACTOR = 2.0
_PAIR_CHUNK = 60_000
_MU0 = ETA0_OHM / C0_M_S
_EPS0 = 1.0 / (ETA0_OHM * C0_M_S)
_SEGMENTS_PER_WAVELENGTH = 40.0   # the coarsest mesh (at least 6 segments per vertical, 4 per radial)
_MAX_PER_WAVELENGTH = 80.0

SEGMENT_BUDGET = 1200
"""The mesh of an array is coarsened (halved, down to 20 per wavelength) until it has at most this many segments."""
SEGMENT_LIMIT = 2400
"""More segments than this at 20 per wavelength is refused (the site checks): the dense solve grows as n^3."""

MIDLINE_GAP = 0.02
"""Share of the distance to the midline left open at the tip of a radial cut there."""


@dataclass(frozen=True, slots=True, eq=False)
class ElevatedArray:
    """Currents on N elements, each on its own hub with elevated radials.

    Attributes
    ----------
    freq_hz : float
    positions_m : ndarray, shape (n_el, 2)
        (along, across) of each hub, metres.
    hub_m : float
        Height of the hubs and radials over the ground.
    impedance_ohm : ndarray of complex, shape (n_el, n_el)
        Base-referred impedance matrix at the hubs' delta gaps (V = Z I), the
        radials' copper loss included, the soil loss under them not (that is
        :func:`elevated_loss_ohm`, in series as for buried radials).
    seg_start_m, seg_end_m : ndarray, shape (n_seg, 3)
        (along, across, up) of every segment, metres.
    seg_element : ndarray of int, shape (n_seg,)
        The element each segment belongs to.
    seg_current_a : ndarray of complex, shape (n_seg, 2, n_el)
        Current along each segment's direction at its start and end per
        ampere of base current on element j (the others at the currents the
        vector asks: columns of the map I_base -> I_segments).
    radial_length_m : ndarray, shape (n_el, n_radial)
        Length of every radial after the cut at the midlines.
    radial_ohm_per_m : float
        Copper resistance the radials are loaded with (0: perfect wires).
    """

    freq_hz: float
    positions_m: np.ndarray
    hub_m: float
    impedance_ohm: np.ndarray
    seg_start_m: np.ndarray
    seg_end_m: np.ndarray
    seg_element: np.ndarray
    seg_current_a: np.ndarray
    radial_length_m: np.ndarray
    radial_ohm_per_m: float = 0.0

    @property
    def n_elements(self) -> int:
        return int(self.positions_m.shape[0])

    def segment_currents(self, base_current_a: np.ndarray) -> np.ndarray:
        """Currents (n_seg, 2) at each segment's ends for the base currents, shape (n_el,)."""
        return self.seg_current_a @ np.asarray(base_current_a, dtype=complex)


@dataclass(frozen=True, slots=True, eq=False)
class ElevatedSolution:
    """Currents on one element with elevated radials.

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


def radial_directions(count: int) -> np.ndarray:
    """Unit vectors (along, across) of the radials: the first along the baseline, then every 360/N deg clockwise."""
    phi = 2.0 * math.pi * np.arange(count) / count
    return np.stack([np.cos(phi), np.sin(phi)], axis=1)


def _cut_lengths(positions: np.ndarray, count: int, length_m: float) -> np.ndarray:
    """Radial lengths after the cut at the midlines to every neighbour, shape (n_el, count).

    A radial of element e along d stays on e's side of the perpendicular
    bisector to each other element o: t d.(p_o - p_e) <= |p_o - p_e|^2 / 2;
    where it would cross, it stops :data:`MIDLINE_GAP` of that distance short.
    """
    dirs = radial_directions(count)
    n = positions.shape[0]
    out = np.full((n, count), float(length_m))
    for e in range(n):
        for o in range(n):
            if o == e:
                continue
            sep = positions[o] - positions[e]
            toward = dirs @ sep
            with np.errstate(divide="ignore"):
                reach = np.where(toward > 1e-12, 0.5 * float(sep @ sep) / np.maximum(toward, 1e-300), np.inf)
            out[e] = np.minimum(out[e], (1.0 - MIDLINE_GAP) * reach)
    return out


def _counts(height_m, radial_len, wavelength_m, per_wavelength):
    """Segments on the vertical and on each radial, shape () and (n_el, n_radial)."""
    scale = per_wavelength / _SEGMENTS_PER_WAVELENGTH      # the minimum counts refine with the mesh
    n_v = max(math.ceil(6 * scale), math.ceil(per_wavelength * height_m / wavelength_m))
    n_r = np.maximum(math.ceil(4 * scale), np.ceil(per_wavelength * np.asarray(radial_len) / wavelength_m))
    return n_v, n_r.astype(int)


def segment_count(height_m: float, count: int, length_m: float, positions_m, freq_hz: float,
                  per_wavelength: float) -> int:
    """Number of wire segments of an array on elevated radials at a mesh of ``per_wavelength``."""
    pos = np.asarray(positions_m, dtype=float).reshape(-1, 2)
    lam = C0_M_S / freq_hz
    n_v, n_r = _counts(height_m, _cut_lengths(pos, count, length_m), lam, per_wavelength)
    return int(pos.shape[0] * n_v + np.sum(n_r))


def _geometry(height_m, hub_m, positions, radial_len, wavelength_m, per_wavelength):
    """Segments and basis functions of every element on its hub.

    Returns (start, end, element, is_vertical, halves, ports): ``halves`` is
    a list per basis of (segment, sign, shape) with shape +1 rising (0 -> 1
    along the segment) and -1 falling; ``ports[m]`` is the element whose gap
    basis m crosses, or -1.
    """
    n_v, n_r_all = _counts(height_m, radial_len, wavelength_m, per_wavelength)
    dirs = radial_directions(radial_len.shape[1])
    starts, ends, element, vertical = [], [], [], []
    bases, ports = [], []
    for e, (x, y) in enumerate(positions):
        hub = np.array([x, y, hub_m])
        v0 = len(starts)
        for i in range(n_v):
            starts.append(hub + [0.0, 0.0, height_m * i / n_v])
            ends.append(hub + [0.0, 0.0, height_m * (i + 1) / n_v])
            element.append(e)
            vertical.append(True)
        firsts, interior = [], []
        for j, d in enumerate(dirs):
            length = float(radial_len[e, j])
            n_r = int(n_r_all[e, j])
            d3 = np.array([d[0], d[1], 0.0])
            firsts.append(len(starts))
            for i in range(n_r):
                starts.append(hub + d3 * length * i / n_r)
                ends.append(hub + d3 * length * (i + 1) / n_r)
                element.append(e)
                vertical.append(False)
            r0 = firsts[-1]
            interior += [[(r0 + i - 1, 1.0, 1), (r0 + i, 1.0, -1)] for i in range(1, n_r)]
        # the gap: each radial's current flows in to the hub and up the vertical (Kirchhoff at the hub)
        for r0 in firsts:
            bases.append([(r0, -1.0, -1), (v0, 1.0, -1)])
            ports.append(e)
        for i in range(1, n_v):
            bases.append([(v0 + i - 1, 1.0, 1), (v0 + i, 1.0, -1)])
            ports.append(-1)
        bases += interior
        ports += [-1] * len(interior)
    return (np.array(starts), np.array(ends), np.array(element), np.array(vertical), bases, np.array(ports))


def _pair_integrals(k, ps, pe, qs, qe, a, gt, gtw, gs, gsw):
    """int int over test segment p and source segment q of shape products times G, pair by pair.

    Returns ndarray of complex, shape (5, n): I_rr, I_rf, I_fr, I_ff, I_00
    (r = rising, f = falling shape on (test, source); 00 = both constant).
    """
    tp = pe - ps
    lp = np.linalg.norm(tp, axis=1)
    tq = qe - qs
    lq = np.linalg.norm(tq, axis=1)
    uq = tq / lq[:, None]
    xs = 0.5 * (gt + 1.0)                                           # test parameter in 0..1
    obs = ps[:, None, :] + xs[None, :, None] * tp[:, None, :]       # (n, i, 3)
    rel = obs - qs[:, None, :]
    s0 = np.einsum("nic,nc->ni", rel, uq)
    perp2 = np.maximum(np.einsum("nic,nic->ni", rel, rel) - s0 * s0, 0.0)
    rho = np.sqrt(perp2 + (a * a)[:, None])
    u_lo = np.arcsinh(-s0 / rho)
    u_hi = np.arcsinh((lq[:, None] - s0) / rho)
    half = 0.5 * (u_hi - u_lo)
    u = 0.5 * (u_hi + u_lo)[..., None] + half[..., None] * gs                 # (n, i, g)
    s = s0[..., None] + rho[..., None] * np.sinh(u)
    r = rho[..., None] * np.cosh(u)
    g = np.exp(-1j * k * r) * (half[..., None] * gsw)                          # ds/R = du
    j0 = np.sum(g, axis=-1)
    jr = np.sum(g * (s / lq[:, None, None]), axis=-1)
    jf = j0 - jr
    wt = 0.5 * gtw[None, :] * lp[:, None]
    rise = xs[None, :]
    return np.stack([np.sum(wt * rise * jr, axis=1), np.sum(wt * rise * jf, axis=1),
                     np.sum(wt * (1.0 - rise) * jr, axis=1), np.sum(wt * (1.0 - rise) * jf, axis=1),
                     np.sum(wt * j0, axis=1)])


def _plain_block(k, ps, pe, qs, qe, a):
    """Pair integrals (5, n_p, n_q) of a block of test rows against every source, plain 2 x 2 Gauss.

    For distant pairs (over six segment lengths apart) 1/R varies slowly
    along both segments, so the u-substitution that tames the near
    singularity is not needed: the Green's function between the Gauss
    points of the two segments, weighted by the shapes, does it.
    """
    x = 0.5 * (_FAREST[0] + 1.0)
    w = 0.5 * _FAREST[1]
    lp = np.linalg.norm(pe - ps, axis=1)
    lq = np.linalg.norm(qe - qs, axis=1)
    obs = ps[:, None, :] + x[None, :, None] * (pe - ps)[:, None, :]            # (p, 2, 3)
    src = qs[:, None, :] + x[None, :, None] * (qe - qs)[:, None, :]            # (q, 2, 3)
    d2 = (np.sum(obs ** 2, axis=-1)[:, :, None, None] + np.sum(src ** 2, axis=-1)[None, None, :, :]
          - 2.0 * np.einsum("pic,qgc->piqg", obs, src))
    r = np.sqrt(np.maximum(d2, 0.0) + (a * a)[:, None, :, None])
    g = np.exp(-1j * k * r) / r                                                 # (p, 2, q, 2)
    scale = lp[:, None] * lq[None, :]
    rise_w = w * x
    fall_w = w * (1.0 - x)
    out = np.empty((5,) + scale.shape, dtype=complex)
    for n, (u, v) in enumerate(((rise_w, rise_w), (rise_w, fall_w), (fall_w, rise_w), (fall_w, fall_w), (w, w))):
        out[n] = np.einsum("i,piqg,g->pq", u, g, v) * scale
    return out


def _integrals(k, start, end, radius, src_start, src_end, src_radius):
    """All pair integrals (5, n_seg, n_seg): plain rule on distant pairs, finer rules on the rest."""
    n = start.shape[0]
    mid_p = 0.5 * (start + end)
    mid_q = 0.5 * (src_start + src_end)
    len_p = np.linalg.norm(end - start, axis=1)
    len_q = np.linalg.norm(src_end - src_start, axis=1)
    out = np.empty((5, n, n), dtype=complex)
    rows = max(1, _PAIR_CHUNK // (4 * n))
    for p0 in range(0, n, rows):
        p = np.arange(p0, min(n, p0 + rows))
        # the reduced kernel at the thicker wire's radius (a thin radial seen from the vertical's surface)
        a = np.maximum(radius[p][:, None], src_radius[None, :])
        out[:, p, :] = _plain_block(k, start[p], end[p], src_start, src_end, a)
        dist = np.linalg.norm(mid_p[p][:, None, :] - mid_q[None, :, :], axis=-1) / (len_p[p][:, None] + len_q[None, :])
        for sel, (gt, gtw, gs, gsw) in (
                ((dist >= _NEAR_FACTOR) & (dist < _FAREST_FACTOR), (_FAR_T, _FAR_TW, _FAR_S, _FAR_SW)),
                (dist < _NEAR_FACTOR, (_NEAR_T, _NEAR_TW, _NEAR_S, _NEAR_SW))):
            pr, qr = np.nonzero(sel)
            if pr.size:
                ps_ = p[pr]
                out[:, ps_, qr] = _pair_integrals(k, start[ps_], end[ps_], src_start[qr], src_end[qr], a[pr, qr],
                                                  gt, gtw, gs, gsw)
    return out


@functools.lru_cache(maxsize=32)
def _solve_array(height_m: float, radius_m: float, hub_m: float, count: int, length_m: float,
                 wire_radius_m: float, positions: tuple[tuple[float, float], ...], freq_hz: float,
                 ground: Ground | None, copper: bool, per_wavelength: float = _SEGMENTS_PER_WAVELENGTH
                 ) -> ElevatedArray:
    lam = C0_M_S / freq_hz
    k = 2.0 * math.pi / lam
    omega = 2.0 * math.pi * freq_hz
    pos = np.array(positions, dtype=float).reshape(-1, 2)
    radial_len = _cut_lengths(pos, count, length_m)
    start, end, element, vertical, bases, ports = _geometry(height_m, hub_m, pos, radial_len, lam, per_wavelength)
    n_seg = start.shape[0]
    radius = np.where(vertical, radius_m, wire_radius_m)
    length = np.linalg.norm(end - start, axis=1)
    t = (end - start) / length[:, None]
    img = np.array([1.0, 1.0, -1.0])
    # image segment: mirrored points, tangent (tx, ty, -tz); image current = -(shape) along it,
    # weighted by the soil's reflection (image_factor)
    direct = _integrals(k, start, end, radius, start, end, radius)
    image = _integrals(k, start, end, radius, start * img, end * img, radius)
    gamma = image_factor(ground, freq_hz)
    dot = t @ t.T
    dot_img = t @ (t * img).T
    vec = direct[:4] * dot[None] - gamma * image[:4] * dot_img[None]         # (4, p, q): rr, rf, fr, ff
    sca = direct[4] - gamma * image[4]
    n_b = len(bases)
    # half-functions: index 2 p (rising on segment p) and 2 p + 1 (falling)
    rows_b, cols_b, vals_b, rows_d, vals_d = [], [], [], [], []
    for m, halves in enumerate(bases):
        for seg, sign, shape in halves:
            rows_b.append(2 * seg + (0 if shape > 0 else 1))
            cols_b.append(m)
            vals_b.append(sign)
            rows_d.append(seg)
            vals_d.append(sign * shape / length[seg])
    # each half-function belongs to one or a few bases: sparse maps keep the assembly O(n^2)
    b_mat = sparse.csr_matrix((vals_b, (rows_b, cols_b)), shape=(2 * n_seg, n_b))
    d_mat = sparse.csr_matrix((vals_d, (rows_d, cols_b)), shape=(n_seg, n_b))
    a_half = np.empty((2 * n_seg, 2 * n_seg), dtype=complex)
    a_half[0::2, 0::2] = vec[0]
    a_half[0::2, 1::2] = vec[1]
    a_half[1::2, 0::2] = vec[2]
    a_half[1::2, 1::2] = vec[3]

    def project(m_dense, mat):
        return np.asarray((mat.T @ (mat.T @ m_dense.T).T))       # mat^T M mat

    z = (1j * omega * _MU0 / (4.0 * math.pi)) * project(a_half, b_mat) \
        - (1j / (4.0 * math.pi * omega * _EPS0)) * project(sca, d_mat)
    r_per_m = wire_resistance_ohm_per_m(freq_hz, wire_radius_m) if copper else 0.0
    if copper:
        # a wire of R' ohm per metre: E_t = R' I on it, so Z_mn gains int R' f_m f_n dl
        # (rising x rising L/3, rising x falling L/6 on each radial segment)
        rl = np.where(vertical, 0.0, r_per_m * length)
        idx = np.arange(n_seg)
        load = sparse.csr_matrix((np.concatenate([rl / 3.0, rl / 3.0, rl / 6.0, rl / 6.0]),
                                  (np.concatenate([2 * idx, 2 * idx + 1, 2 * idx, 2 * idx + 1]),
                                   np.concatenate([2 * idx, 2 * idx + 1, 2 * idx + 1, 2 * idx]))),
                                 shape=(2 * n_seg, 2 * n_seg))
        z = z + (b_mat.T @ load @ b_mat).toarray()
    n_el = pos.shape[0]
    v = np.zeros((n_b, n_el))
    v[ports >= 0, ports[ports >= 0]] = 1.0
    coef = np.linalg.solve(z, v)                        # basis coefficients per volt at each gap
    y = v.T @ coef                                      # base currents: sum of each gap's bases
    z_base = np.linalg.inv(y)
    z_base = 0.5 * (z_base + z_base.T)                  # reciprocity (round-off only)
    halves = (b_mat @ (coef @ z_base)).reshape(n_seg, 2, n_el)
    # rising shape = current at the segment's end, falling = at its start
    seg_i = np.stack([halves[:, 1, :], halves[:, 0, :]], axis=1)
    for arr in (pos, start, end, element, seg_i, radial_len, z_base):
        arr.flags.writeable = False
    return ElevatedArray(float(freq_hz), pos, float(hub_m), z_base, start, end, element, seg_i, radial_len,
                         float(r_per_m))


def solve_elevated_array(height_m: float, radius_m: float, hub_m: float, count: int, length_m: float,
                         wire_radius_m: float, positions_m, freq_hz: float, ground: Ground | None = None,
                         copper: bool = True, per_wavelength: float | None = None) -> ElevatedArray:
    """Solve N verticals, each on a hub at ``hub_m`` with ``count`` horizontal radials, together.

    Parameters
    ----------
    height_m, radius_m : float
        Each vertical (above its hub) and its radius.
    hub_m : float
        Height of the hubs and the radials above the ground.
    count : int
        Radials per element (2 or more), equally spaced, the first along the
        baseline (:func:`radial_directions`).
    length_m, wire_radius_m : float
        Each radial's length before the midline cut, and its wire radius.
    positions_m : array_like, shape (n_el, 2)
        (along, across) of each hub, metres.
    freq_hz : float
    ground : Ground, optional
        The soil below, by its reflection (:func:`image_factor`); None or a
        perfect ground gives the images of a perfect plane.
    copper : bool
        Load the radials with the skin-effect resistance of copper wire.
    per_wavelength : float, optional
        Segments per wavelength; default from :func:`elevated_mesh` (one
        element's Z11 converged by doubling).

    Returns
    -------
    ElevatedArray
        Cached; read-only.

    Notes
    -----
    Neighbours' radials are cut where they reach the midline between two
    elements (:func:`_cut_lengths`), a small gap short of it, and not bonded:
    the tips of elevated radials carry the highest voltage and are insulated
    in practice. Every other wire of the array is in the solution: the
    coupling between elements runs through their radials as well as their
    verticals.

    References
    ----------
    Rao, Wilton and Glisson (1982); Harrington (1968), ch. 4; image theory
    (Balanis, sec. 4.7); Miller et al. (1972) for the reflection-coefficient
    approximation; the copper loading: Harrington (1968), sec. 4.5 (loaded
    wires, from memory).
    """
    if not (freq_hz > 0 and height_m > 0 and radius_m > 0 and hub_m > 0 and length_m > 0 and wire_radius_m > 0):
        raise ValueError("freq_hz, heights, radii and length_m must be positive")
    if count < 2:
        raise ValueError("elevated radials: count must be at least 2")
    pos = tuple((float(a), float(b)) for a, b in np.asarray(positions_m, dtype=float).reshape(-1, 2))
    if per_wavelength is None:
        per_wavelength = array_mesh(height_m, radius_m, hub_m, count, length_m, wire_radius_m, pos, freq_hz,
                                    ground)
    return _solve_array(float(height_m), float(radius_m), float(hub_m), int(count), float(length_m),
                        float(wire_radius_m), pos, float(freq_hz), ground, bool(copper), float(per_wavelength))


@functools.lru_cache(maxsize=64)
def solve_elevated(height_m: float, radius_m: float, hub_m: float, count: int, length_m: float,
                   wire_radius_m: float, freq_hz: float, ground: Ground | None = None,
                   copper: bool = False, per_wavelength: float | None = None) -> ElevatedSolution:
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
    copper : bool
        Load the radials with copper's skin-effect resistance (default off:
        perfectly conducting wires, as the soil-loss integral wants them).
    per_wavelength : float, optional
        Segments per wavelength (default: :func:`elevated_mesh`).

    Returns
    -------
    ElevatedSolution
        Cached; for 1 A at the base of the vertical. The single-element case
        of :func:`solve_elevated_array`.

    References
    ----------
    Rao, Wilton and Glisson (1982); Harrington (1968), ch. 4; image theory.
    """
    arr = solve_elevated_array(height_m, radius_m, hub_m, count, length_m, wire_radius_m, ((0.0, 0.0),),
                               freq_hz, ground, copper, per_wavelength)
    cur = np.ascontiguousarray(arr.seg_current_a[:, :, 0])
    cur.flags.writeable = False
    return ElevatedSolution(float(freq_hz), complex(arr.impedance_ohm[0, 0]), arr.seg_start_m, arr.seg_end_m, cur)


@dataclass(frozen=True, slots=True)
class ElevatedMesh:
    """The mesh of one element on its elevated radials: segments per wavelength and its last doubling.

    ``change`` is |Z11(2n) - Z11(n)| / |Z11(2n)| of the last doubling
    tried; ``converged`` is whether it fell under
    :data:`lobeplan.antenna.mom.MESH_TOLERANCE` before the finest mesh
    (80 per wavelength, or segments four radii long) was reached.
    """

    per_wavelength: float
    change: float
    converged: bool


@functools.lru_cache(maxsize=128)
def elevated_mesh(height_m: float, radius_m: float, hub_m: float, count: int, length_m: float,
                  wire_radius_m: float, freq_hz: float, ground: Ground | None = None) -> ElevatedMesh:
    """Segments per wavelength at which one element's Z11 is converged to 1 % by doubling.

    From 40 per wavelength (at least 6 segments on the vertical and 4 on
    each radial, minimums that double with the mesh), doubled while Z11
    changes by 1 % or more, up to 80 per wavelength or segments four radii
    long. As for the perfect-plane model, a drift that will not settle is
    the delta-gap feed's capacitance (a real base insulator's matters as
    much).

    References
    ----------
    Convergence by successive mesh refinement: common practice for moment
    methods (Balanis, *Antenna Theory*, 3rd ed., sec. 8.3, from memory).
    """
    from .mom import MESH_TOLERANCE

    args = (float(height_m), float(radius_m), float(hub_m), int(count), float(length_m), float(wire_radius_m),
            ((0.0, 0.0),), float(freq_hz), ground, False)
    lam = C0_M_S / freq_hz
    n = _SEGMENTS_PER_WAVELENGTH
    z = _solve_array(*args, n).impedance_ohm[0, 0]
    change = math.inf
    while 2 * n <= _MAX_PER_WAVELENGTH and lam / (2 * n) >= 4.0 * radius_m:
        z2 = _solve_array(*args, 2 * n).impedance_ohm[0, 0]
        change = float(abs(z2 - z) / max(abs(z2), 1e-300))
        n, z = 2 * n, z2
        if change < MESH_TOLERANCE:
            return ElevatedMesh(n, change, True)
    return ElevatedMesh(n, change, False)


def array_mesh(height_m: float, radius_m: float, hub_m: float, count: int, length_m: float,
               wire_radius_m: float, positions_m, freq_hz: float, ground: Ground | None = None) -> float:
    """Segments per wavelength for a whole array: one element's converged mesh (:func:`elevated_mesh`),
    halved (down to 20 per wavelength) while the array would have more than :data:`SEGMENT_BUDGET`
    segments."""
    pw = elevated_mesh(height_m, radius_m, hub_m, count, length_m, wire_radius_m, freq_hz, ground).per_wavelength
    while pw > 0.5 * _SEGMENTS_PER_WAVELENGTH and \
            segment_count(height_m, count, length_m, positions_m, freq_hz, pw) > SEGMENT_BUDGET:
        pw *= 0.5
    return float(pw)


def copper_loss_ohm(sol: ElevatedArray, base_current_a: np.ndarray | None = None) -> float:
    """Copper loss of the radials referred to 1 A: R' sum int |I|^2 dl over every radial segment.

    Zero for a solution without copper loading (``radial_ohm_per_m`` 0).

    ``base_current_a`` defaults to 1 A on element 1 (others open at their
    bases): for one element this is its copper loss resistance.
    """
    i = np.zeros(sol.n_elements, dtype=complex)
    i[0] = 1.0
    cur = sol.segment_currents(i if base_current_a is None else base_current_a)
    length = np.linalg.norm(sol.seg_end_m - sol.seg_start_m, axis=1)
    horizontal = np.abs(sol.seg_end_m[:, 2] - sol.seg_start_m[:, 2]) < 1e-12
    a, b = cur[:, 0], cur[:, 1]
    # int_0^L |a (1 - x) + b x|^2 dl = L (|a|^2 + Re(a b*) + |b|^2) / 3
    sq = length * (np.abs(a) ** 2 + (a * np.conj(b)).real + np.abs(b) ** 2) / 3.0
    return float(sol.radial_ohm_per_m * np.sum(sq[horizontal]))


def _far_field_points(sol: ElevatedArray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Quadrature of the far-field integral along every straight wire, independent of the mesh.

    Each wire (a run of collinear, touching segments: a vertical or a
    radial) is split into stretches of at most a tenth of a wavelength with
    three Gauss points each; the moment-method current (linear on each
    segment) is read at those points. The radiation integral's integrand
    (a near-sinusoidal current times exp(j k s cos)) is smooth on that scale,
    so this carries the far field of the fine mesh at a fraction of its points.

    Returns (points (P, 3), unit tangents (P, 3), weighted currents (P, n_port)).
    """
    start, end = sol.seg_start_m, sol.seg_end_m
    tq = end - start
    lq = np.linalg.norm(tq, axis=1)
    uq = tq / lq[:, None]
    lam = C0_M_S / sol.freq_hz
    cur = sol.seg_current_a
    x = 0.5 * (_FF_T + 1.0)
    pts, tang, wcur = [], [], []
    n_seg = start.shape[0]
    joined = (np.all(np.abs(start[1:] - end[:-1]) < 1e-9, axis=1)
              & np.all(np.abs(uq[1:] - uq[:-1]) < 1e-9, axis=1))
    firsts = np.concatenate([[0], np.flatnonzero(~joined) + 1])
    lasts = np.concatenate([firsts[1:] - 1, [n_seg - 1]])
    for first, last in zip(firsts, lasts):
        segs = np.arange(first, last + 1)
        cum = np.concatenate([[0.0], np.cumsum(lq[segs])])
        total = cum[-1]
        n_stretch = max(1, math.ceil(total / (_FF_STRETCH_WAVELENGTHS * lam)))
        edges = np.linspace(0.0, total, n_stretch + 1)
        s_pts = (edges[:-1, None] + x[None, :] * np.diff(edges)[:, None]).ravel()
        w_pts = (0.5 * _FF_W[None, :] * np.diff(edges)[:, None]).ravel()
        idx = np.clip(np.searchsorted(cum, s_pts, side="right") - 1, 0, segs.size - 1)
        frac = (s_pts - cum[idx]) / lq[segs[idx]]
        seg = segs[idx]
        i_pts = cur[seg, 0, :] * (1.0 - frac)[:, None] + cur[seg, 1, :] * frac[:, None]
        pts.append(start[first] + s_pts[:, None] * uq[first][None, :])
        tang.append(np.repeat(uq[first][None, :], s_pts.size, axis=0))
        wcur.append(w_pts[:, None] * i_pts)
    return np.concatenate(pts), np.concatenate(tang), np.concatenate(wcur)


def radiation_vectors(sol: ElevatedArray, elevation_deg, azimuth_deg) -> tuple[np.ndarray, ...]:
    """Radiation vectors of every port, direct and image, in vertical and horizontal polarization.

    N = int I t exp(j k r.r') dl over the wires (the far field is
    E = -j omega mu exp(-j k r) / (4 pi r) times N's transverse part). The
    image stands for the reflected ray: the wires mirrored in the ground
    plane, horizontal currents reversed (a perfect plane's image); the
    pattern multiplies its vertical part by R_v and its horizontal part by
    -R_h (-R_h = 1 for a perfect plane) of the soil.

    Parameters
    ----------
    sol : ElevatedArray
    elevation_deg : ndarray, shape (n_el_dir,)
    azimuth_deg : ndarray, shape (n_az,)
        Clockwise from the along axis (the array frame).

    Returns
    -------
    (v_direct, v_image, h_direct, h_image) : ndarrays of complex, shape (n_port, n_el_dir, n_az)
        Per ampere of base current on each element (the columns of
        ``seg_current_a``); v = component along theta-hat (vertical
        polarization), h = along phi-hat (horizontal).
    """
    psi = np.radians(np.asarray(elevation_deg, dtype=float))
    az = np.radians(np.asarray(azimuth_deg, dtype=float))
    k = 2.0 * math.pi * sol.freq_hz / C0_M_S
    pts, t_pts, wi = _far_field_points(sol)
    cur = sol.seg_current_a
    # current moments along x, y, z per point and port: direct (tx, ty, tz), image (-tx, -ty, tz)
    m_dir = wi[:, None, :] * t_pts[:, :, None]                                # (P, 3, port)
    m_img = m_dir * np.array([-1.0, -1.0, 1.0])[None, :, None]
    n_port = cur.shape[2]
    shape = (n_port, psi.size, az.size)
    v_dir, v_img, h_dir, h_img = (np.empty(shape, dtype=complex) for _ in range(4))
    ca, sa = np.cos(az), np.sin(az)
    proj = np.outer(ca, pts[:, 0]) + np.outer(sa, pts[:, 1])                    # (az, P)
    n_half = az.size // 2
    half_turn = bool(az.size % 2 == 0 and n_half > 0
                     and np.allclose(np.mod(az[n_half:] - az[:n_half], 2 * math.pi), math.pi, atol=1e-12))
    moments = np.stack([m_dir, m_img]).reshape(2, pts.shape[0], -1)             # (2, P, 3 port)
    rows = max(1, 2_000_000 // max(1, az.size * pts.shape[0]))
    for r0 in range(0, psi.size, rows):
        cp, sp = np.cos(psi[r0:r0 + rows]), np.sin(psi[r0:r0 + rows])
        if half_turn:   # the bearing opposite each azimuth sees the conjugate horizontal phase
            h0 = np.exp(1j * k * cp[:, None, None] * proj[None, :n_half, :])
            horiz = np.concatenate([h0, np.conj(h0)], axis=1)                         # (row, az, P)
        else:
            horiz = np.exp(1j * k * cp[:, None, None] * proj[None, :, :])
        up = np.exp(1j * k * sp[:, None] * pts[None, :, 2])                          # (row, P)
        for which, (v_out, h_out) in enumerate(((v_dir, h_dir), (v_img, h_img))):
            ph = horiz * (up if which == 0 else np.conj(up))[:, None, :]
            nxyz = (ph @ moments[which]).reshape(cp.size, az.size, 3, n_port)
            nx, ny, nz = nxyz[:, :, 0, :], nxyz[:, :, 1, :], nxyz[:, :, 2, :]
            # theta-hat = (sin psi cos az, sin psi sin az, -cos psi); phi-hat = (-sin az, cos az, 0)
            v = sp[:, None, None] * (ca[None, :, None] * nx + sa[None, :, None] * ny) - cp[:, None, None] * nz
            h = -sa[None, :, None] * nx + ca[None, :, None] * ny
            v_out[:, r0:r0 + cp.size, :] = v.transpose(2, 0, 1)
            h_out[:, r0:r0 + cp.size, :] = h.transpose(2, 0, 1)
    return v_dir, v_img, h_dir, h_img


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


def _ground_field(sol: ElevatedSolution, points: np.ndarray, k: float, depth_m: float = 0.0) -> np.ndarray:
    """Tangential H of the wires alone at the ground points, taken ``depth_m`` below them, shape (n, 3).

    The soil spreads the return current under a low wire over about its
    complex image depth; the field is therefore read on a plane that much
    deeper (see :func:`elevated_loss_ohm`). One plane for every wire keeps
    Ampere's law (the field across any plane under a long wire carries half
    its current, the image the other half) and keeps a dense, low screen
    cancelling the vertical's field as it does on the surface.
    """
    start, end, cur = sol.seg_start_m, sol.seg_end_m, sol.seg_current_a
    points = np.array(points, dtype=float)
    points[:, 2] -= depth_m
    tq = end - start
    lq = np.linalg.norm(tq, axis=1)
    uq = tq / lq[:, None]
    rel = points[:, None, :] - start[None, :, :]                            # (n, q, 3)
    s0 = np.einsum("nqc,qc->nq", rel, uq)
    perp2 = np.maximum(np.einsum("nqc,nqc->nq", rel, rel) - s0 * s0, 0.0)
    rho = np.sqrt(perp2 + 1e-18)
    u_lo = np.arcsinh(-s0 / rho)
    u_hi = np.arcsinh((lq[None, :] - s0) / rho)
    half = 0.5 * (u_hi - u_lo)
    integral = np.empty(half.shape, dtype=complex)
    # in u = asinh(s / rho) the integrand is smooth: where a segment spans a
    # small range of u (seen from afar) three points suffice, near it ten
    wide = half > 0.25
    for mask, (gt, gw) in ((~wide, (_FAR_S, _FAR_SW)), (wide, (_GI_T, _GI_W))):
        if not np.any(mask):
            continue
        q_idx = np.nonzero(mask)[1]
        h_m, r_m, s_m = half[mask], rho[mask], s0[mask]
        u = (0.5 * (u_hi + u_lo))[mask][:, None] + h_m[:, None] * gt
        s_pts = s_m[:, None] + r_m[:, None] * np.sinh(u)
        r = r_m[:, None] * np.cosh(u)
        frac = s_pts / lq[q_idx][:, None]
        i_s = cur[q_idx, 0][:, None] * (1.0 - frac) + cur[q_idx, 1][:, None] * frac
        # Biot-Savart with retardation: dH = I ds (t x R) (1 + jkR) e^{-jkR} / (4 pi R^3);
        # t x R is constant along the segment, ds / R^3 = du / (rho^2 cosh^2 u)
        kern = i_s * (1.0 + 1j * k * r) * np.exp(-1j * k * r) / (r_m[:, None] ** 2 * np.cosh(u) ** 2)
        integral[mask] = np.sum(kern * (h_m[:, None] * gw), axis=-1)
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
    # the plane where a wire at the hub's height is sqrt(hub^2 + spread^2) away
    depth = math.sqrt(hub_m * hub_m + spread * spread) - hub_m
    k = 2.0 * math.pi / lam
    # the mesh the array is solved on (elevated_mesh): near an anti-resonance the small base
    # current, and so the loss referred to it, moves with the mesh as Z11 does
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
    flat = pts.reshape(-1, 3)
    h_top = surface * _ground_field(sol, flat, k, 0.0).reshape(rho.size, phi.size, 3)
    h_low = surface * _ground_field(sol, flat, k, depth).reshape(rho.size, phi.size, 3)
    # The azimuthal mean of H_phi is the bulk return current, which the soil must
    # carry as it is (on the surface); what varies with azimuth (the peaks under
    # each wire, the gaps between them) the soil spreads over its image depth:
    # that part is read on the deeper plane. The mirror symmetry about the
    # radial at phi = 0 makes H_rho odd, so its mean over the sector is zero.
    e_phi = np.stack([-np.sin(phi), np.cos(phi), np.zeros(phi.size)], -1)[None, :, :]
    mean_top = np.sum(np.sum(h_top * e_phi, -1) * w_phi, axis=1) / np.sum(w_phi)   # (n_rho,)
    mean_low = np.sum(np.sum(h_low * e_phi, -1) * w_phi, axis=1) / np.sum(w_phi)
    ripple = h_low - mean_low[:, None, None] * e_phi
    h2 = np.abs(mean_top[:, None]) ** 2 + np.sum(np.abs(ripple) ** 2, axis=-1)
    area = (w_u * rho * rho)[:, None] * w_phi[None, :]          # rho drho dphi = rho^2 du dphi
    return float(2 * count * re_zg * np.sum(area * h2))       # 2N half-sectors; R = 2P/|I|^2 with P = 1/2 ...
