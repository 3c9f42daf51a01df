"""Thin-wire moment method for vertical monopoles over a perfect ground plane.

Each monopole of height h stands on a perfectly conducting plane (the radial
system); by image theory it is the upper half of a centre-fed dipole of
length 2h whose current is symmetric about the plane. The dipole current is
expanded in overlapping piecewise-sinusoidal (PWS) triangles and tested with
the same functions (Galerkin). The source field of a PWS triangle is taken in
closed form on the wire axis; it is tested along a line at the wire radius
(the reduced thin-wire kernel) for the self terms and at the axis-to-axis
distance for the mutual terms. The feed is a delta-gap at the dipole centre,
i.e. at the monopole base between the monopole and its image, so the base
current is exactly the coefficient of the centre triangle.

The test integrals use the substitution u = rho sinh t along the wire, which
turns 1/R into dt and makes every integrand smooth; fixed Gauss-Legendre
rules then suffice. Equal heights and uniform segments make the matrix
block-Toeplitz: only one row per distinct axis distance is integrated.

References
----------
J. H. Richmond, "Radiation and scattering by thin-wire structures in the
complex frequency domain", NASA CR-2396, 1974 (PWS Galerkin, reduced kernel).
S. A. Schelkunoff and H. T. Friis, *Antennas: Theory and Practice*, 1952
(closed-form near field of a sinusoidal current filament).
C. A. Balanis, *Antenna Theory*, 3rd ed., sec. 4.2 (image theory), sec. 8.6
(induced-EMF self and mutual impedances), sec. 8.3 (moment methods).
"""
from __future__ import annotations

import functools
import math
from dataclasses import dataclass

import numpy as np
from scipy.special import sici

__all__ = [
    "C0_M_S",
    "ETA0_OHM",
    "CoupledElements",
    "solve_elements",
    "segment_count",
    "MeshChoice",
    "converged_mesh",
    "MESH_TOLERANCE",
    "emf_dipole_self_ohm",
    "emf_dipole_mutual_ohm",
    "emf_monopole_self_ohm",
    "emf_monopole_mutual_ohm",
    "emf_monopole_input_resistance_ohm",
]

C0_M_S = 299_792_458.0
ETA0_OHM = 376.730313668  # free-space wave impedance, mu0 c0

_GAUSS_T, _GAUSS_W = np.polynomial.legendre.leggauss(16)


@dataclass(frozen=True, slots=True, eq=False)
class CoupledElements:
    """Moment-method solution for N equal monopoles at one frequency.

    Attributes
    ----------
    freq_hz : float
    height_m, radius_m : float
    positions_m : ndarray, shape (n_el, 2)
        (along, across) of each element base, metres.
    node_z_m : ndarray, shape (n_node,)
        Heights of the current nodes on each monopole, 0 (base) .. h - dz;
        the current is zero at the top, z = h.
    segment_m : float
        Node spacing dz = h / n_node.
    impedance_ohm : ndarray of complex, shape (n_el, n_el)
        Base-referred impedance matrix of the monopoles (V = Z I at the bases),
        without any ground-loss resistance.
    node_current : ndarray of complex, shape (n_el, n_node, n_el)
        ``node_current[e, i, j]`` is the current at node i of element e per
        ampere of base current on element j (all other bases carrying the
        current the solution demands: this is the response to the full base
        current vector, columns of the map I_base -> I_nodes).
    """

    freq_hz: float
    height_m: float
    radius_m: float
    positions_m: np.ndarray
    node_z_m: np.ndarray
    segment_m: float
    impedance_ohm: np.ndarray
    node_current: np.ndarray

    @property
    def n_elements(self) -> int:
        return int(self.positions_m.shape[0])

    def currents_on_wires(self, base_current_a: np.ndarray) -> np.ndarray:
        """Node currents, shape (n_el, n_node), for the base currents, shape (n_el,)."""
        return self.node_current @ np.asarray(base_current_a, dtype=complex)


def segment_count(height_m: float, radius_m: float, freq_hz: float,
                  per_wavelength: float = 40.0) -> int:
    """Number of nodes (= segments) on one monopole.

    About ``per_wavelength`` segments per wavelength, at least 6, and no
    segment shorter than four radii (the reduced kernel needs dz >> a).
    """
    wavelength_m = C0_M_S / freq_hz
    n = max(6, math.ceil(per_wavelength * height_m / wavelength_m))
    n_max = max(2, int(height_m / (4.0 * radius_m)))
    return min(n, n_max)


MESH_TOLERANCE = 0.01
"""Relative change of Z11 on doubling the segments under which a mesh counts as converged."""


@dataclass(frozen=True, slots=True)
class MeshChoice:
    """The segment count chosen for one (height, radius, frequency).

    Attributes
    ----------
    n_node : int
        Segments per monopole.
    change : float
        |Z11(2n) - Z11(n)| / |Z11(2n)| of the last doubling tried (a last
        step to the thin-wire limit that is less than a doubling is scaled
        to one by ln 2 / ln(n2/n)).
    converged : bool
        ``change`` is under :data:`MESH_TOLERANCE`. False when the thin-wire
        limit (segments at least four radii long) came first.
    limit_node : int
        The thin-wire limit of the segment count.
    """

    n_node: int
    change: float
    converged: bool
    limit_node: int


@functools.lru_cache(maxsize=512)
def converged_mesh(height_m: float, radius_m: float, freq_hz: float,
                   tolerance: float = MESH_TOLERANCE) -> MeshChoice:
    """Segments per monopole such that Z11 is converged to ``tolerance`` by doubling.

    Start from :func:`segment_count` and double while the single element's
    base impedance changes by ``tolerance`` or more; the finer mesh of the
    first doubling that changes it less is used. Segments never get shorter
    than four radii (the reduced kernel's limit): there the last step's
    change is kept and ``converged`` is False. Near an anti-resonance that is
    common, because a delta-gap feed adds a shunt capacitance that grows as
    the segments shrink (a real base insulator's capacitance matters as much).

    References
    ----------
    Convergence by successive mesh refinement: common practice for moment
    methods (Balanis, *Antenna Theory*, 3rd ed., sec. 8.3, from memory).
    """
    n_lim = max(2, int(height_m / (4.0 * radius_m)))
    n = min(segment_count(height_m, radius_m, freq_hz), n_lim)
    z_prev = solve_elements(height_m, radius_m, ((0.0, 0.0),), freq_hz, n_node=n).impedance_ohm[0, 0]
    change = math.inf
    while n < n_lim:
        n2 = min(2 * n, n_lim)
        z = solve_elements(height_m, radius_m, ((0.0, 0.0),), freq_hz, n_node=n2).impedance_ohm[0, 0]
        # a last step short of a doubling is scaled to one (the drift is
        # about logarithmic in the segment length)
        change = abs(z - z_prev) / max(abs(z), 1e-300) * math.log(2.0) / math.log(n2 / n)
        n, z_prev = n2, z
        if change < tolerance:
            return MeshChoice(n, float(change), True, n_lim)
    return MeshChoice(n, float(change), bool(change < tolerance), n_lim)


def _psi(k: float, dz: float, rho: np.ndarray, p: np.ndarray) -> np.ndarray:
    """Test integral of the centre triangle against G at axis offset p*dz.

    Psi(rho, p) = int T_0(z) exp(-jkR)/R dz, R = sqrt(rho^2 + (z - p dz)^2),
    T_0(z) = sin(k (dz - |z|)) / sin(k dz) on |z| < dz. Shapes: rho (n_rho,),
    p (n_p,) -> (n_rho, n_p).
    """
    rho = rho[:, None, None, None]
    zp = (p * dz)[None, :, None, None]
    # two halves of the triangle: [-dz, 0] and [0, dz]
    lo = np.array([-dz, 0.0])[None, None, :, None]
    hi = np.array([0.0, dz])[None, None, :, None]
    t_lo = np.arcsinh((lo - zp) / rho)
    t_hi = np.arcsinh((hi - zp) / rho)
    half = 0.5 * (t_hi - t_lo)
    t = 0.5 * (t_hi + t_lo) + half * _GAUSS_T[None, None, None, :]
    z = zp + rho * np.sinh(t)
    r = rho * np.cosh(t)
    tri = np.sin(k * (dz - np.abs(z))) / math.sin(k * dz)
    f = tri * np.exp(-1j * k * r)
    return np.sum(f * _GAUSS_W * half, axis=(2, 3))


def _toeplitz_rows(k: float, dz: float, rho: np.ndarray, n_full: int) -> np.ndarray:
    """Galerkin entries Z(q) between dipole triangles q = 0..n_full-1 apart."""
    p = np.arange(0, n_full + 1, dtype=float)
    psi = _psi(k, dz, rho, p)  # (n_rho, n_full + 1)
    psi_ext = np.concatenate([psi[:, 1:2], psi], axis=1)  # psi(-1) = psi(1)
    q = np.arange(n_full)
    lower = psi_ext[:, q]      # psi(q - 1)
    mid = psi_ext[:, q + 1]    # psi(q)
    upper = psi_ext[:, q + 2]  # psi(q + 1)
    scale = 1j * ETA0_OHM / (4.0 * math.pi * math.sin(k * dz))
    return scale * (lower + upper - 2.0 * math.cos(k * dz) * mid)


def _solve(freq_hz: float, height_m: float, radius_m: float,
           positions_m: np.ndarray, n_node: int) -> CoupledElements:
    k = 2.0 * math.pi * freq_hz / C0_M_S
    dz = height_m / n_node
    n_el = positions_m.shape[0]
    n_full = 2 * n_node - 1  # triangles on the dipole, centred at -(N-1)..(N-1) dz

    # distinct axis distances (self terms tested at the wire radius)
    diff = positions_m[:, None, :] - positions_m[None, :, :]
    dist = np.hypot(diff[..., 0], diff[..., 1])
    dist = np.where(np.eye(n_el, dtype=bool), radius_m, np.maximum(dist, radius_m))
    rho, inverse = np.unique(np.round(dist, 9), return_inverse=True)
    inverse = inverse.reshape(n_el, n_el)
    rows = _toeplitz_rows(k, dz, rho, n_full)  # (n_rho, n_full)

    # symmetric currents (c at +-i equal): the reduced Galerkin matrix is
    # s_i s_j [T(|i - j|) + T(i + j)], s_0 = 1/sqrt 2, s_i = sqrt 2 (a Toeplitz
    # plus a Hankel part), assembled directly instead of from the full matrix
    i = np.arange(n_node)
    scale = np.where(i == 0, math.sqrt(0.5), math.sqrt(2.0))
    blocks = (rows[:, np.abs(i[:, None] - i[None, :])] + rows[:, i[:, None] + i[None, :]]) \
        * (scale[:, None] * scale[None, :])                                  # (n_rho, N, N)
    z_red = blocks[inverse].transpose(0, 2, 1, 3).reshape(n_el * n_node, n_el * n_node)

    ports = np.zeros((n_el * n_node, n_el))
    ports[np.arange(n_el) * n_node, np.arange(n_el)] = 1.0
    per_gap_volt = np.linalg.solve(z_red, ports)       # nodes per volt of dipole gap
    y_dipole = ports.T @ per_gap_volt                   # I_base = Y_d V_gap
    z_dipole = np.linalg.inv(y_dipole)
    z_mono = 0.5 * z_dipole                             # V_gap = 2 V_base, same current
    z_mono = 0.5 * (z_mono + z_mono.T)                  # reciprocity (round-off only)
    node_current = (per_gap_volt @ z_dipole).reshape(n_el, n_node, n_el)

    pos = np.array(positions_m, dtype=float)
    zs = np.arange(n_node) * dz
    for a in (pos, zs, z_mono, node_current):
        a.flags.writeable = False
    return CoupledElements(freq_hz=float(freq_hz), height_m=float(height_m), radius_m=float(radius_m),
                           positions_m=pos, node_z_m=zs, segment_m=dz,
                           impedance_ohm=z_mono, node_current=node_current)


@functools.lru_cache(maxsize=256)
def _solve_cached(freq_hz: float, height_m: float, radius_m: float,
                  positions: tuple[tuple[float, float], ...], n_node: int) -> CoupledElements:
    return _solve(freq_hz, height_m, radius_m, np.array(positions, dtype=float).reshape(-1, 2), n_node)


def solve_elements(height_m: float, radius_m: float, positions_m, freq_hz: float,
                   n_node: int | None = None) -> CoupledElements:
    """Solve N equal vertical monopoles over a perfect ground plane.

    Parameters
    ----------
    height_m : float
        Element height above the ground plane, metres (0.1 to 0.75 wavelength
        is the range checked by the tests).
    radius_m : float
        Wire radius, metres; thin-wire model, radius << height.
    positions_m : array_like, shape (n_el, 2)
        (along, across) of each base, metres. Elements must not touch.
    freq_hz : float
    n_node : int, optional
        Segments per monopole; default from :func:`converged_mesh` (Z11
        converged to 1 % by doubling, or the thin-wire limit).

    Returns
    -------
    CoupledElements
        Cached per (frequency, geometry, segments); treat as read-only.

    References
    ----------
    Richmond (1974), PWS Galerkin with the reduced thin-wire kernel; image
    theory (Balanis, *Antenna Theory*, sec. 4.7).
    """
    if not (freq_hz > 0 and height_m > 0 and radius_m > 0):
        raise ValueError("freq_hz, height_m and radius_m must be positive")
    if radius_m >= 0.05 * height_m:
        raise ValueError("thin-wire model: radius_m must be under 5 % of height_m")
    pos = tuple((float(a), float(b)) for a, b in np.asarray(positions_m, dtype=float).reshape(-1, 2))
    if n_node is None:
        n_node = converged_mesh(float(height_m), float(radius_m), float(freq_hz)).n_node
    return _solve_cached(float(freq_hz), float(height_m), float(radius_m), pos, int(n_node))


# --- induced-EMF closed forms (sinusoidal current), the independent check ---

def _cin(x):
    """Cin(x) = gamma + ln x - Ci(x) (Balanis eq. 4-68a)."""
    return np.euler_gamma + np.log(x) - sici(x)[1]


def emf_dipole_self_ohm(length_m: float, freq_hz: float) -> complex:
    """Self impedance of a thin half-wave dipole at its centre, induced-EMF method.

    Only the half-wave case is provided: Z = eta/(4 pi) [Cin(2 pi) + j Si(2 pi)].

    References
    ----------
    Balanis, *Antenna Theory*, 3rd ed., sec. 4.6 and 8.5 (infinitesimally thin
    wire, sinusoidal current).
    """
    wavelength_m = C0_M_S / freq_hz
    if not math.isclose(length_m, 0.5 * wavelength_m, rel_tol=1e-9):
        raise ValueError("the closed form is implemented for a half-wave dipole only")
    si, _ = sici(2.0 * math.pi)
    return complex(ETA0_OHM / (4.0 * math.pi) * (_cin(2.0 * math.pi) + 1j * si))


def emf_dipole_mutual_ohm(distance_m, freq_hz: float):
    """Mutual impedance of two parallel side-by-side half-wave dipoles.

    R21 = eta/4pi [2 Ci(u0) - Ci(u1) - Ci(u2)],
    X21 = -eta/4pi [2 Si(u0) - Si(u1) - Si(u2)],
    u0 = kd, u1,2 = k (sqrt(d^2 + l^2) +- l), l = lambda/2.

    Parameters
    ----------
    distance_m : float or ndarray
    freq_hz : float

    Returns
    -------
    complex or ndarray of complex, same shape as ``distance_m``

    References
    ----------
    Balanis, *Antenna Theory*, 3rd ed., sec. 8.6, induced-EMF method.
    """
    k = 2.0 * math.pi * freq_hz / C0_M_S
    ell = 0.5 * C0_M_S / freq_hz
    d = np.asarray(distance_m, dtype=float)
    u0 = k * d
    u1 = k * (np.sqrt(d**2 + ell**2) + ell)
    u2 = k * (np.sqrt(d**2 + ell**2) - ell)
    s0, c0 = sici(u0)
    s1, c1 = sici(u1)
    s2, c2 = sici(u2)
    r = ETA0_OHM / (4 * math.pi) * (2 * c0 - c1 - c2)
    x = -ETA0_OHM / (4 * math.pi) * (2 * s0 - s1 - s2)
    out = r + 1j * x
    return complex(out) if out.ndim == 0 else out


def emf_monopole_self_ohm(freq_hz: float) -> complex:
    """Quarter-wave monopole over a perfect plane: half the half-wave dipole value."""
    return 0.5 * emf_dipole_self_ohm(0.5 * C0_M_S / freq_hz, freq_hz)


def emf_monopole_mutual_ohm(distance_m, freq_hz: float):
    """Two quarter-wave monopoles over a perfect plane: half the dipole value."""
    return 0.5 * emf_dipole_mutual_ohm(distance_m, freq_hz)


def emf_monopole_input_resistance_ohm(height_m, freq_hz: float):
    """Input resistance of a thin monopole of any height over a perfect plane.

    Radiation resistance of a centre-fed dipole of length l = 2h with a
    sinusoidal current, referred to the current maximum,

        Rr = eta/(2 pi) {C + ln(kl) - Ci(kl) + 1/2 sin(kl) [Si(2kl) - 2 Si(kl)]
             + 1/2 cos(kl) [C + ln(kl/2) + Ci(2kl) - 2 Ci(kl)]},

    moved to the feed point by 1/sin^2(kl/2) and halved for the monopole.
    Not meaningful near l = lambda (the sinusoidal current has a node at the
    feed there).

    References
    ----------
    Balanis, *Antenna Theory*, 3rd ed., sec. 4.5 (radiation resistance of a
    finite-length dipole; equation number from memory) and sec. 4.5.4
    (input resistance).
    """
    k = 2.0 * math.pi * freq_hz / C0_M_S
    kl = 2.0 * k * np.asarray(height_m, dtype=float)
    s1, c1 = sici(kl)
    s2, c2 = sici(2.0 * kl)
    g = np.euler_gamma
    rr = ETA0_OHM / (2.0 * math.pi) * (
        g + np.log(kl) - c1 + 0.5 * np.sin(kl) * (s2 - 2.0 * s1)
        + 0.5 * np.cos(kl) * (g + np.log(kl / 2.0) + c2 - 2.0 * c1))
    return 0.5 * rr / np.sin(kl / 2.0) ** 2
