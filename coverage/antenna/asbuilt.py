"""What a designed switch network really gives: band centre and edges, cut tolerance, part stress.

For a forced state with a design band, the network of
:func:`lobeplan.antenna.pattern.state_network` is solved with the coupled
elements at any frequency. Figures (defined here, printed by ``feed``):

- forward gain: dBi toward the wanted pattern's peak (azimuth and
  elevation of the forced currents on the design band), referred to the
  power into the junction;
- front-to-back: that gain against the opposite bearing at the same
  elevation (capped at 60 dB);
- SWR: on a 50 ohm line at the transmitter side of the junction's match,
  whose parts are fixed at their design-band values;
- cut tolerance: the smallest error in the length of any one line (cm), or
  common error of the cable's velocity factor (%), that costs 3 dB of
  front-to-back on the design band. None when the state has under 6 dB of
  front-to-back to lose (broadside and omnidirectional states), or when no
  error up to 2.5 m (25 %) costs that much.

References
----------
Sensitivity of phased-array feeds to line length: common practice (a few
cm at 7 MHz matter); computed here by bisection on the coupled model.
"""
from __future__ import annotations

import functools
from dataclasses import dataclass, replace

import numpy as np

from .feed import drive_forced, l_network_input_ohm, swr
from .model import ArrayOption, ArraySpec, State
from .network import Network, PartStress, network_drive, part_stress
from .pattern import (RATIO_CAP_DB, base_impedance_ohm, coupled_elements, gain_from_currents_dbi,
                      gain_toward_dbi, state_currents, state_network)

__all__ = ["BandCheck", "NetworkCheck", "check_network", "cut_tolerance", "FB_LOSS_DB"]

FB_LOSS_DB = 3.0
_MIN_FB_DB = 6.0
_MAX_LENGTH_ERROR_M = 2.5
_MAX_VF_ERROR = 0.25


@dataclass(frozen=True, slots=True)
class BandCheck:
    """The network solved at one frequency (1 W into the junction)."""

    freq_hz: float
    base_current_a: tuple[complex, ...]
    forward_gain_dbi: float
    front_to_back_db: float
    swr: float | None


@dataclass(frozen=True, slots=True)
class NetworkCheck:
    network: Network
    front_azimuth_deg: float      # array frame
    front_elevation_deg: float
    checks: tuple[BandCheck, ...]
    tolerance_cm: float | None
    tolerance_vf_pct: float | None
    stress: tuple[PartStress, ...]
    tolerance_cm_by_line: tuple[float | None, ...] = ()


def _front(spec, option, state):
    f = state.design_freq_hz
    sol = coupled_elements(spec, option, f)
    d = drive_forced(base_impedance_ohm(spec, option, f, sol), state_currents(state, option.n_elements))
    g = gain_from_currents_dbi(sol, spec.ground, d.base_current_a, 1.0)
    el, az = np.unravel_index(int(np.argmax(g)), g.shape)
    return int(el), float(az)


def _rear_null_deg(spec, option, state, el: int, az: float) -> float:
    """Frame azimuth of the wanted pattern's weakest direction in the rear half
    (within 90 deg of the back), at the beam's takeoff angle.

    A cardioid's is the back itself; a pair whose beam splits in two (3/8
    wavelength, 0/-45 deg) has its null along the baseline instead, and that
    null is what mis-cut lines destroy.
    """
    f = state.design_freq_hz
    sol = coupled_elements(spec, option, f)
    d = drive_forced(base_impedance_ohm(spec, option, f, sol), state_currents(state, option.n_elements))
    rear = (az + 180.0 + np.arange(-90.0, 91.0)) % 360.0
    g = gain_toward_dbi(sol, spec.ground, d.base_current_a, 1.0, el, rear)
    return float(rear[int(np.argmin(g))])


def _fb(spec, option, net, freq_hz, el, az, feed=None, rear_az=None):
    sol = coupled_elements(spec, option, freq_hz)
    drive = network_drive(base_impedance_ohm(spec, option, freq_hz, sol), feed or spec.feed, net, freq_hz)
    back = az + 180.0 if rear_az is None else rear_az
    g = gain_toward_dbi(sol, spec.ground, drive.base_current_a, 1.0, el, [az, back])
    return drive, float(g[0]), float(min(g[0] - g[1], RATIO_CAP_DB))


def _smallest(cost, limit: float) -> float | None:
    """Smallest x in (0, limit] with cost(x) >= FB_LOSS_DB (cost(0) = 0), by doubling and bisection."""
    x = limit / 512.0
    lo = 0.0
    while x <= limit:
        if cost(x) >= FB_LOSS_DB:
            hi = x
            for _ in range(10):
                mid = 0.5 * (lo + hi)
                if cost(mid) >= FB_LOSS_DB:
                    hi = mid
                else:
                    lo = mid
            return hi
        lo, x = x, 2.0 * x
    return None


@functools.lru_cache(maxsize=128)
def cut_tolerance(spec: ArraySpec, option: ArrayOption, state: State):
    """(cm of the most sensitive line, % of velocity factor, cm of each line) that cost
    3 dB of the rear null (cached).

    The ratio watched is the beam's gain over the wanted pattern's weakest
    direction in the rear half (see :func:`_rear_null_deg`), at the beam's
    takeoff angle: the back itself for a cardioid. None where that ratio is
    under 6 dB or no error in the searched range (2.5 m, 25 %) costs 3 dB.
    """
    net = state_network(spec, option, state)
    f0 = state.design_freq_hz
    el, az = _front(spec, option, state)
    rear = _rear_null_deg(spec, option, state, el, az)
    _, _, fb0 = _fb(spec, option, net, f0, el, az, rear_az=rear)
    if fb0 < _MIN_FB_DB:
        return None, None, tuple(None for _ in net.branches)

    def line_cost(dx, e, sign):
        br = list(net.branches)
        br[e] = replace(br[e], line_m=max(br[e].line_m + sign * dx, 0.0))
        return fb0 - _fb(spec, option, replace(net, branches=tuple(br)), f0, el, az, rear_az=rear)[2]

    per_line = []
    for e in range(len(net.branches)):
        both = [_smallest(lambda dx, e=e, sg=sg: line_cost(dx, e, sg), _MAX_LENGTH_ERROR_M) for sg in (1.0, -1.0)]
        both = [x for x in both if x is not None]
        per_line.append(100.0 * min(both) if both else None)
    found = [x for x in per_line if x is not None]
    tol_cm = min(found) if found else None

    def vf_cost(eps, sign):
        feed = replace(spec.feed, velocity_factor=spec.feed.velocity_factor * (1.0 + sign * eps))
        return fb0 - _fb(spec, option, net, f0, el, az, feed, rear_az=rear)[2]

    found = [_smallest(lambda e, sg=sg: vf_cost(e, sg), _MAX_VF_ERROR) for sg in (1.0, -1.0)]
    found = [x for x in found if x is not None]
    return tol_cm, (100.0 * min(found) if found else None), tuple(per_line)


def check_network(spec: ArraySpec, option: ArrayOption, state: State, freqs_hz, power_w: float = 100.0
                  ) -> NetworkCheck:
    """Solve a forced state's network at ``freqs_hz`` and find its cut tolerance.

    Parameters
    ----------
    spec, option, state
        ``state`` must be a forced state with a design band.
    freqs_hz : sequence of float
        Usually the band's lower edge, centre and upper edge.
    power_w : float
        Power into the junction for the part stress, which is computed at
        the middle entry of ``freqs_hz`` (the band centre).

    Returns
    -------
    NetworkCheck
    """
    net = state_network(spec, option, state)
    f0 = state.design_freq_hz
    el, az = _front(spec, option, state)
    checks = []
    for f in freqs_hz:
        drive, fwd, fb = _fb(spec, option, net, f, el, az)
        s = None
        if net.match is not None:
            s = float(min(swr(l_network_input_ohm(net.match, f, drive.junction_impedance_ohm)), 1e6))
        checks.append(BandCheck(float(f), tuple(complex(x) for x in drive.base_current_a), fwd, fb, s))
    tol_cm, tol_vf, tol_lines = cut_tolerance(spec, option, state)
    # the parts' stress on the band asked about (its centre: the middle frequency)
    f_mid = float(list(freqs_hz)[len(list(freqs_hz)) // 2]) if len(list(freqs_hz)) else f0
    stress = part_stress(base_impedance_ohm(spec, option, f_mid), spec.feed, net, f_mid, power_w)
    return NetworkCheck(net, az, float(el), tuple(checks), tol_cm, tol_vf, stress, tol_lines)
