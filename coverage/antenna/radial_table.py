"""What more copper buys: loss, efficiency and gain against radial count and length.

For one option on one band, every (count, length) of buried radials is put in
place of the site's ground system; the loss per base comes from
:func:`lobeplan.antenna.radials.radial_loss_ohm`, the option's reference state
(its first forced-current state, else its first state) is solved again, and
its gain toward the beam of the site's own system is compared with the site's
own. The array stays as built: fed states keep their lines and as-built
states keep the network designed on the site's own ground (it is not cut
again for each radial system), so their true currents and front-to-back move
with the loss, because the loss changes every base impedance.

References
----------
Loss model: see :mod:`lobeplan.antenna.radials` (Wait and Pope; Monteath).
Measurements the trend follows: Brown, Lewis and Epstein, Proc. IRE 25, 1937.
"""
from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np

from .model import ArrayOption, ArraySpec, Radials
from .mom import C0_M_S
from .pattern import array_pattern, pattern_figures, state_kind
from .radials import ground_loss

__all__ = ["TABLE_COUNTS", "TABLE_LENGTHS_WAVELENGTHS", "DEFAULT_DEPTH_M", "FedChange", "RadialRow",
           "RadialTable", "reference_state", "radial_table"]

TABLE_COUNTS = (4, 8, 16, 32, 64, 120)
TABLE_LENGTHS_WAVELENGTHS = (0.1, 0.2, 0.3)
DEFAULT_DEPTH_M = 0.1       # common practice: radials a few centimetres to a hand's depth down
DEFAULT_WIRE_DIAMETER_MM = 2.0


@dataclass(frozen=True, slots=True)
class FedChange:
    """A fed or as-built state's true currents and front-to-back with one radial system."""

    state: str
    base_current_a: tuple[complex, ...]   # for 1 W into the junction
    front_to_back_db: float


@dataclass(frozen=True, slots=True)
class RadialRow:
    """One radial system in the table.

    ``loss_ohm`` is per base (mean over the elements), ``copper_loss_ohm`` the
    part of it in the radial wires' copper (the rest is the soil's); ``efficiency`` the share
    of the power into the bases that is not lost in the ground (reference
    state); ``gain_change_db`` its gain toward the beam against the site's own
    ground system.
    """

    count: int
    length_wavelengths: float
    length_m: float
    loss_ohm: float
    efficiency: float
    gain_change_db: float
    fed: tuple[FedChange, ...]
    copper_loss_ohm: float = 0.0


@dataclass(frozen=True, slots=True)
class RadialTable:
    freq_hz: float
    option_name: str
    state_name: str
    depth_m: float
    wire_diameter_mm: float
    beam_azimuth_deg: float        # array frame
    beam_elevation_deg: float
    site_loss_ohm: float
    site_efficiency: float
    site_fed: tuple[FedChange, ...]
    rows: tuple[RadialRow, ...]
    site_copper_loss_ohm: float | None = None   # None: the site's loss is given, or elevated radials


def reference_state(option: ArrayOption):
    """The state the table's gain refers to: the first forced one, else the first."""
    for s in option.states:
        if not s.is_fed:
            return s
    return option.states[0]


def _efficiency(res) -> float:
    base_w = 1.0 - res.line_loss_w
    return float(1.0 - res.ground_loss_w / base_w) if base_w > 0 else 0.0


def _fed(spec, option, freq_hz, designed_on=None, solved=None) -> tuple[FedChange, ...]:
    """Every state whose currents follow the ground: its lines or its network as built on ``designed_on``."""
    out = []
    for s in option.states:
        kind = state_kind(s, freq_hz)
        if kind == "fed" or (kind == "as-built" and option.n_elements > 1):
            res = solved if solved is not None and solved.state_name == s.name else \
                array_pattern(spec, option, s, freq_hz, designed_on)
            out.append(FedChange(s.name, tuple(complex(i) for i in res.base_current_a),
                                 pattern_figures(res.gain_dbi)["front_to_back_db"]))
    return tuple(out)


def radial_table(spec: ArraySpec, option: ArrayOption, freq_hz: float,
                 counts=TABLE_COUNTS, lengths_wavelengths=TABLE_LENGTHS_WAVELENGTHS) -> RadialTable:
    """Loss, efficiency and gain change for every (count, length) of buried radials.

    Parameters
    ----------
    spec : ArraySpec
        The site's array; its soil is used, its depth and wire (if it has
        buried radials; otherwise 0.1 m and 2 mm).
    option : ArrayOption
    freq_hz : float
    counts : sequence of int
    lengths_wavelengths : sequence of float

    Returns
    -------
    RadialTable
        Rows count-major (every length of the first count first).
    """
    wavelength_m = C0_M_S / freq_hz
    own = spec.radials if spec.radials is not None and spec.radials.buried else None
    depth = own.depth_m if own is not None else DEFAULT_DEPTH_M
    wire = own.wire_diameter_mm if own is not None else DEFAULT_WIRE_DIAMETER_MM
    state = reference_state(option)
    base = array_pattern(spec, option, state, freq_hz)
    el, az = np.unravel_index(int(np.argmax(base.gain_dbi)), base.gain_dbi.shape)

    rows = []
    for n in counts:
        for frac in lengths_wavelengths:
            length_m = float(frac) * wavelength_m
            alt = replace(spec, ground_loss_ohm=None, radials=Radials(int(n), length_m, depth, None, wire))
            res = array_pattern(alt, option, state, freq_hz, designed_on=spec)
            loss = ground_loss(alt, option, freq_hz)
            rows.append(RadialRow(int(n), float(frac), length_m, float(np.mean(loss.ohm)), _efficiency(res),
                                  float(res.gain_dbi[el, az] - base.gain_dbi[el, az]),
                                  _fed(alt, option, freq_hz, spec, res), float(np.mean(loss.copper_ohm))))
    site_loss = ground_loss(spec, option, freq_hz)
    return RadialTable(float(freq_hz), option.name, state.name, float(depth), float(wire), float(az), float(el),
                       float(np.mean(site_loss.ohm)), _efficiency(base),
                       _fed(spec, option, freq_hz, None, base), tuple(rows),
                       None if site_loss.copper_ohm is None else float(np.mean(site_loss.copper_ohm)))
