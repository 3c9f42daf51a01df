"""Array patterns in dBi on the planner's angular grid, referred to input power.

The moment method gives the current along every monopole; each piecewise-
sinusoidal current triangle is integrated in closed form into the far field,
once as the direct ray and once as the ray reflected by the real ground with
the Fresnel coefficient for vertical polarization. The horizontal array
factor places each element at its (along, across) position. With elevated
radials the solution is the wires of :mod:`lobeplan.antenna.elevated`
instead, and their far field (both polarizations, each with its own Fresnel
coefficient) replaces the vertical factor. Gain is
4 pi U / P_in, where P_in is the power into the bases (forced currents) or
into the junction (fed states), so ground loss and line loss lower it.

Frame: azimuth clockwise from the along axis; element 1 at the origin.

References
----------
C. A. Balanis, *Antenna Theory*, 3rd ed., sec. 4.7 (vertical elements above
ground: direct plus reflected ray), sec. 6.2-6.4 (array factor), sec. 2.9
(gain and radiation intensity).
J. D. Kraus, *Antennas*, 2nd ed., sec. 12-2 (vertical-polarization
reflection coefficient).
"""
from __future__ import annotations

import functools
import math
from dataclasses import dataclass

import numpy as np

from ..grid import AZIMUTH_DEG, ELEVATION_DEG
from .feed import Drive, drive_fed, drive_forced
from .elevated import ElevatedArray, radiation_vectors, solve_elevated_array
from .ground import reflection_horizontal, reflection_vertical
from .model import ArrayOption, ArraySpec, Ground, State
from .mom import C0_M_S, ETA0_OHM, CoupledElements, solve_elements
from .network import Network, design_network, network_drive
from .radials import ground_loss

__all__ = [
    "GAIN_FLOOR_DBI",
    "RATIO_CAP_DB",
    "ArrayResult",
    "array_pattern",
    "vertical_gain_dbi",
    "pattern_figures",
    "coupled_elements",
    "element_solution",
    "element_impedance_ohm",
    "state_currents",
    "state_drive",
    "gain_from_currents_dbi",
    "gains_from_currents_dbi",
    "LOBE_WINDOW_DB",
    "lobe_bearings_deg",
    "base_impedance_ohm",
    "state_kind",
    "state_network",
    "KINDS",
    "gain_toward_dbi",
]

GAIN_FLOOR_DBI = -60.0
RATIO_CAP_DB = 60.0

_SIN_EL = np.sin(np.radians(ELEVATION_DEG))
_COS_EL = np.cos(np.radians(ELEVATION_DEG))
_COS_AZ = np.cos(np.radians(AZIMUTH_DEG))
_SIN_AZ = np.sin(np.radians(AZIMUTH_DEG))
_COS_EL[-1] = 0.0  # exactly zero at the zenith, where a vertical does not radiate


@dataclass(frozen=True, slots=True, eq=False)
class ArrayResult:
    """Pattern and drive of one (option, state) on one frequency.

    Attributes
    ----------
    freq_hz : float
    option_name, state_name : str
    gain_dbi : ndarray, shape (91, 360)
        Gain over the grid of :mod:`lobeplan.grid` in the array frame
        (azimuth clockwise from the along axis), floored at -60 dBi.
    base_current_a : ndarray of complex, shape (n_el,)
        Peak base currents for 1 W total input.
    feed_impedance_ohm : ndarray of complex, shape (n_el,)
        Active impedance at each base, ground loss included.
    element_power_w : ndarray, shape (n_el,)
        Power each element takes (may be negative), 1 W total input.
    junction_impedance_ohm : complex or None
        Fed states only.
    line_loss_w : float
        Power lost in the lines per watt of input.
    ground_loss_w : float
        Power lost in the base (radial) resistances per watt of input.
    impedance_matrix_ohm : ndarray of complex, shape (n_el, n_el)
        Coupled base impedances without the series ground loss: over the
        perfect plane, or with elevated radials the wires over the soil.
    kind : {"forced", "as-built", "fed"}
        Forced currents held on this band; the currents the state's network
        (designed on ``design_band``) delivers here; or the ``line_m`` lines.
    design_band : str or None
        The band the state's network is designed on (as-built states).
    """

    freq_hz: float
    option_name: str
    state_name: str
    gain_dbi: np.ndarray
    base_current_a: np.ndarray
    feed_impedance_ohm: np.ndarray
    element_power_w: np.ndarray
    junction_impedance_ohm: complex | None
    line_loss_w: float
    ground_loss_w: float
    impedance_matrix_ohm: np.ndarray
    kind: str = "forced"
    design_band: str | None = None


KINDS = ("forced", "as-built", "fed")


def base_impedance_ohm(spec: ArraySpec, option: ArrayOption, freq_hz: float,
                       sol: CoupledElements | None = None) -> np.ndarray:
    """Coupled base impedances with each base's series loss on the diagonal.

    Returns
    -------
    ndarray of complex, shape (n_el, n_el)
        The one place the base (radial) loss enters the drive.
    """
    if sol is None:
        sol = coupled_elements(spec, option, freq_hz)
    return sol.impedance_ohm + np.diag(ground_loss(spec, option, freq_hz).ohm)


def state_kind(state: State, freq_hz: float) -> str:
    """"fed", "forced" (ideal, or a band of its own in forced_freqs_hz) or "as-built"."""
    if state.is_fed:
        return "fed"
    if state.design_freq_hz is None:
        return "forced"
    if any(math.isclose(freq_hz, f, rel_tol=1e-9) for f in state.forced_freqs_hz):
        return "forced"
    return "as-built"


@functools.lru_cache(maxsize=256)
def state_network(spec: ArraySpec, option: ArrayOption, state: State) -> Network:
    """The network that realises a forced state, designed on its design band (cached).

    Lines from the option's junction (default the centroid), each at least
    its run plus ``spec.line_slack_m``; see :mod:`lobeplan.antenna.network`.
    """
    if state.design_freq_hz is None or state.is_fed:
        raise ValueError(f"state {state.name!r} has no network to design")
    f = state.design_freq_hz
    z = base_impedance_ohm(spec, option, f)
    return design_network(z, spec.feed, f, state_currents(state, option.n_elements), option.positions_m,
                          option.junction_point_m, spec.line_slack_m)


def element_solution(spec: ArraySpec, positions_m, freq_hz: float) -> CoupledElements | ElevatedArray:
    """The moment-method solution of the array's elements at ``positions_m`` on one frequency (cached).

    Over buried radials, or a given loss, the monopoles stand on a perfect
    plane (:func:`lobeplan.antenna.mom.solve_elements`); with elevated
    radials every element, its hub and its radials are wires in one solution
    over the soil (:func:`lobeplan.antenna.elevated.solve_elevated_array`), so
    the radials set the base impedances, the coupling and the far field.
    """
    r = spec.radials
    if r is not None and not r.buried:
        return solve_elevated_array(spec.height_m, spec.radius_m, r.height_m, r.count, r.length_m,
                                    0.5e-3 * r.wire_diameter_mm, positions_m, freq_hz, spec.ground)
    return solve_elements(spec.height_m, spec.radius_m, positions_m, freq_hz)


def coupled_elements(spec: ArraySpec, option: ArrayOption, freq_hz: float) -> CoupledElements | ElevatedArray:
    """The moment-method solution for an option on one frequency (cached); see :func:`element_solution`."""
    return element_solution(spec, option.positions_m, freq_hz)


def element_impedance_ohm(spec: ArraySpec, freq_hz: float) -> complex:
    """Base impedance of one element alone on its ground system, without the series ground loss."""
    return complex(element_solution(spec, ((0.0, 0.0),), freq_hz).impedance_ohm[0, 0])


def state_currents(state: State, n_elements: int) -> np.ndarray:
    """Relative forced base currents of a ``phase_deg`` state, shape (n_el,)."""
    if state.phase_deg is None:
        raise ValueError(f"state {state.name!r} has no phase_deg")
    phase = np.radians(np.asarray(state.phase_deg, dtype=float))
    amp = np.ones(phase.shape) if state.amplitude is None else np.asarray(state.amplitude, dtype=float)
    if phase.shape != (n_elements,) or amp.shape != (n_elements,):
        raise ValueError(f"state {state.name!r}: need one phase and amplitude per element ({n_elements})")
    return amp * np.exp(1j * phase)


def state_drive(spec: ArraySpec, option: ArrayOption, state: State, freq_hz: float,
                sol: CoupledElements | None = None, designed_on: ArraySpec | None = None) -> Drive:
    """Solve one state's drive (forced or fed) for 1 W input.

    ``designed_on`` is the array an as-built state's network was cut for
    (default ``spec``): give the site's own to see what another ground does
    to the currents the network it has delivers.
    """
    if sol is None:
        sol = coupled_elements(spec, option, freq_hz)
    n = sol.n_elements
    z_base = base_impedance_ohm(spec, option, freq_hz, sol)
    if state.is_fed:
        if len(state.line_m) != n:
            raise ValueError(f"state {state.name!r}: need one line per element ({n})")
        return drive_fed(z_base, spec.feed, freq_hz, state.line_m)
    if n > 1 and state_kind(state, freq_hz) == "as-built":
        net = state_network(spec if designed_on is None else designed_on, option, state)
        return network_drive(z_base, spec.feed, net, freq_hz)
    return drive_forced(z_base, state_currents(state, n))


@functools.lru_cache(maxsize=128)
def _vertical_kernel(freq_hz: float, segment_m: float, n_node: int, ground: Ground) -> np.ndarray:
    """Map node currents -> vertical factor, shape (91, n_node).

    F(psi) = cos(psi) int_0^h I(z) [exp(j k z sin psi) + Rv(psi) exp(-j k z sin psi)] dz,
    each piecewise-sinusoidal triangle integrated in closed form.
    """
    k = 2.0 * math.pi * freq_hz / C0_M_S
    d = segment_m
    beta = k * _SIN_EL
    skd = math.sin(k * d)
    sp = np.sinc((k + beta) * d / (2 * math.pi))
    sm = np.sinc((k - beta) * d / (2 * math.pi))
    full = k * d * d * sp * sm / skd                        # int of a whole triangle * cos(beta u)
    half_sin = (d * np.cos((k - beta) * d / 2) * sp - d * np.cos((k + beta) * d / 2) * sm) / (2 * skd)
    z = np.arange(n_node) * d
    up = np.exp(1j * beta[:, None] * z[None, :]) * full[:, None]
    down = np.conj(up)
    up[:, 0] = 0.5 * full + 1j * half_sin                   # the base triangle: upper half only
    down[:, 0] = 0.5 * full - 1j * half_sin
    rv = reflection_vertical(ground, freq_hz, ELEVATION_DEG)
    kern = _COS_EL[:, None] * (up + rv[:, None] * down)
    kern.flags.writeable = False
    return kern


@functools.lru_cache(maxsize=32)
def _array_phase(freq_hz: float, positions: tuple[tuple[float, float], ...]) -> np.ndarray:
    """Horizontal phase of each element over the grid, shape (n_el, 91, 360) (cached)."""
    k = 2.0 * math.pi * freq_hz / C0_M_S
    pos = np.asarray(positions, dtype=float).reshape(-1, 2)
    proj = pos[:, 0, None] * _COS_AZ[None, :] + pos[:, 1, None] * _SIN_AZ[None, :]  # (n_el, 360)
    phase = np.exp(1j * k * _COS_EL[None, :, None] * proj[:, None, :])
    phase.flags.writeable = False
    return phase


def gain_from_currents_dbi(sol: CoupledElements, ground: Ground, base_current_a: np.ndarray,
                           input_power_w: float) -> np.ndarray:
    """Gain over the grid for given base currents and input power.

    Parameters
    ----------
    sol : CoupledElements
    ground : Ground
        Far-field ground (the near field is the perfect plane, or with
        elevated radials the soil as the wires' solution sees it).
    base_current_a : ndarray of complex, shape (n_el,)
    input_power_w : float

    Returns
    -------
    ndarray, shape (91, 360)
        dBi in the array frame, floored at -60 dBi.
    """
    return gains_from_currents_dbi(sol, (ground,), base_current_a, input_power_w)[0]


def gains_from_currents_dbi(sol: CoupledElements | ElevatedArray, grounds, base_current_a: np.ndarray,
                            input_power_w: float) -> np.ndarray:
    """:func:`gain_from_currents_dbi` for several far-field grounds at once.

    The array factor is shared; only the vertical factor (the Fresnel
    reflection) differs per ground. Returns ndarray, shape (n_ground, 91, 360).
    With elevated radials the wires' radiation vectors are shared and each
    ground reflects their vertical part by R_v and their horizontal part by
    R_h (:func:`_wire_fields`).
    """
    k = 2.0 * math.pi * sol.freq_hz / C0_M_S
    if isinstance(sol, ElevatedArray):
        i = np.asarray(base_current_a, dtype=complex)
        fields = [(i @ _ground_vectors(sol, g)).reshape(2, ELEVATION_DEG.size, AZIMUTH_DEG.size) for g in grounds]
        power = np.stack([f.real ** 2 + f.imag ** 2 for f in fields]).sum(axis=1)
    else:
        nodes = sol.currents_on_wires(base_current_a)                       # (n_el, n_node)
        vert = np.stack([nodes @ _vertical_kernel(sol.freq_hz, sol.segment_m, sol.node_z_m.size, g).T
                         for g in grounds])                                 # (n_ground, n_el, 91)
        phase = _array_phase(sol.freq_hz, tuple(map(tuple, sol.positions_m)))
        field = np.einsum("gep,epa->gpa", vert, phase)
        power = field.real ** 2 + field.imag ** 2
    gain = ETA0_OHM * k * k * power / (8.0 * math.pi * input_power_w)
    floor = 10.0 ** (GAIN_FLOOR_DBI / 10.0)
    return 10.0 * np.log10(np.maximum(gain, floor))


@functools.lru_cache(maxsize=16)
def _grid_vectors(sol: ElevatedArray) -> tuple[np.ndarray, ...]:
    """Radiation vectors of every port over the whole grid (cached per solution)."""
    out = radiation_vectors(sol, ELEVATION_DEG, AZIMUTH_DEG)
    for a in out:
        a.flags.writeable = False
    return out


@functools.lru_cache(maxsize=32)
def _ground_vectors(sol: ElevatedArray, ground: Ground) -> np.ndarray:
    """Per port, the vertical and horizontal far field over the grid with this ground's reflection.

    Shape (n_port, 2 * 91 * 360): [v_dir + R_v v_img, h_dir - R_h h_img], so a
    pattern is one product with the base currents (cached per solution and ground).
    """
    v_dir, v_img, h_dir, h_img = _grid_vectors(sol)
    rv = reflection_vertical(ground, sol.freq_hz, ELEVATION_DEG)[None, :, None]
    rh = reflection_horizontal(ground, sol.freq_hz, ELEVATION_DEG)[None, :, None]
    out = np.stack([v_dir + rv * v_img, h_dir - rh * h_img], axis=1).reshape(v_dir.shape[0], -1)
    out.flags.writeable = False
    return out


def _wire_power(sol: ElevatedArray, grounds, base_current_a, vectors, elevation_deg) -> np.ndarray:
    """|N_theta|^2 + |N_phi|^2 of the wires with each ground's reflection, shape (n_ground, n_el_dir, n_az).

    ``vectors`` are :func:`lobeplan.antenna.elevated.radiation_vectors` at
    the elevations ``elevation_deg``.

    Direct plus image, the image's vertical part times R_v and its
    horizontal part times -R_h (see :func:`lobeplan.antenna.elevated.radiation_vectors`).
    """
    i = np.asarray(base_current_a, dtype=complex)
    vd, vi, hd, hi = (np.tensordot(i, v, axes=1) for v in vectors)          # (n_el_dir, n_az) each
    out = []
    for g in grounds:
        rv = reflection_vertical(g, sol.freq_hz, elevation_deg)[:, None]
        rh = reflection_horizontal(g, sol.freq_hz, elevation_deg)[:, None]
        ev = vd + rv * vi
        eh = hd - rh * hi
        out.append(ev.real ** 2 + ev.imag ** 2 + eh.real ** 2 + eh.imag ** 2)
    return np.stack(out)


@functools.lru_cache(maxsize=256)
def _toward_vectors(sol: ElevatedArray, elevation_index: int, azimuth_deg: tuple[float, ...]) -> tuple:
    """Radiation vectors at one elevation row toward a few azimuths (cached: searches ask again and again)."""
    out = radiation_vectors(sol, ELEVATION_DEG[elevation_index:elevation_index + 1], np.asarray(azimuth_deg))
    for a in out:
        a.flags.writeable = False
    return out


def gain_toward_dbi(sol: CoupledElements | ElevatedArray, ground: Ground, base_current_a: np.ndarray,
                    input_power_w: float, elevation_index: int, azimuth_deg) -> np.ndarray:
    """Gain at one elevation row toward a few azimuths (array frame), dBi.

    The same far field as :func:`gain_from_currents_dbi`, evaluated only where
    asked (for tolerance searches that need the front and the back only).

    Returns
    -------
    ndarray, shape (n_az,), floored at -60 dBi.
    """
    k = 2.0 * math.pi * sol.freq_hz / C0_M_S
    if isinstance(sol, ElevatedArray):
        el = ELEVATION_DEG[elevation_index:elevation_index + 1]
        az = tuple(float(a) for a in np.atleast_1d(np.asarray(azimuth_deg, dtype=float)))
        power = _wire_power(sol, (ground,), base_current_a, _toward_vectors(sol, int(elevation_index), az), el)[0, 0]
    else:
        nodes = sol.currents_on_wires(base_current_a)
        kern = _vertical_kernel(sol.freq_hz, sol.segment_m, sol.node_z_m.size, ground)[elevation_index]
        vert = nodes @ kern                                                   # (n_el,)
        az = np.radians(np.atleast_1d(np.asarray(azimuth_deg, dtype=float)))
        pos = sol.positions_m
        proj = pos[:, 0, None] * np.cos(az)[None, :] + pos[:, 1, None] * np.sin(az)[None, :]
        field = (vert[:, None] * np.exp(1j * k * _COS_EL[elevation_index] * proj)).sum(axis=0)
        power = np.abs(field) ** 2
    gain = ETA0_OHM * k * k * power / (8.0 * math.pi * input_power_w)
    return 10.0 * np.log10(np.maximum(gain, 10.0 ** (GAIN_FLOOR_DBI / 10.0)))


def array_pattern(spec: ArraySpec, option: ArrayOption, state: State, freq_hz: float,
                  designed_on: ArraySpec | None = None) -> ArrayResult:
    """Gain pattern and drive of one switch state of one option on one band.

    Parameters
    ----------
    spec : ArraySpec
    option : ArrayOption
    state : State
        Fed states are solved through their lines at ``freq_hz``. Forced
        states with a design band are solved through the network designed
        there (coupling, line loss and the fixed parts: "as built"), except
        on their ``forced_freqs_hz``, where the forced currents hold.
    freq_hz : float
    designed_on : ArraySpec, optional
        The array the networks were designed on (default ``spec``); see
        :func:`state_drive`.

    Returns
    -------
    ArrayResult
        ``gain_dbi`` has shape (91, 360) in the array frame, referred to the
        input power (ground loss and line loss included).

    References
    ----------
    Balanis, *Antenna Theory*, 3rd ed., sec. 4.7 and 6.2; currents from the
    moment method of :mod:`lobeplan.antenna.mom`.
    """
    sol = coupled_elements(spec, option, freq_hz)
    drive = state_drive(spec, option, state, freq_hz, sol, designed_on)
    kind = "forced" if option.n_elements == 1 and not state.is_fed else state_kind(state, freq_hz)
    i = drive.base_current_a
    ground_loss_w = 0.5 * float(np.sum(ground_loss(spec, option, freq_hz).ohm * np.abs(i) ** 2))
    gain = gain_from_currents_dbi(sol, spec.ground, i, 1.0)
    for a in (gain, i, drive.feed_impedance_ohm, drive.element_power_w):
        a.flags.writeable = False
    return ArrayResult(freq_hz=float(freq_hz), option_name=option.name, state_name=state.name,
                       gain_dbi=gain, base_current_a=i, feed_impedance_ohm=drive.feed_impedance_ohm,
                       element_power_w=drive.element_power_w,
                       junction_impedance_ohm=drive.junction_impedance_ohm,
                       line_loss_w=drive.line_loss_w, ground_loss_w=ground_loss_w,
                       impedance_matrix_ohm=sol.impedance_ohm,
                       kind=kind, design_band=state.design_band if kind == "as-built" else None)


def vertical_gain_dbi(spec: ArraySpec, freq_hz: float, far_ground: Ground | None = None) -> np.ndarray:
    """Elevation pattern of one vertical of the same height, radius and ground.

    Omnidirectional; ground loss in series at its base as for the array (its
    own radials, no neighbours). ``far_ground`` replaces ``spec.ground`` in
    the far-field reflection only (a foreground class). With elevated
    radials the element's few radials make the pattern slightly unround: the
    power mean over azimuth is taken.

    Returns
    -------
    ndarray, shape (91,)
        dBi at elevations 0..90 deg, floored at -60 dBi.
    """
    sol = element_solution(spec, ((0.0, 0.0),), freq_hz)
    r_in = float(sol.impedance_ohm[0, 0].real) + float(ground_loss(spec, None, freq_hz).ohm[0])
    i = np.array([math.sqrt(2.0 / r_in)], dtype=complex)  # 1 W input
    g = spec.ground if far_ground is None else far_ground
    if isinstance(sol, ElevatedArray):
        lin = 10.0 ** (gains_from_currents_dbi(sol, (g,), i, 1.0)[0] / 10.0)
        return np.maximum(10.0 * np.log10(np.mean(lin, axis=1)), GAIN_FLOOR_DBI)
    k = 2.0 * math.pi * freq_hz / C0_M_S
    kern = _vertical_kernel(sol.freq_hz, sol.segment_m, sol.node_z_m.size, g)
    vert = sol.currents_on_wires(i)[0] @ kern.T
    gain = ETA0_OHM * k * k * np.abs(vert) ** 2 / (8.0 * math.pi)
    return 10.0 * np.log10(np.maximum(gain, 10.0 ** (GAIN_FLOOR_DBI / 10.0)))


def _crossing(row: np.ndarray, start: int, level: float, step: int) -> float | None:
    """Degrees from ``start`` to where ``row`` first drops below ``level``."""
    n = row.size
    prev = row[start]
    for off in range(1, n):
        cur = row[(start + step * off) % n]
        if cur < level:
            return off - 1 + (prev - level) / (prev - cur)
        prev = cur
    return None


def pattern_figures(gain_dbi: np.ndarray) -> dict:
    """Figures of one pattern on the grid (azimuths in the frame of the input).

    Parameters
    ----------
    gain_dbi : ndarray, shape (91, 360)

    Returns
    -------
    dict
        ``peak_gain_dbi``, ``peak_azimuth_deg``, ``peak_elevation_deg``;
        ``front_to_back_db``: peak against the opposite bearing at the peak
        elevation; ``front_to_rear_db``: peak against the strongest direction
        of the rear 120 deg (opposite bearing +-60 deg) at the peak elevation;
        ``beamwidth_deg``: width of the -3 dB azimuth arc around the peak at the
        peak elevation, None if the row never drops 3 dB (omnidirectional).
        Ratios are capped at 60 dB.
    """
    g = np.asarray(gain_dbi, dtype=float)
    # gains equal to 1e-6 dB count as equal, so twin beams pick the same one on every machine
    el, az = np.unravel_index(int(np.argmax(np.round(g / _TIE_DB))), g.shape)
    row = g[el]
    peak = float(row[az])
    n = row.size
    back = float(row[(az + n // 2) % n])
    rear_idx = (az + n // 2 + np.arange(-60, 61)) % n
    rear = float(np.max(row[rear_idx]))
    left = _crossing(row, az, peak - 3.0, -1)
    right = _crossing(row, az, peak - 3.0, +1)
    width = None if left is None or right is None else float(left + right)
    return {
        "peak_gain_dbi": peak,
        "peak_azimuth_deg": float(AZIMUTH_DEG[az]),
        "peak_elevation_deg": float(ELEVATION_DEG[el]),
        "front_to_back_db": float(min(peak - back, RATIO_CAP_DB)),
        "front_to_rear_db": float(min(peak - rear, RATIO_CAP_DB)),
        "beamwidth_deg": width,
    }


LOBE_WINDOW_DB = 1.0
"""A lobe is listed when its peak is within this of the row's strongest."""

_TIE_DB = 1e-6  # gains this close count as equal, so ties break the same on every machine


_STEP_MIN_DB = 0.1   # a drop this small next to a maximum is within a smooth lobe's top


def _is_step(g: np.ndarray, i: int, side: int) -> bool:
    """Whether the row falls from sample ``i`` toward ``side`` (-1, +1) as a step does, not as a lobe."""
    n = g.size
    first = g[i] - g[(i + side) % n]
    second = g[(i + side) % n] - g[(i + 2 * side) % n]
    return bool(first > _STEP_MIN_DB and second < 0.5 * first)


def lobe_bearings_deg(row_dbi: np.ndarray, within_db: float = LOBE_WINDOW_DB) -> tuple[tuple[float, float], ...]:
    """Every lobe of one circular azimuth row within ``within_db`` of its peak.

    Parameters
    ----------
    row_dbi : ndarray, shape (n,)
        Gain over n equally spaced azimuths 0, 360/n, ... (deg), circular.
    within_db : float
        Lobes whose peak is more than this below the row's peak are left out.

    Returns
    -------
    tuple of (azimuth_deg, peak_dbi)
        Strongest first; the azimuth is refined by a parabola through the
        three samples around each local maximum. Gains are compared after
        rounding to 1e-6 dB and equal lobes are ordered by azimuth, so twin
        beams come out in the same order on every machine. A row without
        any maximum (omnidirectional) has no lobe: ``()``. A maximum that is
        the high side of a step (a foreground sector's edge) is not a lobe,
        unless the row has nothing else.
    """
    g = np.asarray(row_dbi, dtype=float)
    n = g.size
    q = np.round(g / _TIE_DB)
    if n < 3 or q.max() == q.min():
        return ()
    step = 360.0 / n
    left, right = np.roll(q, 1), np.roll(q, -1)
    # a plateau of equal samples counts once, at its first sample
    peaks = np.flatnonzero((q > left) & (q >= right))
    # A foreground sector's edge is a step in the blended gain: the sample on
    # its high side is a local maximum without being a lobe. A smooth
    # maximum falls faster the further it goes (concave: the second drop at
    # least the first); a step falls once and then runs on nearly level.
    smooth = [i for i in peaks if not (_is_step(g, i, -1) or _is_step(g, i, +1))]
    if smooth or peaks.size == 0:
        peaks = np.asarray(smooth, dtype=int)
    else:  # only steps: the strongest still marks where the beam is
        peaks = peaks[[int(np.argmax(g[peaks]))]]
    # the window is measured from the strongest lobe kept (a step's high side may stand above it)
    top = float(np.max(g[peaks])) if peaks.size else float(np.max(g))
    out = []
    for i in peaks:
        if g[i] < top - within_db - _TIE_DB:
            continue
        lo, c, hi = g[(i - 1) % n], g[i], g[(i + 1) % n]
        curv = lo - 2.0 * c + hi
        off = 0.0 if curv >= 0.0 else float(np.clip(0.5 * (lo - hi) / curv, -0.5, 0.5))
        out.append((round(float((i + off) * step) % 360.0, 6), float(c)))
    out.sort(key=lambda lobe: (-round(lobe[1] / _TIE_DB), lobe[0]))
    return tuple(out)
