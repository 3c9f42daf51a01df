"""`lobeplan feed`: coupling, true currents, feed-point impedances, line design, match."""
from __future__ import annotations

import math

import numpy as np

from ..antenna.feed import (design_l_network, design_line_lengths, drive_fed, l_network_input_ohm,
                            quarter_wave_forcing, swr)
from ..antenna.pattern import coupled_elements, state_currents, state_drive
from .pattern import current_rows, pair, select_bands

__all__ = ["add_arguments", "build", "format_text"]

_EDGE_FRACTION = 0.015


def add_arguments(parser) -> None:
    parser.add_argument("--band", metavar="B", default=None, help="only this band (its name in the site file)")


def _edges(band):
    if band.edges_hz is not None:
        lo, hi = band.edges_hz
    else:
        lo, hi = band.freq_hz * (1 - _EDGE_FRACTION), band.freq_hz * (1 + _EDGE_FRACTION)
    return [lo, band.freq_hz, hi]


def _part(c) -> dict:
    return {"part": "L", "uh": round(c.value, 4)} if c.kind == "L" else {"part": "C", "pf": round(c.value, 2)}


def _junction(spec, option, line_m, freq_hz):
    sol = coupled_elements(spec, option, freq_hz)
    z = sol.impedance_ohm + spec.ground_loss_ohm * np.eye(sol.n_elements)
    return drive_fed(z, spec.feed, freq_hz, line_m).junction_impedance_ohm


def _match(spec, option, line_m, band) -> dict:
    """L-network to 50 ohm at the band centre and the SWR it leaves at the edges."""
    z_j = _junction(spec, option, line_m, band.freq_hz)
    net = design_l_network(z_j, band.freq_hz, 50.0)
    rows = []
    for f in _edges(band):
        z_in = l_network_input_ohm(net, f, _junction(spec, option, line_m, f))
        rows.append({"freq_mhz": round(f / 1e6, 4), "swr": round(float(min(swr(z_in), 1e6)), 3)})
    return {"junction_impedance_ohm": pair(z_j), "series": _part(net.series), "shunt": _part(net.shunt),
            "shunt_at": "junction" if net.shunt_at_load else "transmitter", "q": round(net.q, 3),
            "swr": rows}


def _state_row(spec, option, state, band) -> dict:
    d = state_drive(spec, option, state, band.freq_hz)
    row = {
        "state": state.name,
        "kind": "fed" if state.is_fed else "forced",
        "element_currents": current_rows(d.base_current_a),
        "current_a_per_w": [round(float(abs(i)), 4) for i in d.base_current_a],
        "feedpoint_impedance_ohm": [pair(z) for z in d.feed_impedance_ohm],
        "element_power_w": [round(float(p), 4) for p in d.element_power_w],
        "junction_impedance_ohm": None if d.junction_impedance_ohm is None else pair(d.junction_impedance_ohm),
        "line_loss_w": round(d.line_loss_w, 4),
        "match": None,
    }
    if state.is_fed and not option.receive:  # a receive option needs no transmitter match
        row["match"] = _match(spec, option, state.line_m, band)
    return row


def _design(spec, option, band) -> dict:
    sol = coupled_elements(spec, option, band.freq_hz)
    n = sol.n_elements
    z = sol.impedance_ohm + spec.ground_loss_ohm * np.eye(n)
    pos = np.asarray(option.positions_m)
    # lines start at a junction at the centroid, so each must at least reach its element
    min_len = float(np.max(np.hypot(*(pos - pos.mean(axis=0)).T))) if n > 1 else 0.0
    wanted = [(s.name, state_currents(s, n)) for s in option.states if not s.is_fed]
    if not wanted and n == 2:
        wanted = [("equal, -90 deg", np.array([1.0, np.exp(-0.5j * math.pi)]))]
    lines = []
    for name, w in wanted:
        entry = {"state": name, "wanted_currents": current_rows(w), "line_m": None, "current_error": None,
                 "match": None}
        if n >= 2:
            d = design_line_lengths(z, spec.feed, band.freq_hz, w, min_length_m=min_len)
            if d is not None:
                entry["line_m"] = [round(x, 3) for x in d.line_m]
                entry["current_error"] = round(d.error, 5)
                if not option.receive:
                    entry["match"] = _match(spec, option, d.line_m, band)
        q = quarter_wave_forcing(spec.feed, band.freq_hz, w)
        entry["quarter_wave_forcing"] = {
            "quarter_wave_m": round(q.quarter_wave_m, 3),
            "input_voltage_v_per_a": [pair(v) for v in q.input_voltage_v],
            "common_junction_line_m": None if q.common_junction_line_m is None
            else [round(x, 3) for x in q.common_junction_line_m],
        }
        lines.append(entry)
    return {"min_line_m": round(min_len, 3), "lines": lines}


def build(site, args=None) -> dict:
    spec = site.array
    out = []
    for band in select_bands(site, getattr(args, "band", None)):
        for option in spec.options:
            sol = coupled_elements(spec, option, band.freq_hz)
            out.append({
                "band": band.name,
                "option": option.name,
                "use": option.use,
                "freq_mhz": round(band.freq_hz / 1e6, 6),
                "spacing_m": None if option.layout in ("single", "custom") else option.spacing_m,
                "ground_loss_ohm": spec.ground_loss_ohm,
                "impedance_matrix_ohm": [[pair(z) for z in row] for row in sol.impedance_ohm],
                "states": [_state_row(spec, option, s, band) for s in option.states],
                "design": _design(spec, option, band),
            })
    return {"bands": out}


def _z(p) -> str:
    return f"{p[0]:.1f}{p[1]:+.1f}j"


def _parts(m) -> str:
    if m is None:
        return "none (a receive option)"

    def one(c):
        return f"{c['uh']:.3f} uH" if c["part"] == "L" else f"{c['pf']:.0f} pF"
    swrs = ", ".join(f"{r['swr']:.2f} at {r['freq_mhz']:g}" for r in m["swr"])
    return (f"series {one(m['series'])}, shunt {one(m['shunt'])} at the {m['shunt_at']} side; "
            f"SWR {swrs} MHz")


def format_text(result: dict) -> str:
    lines = []
    for b in result["bands"]:
        sp = "" if b["spacing_m"] is None else f", spacing {b['spacing_m']:g} m"
        lines.append(f"== {b['band']} ({b['freq_mhz']:g} MHz{sp}); ground loss {b['ground_loss_ohm']:g} ohm "
                     "per base, not in the matrix")
        lines.append("coupled base impedances (ohm):")
        for row in b["impedance_matrix_ohm"]:
            lines.append("  " + "  ".join(f"{_z(p):>16}" for p in row))
        for s in b["states"]:
            cur = ", ".join(f"{c['amplitude']:.2f}/{c['phase_deg']:+.0f}" for c in s["element_currents"])
            zs = ", ".join(_z(p) for p in s["feedpoint_impedance_ohm"])
            pw = ", ".join(f"{p:.3f}" for p in s["element_power_w"])
            lines.append(f"  state {s['state']!r} ({s['kind']}): currents {cur}; feed points {zs} ohm; "
                         f"power {pw} W per W")
            if s["junction_impedance_ohm"] is not None:
                lines.append(f"    junction {_z(s['junction_impedance_ohm'])} ohm, line loss "
                             f"{s['line_loss_w']:.3f} W per W; match: {_parts(s['match'])}")
        for d in b["design"]["lines"]:
            if d["line_m"] is not None:
                lines.append(f"  lines for {d['state']!r}: " + ", ".join(f"{x:.2f}" for x in d["line_m"])
                             + f" m (current error {d['current_error']:.1e}); match: {_parts(d['match'])}")
            q = d["quarter_wave_forcing"]
            extra = ("" if q["common_junction_line_m"] is None else
                     "; from one junction: " + ", ".join(f"{x:.2f}" for x in q["common_junction_line_m"]) + " m")
            lines.append(f"    current forcing: lambda/4 of this cable is {q['quarter_wave_m']:.2f} m{extra}")
        lines.append("")
    return "\n".join(lines)
