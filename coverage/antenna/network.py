"""Switch networks that can be cut: the recognised feed forms and their design.

A forced state (wanted base currents) is realised on one band by a network
of the user's cable and a few lumped parts. Two forms are recognised:

- ``junction-lines``: a line from one junction to every element, each at
  least the geometric run from the junction to its element plus a slack;
  the lengths are chosen (with the coupling) so the true currents meet the
  wish. Exact for two elements; a least-squares fit for more.
- ``current-forcing``: every element on an odd number of quarter waves of
  line, which forces its base current to follow the voltage at the line's
  input whatever the element's impedance; the line inputs that need another
  phase than the junction's are driven through a lossless L section (series
  part from the junction, shunt part at the line input) that makes that
  voltage. Elements whose line input already lies within 5 % of the
  junction voltage share the junction directly.

Both forms end at the junction in an L-network to the transmitter's 50 ohm.
Every branch is a chain (ABCD) matrix, so the same network is solved on any
band with the coupled elements (:func:`lobeplan.antenna.feed.drive_chains`):
that is how a state is "as built" on a band it was not designed on.

Symmetric states share one design: when a rotation or mirror image of the
layout (about the junction) maps one state's wanted currents onto
another's, both get the design of one canonical image, permuted.

``current_error`` (defined once, here): the largest difference between the
delivered and the wanted base currents, as a fraction of the largest wanted
current, after the one complex factor that fits them best (a common
amplitude and phase change nothing in the pattern).

References
----------
Quarter-wave current forcing: *The ARRL Antenna Book*, chapter on
multielement (phased) arrays, "current forcing" with lambda/4 lines and an
L-network phase shifter (from memory); the property itself follows from the
line equations (Collin, *Foundations for Microwave Engineering*, ch. 3):
a lossless lambda/4 line has A = 0, B = j Z0, so I_load = -j V_in / Z0.
L-network design: Bowick, *RF Circuit Design*, ch. 4.
"""
from __future__ import annotations

import functools
import math
from dataclasses import dataclass

import numpy as np

from .feed import (Component, LNetwork, design_l_network, design_line_lengths, drive_chains,
                   line_chain_matrix, line_wavelength_m)
from .model import Feed

__all__ = [
    "FORMS",
    "MAX_CURRENT_ERROR",
    "Branch",
    "Network",
    "current_error",
    "layout_symmetries",
    "branch_chains",
    "network_drive",
    "design_network",
    "geometric_runs_m",
    "PartStress",
    "part_stress",
]

FORMS = ("junction-lines", "current-forcing")
MAX_CURRENT_ERROR = 0.1
"""A form "meets" the wanted currents when its current_error is at most this."""

_DIRECT = 0.05   # a line input this close to the junction voltage shares the junction


@dataclass(frozen=True, slots=True)
class Branch:
    """One element's branch from the junction: optional series part, optional
    shunt part at the line input, then ``line_m`` of cable to the base."""

    element: int
    line_m: float
    series: Component | None = None
    shunt: Component | None = None


@dataclass(frozen=True, slots=True)
class Network:
    """A designed switch network for one state.

    Attributes
    ----------
    form : {"junction-lines", "current-forcing"}
    design_freq_hz : float
    branches : tuple of Branch, one per element in element order
    match : LNetwork or None
        Junction to 50 ohm at the design frequency.
    wanted : tuple of complex
        The wanted relative base currents.
    achieved : tuple of complex
        What the network delivers at the design frequency (same scale).
    current_error : float
        See the module notes.
    meets : bool
        ``current_error <= MAX_CURRENT_ERROR``.
    junction_m : (float, float)
        (along, across) of the junction, metres.
    runs_m : tuple of float
        Straight distance from the junction to each element.
    slack_m : float
    """

    form: str
    design_freq_hz: float
    branches: tuple[Branch, ...]
    match: LNetwork | None
    wanted: tuple[complex, ...]
    achieved: tuple[complex, ...]
    current_error: float
    meets: bool
    junction_m: tuple[float, float]
    runs_m: tuple[float, ...]
    slack_m: float

    @property
    def line_m(self) -> tuple[float, ...]:
        return tuple(b.line_m for b in self.branches)

    def permuted(self, perm) -> "Network":
        """This design moved onto an image state: element i takes the branch of
        element ``perm[i]`` of this one (``perm`` from :func:`layout_symmetries`)."""
        p = [int(k) for k in perm]
        br = tuple(Branch(i, self.branches[p[i]].line_m, self.branches[p[i]].series, self.branches[p[i]].shunt)
                   for i in range(len(p)))
        return Network(self.form, self.design_freq_hz, br, self.match,
                       tuple(self.wanted[k] for k in p), tuple(self.achieved[k] for k in p),
                       self.current_error, self.meets, self.junction_m,
                       tuple(self.runs_m[k] for k in p), self.slack_m)


def current_error(achieved, wanted) -> float:
    """Largest |c a - w| / max|w| with c the complex factor fitting a to w best."""
    a = np.asarray(achieved, dtype=complex)
    w = np.asarray(wanted, dtype=complex)
    den = float(np.real(np.vdot(a, a)))
    if den <= 0.0:
        return math.inf
    c = np.vdot(a, w) / den
    return float(np.max(np.abs(c * a - w)) / np.max(np.abs(w)))


def geometric_runs_m(positions_m, junction_m) -> np.ndarray:
    """Straight distance from the junction to each element base, metres."""
    pos = np.asarray(positions_m, dtype=float).reshape(-1, 2)
    return np.hypot(*(pos - np.asarray(junction_m, dtype=float)).T)


def layout_symmetries(positions_m, junction_m, tol_m: float = 1e-6) -> tuple[tuple[int, ...], ...]:
    """Element permutations of the rotations and mirror images that keep the
    layout and the junction in place (the identity first).

    ``perm[i]`` is the element that element i's position goes to.
    """
    pos = np.asarray(positions_m, dtype=float).reshape(-1, 2)
    c = np.asarray(junction_m, dtype=float)
    rel = pos - c
    n = rel.shape[0]
    found: dict[tuple[int, ...], None] = {tuple(range(n)): None}
    radii = np.hypot(*rel.T)
    ref = int(np.argmax(radii))
    if radii[ref] <= tol_m:
        return tuple(found)
    a0 = math.atan2(rel[ref, 1], rel[ref, 0])
    for j in range(n):
        if abs(radii[j] - radii[ref]) > tol_m:
            continue
        aj = math.atan2(rel[j, 1], rel[j, 0])
        for mirror in (False, True):
            if mirror:   # reflection about the axis at angle (a0 + aj) / 2
                t = a0 + aj
                m = np.array([[math.cos(t), math.sin(t)], [math.sin(t), -math.cos(t)]])
            else:
                t = aj - a0
                m = np.array([[math.cos(t), -math.sin(t)], [math.sin(t), math.cos(t)]])
            img = rel @ m.T
            d = np.hypot(*(img[:, None, :] - rel[None, :, :]).transpose(2, 0, 1))
            perm = tuple(int(k) for k in np.argmin(d, axis=1))
            if np.all(d[np.arange(n), perm] < tol_m * max(1.0, float(radii.max()))) and len(set(perm)) == n:
                found.setdefault(perm, None)
    return tuple(found)


def _series(z):
    return np.array([[1.0, z], [0.0, 1.0]], dtype=complex)


def _shunt(y):
    return np.array([[1.0, 0.0], [y, 1.0]], dtype=complex)


def branch_chains(feed: Feed, branches, freq_hz: float) -> np.ndarray:
    """Chain matrices of every branch at ``freq_hz`` (fixed parts), shape (n, 2, 2)."""
    out = []
    for b in branches:
        m = line_chain_matrix(feed, freq_hz, b.line_m)
        if b.shunt is not None:
            m = _shunt(1.0 / (1j * b.shunt.reactance_ohm(freq_hz))) @ m
        if b.series is not None:
            m = _series(1j * b.series.reactance_ohm(freq_hz)) @ m
        out.append(m)
    return np.stack(out)


def network_drive(z_base_ohm: np.ndarray, feed: Feed, net: Network, freq_hz: float):
    """The network solved on ``freq_hz`` with the coupled elements (1 W at the junction)."""
    return drive_chains(z_base_ohm, branch_chains(feed, net.branches, freq_hz))


def _part(x_ohm: float, freq_hz: float) -> Component:
    w = 2.0 * math.pi * freq_hz
    if x_ohm >= 0:
        return Component("L", x_ohm / w * 1e6)
    return Component("C", -1.0 / (w * x_ohm) * 1e12)


def _lines_form(z, feed, freq_hz, w, min_len):
    d = design_line_lengths(z, feed, freq_hz, w, min_length_m=min_len)
    if d is None:
        return None
    return tuple(Branch(e, float(x)) for e, x in enumerate(d.line_m))


def _forcing_form(z, feed, freq_hz, w, min_len):
    """Odd quarter waves to every element, L sections for the other phases."""
    q = 0.25 * line_wavelength_m(feed, freq_hz)
    n = len(w)
    v_base = z @ w
    best = None
    # each line the shortest odd multiple of lambda/4 that reaches, or the next
    # one (the sign of the forced current flips by one half wave)
    first = np.maximum(np.ceil((np.asarray(min_len) / q - 1.0) / 2.0), 0).astype(int)
    for flips in range(1 << n):
        m_odd = first + np.array([(flips >> e) & 1 for e in range(n)])
        lengths = (2 * m_odd + 1) * q
        vin, iin = [], []
        for e in range(n):
            mat = line_chain_matrix(feed, freq_hz, lengths[e])
            vin.append(mat[0, 0] * v_base[e] + mat[0, 1] * w[e])
            iin.append(mat[1, 0] * v_base[e] + mat[1, 1] * w[e])
        vin, iin = np.array(vin), np.array(iin)
        ref = int(np.argmax(np.abs(w)))
        vj = vin[ref]
        branches, cost, ok = [], 0, True
        for e in range(n):
            if abs(vin[e] / vj - 1.0) < _DIRECT:
                branches.append(Branch(e, float(lengths[e])))
                continue
            # V_J - V_N = X (j I_in) + (X B)(-V_N): solve for the real X and X B
            rhs = vj - vin[e]
            a = np.array([[(1j * iin[e]).real, (-vin[e]).real], [(1j * iin[e]).imag, (-vin[e]).imag]])
            try:
                x, xb = np.linalg.solve(a, [rhs.real, rhs.imag])
            except np.linalg.LinAlgError:
                ok = False
                break
            if abs(x) < 1e-9:
                ok = False
                break
            b = xb / x
            branches.append(Branch(e, float(lengths[e]), _part(float(x), freq_hz),
                                   _part(float(-1.0 / b), freq_hz) if abs(b) > 1e-12 else None))
            cost += 1
        if not ok:
            continue
        key = (cost, float(np.sum(lengths)))
        if best is None or key < best[0]:
            best = (key, tuple(branches))
    return None if best is None else best[1]


def _finish(form, branches, z, feed, freq_hz, w, junction, runs, slack):
    drive = drive_chains(z, branch_chains(feed, branches, freq_hz))
    a = drive.base_current_a
    err = current_error(a, w)
    c = np.vdot(a, w) / np.real(np.vdot(a, a))
    try:
        match = design_l_network(drive.junction_impedance_ohm, freq_hz, 50.0)
    except ValueError:
        match = None
    return Network(form, float(freq_hz), tuple(branches), match, tuple(complex(x) for x in w),
                   tuple(complex(x) for x in c * a), err, err <= MAX_CURRENT_ERROR,
                   (float(junction[0]), float(junction[1])), tuple(float(r) for r in runs), float(slack))


def _normalised_key(w) -> tuple:
    w = np.asarray(w, dtype=complex)
    k = int(np.flatnonzero(np.abs(w) >= np.max(np.abs(w)) * (1 - 1e-9))[0])
    r = w / w[k]
    return tuple((round(float(abs(x)), 6), round(float(np.degrees(np.angle(x))) % 360.0, 4) % 360.0) for x in r)


def design_network(z_base_ohm: np.ndarray, feed: Feed, freq_hz: float, wanted, positions_m,
                   junction_m=None, slack_m: float = 1.0) -> Network:
    """Design the network that realises ``wanted`` currents on ``freq_hz``.

    The simple form (lines from one junction) is taken when it meets the
    currents; otherwise current forcing when it does; otherwise whichever
    comes closer, with ``meets`` False (say so to the user).

    Parameters
    ----------
    z_base_ohm : ndarray of complex, shape (n_el, n_el)
        Coupled base impedances, base loss included.
    feed : Feed
    freq_hz : float
    wanted : array_like of complex, shape (n_el,)
    positions_m : array_like, shape (n_el, 2)
    junction_m : (along, across), optional
        Default: the centroid of the elements.
    slack_m : float
        Each line is at least its straight run plus this.

    Returns
    -------
    Network
    """
    pos = np.asarray(positions_m, dtype=float).reshape(-1, 2)
    junction = pos.mean(axis=0) if junction_m is None else np.asarray(junction_m, dtype=float)
    w = np.asarray(wanted, dtype=complex)
    syms = layout_symmetries(pos, junction)
    # the canonical image: the smallest key among the images of the state
    images = []
    for perm in syms:
        img = np.empty_like(w)
        img[list(perm)] = w
        images.append((_normalised_key(img), perm, img))
    key, perm, img = min(images, key=lambda t: t[0])
    runs = geometric_runs_m(pos, junction)
    net = _design_cached(_MatrixKey(z_base_ohm), feed, float(freq_hz), key, tuple(img),
                         tuple(map(float, runs)), (float(junction[0]), float(junction[1])), float(slack_m))
    return net.permuted(np.asarray(perm)) if perm != tuple(range(len(perm))) else net


class _MatrixKey:
    """Hashable wrapper of an impedance matrix for the design cache."""

    __slots__ = ("z", "h")

    def __init__(self, z):
        self.z = np.asarray(z, dtype=complex)
        self.h = hash(self.z.tobytes())

    def __hash__(self):
        return self.h

    def __eq__(self, other):
        return isinstance(other, _MatrixKey) and self.h == other.h and np.array_equal(self.z, other.z)


@functools.lru_cache(maxsize=256)
def _design_cached(zk, feed, freq_hz, key, wanted, runs, junction, slack):
    z = zk.z
    w = np.asarray(wanted, dtype=complex)
    min_len = np.asarray(runs) + slack
    candidates = []
    if len(w) >= 2:
        br = _lines_form(z, feed, freq_hz, w, min_len)
        if br is not None:
            candidates.append(_finish("junction-lines", br, z, feed, freq_hz, w, junction, runs, slack))
    if not (candidates and candidates[0].meets):
        br = _forcing_form(z, feed, freq_hz, w, min_len)
        if br is not None:
            candidates.append(_finish("current-forcing", br, z, feed, freq_hz, w, junction, runs, slack))
    if not candidates:
        raise ValueError("no recognised network form could be designed for these currents")
    meeting = [c for c in candidates if c.meets]
    return meeting[0] if meeting else min(candidates, key=lambda c: c.current_error)


@dataclass(frozen=True, slots=True)
class PartStress:
    """Peak voltage across and RMS current through one part at a power."""

    name: str
    part: Component
    voltage_v_peak: float
    current_a_rms: float


def part_stress(z_base_ohm: np.ndarray, feed: Feed, net: Network, freq_hz: float, power_w: float
                ) -> tuple[PartStress, ...]:
    """Stress on every lumped part of the network with ``power_w`` into the junction.

    Phasors are peak values (1/2 Re(V I*) is power): voltages are given as
    peaks (what breaks a capacitor), currents as RMS (what heats a coil).
    The match parts see the junction power too (lossless match).
    """
    s = math.sqrt(power_w)
    drive = network_drive(z_base_ohm, feed, net, freq_hz)
    v = drive.base_voltage_v
    i = drive.base_current_a
    out = []
    for b in net.branches:
        m = line_chain_matrix(feed, freq_hz, b.line_m)
        vn = m[0, 0] * v[b.element] + m[0, 1] * i[b.element]
        i_line = m[1, 0] * v[b.element] + m[1, 1] * i[b.element]
        i_ser = i_line
        if b.shunt is not None:
            i_sh = vn / (1j * b.shunt.reactance_ohm(freq_hz))
            i_ser = i_line + i_sh
            out.append(PartStress(f"element {b.element + 1} shunt", b.shunt, s * abs(vn), s * abs(i_sh) / math.sqrt(2)))
        if b.series is not None:
            vs = i_ser * 1j * b.series.reactance_ohm(freq_hz)
            out.append(PartStress(f"element {b.element + 1} series", b.series, s * abs(vs),
                                  s * abs(i_ser) / math.sqrt(2)))
    if net.match is not None:
        zj = drive.junction_impedance_ohm
        vj = math.sqrt(2.0 / max(np.real(1.0 / zj), 1e-300))
        ij = vj / zj
        mt = net.match
        xs = mt.series.reactance_ohm(freq_hz)
        xp = mt.shunt.reactance_ohm(freq_hz)
        if mt.shunt_at_load:   # shunt across the junction, series to the source
            i_sh = vj / (1j * xp)
            i_s = ij + i_sh
            out.append(PartStress("match shunt", mt.shunt, s * abs(vj), s * abs(i_sh) / math.sqrt(2)))
            out.append(PartStress("match series", mt.series, s * abs(i_s * xs), s * abs(i_s) / math.sqrt(2)))
        else:                  # series at the junction, shunt across the source
            v_src = vj + ij * 1j * xs
            i_sh = v_src / (1j * xp)
            out.append(PartStress("match series", mt.series, s * abs(ij * xs), s * abs(ij) / math.sqrt(2)))
            out.append(PartStress("match shunt", mt.shunt, s * abs(v_src), s * abs(i_sh) / math.sqrt(2)))
    return tuple(out)
