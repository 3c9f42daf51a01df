"""Feed network: lossy lines from a common junction, solved with the coupling.

Each element is fed through its own line from one junction. With the
coupled base impedance matrix Z (ground loss included) the base voltages are
V = Z I, and every line must bring its element back to the same junction
voltage:

    V_J = A_i V_i + B_i I_i,   I_Ji = C_i V_i + D_i I_i,

with (A, B; C, D) the chain matrix of line i. Solving these together gives
the *true* base currents, which differ from what the electrical line lengths
suggest because each element's feed-point impedance depends on the currents
of all the others.

Phasors are peak values with e^{j omega t}; power is 1/2 Re(V I*).

References
----------
R. E. Collin, *Foundations for Microwave Engineering*, 2nd ed., ch. 3
(lossy TEM lines, Zin = Z0 (ZL + Z0 tanh gl) / (Z0 + ZL tanh gl)) and ch. 4
(chain matrices). Phased-array feeding with lines and the coupling matrix:
Balanis, *Antenna Theory*, 3rd ed., sec. 8.6 (driving-point impedances).
L-network design equations: C. Bowick, *RF Circuit Design*, ch. 4.
"""
from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from .model import Feed

__all__ = [
    "Drive",
    "Component",
    "LNetwork",
    "LineDesign",
    "ForcingDesign",
    "line_gamma_per_m",
    "line_wavelength_m",
    "line_chain_matrix",
    "line_input_impedance_ohm",
    "line_load_current_a",
    "drive_forced",
    "drive_fed",
    "drive_chains",
    "design_line_lengths",
    "quarter_wave_forcing",
    "design_l_network",
    "l_network_input_ohm",
    "swr",
    "LoadingCoil",
    "loading_coil",
    "COIL_Q",
]

_C0_M_S = 299_792_458.0
_NEPER_DB = 20.0 * math.log10(math.e)


def line_gamma_per_m(feed: Feed, freq_hz: float) -> complex:
    """Propagation constant alpha + j beta of the cable, per metre.

    The matched loss is given in dB per 100 m at 10 MHz and scaled with
    sqrt(f) (skin-effect conductor loss dominates at HF).
    """
    alpha = feed.loss_db_per_100m_at_10mhz * math.sqrt(freq_hz / 10e6) / 100.0 / _NEPER_DB
    beta = 2.0 * math.pi * freq_hz / (_C0_M_S * feed.velocity_factor)
    return complex(alpha, beta)


def line_wavelength_m(feed: Feed, freq_hz: float) -> float:
    """One wavelength in the cable, metres (velocity factor applied)."""
    return _C0_M_S * feed.velocity_factor / freq_hz


def line_chain_matrix(feed: Feed, freq_hz: float, length_m) -> np.ndarray:
    """Chain (ABCD) matrix of a line, (V_in, I_in) = M (V_out, I_out).

    Parameters
    ----------
    length_m : float or ndarray, shape (n,)

    Returns
    -------
    ndarray of complex, shape (..., 2, 2)
    """
    gl = line_gamma_per_m(feed, freq_hz) * np.asarray(length_m, dtype=float)
    ch, sh = np.cosh(gl), np.sinh(gl)
    z0 = feed.z0_ohm
    return np.stack([np.stack([ch, z0 * sh], -1), np.stack([sh / z0, ch], -1)], -2)


def line_input_impedance_ohm(feed: Feed, freq_hz: float, length_m, z_load_ohm):
    """Zin = Z0 (ZL + Z0 tanh gl) / (Z0 + ZL tanh gl) (Collin, ch. 3)."""
    th = np.tanh(line_gamma_per_m(feed, freq_hz) * np.asarray(length_m, dtype=float))
    z0 = feed.z0_ohm
    zl = np.asarray(z_load_ohm, dtype=complex)
    return z0 * (zl + z0 * th) / (z0 + zl * th)


def line_load_current_a(feed: Feed, freq_hz: float, length_m, z_load_ohm, v_in_v):
    """Current into the load of a line driven by the voltage ``v_in_v``.

    From V_in = A V_L + B I_L with V_L = Z_L I_L.
    """
    m = line_chain_matrix(feed, freq_hz, length_m)
    zl = np.asarray(z_load_ohm, dtype=complex)
    return np.asarray(v_in_v, dtype=complex) / (m[..., 0, 0] * zl + m[..., 0, 1])


@dataclass(frozen=True, slots=True, eq=False)
class Drive:
    """How the elements are driven, scaled to 1 W total input.

    Attributes
    ----------
    base_current_a : ndarray of complex, shape (n_el,)
        Peak base currents for 1 W input (at the junction for fed states).
    base_voltage_v : ndarray of complex, shape (n_el,)
    feed_impedance_ohm : ndarray of complex, shape (n_el,)
        V_i / I_i at each base, ground loss included (what an analyser at the
        base would see with the array driven); a huge value where I_i ~ 0.
    element_power_w : ndarray, shape (n_el,)
        1/2 Re(V_i I_i*): power each element takes; negative means the element
        hands power back into its line.
    junction_impedance_ohm : complex or None
        Fed states only.
    line_loss_w : float
        Power lost in the lines (fed states; 0 for forced currents).
    """

    base_current_a: np.ndarray
    base_voltage_v: np.ndarray
    feed_impedance_ohm: np.ndarray
    element_power_w: np.ndarray
    junction_impedance_ohm: complex | None
    line_loss_w: float


def _feedpoint(v: np.ndarray, i: np.ndarray) -> np.ndarray:
    tiny = 1e-12 * max(float(np.max(np.abs(i))), 1e-300)
    safe = np.where(np.abs(i) > tiny, i, tiny)
    return v / safe


def drive_forced(z_base_ohm: np.ndarray, currents) -> Drive:
    """Forced base currents (an ideal feed), scaled to 1 W input.

    Parameters
    ----------
    z_base_ohm : ndarray of complex, shape (n_el, n_el)
        Coupled base impedance matrix, ground loss on the diagonal.
    currents : array_like of complex, shape (n_el,)
        Wanted relative base currents.
    """
    i = np.asarray(currents, dtype=complex)
    v = z_base_ohm @ i
    p = 0.5 * float(np.real(np.vdot(i, v)))
    if not p > 0:
        raise ValueError("these currents take no net power: the state is not realisable")
    s = 1.0 / math.sqrt(p)
    i, v = i * s, v * s
    return Drive(base_current_a=i, base_voltage_v=v, feed_impedance_ohm=_feedpoint(v, i),
                 element_power_w=0.5 * np.real(v * np.conj(i)), junction_impedance_ohm=None,
                 line_loss_w=0.0)


def drive_fed(z_base_ohm: np.ndarray, feed: Feed, freq_hz: float, line_m) -> Drive:
    """Lines from one junction to every base, solved with the coupling matrix.

    Parameters
    ----------
    z_base_ohm : ndarray of complex, shape (n_el, n_el)
    feed : Feed
    freq_hz : float
    line_m : array_like, shape (n_el,)
        Physical length of each element's line, metres.

    Returns
    -------
    Drive
        True base currents for 1 W into the junction.
    """
    return drive_chains(z_base_ohm, line_chain_matrix(feed, freq_hz, np.asarray(line_m, dtype=float)))


def drive_chains(z_base_ohm: np.ndarray, chains: np.ndarray) -> Drive:
    """Branches from one junction to every base, each a chain (ABCD) matrix.

    Parameters
    ----------
    z_base_ohm : ndarray of complex, shape (n_el, n_el)
    chains : ndarray of complex, shape (n_el, 2, 2)
        (V_J, I_branch) = M_e (V_e, I_e) for each element's branch (a line,
        possibly with lumped parts at its junction end).

    Returns
    -------
    Drive
        True base currents for 1 W into the junction; ``line_loss_w`` is all
        the power lost between the junction and the bases.
    """
    m = np.asarray(chains, dtype=complex)
    a, b, c, d = m[:, 0, 0], m[:, 0, 1], m[:, 1, 0], m[:, 1, 1]
    # V_J 1 = diag(A) Z I + diag(B) I  ->  I per volt at the junction
    i = np.linalg.solve(a[:, None] * z_base_ohm + np.diag(b), np.ones(len(a), dtype=complex))
    v = z_base_ohm @ i
    i_j = np.sum(c * v + d * i)
    p_in = 0.5 * float(np.real(np.conj(i_j)))  # V_J = 1
    if not p_in > 0:
        raise ValueError("the fed network takes no net power")
    s = 1.0 / math.sqrt(p_in)
    i, v = i * s, v * s
    el_p = 0.5 * np.real(v * np.conj(i))
    return Drive(base_current_a=i, base_voltage_v=v, feed_impedance_ohm=_feedpoint(v, i),
                 element_power_w=el_p, junction_impedance_ohm=complex(1.0 / i_j),
                 line_loss_w=float(1.0 - el_p.sum()))


@dataclass(frozen=True, slots=True)
class LineDesign:
    """Designed line lengths and how well the true currents meet the wish.

    ``achieved`` are the true relative base currents (element 1 = 1) with the
    designed lines, solved again with the coupling; ``error`` is the largest
    |achieved - wanted| relative to element 1.
    """

    line_m: tuple[float, ...]
    achieved: tuple[complex, ...]
    error: float


def _junction_voltage(feed, freq_hz, length_m, v, i):
    m = line_chain_matrix(feed, freq_hz, length_m)
    return m[..., 0, 0] * v + m[..., 0, 1] * i


def design_line_lengths(z_base_ohm: np.ndarray, feed: Feed, freq_hz: float,
                        wanted=None, min_length_m=0.0) -> LineDesign | None:
    """Line lengths of the given cable that deliver the wanted base currents.

    The wanted currents fix the base voltages through the coupled impedances;
    each line transforms its (V, I) pair back toward the junction, and the
    lengths are chosen so that all lines arrive at the same junction voltage
    (two real conditions per extra element). For two elements this has exact
    solutions; the shortest one with every line at least ``min_length_m`` is
    returned. For more elements it is solved in the least-squares sense and
    ``error`` says how far the result is from the wish.

    Parameters
    ----------
    z_base_ohm : ndarray of complex, shape (n_el, n_el)
        Coupled base impedances, ground loss included.
    feed : Feed
    freq_hz : float
    wanted : array_like of complex, shape (n_el,), optional
        Relative base currents; default equal amplitude, element 2 at -90 deg
        (two elements only).
    min_length_m : float or array_like, shape (n_el,)
        Shortest acceptable line, one for all or one per element (each line
        must reach from the junction to its element).

    Returns
    -------
    LineDesign or None
        None if no acceptable solution was found.
    """
    n = z_base_ohm.shape[0]
    if wanted is None:
        if n != 2:
            raise ValueError("give the wanted currents for more than two elements")
        wanted = (1.0, np.exp(-0.5j * math.pi))
    w = np.asarray(wanted, dtype=complex)
    w = w / w[0]
    v = z_base_ohm @ w
    lam = line_wavelength_m(feed, freq_hz)
    lo = np.broadcast_to(np.asarray(min_length_m, dtype=float), (n,)).copy()
    grids = lo[:, None] + np.linspace(0.0, lam, 721)[None, :]
    vj = np.stack([_junction_voltage(feed, freq_hz, grids[e], v[e], w[e]) for e in range(n)])
    scale = float(np.max(np.abs(vj)))

    gamma = line_gamma_per_m(feed, freq_hz)
    z0 = feed.z0_ohm

    def residual(lengths):
        gl = gamma * np.asarray(lengths)
        vjs = (np.cosh(gl) * v + z0 * np.sinh(gl) * w) / scale   # V_J = A V + B I of each line
        diff = vjs[1:] - vjs[0]
        return np.column_stack([diff.real, diff.imag]).ravel()

    def jacobian(lengths):
        # d V_J / d l = gamma (sinh(gl) V + Z0 cosh(gl) I) for each line
        gl = gamma * np.asarray(lengths)
        dv = gamma * (np.sinh(gl) * v + z0 * np.cosh(gl) * w) / scale
        jac = np.zeros((2 * (n - 1), n))
        for e in range(1, n):
            jac[2 * e - 2, 0], jac[2 * e - 1, 0] = -dv[0].real, -dv[0].imag
            jac[2 * e - 2, e], jac[2 * e - 1, e] = dv[e].real, dv[e].imag
        return jac

    # seeds: the best grid pairs of element 1 against element 2
    gap = np.abs(vj[0][:, None] - vj[1][None, :])
    flat_gap = gap.ravel()
    near = np.argpartition(flat_gap, 400)[:400]
    order = near[np.argsort(flat_gap[near], kind="stable")]
    seeds = []
    picked: list[tuple[int, int]] = []
    for flat in order:
        i1, i2 = np.unravel_index(flat, gap.shape)
        # distinct basins only: neighbouring grid pairs lead to the same solution
        if len(picked) >= 8:
            break
        if any(abs(int(i1) - a) < 12 and abs(int(i2) - b) < 12 for a, b in picked):
            continue
        picked.append((int(i1), int(i2)))
        start = [grids[0][i1], grids[1][i2]]
        for e in range(2, n):  # remaining lines: nearest junction voltage on their grid
            start.append(grids[e][int(np.argmin(np.abs(vj[e] - vj[0][i1])))])
        seeds.append(start)
    found = []
    hi = lo + 2.0 * lam
    for start in seeds:
        x, fun = _bounded_lm(residual, jacobian, np.array(start), lo, hi)
        found.append((float(np.max(np.abs(fun))), float(np.sum(x)), tuple(x)))
    best_res = min(f[0] for f in found)
    good = [f for f in found if f[0] <= max(1e-7, 1.5 * best_res)]
    good.sort(key=lambda f: (round(f[1], 6), tuple(round(x, 6) for x in f[2])))  # ties: the same on every machine
    lengths = good[0][2]
    check = drive_fed(z_base_ohm, feed, freq_hz, lengths).base_current_a
    achieved = check / check[0]
    return LineDesign(line_m=tuple(float(x) for x in lengths),
                      achieved=tuple(complex(x) for x in achieved),
                      error=float(np.max(np.abs(achieved - w))))


def _bounded_lm(residual, jacobian, x0, lo, hi, iterations: int = 60):
    """Levenberg-Marquardt with the steps clipped into [lo, hi] (few unknowns).

    References
    ----------
    D. W. Marquardt, "An algorithm for least-squares estimation of nonlinear
    parameters", J. SIAM 11 (1963) 431-441.
    """
    x = np.clip(x0, lo, hi)
    r = residual(x)
    cost = float(r @ r)
    damp = 1e-3
    for _ in range(iterations):
        jac = jacobian(x)
        h = jac.T @ jac
        g = jac.T @ r
        try:
            step = np.linalg.solve(h + damp * np.diag(np.diag(h) + 1e-12), -g)
        except np.linalg.LinAlgError:
            break
        x_new = np.clip(x + step, lo, hi)
        r_new = residual(x_new)
        c_new = float(r_new @ r_new)
        if c_new < cost:
            moved = float(np.max(np.abs(x_new - x)))
            x, r, cost = x_new, r_new, c_new
            damp = max(damp / 3.0, 1e-12)
            if moved < 1e-12 or cost < 1e-26:
                break
        else:
            damp *= 4.0
            if damp > 1e10:
                break
    return x, r


@dataclass(frozen=True, slots=True)
class ForcingDesign:
    """Quarter-wave current forcing: each element on an odd number of lambda/4.

    A lossless lambda/4 line delivers I_load = -j V_in / Z0 whatever the load,
    so the element currents follow the voltages applied at the line inputs.

    Attributes
    ----------
    quarter_wave_m : float
        Physical length of lambda/4 of the cable.
    input_voltage_v : tuple of complex
        Voltage to apply at each lambda/4 line input per ampere of wanted
        current (V_in = j Z0 I).
    common_junction_line_m : tuple of float or None
        If the wanted currents are equal in amplitude and in phase or in
        antiphase, lambda/4 and 3 lambda/4 lines from one junction realise them
        directly (3 lambda/4 gives I = +j V_in / Z0); otherwise a phasing
        network must supply the input voltages, and this is None.
    """

    quarter_wave_m: float
    input_voltage_v: tuple[complex, ...]
    common_junction_line_m: tuple[float, ...] | None


def quarter_wave_forcing(feed: Feed, freq_hz: float, wanted) -> ForcingDesign:
    """Design the quarter-wave current-forcing feed for the wanted currents.

    References
    ----------
    Transmission-line equations (Collin, ch. 3): for a lossless line of
    length lambda/4, A = 0 and B = j Z0, so I_L = V_in / (j Z0).
    """
    w = np.asarray(wanted, dtype=complex)
    w = w / w[0]
    q = 0.25 * line_wavelength_m(feed, freq_hz)
    v_in = 1j * feed.z0_ohm * w
    common = None
    if np.allclose(np.abs(w), 1.0, atol=1e-6):
        sign = np.real(w)
        if np.allclose(np.abs(sign), 1.0, atol=1e-6):
            common = tuple(q if s > 0 else 3.0 * q for s in sign)
    return ForcingDesign(quarter_wave_m=q, input_voltage_v=tuple(complex(x) for x in v_in),
                         common_junction_line_m=common)


@dataclass(frozen=True, slots=True)
class Component:
    """One lumped part: ``kind`` "L" (value in uH) or "C" (value in pF)."""

    kind: str
    value: float

    def reactance_ohm(self, freq_hz: float) -> float:
        w = 2.0 * math.pi * freq_hz
        if self.kind == "L":
            return w * self.value * 1e-6
        return -1.0 / (w * self.value * 1e-12)


def _part(x_ohm: float, freq_hz: float) -> Component:
    w = 2.0 * math.pi * freq_hz
    if x_ohm >= 0:
        return Component("L", x_ohm / w * 1e6)
    return Component("C", -1.0 / (w * x_ohm) * 1e12)


@dataclass(frozen=True, slots=True)
class LNetwork:
    """An L-network between a resistive source and the load.

    ``shunt_at_load`` True: the shunt part is across the load and the series
    part goes to the source (load resistance above the source's); False: the
    series part is at the load and the shunt part across the source.
    """

    series: Component
    shunt: Component
    shunt_at_load: bool
    q: float


def design_l_network(z_load_ohm: complex, freq_hz: float, r_source_ohm: float = 50.0) -> LNetwork:
    """Two-part L-network matching ``z_load_ohm`` to ``r_source_ohm``.

    Of the two solutions the low-pass one (series inductor, shunt capacitor)
    is preferred when it exists.

    References
    ----------
    Bowick, *RF Circuit Design*, ch. 4: Q = sqrt(Rhigh/Rlow - 1),
    Xs = Q Rlow, Xp = Rhigh / Q, extended here to a complex load by absorbing
    its reactance (susceptance) into the adjacent part.
    """
    zl = complex(z_load_ohm)
    rl, xl = zl.real, zl.imag
    r0 = r_source_ohm
    if rl <= 0:
        raise ValueError("the load must have a positive resistance to be matched")
    yl = 1.0 / zl
    g, bl = yl.real, yl.imag
    if g * r0 >= 1.0:  # 1/G <= R0: series part at the load brings R up... to R0
        # Re{1/(zl + j xs)} = 1/r0  ->  (xl + xs) = +- sqrt(rl r0 - rl^2)
        root = math.sqrt(max(rl * r0 - rl * rl, 0.0))
        options = []
        for xp in (root, -root):
            xs = xp - xl
            b = xp / (rl * rl + xp * xp)  # shunt susceptance cancelling Im(1/(rl + j xp))
            options.append((xs, b))
        xs, b = max(options, key=lambda o: (o[0] >= 0) + (o[1] >= 0))
        q = root / rl if rl > 0 else 0.0
        return LNetwork(series=_part(xs, freq_hz), shunt=_part(-1.0 / b if b else math.inf, freq_hz),
                        shunt_at_load=False, q=q)
    root = math.sqrt(max(g / r0 - g * g, 0.0))
    options = []
    for bp in (root, -root):
        b = bp - bl
        xs = bp / (g * g + bp * bp)
        options.append((xs, b))
    xs, b = max(options, key=lambda o: (o[0] >= 0) + (o[1] >= 0))
    return LNetwork(series=_part(xs, freq_hz), shunt=_part(-1.0 / b if b else math.inf, freq_hz),
                    shunt_at_load=True, q=root / g)


def l_network_input_ohm(net: LNetwork, freq_hz: float, z_load_ohm) -> np.ndarray:
    """Impedance seen from the source side with fixed parts at ``freq_hz``."""
    zl = np.asarray(z_load_ohm, dtype=complex)
    zs = 1j * net.series.reactance_ohm(freq_hz)
    zp = 1j * net.shunt.reactance_ohm(freq_hz)
    if net.shunt_at_load:
        return zs + zp * zl / (zp + zl)
    z = zl + zs
    return zp * z / (zp + z)


def swr(z_ohm, r0_ohm: float = 50.0):
    """Standing-wave ratio on a line of ``r0_ohm`` terminated in ``z_ohm``."""
    g = np.abs((np.asarray(z_ohm, dtype=complex) - r0_ohm) / (np.asarray(z_ohm, dtype=complex) + r0_ohm))
    g = np.minimum(g, 1.0 - 1e-12)
    return (1.0 + g) / (1.0 - g)


COIL_Q = 200.0
"""Unloaded Q assumed for a base-loading coil (an air-wound HF coil: 150-300 is
common practice)."""


@dataclass(frozen=True, slots=True)
class LoadingCoil:
    """A series base coil that resonates a short element.

    Attributes
    ----------
    inductance_uh : float
    loss_ohm : float
        Its series loss resistance X / Q.
    q : float
    resistance_ohm : float
        The resonated base resistance (element + base loss + coil loss).
    efficiency : float
        Share of the power that the element's own resistance takes (its
        radiation, over a perfect plane), 0..1.
    """

    inductance_uh: float
    loss_ohm: float
    q: float
    resistance_ohm: float
    efficiency: float


def loading_coil(z_element_ohm: complex, base_loss_ohm: float, freq_hz: float, q: float = COIL_Q
                 ) -> LoadingCoil | None:
    """The base coil that cancels a capacitive element reactance, with its loss at ``q``.

    None when the element is not capacitive (no coil resonates it).

    References
    ----------
    Base loading of short verticals: X_L = -X_element, R_coil = X_L / Q
    (common practice; e.g. the loading sections of the ARRL Antenna Book,
    from memory).
    """
    x = float(np.imag(z_element_ohm))
    if x >= 0:
        return None
    xl = -x
    r_coil = xl / q
    r_el = float(np.real(z_element_ohm))
    total = r_el + base_loss_ohm + r_coil
    return LoadingCoil(xl / (2 * math.pi * freq_hz) * 1e6, r_coil, q, total, r_el / total if total > 0 else 0.0)
