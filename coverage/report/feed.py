"""`lobeplan feed`: coupling, true currents, feed-point impedances, line design, match."""
from __future__ import annotations

import math

import numpy as np

from ..antenna.feed import (design_l_network, drive_fed, l_network_input_ohm,
                            quarter_wave_forcing, swr)
from ..antenna.pattern import (array_pattern, base_impedance_ohm, coupled_elements, element_impedance_ohm,
                               lobe_bearings_deg, state_currents, state_drive)
from ..antenna.radial_table import radial_table
from ..antenna.radials import ground_loss
from .ground import radials_json, system_text
from .pattern import current_rows, pair, select_bands

__all__ = ["add_arguments", "check_arguments", "build", "format_text", "write_files", "radial_table_json",
           "power_w", "network_dict"]

_EDGE_FRACTION = 0.015


DEFAULT_POWER_W = 100.0


def add_arguments(parser) -> None:
    parser.add_argument("--band", metavar="B", default=None, help="only this band (its name in the site file)")
    parser.add_argument("--power-w", metavar="W", default=None,
                        help=f"transmitter power for the part stress (default {DEFAULT_POWER_W:g} W)")
    parser.add_argument("--suggest", metavar="TARGET", default=None, choices=_suggest_choices(),
                        help="propose element currents per option and band that maximise gain, front-to-back "
                             "or the plan's score for the goals; prints ready [[array.state]] blocks")


def _suggest_choices():
    return ("gain", "front-to-back", "goals")   # lobeplan.antenna.suggest.TARGETS, without its imports


def power_w(args) -> float:
    """--power-w in watts (the same check as the exposure verb's), default 100 W."""
    from .exposure import _number

    text = getattr(args, "power_w", None)
    return DEFAULT_POWER_W if text is None else _number(str(text), "--power-w", 0.0, 1e5, True)


def check_arguments(args) -> None:
    power_w(args)


def _edges(band):
    if band.edges_hz is not None:
        lo, hi = band.edges_hz
    else:
        lo, hi = band.freq_hz * (1 - _EDGE_FRACTION), band.freq_hz * (1 + _EDGE_FRACTION)
    return [lo, band.freq_hz, hi]


def _part(c) -> dict:
    return {"part": "L", "uh": round(c.value, 4)} if c.kind == "L" else {"part": "C", "pf": round(c.value, 2)}


def _junction(spec, option, line_m, freq_hz):
    return drive_fed(base_impedance_ohm(spec, option, freq_hz), spec.feed, freq_hz, line_m).junction_impedance_ohm


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


def _stress_rows(stress) -> list[dict]:
    return [{"name": p.name, **_part(p.part), "voltage_v_peak": round(p.voltage_v_peak, 1),
             "current_a_rms": round(p.current_a_rms, 2)} for p in stress]


def network_dict(net) -> dict:
    """A designed network as strict JSON (lines, parts, error; no stress)."""
    parts = []
    for b in net.branches:
        for where, c in (("series", b.series), ("shunt", b.shunt)):
            if c is not None:
                parts.append({"name": f"element {b.element + 1} {where}", **_part(c)})
    if net.match is not None:
        parts.append({"name": "match series", **_part(net.match.series)})
        parts.append({"name": "match shunt", **_part(net.match.shunt),
                      "at": "junction" if net.match.shunt_at_load else "transmitter"})
    return {"form": net.form, "line_m": [round(x, 3) for x in net.line_m], "parts": parts,
            "current_error": round(net.current_error, 4), "meets": net.meets,
            "junction_m": [round(x, 3) for x in net.junction_m], "runs_m": [round(x, 3) for x in net.runs_m],
            "slack_m": net.slack_m}


def _network_row(spec, option, state, band, power) -> dict:
    from ..antenna.asbuilt import check_network

    chk = check_network(spec, option, state, _edges(band), power)
    out = network_dict(chk.network)
    out["tolerance_cm"] = None if chk.tolerance_cm is None else round(chk.tolerance_cm, 1)
    out["tolerance_vf_pct"] = None if chk.tolerance_vf_pct is None else round(chk.tolerance_vf_pct, 2)
    out["tolerance_cm_by_line"] = [None if x is None else round(x, 1) for x in chk.tolerance_cm_by_line]
    out["stress"] = _stress_rows(chk.stress)
    out["power_w"] = power
    out["checks"] = [{"freq_mhz": round(c.freq_hz / 1e6, 4), "element_currents": current_rows(c.base_current_a),
                      "forward_gain_dbi": round(c.forward_gain_dbi, 2), "front_to_back_db": round(c.front_to_back_db, 2),
                      "swr": None if c.swr is None else round(c.swr, 3)} for c in chk.checks]
    if option.receive:
        # nothing transmits through a receive option: no transmitter match, no part stress, no SWR
        out["parts"] = [p for p in out["parts"] if not p["name"].startswith("match ")]
        out["stress"] = [p for p in out["stress"] if not p["name"].startswith("match ")]
        out["power_w"] = None
        for c in out["checks"]:
            c["swr"] = None
    return out


def _base_match(spec, option, band) -> dict:
    """One vertical: L-network at its base to 50 ohm (band centre) and the SWR at the edges."""
    def z_at(f):
        return complex(base_impedance_ohm(spec, option, f)[0, 0])

    z0 = z_at(band.freq_hz)
    net = design_l_network(z0, band.freq_hz, 50.0)
    rows = [{"freq_mhz": round(f / 1e6, 4), "swr": round(float(min(swr(l_network_input_ohm(net, f, z_at(f))), 1e6)), 3)}
            for f in _edges(band)]
    return {"junction_impedance_ohm": pair(z0), "series": _part(net.series), "shunt": _part(net.shunt),
            "shunt_at": "junction" if net.shunt_at_load else "transmitter", "q": round(net.q, 3), "swr": rows,
            "swr_unmatched": [{"freq_mhz": round(f / 1e6, 4), "swr": round(float(min(swr(z_at(f)), 1e6)), 3)}
                              for f in _edges(band)]}


def _loading(spec, band):
    from ..antenna.feed import COIL_Q, loading_coil
    from ..site import SHORT_WAVELENGTHS

    h = spec.height_m * band.freq_hz / 299_792_458.0
    if h >= SHORT_WAVELENGTHS:
        return None
    z = element_impedance_ohm(spec, band.freq_hz)
    coil = loading_coil(z, float(ground_loss(spec, spec.options[0], band.freq_hz).ohm[0]), band.freq_hz)
    if coil is None:
        return None
    return {"height_wavelengths": round(h, 3), "inductance_uh": round(coil.inductance_uh, 3),
            "coil_q": COIL_Q, "coil_loss_ohm": round(coil.loss_ohm, 3),
            "resonated_resistance_ohm": round(coil.resistance_ohm, 3), "efficiency": round(coil.efficiency, 3)}


def _state_row(spec, option, state, band, power=DEFAULT_POWER_W) -> dict:
    res = array_pattern(spec, option, state, band.freq_hz)
    d = state_drive(spec, option, state, band.freq_hz)
    el = int(np.unravel_index(int(np.argmax(res.gain_dbi)), res.gain_dbi.shape)[0])
    row = {
        "state": state.name,
        "kind": res.kind,
        "design_band": res.design_band,
        "element_currents": current_rows(d.base_current_a),
        "current_a_per_w": [round(float(abs(i)), 4) for i in d.base_current_a],
        "feedpoint_impedance_ohm": [pair(z) for z in d.feed_impedance_ohm],
        "element_power_w": [round(float(p), 4) for p in d.element_power_w],
        "junction_impedance_ohm": None if d.junction_impedance_ohm is None else pair(d.junction_impedance_ohm),
        "line_loss_w": round(d.line_loss_w, 4),
        # array frame (azimuth from the baseline), at the state's peak elevation
        "lobes_deg": [round(b, 1) for b, _ in lobe_bearings_deg(res.gain_dbi[el])],
        "match": None,
        "network": None,
    }
    if state.is_fed and not option.receive:  # a receive option needs no transmitter match
        row["match"] = _match(spec, option, state.line_m, band)
    elif option.n_elements == 1:
        row["match"] = _base_match(spec, option, band)
    elif res.kind == "as-built":
        row["network"] = _network_row(spec, option, state, band, power)
    return row


def _design(spec, option, band) -> dict:
    """What a network designed on this band would be, for every forced state
    (the network a switch box needs for each of its forced_bands)."""
    from ..antenna.network import design_network

    n = option.n_elements
    if n < 2:   # one vertical: no network, its match is in its state row
        return {"min_line_m": 0.0, "lines": []}
    z = base_impedance_ohm(spec, option, band.freq_hz)
    pos = np.asarray(option.positions_m)
    runs = np.hypot(*(pos - np.asarray(option.junction_point_m)).T)
    min_len = float(np.max(runs)) + spec.line_slack_m if n > 1 else 0.0
    wanted = [(s.name, state_currents(s, n)) for s in option.states if not s.is_fed]
    if not wanted and n == 2:   # a pair with only fed states: show the usual quadrature wish
        wanted = [("equal, -90 deg", np.array([1.0, np.exp(-0.5j * math.pi)]))]
    lines = []
    for name, w in wanted:
        entry = {"state": name, "wanted_currents": current_rows(w), "line_m": None, "current_error": None,
                 "match": None, "network": None}
        if n >= 2:
            net = design_network(z, spec.feed, band.freq_hz, w, option.positions_m, option.junction_point_m,
                                 spec.line_slack_m)
            entry["network"] = network_dict(net)
            if option.receive:   # no transmitter match on a receive option
                entry["network"]["parts"] = [p for p in entry["network"]["parts"] if not p["name"].startswith("match ")]
            entry["line_m"] = [round(x, 3) for x in net.line_m]
            entry["current_error"] = round(net.current_error, 5)
            if net.form == "junction-lines" and not option.receive:
                entry["match"] = _match(spec, option, net.line_m, band)
        q = quarter_wave_forcing(spec.feed, band.freq_hz, w)
        entry["quarter_wave_forcing"] = {
            "quarter_wave_m": round(q.quarter_wave_m, 3),
            "input_voltage_v_per_a": [pair(v) for v in q.input_voltage_v],
            "common_junction_line_m": None if q.common_junction_line_m is None
            else [round(x, 3) for x in q.common_junction_line_m],
        }
        lines.append(entry)
    return {"min_line_m": round(min_len, 3), "lines": lines}


def _goal_weights(site, option, band_name):
    """Pooled need weights of the band's goals in the option's array frame, at its chosen bearing."""
    from ..grid import to_true_bearing
    from .plan import _chosen_bearing, run_plan

    plan = run_plan(site, True)
    op = next(o for o in plan.options if o.option == option.name)
    theta = _chosen_bearing(site, plan, op)
    total = None
    for gb in plan.goal_bands:
        if gb.band_name == band_name and gb.needs.weights.sum() > 0:
            w = gb.weight * gb.needs.weights
            total = w if total is None else total + w
    if total is None:
        return None, theta
    return to_true_bearing(total, -theta), theta


def suggestions(site, target: str, bands) -> list[dict]:
    """A suggested state per option (of two or more elements) and band."""
    from ..antenna.pattern import vertical_gain_dbi
    from ..antenna.suggest import SUGGEST_ELEVATION_DEG, suggest_currents

    out = []
    for band in bands:
        for option in site.array.options:
            if option.n_elements < 2:
                continue
            sol = coupled_elements(site.array, option, band.freq_hz)
            z = base_impedance_ohm(site.array, option, band.freq_hz, sol)
            weights, theta = (None, None)
            if target == "goals":
                weights, theta = _goal_weights(site, option, band.name)
                if weights is None:
                    out.append({"option": option.name, "band": band.name, "target": target, "amplitude": None,
                                "phase_deg": None, "gain_dbi": None, "front_to_back_db": None,
                                "note": "no goal is open on this band"})
                    continue
            vert = float(np.interp(SUGGEST_ELEVATION_DEG, np.arange(91.0), vertical_gain_dbi(site.array, band.freq_hz)))
            sug = suggest_currents(sol, z, site.array.ground, target, weights, vert)
            out.append({"option": option.name, "band": band.name, "target": target,
                        "amplitude": [round(a, 3) for a in sug.amplitude],
                        "phase_deg": [round(p, 1) + 0.0 for p in sug.phase_deg],
                        "gain_dbi": round(sug.gain_dbi, 2), "front_to_back_db": round(sug.front_to_back_db, 2),
                        "elevation_deg": SUGGEST_ELEVATION_DEG,
                        "goal_mean_gain_dbi": None if sug.goal_mean_gain_dbi is None else round(sug.goal_mean_gain_dbi, 2),
                        "orientation_deg": theta})
    return out


def _suggest_text(result: dict, site_options: int) -> str:
    out = [f"# Suggested switch states (target: {result['target']}); paste into the site file.",
           f"# forward gain and F/B along the baseline at {result['elevation_deg']:g} deg elevation, 1 W into "
           "the bases; the currents are forced (their network is designed on the band named).", ""]
    if not result["suggestions"]:
        out.append("# nothing to suggest: every option is one vertical, which has no phasing to choose")
    for s in result["suggestions"]:
        if s["amplitude"] is None:
            out.append(f"# {s['option']}, {s['band']}: {s['note']}")
            out.append("")
            continue
        extra = "" if s["goal_mean_gain_dbi"] is None else \
            f", mean {s['goal_mean_gain_dbi']:+.2f} dBi over the goals at {s['orientation_deg']:.0f} deg"
        out.append(f"# {s['option']}, {s['band']}: forward {s['gain_dbi']:+.2f} dBi, F/B {s['front_to_back_db']:.1f} dB{extra}")
        out.append("[[array.state]]" if site_options == 1 else f"[[array.option.state]]   # in the block of {s['option']!r}")
        out.append(f'name = "{s["target"]} {s["band"]}"')
        out.append("phase_deg = [" + ", ".join(f"{p:g}" for p in s["phase_deg"]) + "]")
        out.append("amplitude = [" + ", ".join(f"{a:g}" for a in s["amplitude"]) + "]")
        out.append(f'design_band = "{s["band"]}"')
        out.append("")
    return "\n".join(out)


def build(site, args=None) -> dict:
    spec = site.array
    power = power_w(args)
    target = getattr(args, "suggest", None)
    if target is not None:
        from ..antenna.suggest import SUGGEST_ELEVATION_DEG

        return {"target": target, "elevation_deg": SUGGEST_ELEVATION_DEG, "options": len(spec.options),
                "suggestions": suggestions(site, target, select_bands(site, getattr(args, "band", None)))}
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
                "ground_loss_copper_ohm": (None if loss.copper_ohm is None
                                           else round(float(np.mean(loss.copper_ohm)), 4)),
                "elevated_copper_loss_ohm": _elevated_copper(spec, band.freq_hz),
                "impedance_matrix_ohm": [[pair(z) for z in row] for row in sol.impedance_ohm],
                "states": [_state_row(spec, option, s, band, power) for s in option.states],
                "loading_coil": None if option.receive else _loading(spec, band),
                "design": _design(spec, option, band),
                **radial_table_json(radial_table(spec, option, band.freq_hz)),
            })
    from ..site import radial_caveats

    return {"bands": out, "radials": radials_json(spec), "caveats": list(radial_caveats(site))}


def _elevated_copper(spec, freq_hz):
    """Copper loss of one element's elevated radials referred to its base, ohm (None: not elevated)."""
    r = spec.radials
    if r is None or r.buried:
        return None
    from ..antenna.elevated import copper_loss_ohm, solve_elevated_array

    one = solve_elevated_array(spec.height_m, spec.radius_m, r.height_m, r.count, r.length_m,
                               0.5e-3 * r.wire_diameter_mm, ((0.0, 0.0),), freq_hz, spec.ground)
    return round(copper_loss_ohm(one), 3)


def write_files(site, args, result, out_dir) -> list:
    """The radial table as a figure, ``radials.png``."""
    from pathlib import Path

    from ..render.radials import draw_radial_table

    if "suggestions" in result:   # --suggest: the suggestions themselves, as the TOML they print
        from ..fileio import atomic_write_text

        return [atomic_write_text(Path(out_dir) / "suggestions.toml", format_text(result))]
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
                          "copper_loss_ohm": round(r.copper_loss_ohm, 4),
                          "as_built": _as_built(r.fed)} for r in table.rows],
        "radial_table_reference": {
            "state": table.state_name, "depth_m": table.depth_m, "wire_diameter_mm": table.wire_diameter_mm,
            "beam_azimuth_deg_array_frame": table.beam_azimuth_deg,
            "beam_elevation_deg": table.beam_elevation_deg,
            "site_loss_ohm": round(table.site_loss_ohm, 3), "site_efficiency": round(table.site_efficiency, 4),
            "site_copper_loss_ohm": (None if table.site_copper_loss_ohm is None
                                     else round(table.site_copper_loss_ohm, 4)),
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


def _one(c) -> str:
    return f"{c['uh']:.3f} uH" if c["part"] == "L" else f"{c['pf']:.0f} pF"


def _network_text(n) -> list[str]:
    lines = ", ".join(f"{x:.2f}" for x in n["line_m"])
    runs = ", ".join(f"{x:.2f}" for x in n["runs_m"])
    out = [f"    network ({n['form']}): lines {lines} m of the cable from the junction at "
           f"({n['junction_m'][0]:.2f}, {n['junction_m'][1]:.2f}) m (runs {runs} m + {n['slack_m']:g} m slack); "
           f"current error {n['current_error']:.3f}"]
    if not n["meets"]:
        out.append(f"    ! no recognised form meets the wanted currents (best current error {n['current_error']:.2f}, "
                   "more than 0.1): this state will not give its forced pattern; see the checks below")
    if "stress" in n:
        for p in n["stress"]:
            out.append(f"      {p['name']}: {_one(p)}" if n["power_w"] is None else
                       f"      {p['name']}: {_one(p)}, {p['voltage_v_peak']:.0f} V peak, {p['current_a_rms']:.2f} A rms "
                       f"at {n['power_w']:g} W")
    else:
        for p in n["parts"]:
            out.append(f"      {p['name']}: {_one(p)}")
    tol = n.get("tolerance_cm")
    vf = n.get("tolerance_vf_pct")
    if "tolerance_cm" in n:
        by_line = ", ".join("over 250" if x is None else f"{x:.1f}" for x in n.get("tolerance_cm_by_line", []))
        out.append("      cut tolerance: " + ("no rear null to lose (under 6 dB)" if tol is None and vf is None else
                   f"{'over 250' if tol is None else f'{tol:.1f}'} cm on the most sensitive line (each line: "
                   f"{by_line} cm), or {'over 25' if vf is None else f'{vf:.2f}'} % of velocity factor, costs "
                   "3 dB of the rear null (the beam over the weakest rear direction, see docs/feed.md)"))
    for c in n.get("checks", []):
        cur = ", ".join(f"{e['amplitude']:.2f}/{e['phase_deg']:+.0f}" for e in c["element_currents"])
        sw = "-" if c["swr"] is None else f"{c['swr']:.2f}"
        out.append(f"      at {c['freq_mhz']:g} MHz: currents {cur}; forward {c['forward_gain_dbi']:+.2f} dBi, "
                   f"F/B {c['front_to_back_db'] + 0.0:.1f} dB, SWR {sw}")
    return out


FOOTNOTES = (
    "currents: amplitude/phase (deg) relative to element 1. kind: forced = the wanted currents held (an ideal "
    "feed, or a network of its own on this band: forced_bands); as built = what the state's network, designed "
    "on its design band, delivers here (coupling, line loss, fixed parts); fed = its own line_m lines.",
    "current error: the largest difference between delivered and wanted currents as a fraction of the largest "
    "wanted current, after the one common scale and phase that fits them best; a form meets the currents at "
    "0.1 or less.",
    "forward: gain toward the forced pattern's peak (design band), per watt into the junction; F/B: against the "
    "opposite bearing at the same elevation; SWR: 50 ohm, through the junction's match (parts fixed at their "
    "design-band values). Cut tolerance: the smallest error of one line's length, or of the cable's velocity "
    "factor, that costs 3 dB of the rear null on the design band: the beam's gain over the wanted pattern's "
    "weakest direction within 90 deg of the back, at the beam's takeoff angle (the back itself for a cardioid).",
    "part stress: peak voltage across and RMS current through each part at the given power (--power-w); "
    "these voltages are dangerous: work on the switch box only with the transmitter off and disconnected. "
    "Lobes: every beam within 1 dB of the peak, azimuth from the baseline (array frame).",
)


def format_text(result: dict) -> str:
    if "suggestions" in result:
        return _suggest_text(result, result["options"])
    lines = []
    for b in result["bands"]:
        sp = "" if b["spacing_m"] is None else f", spacing {b['spacing_m']:g} m"
        per = b["ground_loss_per_element_ohm"]
        loss = (f"{b['ground_loss_ohm']:.2f}" if len(set(per)) == 1
                else "/".join(f"{x:.2f}" for x in per))
        source = "from the radials" if b["ground_loss_source"] == "radials" else "as given"
        copper = b.get("elevated_copper_loss_ohm")
        copper = "" if copper is None else f"; the elevated radials' copper ({copper:.2f} ohm) is in it"
        lines.append(f"== {b['band']} ({b['freq_mhz']:g} MHz{sp}); ground loss {loss} ohm per base "
                     f"({source}), not in the matrix{copper}")
        lines.append("coupled base impedances (ohm):")
        for row in b["impedance_matrix_ohm"]:
            lines.append("  " + "  ".join(f"{_z(p):>16}" for p in row))
        for s in b["states"]:
            cur = ", ".join(f"{c['amplitude']:.2f}/{c['phase_deg']:+.0f}" for c in s["element_currents"])
            zs = ", ".join(_z(p) for p in s["feedpoint_impedance_ohm"])
            pw = ", ".join(f"{p:.3f}" for p in s["element_power_w"])
            kind = {"as-built": f"as built from the {s['design_band']} network", "fed": "fed"}.get(s["kind"], "forced")
            lobes = ("lobes " + "/".join(f"{x:.0f}" for x in s["lobes_deg"]) + " deg") if s["lobes_deg"] \
                else "all round"
            lines.append(f"  state {s['state']!r} ({kind}): currents {cur}; feed points {zs} ohm; "
                         f"power {pw} W per W; {lobes}")
            if s["junction_impedance_ohm"] is not None and s["match"] is not None:
                lines.append(f"    junction {_z(s['junction_impedance_ohm'])} ohm, line loss "
                             f"{s['line_loss_w']:.3f} W per W; match: {_parts(s['match'])}")
            elif s["match"] is not None:   # one vertical: matched at its base
                m = s["match"]
                bare = ", ".join(f"{r['swr']:.2f} at {r['freq_mhz']:g}" for r in m["swr_unmatched"])
                lines.append(f"    base {_z(m['junction_impedance_ohm'])} ohm (SWR on 50 ohm without a match: {bare} MHz); "
                             f"match at the base: {_parts(m)}")
            if s.get("network") is not None:
                lines.extend(_network_text(s["network"]))
        if b.get("loading_coil"):
            c = b["loading_coil"]
            lines.append(f"  short elements ({c['height_wavelengths']:.2f} wavelength): a base coil of "
                         f"{c['inductance_uh']:.2f} uH resonates one; at Q {c['coil_q']:g} it adds {c['coil_loss_ohm']:.1f} "
                         f"ohm, leaving {c['resonated_resistance_ohm']:.1f} ohm to match and {100 * c['efficiency']:.0f} % "
                         "radiated (the element's share of the base resistance)")
        for d in b["design"]["lines"]:
            if d.get("network") is not None:
                lines.append(f"  a network designed on {b['band']} for {d['state']!r} (for a forced_bands switch box):")
                lines.extend(_network_text(d["network"]))
            q = d["quarter_wave_forcing"]
            extra = ("" if q["common_junction_line_m"] is None else
                     "; from one junction: " + ", ".join(f"{x:.2f}" for x in q["common_junction_line_m"]) + " m")
            lines.append(f"    current forcing: lambda/4 of this cable is {q['quarter_wave_m']:.2f} m{extra}")
        lines.extend(_table_text(b, result.get("radials")))
        lines.append("")
    if result["bands"]:
        lines.extend(_footnotes(result))
    lines += [f"  {t}" for t in FOOTNOTES]
    return "\n".join(lines) + "\n"


def _table_text(b, rad) -> list[str]:
    ref = b["radial_table_reference"]
    lengths = sorted({r["length_wavelengths"] for r in b["radial_table"]})
    out = [f"  buried radials ({ref['depth_m']:g} m deep, {ref['wire_diameter_mm']:g} mm wire), state "
           f"{ref['state']!r}; now ({system_text(rad)}) {ref['site_loss_ohm']:.2f} ohm"
           + ("" if ref.get("site_copper_loss_ohm") is None else f" (cu {ref['site_copper_loss_ohm']:.2f})")
           + ", efficiency "
           f"{100 * ref['site_efficiency']:.0f} %:",
           "    count " + "".join(f"{f'{x:g} wavelength':>30}" for x in lengths),
           "          " + "".join(f"{'ohm (cu)   eff.  gain dB':>30}" for _ in lengths)]
    for n in sorted({r["count"] for r in b["radial_table"]}):
        cells = []
        for x in lengths:
            r = next(r for r in b["radial_table"] if r["count"] == n and r["length_wavelengths"] == x)
            cells.append(f"{r['loss_ohm']:>9.2f} ({r['copper_loss_ohm']:.2f}) {100 * r['efficiency']:>4.0f}% "
                         f"{r['gain_change_db']:>+7.2f}")
        out.append(f"    {n:>5} " + "".join(f"{c:>30}" for c in cells))
    for fed in ref["as_built"]:
        rows = [r for r in b["radial_table"] if r["as_built"]]
        lo = min(rows, key=lambda r: r["loss_ohm"])
        hi = max(rows, key=lambda r: r["loss_ohm"])
        def cur(entry, name=fed["state"]):
            a = next(x for x in entry["as_built"] if x["state"] == name)
            return (", ".join(f"{c['amplitude']:.2f}/{c['phase_deg']:+.0f}" for c in a["element_currents"])
                    + f", F/B {a['front_to_back_db'] if abs(a['front_to_back_db']) >= 0.05 else 0.0:.1f} dB")
        out.append(f"    as built {fed['state']!r}: now {cur(ref)}; with {lo['count']} x {lo['length_wavelengths']:g} "
                   f"wavelength {cur(lo)}; with {hi['count']} x {hi['length_wavelengths']:g} wavelength {cur(hi)}")
    return out


def _footnotes(result) -> list[str]:
    rad = result.get("radials")
    if rad is not None and rad["height_m"] is not None:
        source = ("\"from the radials\": the soil's surface resistance times the field the wires make on it, "
                  "integrated to half a wavelength (the field's mean around the element as it is, what varies "
                  "around it spread over the soil's image depth); the wires' copper is in the matrix")
    else:
        source = ("\"from the radials\": buried-screen surface impedance in parallel with the soil, integrated "
                  "over the base's field to half a wavelength, the wires' copper included")
    notes = ["Ground loss: series resistance at each base standing for the radial system and soil "
             f"({source}; \"as given\": ground_loss_ohm of the site, default 2 ohm).",
             "Radial table: loss = that resistance per base (cu: the part of it in the radial wires' own "
             "copper, skin effect; the rest is the soil's); eff. = share of the power into the bases not lost "
             "in the ground; gain dB = change of the state's gain toward its beam against the site's own "
             "ground system; as built = true currents (amplitude/phase rel. element 1) and front-to-back of "
             "fed states."]
    if rad is not None and rad["height_m"] is None:
        notes.append("Neighbouring elements: radials cut where they meet and bonded along the midline "
                     "(each base's loss from its own field; cross terms between elements left out).")
    elif rad is not None:
        notes.append(f"Elevated radials ({rad['count']} x {rad['length_m']:g} m at {rad['height_m']:g} m): every "
                     "element, its hub and its radials are solved together as copper wires over the soil (seen by "
                     "its reflection), so the radials set the base impedances, the coupling and the patterns; "
                     "radials that would cross a midline between two elements stop just short of it, unbonded. "
                     "The soil's loss under them is each element's with its own radials alone (cross terms "
                     "left out), in series at its base; the copper loss is in the matrix.")
    notes += result.get("caveats", [])
    return notes
