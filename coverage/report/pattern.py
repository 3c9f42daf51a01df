"""`lobeplan pattern`: azimuth/elevation patterns, front-to-back and gains."""
from __future__ import annotations

import re
import textwrap
from pathlib import Path

import numpy as np

from ..antenna.foreground import blend_true_bearing, class_gains_dbi, foreground_masks, ground_classes
from ..antenna.pattern import GAIN_FLOOR_DBI, array_pattern, lobe_bearings_deg, pattern_figures, vertical_gain_dbi
from ..antenna.receive import directivity_dbi, rdf_db, sky_mean_gain_dbi
from ..errors import UsageError
from ..grid import AZIMUTH_DEG, ELEVATION_DEG, to_true_bearing
from .widths import width as fit_width
from ..plan.sweep import floored
from ..render.scene import key_takeoff_deg
from .ground import foreground_json, ground_line, ground_summary

__all__ = ["add_arguments", "build", "format_text", "write_files",
           "select_bands", "select_states", "to_true_bearing", "current_rows", "pair", "goal_cells", "NOTES",
           "foreground_json", "true_pattern_dbi"]


def add_arguments(parser) -> None:
    parser.add_argument("--band", metavar="B", default=None, help="only this band (its name in the site file)")
    parser.add_argument("--state", metavar="S", default=None, help="only this switch state")


def select_bands(site, name):
    if name is None:
        return site.bands
    chosen = tuple(b for b in site.bands if b.name == name)
    if not chosen:
        raise UsageError(f"--band: no band {name!r}; the site has: "
                         + ", ".join(repr(b.name) for b in site.bands))
    return chosen


def select_states(site, name):
    """(option, state) pairs, filtered by state name."""
    pairs = [(o, s) for o in site.array.options for s in o.states]
    if name is None:
        return pairs
    chosen = [(o, s) for o, s in pairs if s.name == name]
    if not chosen:
        names = list(dict.fromkeys(s.name for _, s in pairs))
        raise UsageError(f"--state: no state {name!r}; the site has: " + ", ".join(repr(n) for n in names))
    return chosen


def pair(z) -> list[float]:
    z = complex(z)
    return [round(z.real, 3), round(z.imag, 3)]


def current_rows(currents) -> list[dict]:
    """Base currents relative to element 1 (amplitude ratio, phase in deg)."""
    i = np.asarray(currents, dtype=complex)
    ref = i[0] if abs(i[0]) > 1e-12 * max(float(np.max(np.abs(i))), 1e-300) else i[np.argmax(np.abs(i))]
    rel = i / ref
    return [{"amplitude": round(float(abs(r)), 4),
             "phase_deg": round(float(np.degrees(np.angle(r))), 2) + 0.0} for r in rel]


def _spacing(option):
    return None if option.layout in ("single", "custom") else option.spacing_m


def _r(x, nd=2):
    return None if x is None else round(float(x), nd) + 0.0  # + 0.0: no "-0.0" in text or JSON


def _goal_context(site, quiet: bool):
    """The plan (needs, reference vertical, best bearings) and each goal's bearing arc."""
    from .paths import goal_path_rows
    from .plan import run_plan

    plan = run_plan(site, quiet)
    arcs = {(g["name"], g["path"]): g["bearing_deg"] for g in goal_path_rows(site)}
    return plan, arcs


def _orientation(site, plan, option) -> tuple[float, str]:
    """Baseline bearing a pattern is shown at, and where it comes from.

    A fixed ``orientation_deg`` of the site; when the site sweeps, the
    option's best allowed bearing in the plan ("plan"), or 0 deg when no
    goal is ever open ("none").
    """
    if site.orientation.fixed_deg is not None:
        return float(site.orientation.fixed_deg), "site"
    op = next(o for o in plan.options if o.option == option.name)
    if op.best_orientation_deg is None:
        return 0.0, "none"
    return float(op.best_orientation_deg), "plan"


def _mean(weights, grid_dbi) -> float:
    """Need-weighted mean in dB, floored as the score floors it (DESIGN.md Score)."""
    return float(np.sum(weights * floored(grid_dbi)) / np.sum(weights))


def goal_cells(goal_bands, arcs, band_name, true_gain, ref_gain, sky_mean_dbi) -> list[dict]:
    """Each goal of the band against one pattern (true bearings).

    ``mean_gain_dbi``: the need-weighted mean gain toward the goal (its
    bearings and takeoff angles, weighted as the plan weighs them);
    ``advantage_db``: that less the same mean of one vertical;
    ``directivity_db`` and ``directivity_advantage_db``: the same with
    gain over the sky mean in place of gain (see :mod:`lobeplan.antenna.receive`).
    """
    ref_d = directivity_dbi(ref_gain)
    out = []
    for gb in goal_bands:
        if gb.band_name != band_name:
            continue
        n = gb.needs
        w = n.weights
        arc = arcs[(gb.goal_name, gb.path)]
        cell = {"goal": gb.goal_name, "path": gb.path, "bearing_deg": dict(arc),
                "elevation_deg": {"p10": _r(n.elevation_p10, 1), "p90": _r(n.elevation_p90, 1)},
                "open_fraction": round(float(n.open_fraction), 4), "mean_gain_dbi": None,
                "advantage_db": None, "directivity_db": None, "directivity_advantage_db": None}
        if float(w.sum()) > 0:
            ref_grid = _on_grid(ref_gain, w.shape)
            gain = _mean(w, true_gain)
            d = _mean(w, true_gain - sky_mean_dbi)
            cell.update(mean_gain_dbi=_r(gain), advantage_db=_r(gain - _mean(w, ref_grid)),
                        directivity_db=_r(d),
                        directivity_advantage_db=_r(d - _mean(w, _on_grid(ref_d, w.shape))))
        out.append(cell)
    return out


def true_pattern_dbi(spec, option, res, orientation_deg: float) -> np.ndarray:
    """A result's gain over true bearings, the foreground blended per class (dBi)."""
    if not spec.foreground:
        return np.maximum(to_true_bearing(res.gain_dbi, orientation_deg), GAIN_FLOOR_DBI)
    return blend_true_bearing(class_gains_dbi(spec, option, res), foreground_masks(spec, res.freq_hz),
                              orientation_deg)


def _blended_reference(spec, freq_hz: float) -> np.ndarray:
    """One vertical over true bearings with the foreground, (91, 360) dBi."""
    masks = foreground_masks(spec, freq_hz)
    ref_k = [vertical_gain_dbi(spec, freq_hz, g) for g in ground_classes(spec)]
    return sum(m * r[:, None] for m, r in zip(masks, ref_k))


def _on_grid(ref, shape):
    """A reference over elevation (91,) or already over the grid (91, 360), as the grid."""
    ref = np.asarray(ref, dtype=float)
    return np.broadcast_to(ref if ref.ndim == 2 else ref[:, None], shape)


def build(site, args=None) -> dict:
    band_name = getattr(args, "band", None)
    state_name = getattr(args, "state", None)
    bands = select_bands(site, band_name)
    pairs = select_states(site, state_name)
    plan, arcs = _goal_context(site, bool(getattr(args, "json", False)))
    rdf_el = float(site.array.rdf_elevation_deg)
    out = []
    for band in bands:
        ref = plan.reference_gain_dbi.get(band.name)
        ref = vertical_gain_dbi(site.array, band.freq_hz) if ref is None else ref
        if site.array.foreground:  # the vertical stands at the same site: it sees the same foreground
            ref = _blended_reference(site.array, band.freq_hz)
        takeoff = key_takeoff_deg(plan.goal_bands, band.name)
        for option, state in pairs:
            orient, orient_from = _orientation(site, plan, option)
            res = array_pattern(site.array, option, state, band.freq_hz)
            true_gain = true_pattern_dbi(site.array, option, res, orient)
            grid = res.gain_dbi
            fig = pattern_figures(res.gain_dbi)
            if site.array.foreground:  # figures of the blended grid, which is over true bearings
                grid = true_gain
                fig = pattern_figures(true_gain)
                fig["peak_azimuth_deg"] = (fig["peak_azimuth_deg"] - orient) % 360.0
            sky = sky_mean_gain_dbi(grid)
            out.append({
                "band": band.name,
                "option": option.name,
                "state": state.name,
                "spacing_m": _spacing(option),
                "orientation_deg": orient,
                "peak_gain_dbi": _r(fig["peak_gain_dbi"]),
                "peak_azimuth_deg": _r((fig["peak_azimuth_deg"] + orient) % 360.0, 1),
                "peak_elevation_deg": _r(fig["peak_elevation_deg"], 1),
                "front_to_back_db": _r(fig["front_to_back_db"]),
                "front_to_rear_db": _r(fig["front_to_rear_db"]),
                "beamwidth_deg": _r(fig["beamwidth_deg"], 1),
                "element_currents": current_rows(res.base_current_a),
                "kind": res.kind,
                "design_band": res.design_band,
                # every lobe within 1 dB at the peak elevation, true bearings, strongest first
                "lobes_deg": [round(b, 1) for b, _ in
                              lobe_bearings_deg(true_gain[int(round(fig["peak_elevation_deg"]))])],
                "feedpoint_impedance_ohm": [pair(z) for z in res.feed_impedance_ohm],
                "azimuth_deg": [float(a) for a in AZIMUTH_DEG],
                "elevation_deg": [float(e) for e in ELEVATION_DEG],
                "gain_dbi": np.round(true_gain, 2).tolist(),
                "_option": option.name,  # dropped before output; used for file names
            })
            # issue 14: the goal-centred figures, and the receiving ones
            peak_el = int(round(fig["peak_elevation_deg"]))
            out[-1].update({
                "use": option.use,
                "orientation_from": orient_from,
                "key_takeoff_deg": takeoff,
                "lobes": [{"bearing_deg": round(b, 1), "gain_dbi": round(g, 2)}
                          for b, g in lobe_bearings_deg(true_gain[peak_el])],
                "sky_mean_gain_dbi": round(sky, 2),
                "rdf_db": round(rdf_db(grid, rdf_el), 2),
                "rdf_elevation_deg": rdf_el,
                "goals": goal_cells(plan.goal_bands, arcs, band.name, true_gain, ref, sky),
            })
    for row in out:
        row.pop("_option")
    notes = list(NOTES)
    for f in site.array.foreground:
        notes.append(f"foreground: {f.ground.name} from {f.from_m:g} m toward {f.from_deg:g}-{f.to_deg:g} deg "
                     "true; each ray's gain blends the grounds its first Fresnel zone falls on (the vertical's "
                     "reference too).")
    return {"patterns": out, "notes": notes, "foreground": foreground_json(site.array),
            "ground_system": ground_summary(site)}


NOTES = (
    "toward a goal: the mean gain (dBi) over the goal's needed directions, every true bearing and takeoff "
    "angle weighted by how often the needs reach the goal there (gains floored at -30 dBi, as the plan "
    "scores them); 'vs 1': that mean less the same mean for one vertical of the same height on the same ground.",
    "bearings: the great-circle span of the goal's sampled points (as the paths verb gives it); takeoff: its "
    "10th to 90th percentile needed takeoff angle (as the needs verb gives it).",
    "lobes: true bearings of every azimuth maximum within 1 dB of the strongest, at the state's peak takeoff "
    "angle (the 'at' of its peak).",
    "F/B, front-to-back: the gain toward the peak (its bearing and takeoff angle) over the gain toward the "
    "opposite bearing at the same takeoff angle, dB (capped at 60).",
    "beam width: the azimuth arc around the peak that stays within 3 dB of it, at the peak takeoff angle; "
    "'-' where the gain never drops 3 dB (no beam).",
    "RDF, receiving directivity factor: the gain toward the beam (its strongest bearing) at the takeoff angle "
    "rdf_elevation_deg over the sky mean, the solid-angle-weighted mean gain over the upper hemisphere, both "
    "over this ground, dB. Directivity: the same ratio toward any direction.",
    "receive options (use = \"receive\") are scored by directivity, not gain: their goal cells give the "
    "directivity over the sky mean, dB, and its advantage over one vertical's.",
    "front_to_rear_db (JSON only): the peak over the strongest direction within 60 deg of the opposite "
    "bearing, at the peak takeoff angle.",
    "Gain is referred to the power into the feed (ground and line loss included); bearings are true.",
)
"""Definitions of every figure the pattern verb prints (text footnotes and JSON ``notes``)."""

_WHERE = {"site": "from the site file", "plan": "the plan's best bearing for this option",
          "none": "no goal is open: shown at 0 deg"}


def _fmt(x, spec="6.1f"):
    return f"{'-':>{spec.split('.')[0]}}" if x is None else format(x, spec)


def _blocks(rows: list[dict]) -> list[list[dict]]:
    """Rows grouped by (band, option), in order: one table and one figure each."""
    blocks: dict[tuple, list[dict]] = {}
    for p in rows:
        blocks.setdefault((p["band"], p["option"]), []).append(p)
    return list(blocks.values())


def _arc_text(goal: dict) -> str:
    b = goal["bearing_deg"]
    return f"{b['start']:.0f}-{b['end']:.0f}°"


def _takeoff_text(goal: dict) -> str:
    e = goal["elevation_deg"]
    return "closed" if e["p10"] is None else f"{e['p10']:.0f}-{e['p90']:.0f}°"


def _cell(goal: dict, receive: bool) -> str:
    value, adv = ((goal["directivity_db"], goal["directivity_advantage_db"]) if receive
                  else (goal["mean_gain_dbi"], goal["advantage_db"]))
    return "closed" if value is None else f"{value:5.1f} {adv:+5.1f}"


def _block_text(rows: list[dict]) -> list[str]:
    first = rows[0]
    receive = first["use"] == "receive"
    width = fit_width(12, (p["state"] for p in rows))
    labels = [g["goal"] + (" (long)" if g["path"] == "long" else "") for g in first["goals"]]
    wg = fit_width(22, labels)
    ws = fit_width(18, (p["state"] for p in rows))
    lobe_texts = [", ".join(f"{lobe['bearing_deg']:.0f}°" for lobe in p["lobes"]) or "none (omni)" for p in rows]
    wl = fit_width(22, lobe_texts)
    single = len(first["element_currents"]) == 1   # issue 10: one vertical has no baseline
    lines = [f"{first['band']}, {first['option']}: " + ("one vertical, no baseline" if single else
             f"baseline along {first['orientation_deg']:.1f}° ({_WHERE[first['orientation_from']]})")
             + (", receive option" if receive else ""),
             "  toward each goal: " + ("directivity over the sky mean, dB, and vs 1 vertical's" if receive
                                       else "gain at its needed angles, dBi, and vs 1 vertical, dB")]
    lines.append(f"  {'goal':<{wg}} {'path':<5} {'bearings':>10} {'takeoff':>8}"
                 + "".join(f"  {p['state']:>{width}}" for p in rows))
    lines.append(f"  {'':<{wg}} {'':<5} {'':>10} {'':>8}"
                 + "".join(f"  {('dB' if receive else 'dBi'):>5} {'vs 1':>5}".rjust(width + 2) for p in rows))
    for k, goal in enumerate(first["goals"]):
        label = goal["goal"] + (" (long)" if goal["path"] == "long" else "")
        lines.append(f"  {label:<{wg}} {goal['path']:<5} {_arc_text(goal):>10} {_takeoff_text(goal):>8}"
                     + "".join(f"  {_cell(p['goals'][k], receive):>{width}}" for p in rows))
    if not first["goals"]:
        lines.append("  (no goal on this band)")
    lines.append("")
    lines.append(f"  {'state':<{ws}} {'lobes (true bearing)':<{wl}} {'F/B':>6} {'beam w.':>7} {'peak':>6} "
                 f"{'at':>10} {'RDF':>5}  currents (rel. element 1)")
    lines.append(f"  {'':<{ws}} {'':<{wl}} {'dB':>6} {'deg':>7} {'dBi':>6} {'az/el deg':>10} {'dB':>5}")
    for p, lobes in zip(rows, lobe_texts):
        cur = ", ".join(f"{c['amplitude']:.2f}/{c['phase_deg']:+.0f}" for c in p["element_currents"])
        at = f"{p['peak_azimuth_deg']:.0f}/{p['peak_elevation_deg']:.0f}"
        lines.append(f"  {p['state']:<{ws}} {lobes:<{wl}} {_fmt(p['front_to_back_db'])} "
                     f"{_fmt(p['beamwidth_deg'], '7.0f')} {p['peak_gain_dbi']:6.2f} {at:>10} "
                     f"{p['rdf_db']:5.1f}  {cur}")
    lines += _kind_lines(rows)
    return lines


def _kind_lines(rows: list[dict]) -> list[str]:
    """Issue 10: which states' currents are as built, forced or fed on this band."""
    built = [p for p in rows if p.get("kind") == "as-built"]
    forced = [p["state"] for p in rows if p.get("kind") == "forced" and len(p["element_currents"]) > 1]
    out = []
    for band in dict.fromkeys(p["design_band"] for p in built):
        out.append(f"  as built from the {band} network (the currents it delivers here): "
                   + ", ".join(p["state"] for p in built if p["design_band"] == band))
    if forced:
        out.append("  forced (the wanted currents held exactly): " + ", ".join(forced))
    return out


def format_text(result: dict) -> str:
    lines: list[str] = []
    for block in _blocks(result["patterns"]):
        lines += _block_text(block) + [""]
    if result["patterns"]:
        rdf = result["patterns"][0]["rdf_elevation_deg"]
        lines.append(f"RDF at {rdf:g}° takeoff (rdf_elevation_deg).")
        if "ground_system" in result:
            lines.append(textwrap.fill(ground_line(result["ground_system"]), 100))
        lines += [textwrap.fill(n, 100, initial_indent="- ", subsequent_indent="  ")
                  for n in result.get("notes", NOTES)]
    return "\n".join(lines) + "\n"


def _slug(text: str) -> str:
    return re.sub(r"[^A-Za-z0-9]+", "-", str(text)).strip("-").lower() or "x"


def grid_csv(row: dict) -> str:
    """One pattern as CSV: bearing_deg, takeoff_deg, gain_dbi (takeoff outer, bearing inner)."""
    import io

    g = np.asarray(row["gain_dbi"], dtype=float)
    az, el = np.meshgrid(np.asarray(row["azimuth_deg"]), np.asarray(row["elevation_deg"]))
    buf = io.StringIO()
    buf.write("bearing_deg,takeoff_deg,gain_dbi\n")
    np.savetxt(buf, np.column_stack([az.ravel(), el.ravel(), g.ravel()]), fmt=("%.0f", "%.0f", "%.2f"),
               delimiter=",")
    return buf.getvalue()


def _unique(stem: str, seen: set) -> str:
    name, n = stem, 2
    while name in seen:
        name, n = f"{stem}-{n}", n + 1
    seen.add(name)
    return name


def write_files(site, args, result, out_dir) -> list[Path]:
    """pattern.json; per band and option one figure (PNG); per band and state the gain grid (CSV)."""
    from ..fileio import atomic_write_json, atomic_write_text
    from ..render.goalchart import draw_band_figure

    out = Path(out_dir)
    written = [atomic_write_json(out / "pattern.json", result)]
    seen: set = set()
    for block in _blocks(result["patterns"]):
        base = f"pattern-{_slug(block[0]['band'])}-{_slug(block[0]['option'])}"
        written.append(draw_band_figure(block, out / f"{_unique(base, seen)}.png", site.station.name,
                                        foreground=result.get("foreground", ())))
        for p in block:
            name = _unique(f"{base}-{_slug(p['state'])}", seen)
            written.append(atomic_write_text(out / f"{name}.csv", grid_csv(p)))
    return written
