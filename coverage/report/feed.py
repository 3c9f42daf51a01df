"""`lobeplan feed`: coupling, true currents, feed-point impedances, line design, match."""
from __future__ import annotations

import math

import numpy as np

from ..antenna.feed import (design_l_network, design_line_lengths, drive_fed, l_network_input_ohm,
                            quarter_wave_forcing, swr)
from ..antenna.pattern import coupled_elements, state_currents, state_drive
from ..antenna.radial_table import radial_table
from ..antenna.radials import ground_loss
from .ground import radials_json, system_text
from .pattern import current_rows, pair, select_bands

__all__ = ["add_arguments", "build", "format_text", "write_files", "radial_table_json"]

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
    return drive_fed(_z_base(spec, option, freq_hz), spec.feed, freq_hz, line_m).junction_impedance_ohm


def _z_base(spec, option, freq_hz):
    """Coupled base impedances with the ground loss of every base on the diagonal."""
    sol = coupled_elements(spec, option, freq_hz)
    return sol.impedance_ohm + np.diag(ground_loss(spec, option, freq_hz).ohm)


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
    z = _z_base(spec, option, band.freq_hz)
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
            loss = ground_loss(spec, option, band.freq_hz)
            out.append({
                "band": band.name,
                "option": option.name,
                "use": option.use,
                "freq_mhz": round(band.freq_hz / 1e6, 6),
                "spacing_m": None if option.layout in ("single", "custom") else option.spacing_m,
                "ground_loss_ohm": round(float(np.mean(loss.ohm)), 3),
                "ground_loss_source": loss.source,
                "ground_loss_per_element_ohm": [round(float(x), 3) for x in loss.ohm],
                "impedance_matrix_ohm": [[pair(z) for z in row] for row in sol.impedance_ohm],
                "states": [_state_row(spec, option, s, band) for s in option.states],
                "design": _design(spec, option, band),
                **radial_table_json(radial_table(spec, option, band.freq_hz)),
            })
    return {"bands": out, "radials": radials_json(spec)}


def write_files(site, args, result, out_dir) -> list:
    """The radial table as a figure, ``radials.png``."""
    from pathlib import Path

    from ..render.radials import draw_radial_table

    if not result["bands"]:
        return []
    return [draw_radial_table(result["bands"], Path(out_dir) / "radials.png")]


def _as_built(fed) -> list[dict]:
    return [{"state": f.state, "element_currents": current_rows(f.base_current_a),
             "front_to_back_db": round(f.front_to_back_db, 2)} for f in fed]


def radial_table_json(table) -> dict:
    """The radial table of one band and option, JSON-ready."""
    return {
        "radial_table": [{"count": r.count, "length_wavelengths": r.length_wavelengths,
                          "length_m": round(r.length_m, 2), "loss_ohm": round(r.loss_ohm, 3),
                          "efficiency": round(r.efficiency, 4), "gain_change_db": round(r.gain_change_db, 3),
                          "as_built": _as_built(r.fed)} for r in table.rows],
        "radial_table_reference": {
            "state": table.state_name, "depth_m": table.depth_m, "wire_diameter_mm": table.wire_diameter_mm,
            "beam_azimuth_deg_array_frame": table.beam_azimuth_deg,
            "beam_elevation_deg": table.beam_elevation_deg,
            "site_loss_ohm": round(table.site_loss_ohm, 3), "site_efficiency": round(table.site_efficiency, 4),
            "as_built": _as_built(table.site_fed)},
    }


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
        per = b["ground_loss_per_element_ohm"]
        loss = (f"{b['ground_loss_ohm']:.2f}" if len(set(per)) == 1
                else "/".join(f"{x:.2f}" for x in per))
        source = "from the radials" if b["ground_loss_source"] == "radials" else "as given"
        lines.append(f"== {b['band']} ({b['freq_mhz']:g} MHz{sp}); ground loss {loss} ohm per base "
                     f"({source}), not in the matrix")
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
        lines.extend(_table_text(b, result.get("radials")))
        lines.append("")
    if result["bands"]:
        lines.extend(_footnotes(result))
    return "\n".join(lines)


def _table_text(b, rad) -> list[str]:
    ref = b["radial_table_reference"]
    lengths = sorted({r["length_wavelengths"] for r in b["radial_table"]})
    out = [f"  buried radials ({ref['depth_m']:g} m deep, {ref['wire_diameter_mm']:g} mm wire), state "
           f"{ref['state']!r}; now ({system_text(rad)}) {ref['site_loss_ohm']:.2f} ohm, efficiency "
           f"{100 * ref['site_efficiency']:.0f} %:",
           "    count " + "".join(f"{f'{x:g} wavelength':>26}" for x in lengths),
           "          " + "".join(f"{'ohm   eff.  gain dB':>26}" for _ in lengths)]
    for n in sorted({r["count"] for r in b["radial_table"]}):
        cells = []
        for x in lengths:
            r = next(r for r in b["radial_table"] if r["count"] == n and r["length_wavelengths"] == x)
            cells.append(f"{r['loss_ohm']:>12.2f} {100 * r['efficiency']:>4.0f}% {r['gain_change_db']:>+7.2f}")
        out.append(f"    {n:>5} " + "".join(f"{c:>26}" for c in cells))
    for fed in ref["as_built"]:
        rows = [r for r in b["radial_table"] if r["as_built"]]
        lo = min(rows, key=lambda r: r["loss_ohm"])
        hi = max(rows, key=lambda r: r["loss_ohm"])
        def cur(entry, name=fed["state"]):
            a = next(x for x in entry["as_built"] if x["state"] == name)
            return (", ".join(f"{c['amplitude']:.2f}/{c['phase_deg']:+.0f}" for c in a["element_currents"])
                    + f", F/B {a['front_to_back_db']:.1f} dB")
        out.append(f"    as built {fed['state']!r}: now {cur(ref)}; with {lo['count']} x {lo['length_wavelengths']:g} "
                   f"wavelength {cur(lo)}; with {hi['count']} x {hi['length_wavelengths']:g} wavelength {cur(hi)}")
    return out


def _footnotes(result) -> list[str]:
    notes = ["Ground loss: series resistance at each base standing for the radial system and soil "
             "(\"from the radials\": buried-screen surface impedance in parallel with the soil, integrated "
             "over the base's field to half a wavelength; \"as given\": ground_loss_ohm of the site, "
             "default 2 ohm).",
             "Radial table: loss = that resistance per base; eff. = share of the power into the bases not lost "
             "in the ground; gain dB = change of the state's gain toward its beam against the site's own "
             "ground system; as built = true currents (amplitude/phase rel. element 1) and front-to-back of "
             "fed states."]
    rad = result.get("radials")
    if rad is not None and rad["height_m"] is None:
        notes.append("Neighbouring elements: radials cut where they meet and bonded along the midline "
                     "(each base's loss from its own field; cross terms between elements left out).")
    elif rad is not None:
        notes.append(f"Elevated radials ({rad['count']} x {rad['length_m']:g} m at {rad['height_m']:g} m): each "
                     "element and its own radials are solved as wires, the soil below by its reflection, and the "
                     "soil's loss taken under them; the base impedances and the coupling between elements stay those of the "
                     "verticals over the perfect plane, and neighbours' radials are not in each other's solution.")
    return notes
