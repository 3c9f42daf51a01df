"""`lobeplan plan`: ranking, per-goal table, spacing comparison, results files."""
from __future__ import annotations

import csv
import functools
import io
import math
from pathlib import Path

import numpy as np

from ..safety import CAUTIONS
from ..site import element_caveats, height_caveats, mesh_caveats, radial_caveats
from .ground import ground_line, ground_summary
from .widths import width

__all__ = ["add_arguments", "check_arguments", "build", "build_from_plan", "format_text", "write_files", "run_plan",
           "score_definition"]


def add_arguments(p) -> None:
    p.add_argument("--date", default=None, metavar="YYYY-MM-DD",
                   help="date printed on maps (default: today); results carry none")


def check_arguments(args) -> None:
    from .map import map_date

    map_date(args)  # a bad --date is refused before any work is done


def _r(x, nd: int = 3):
    if x is None:
        return None
    x = float(x)
    if not math.isfinite(x):
        return None
    return round(x, nd) + 0.0   # no "-0.0"


@functools.lru_cache(maxsize=2)
def run_plan(site, quiet: bool = False):
    """The plan of the site, kept for write_files; a progress bar on a terminal."""
    from ..plan.planner import make_plan
    from ..progress import ProgressBar

    bar = ProgressBar(1.0, "takeoff-angle needs", enabled=not quiet)
    try:
        return make_plan(site, progress=lambda done, total: bar.set(done / total if total else 1.0))
    finally:
        bar.close()


def _goal_row(g) -> dict:
    return {"goal": g.goal, "path": g.path, "band": g.band, "state": g.state or None,
            "mean_gain_dbi": _r(g.mean_gain_dbi, 2), "p10_gain_dbi": _r(g.p10_gain_dbi, 2),
            "advantage_db": _r(g.advantage_db, 2), "value_db": _r(g.value_db, 2),
            "open_fraction": _r(g.open_fraction, 3), "avoid_advantage_db": _r(g.avoid_advantage_db, 2),
            "kind": g.kind or None, "design_band": g.design_band}


def _state_kinds(plan) -> list[dict]:
    """How every state's currents are made on every band (forced, as-built, fed)."""
    out = []
    for op in plan.options:
        for s in op.state_names:
            bands = {b: r for (b, name), r in op.patterns.items() if name == s}
            design = next((r.design_band for r in bands.values() if r.design_band), None)
            out.append({"option": op.option, "state": s, "design_band": design,
                        "kind": {b: r.kind for b, r in bands.items()}})
    return out


def build_from_plan(site, plan) -> dict:
    from ..plan.planner import goal_rows, windows_within
    from .paths import goal_path_rows
    from .schedule import schedule_of, schedule_options, schedule_rows

    def bearing(layout, theta):   # one vertical has no baseline
        return None if layout == "single" else _r(theta, 1)

    ranking = [{"option": e.option, "orientation_deg": bearing(e.layout, e.orientation_deg),
                "spacing_m": _r(e.spacing_m, 3),
                "layout": e.layout, "score_db": _r(e.score_db, 2),
                "goals": [_goal_row(g) for g in e.goals]} for e in plan.ranking]
    uses = {op.option: op.use for op in plan.options}
    for entry in ranking:  # issue 14: receive options are scored by directivity
        entry["use"] = uses[entry["option"]]
    comparison = []
    for op in plan.options:
        entry = {"option": op.option, "spacing_m": _r(op.spacing_m, 3), "layout": op.layout,
                 "best_orientation_deg": bearing(op.layout, op.best_orientation_deg),
                 "score_db": _r(op.best_score_db, 2),
                 "within_1db_deg": [_r(op.window_deg[0], 1), _r(op.window_deg[1], 1)] if op.window_deg else None,
                 "goals": [], "use": op.use}
        runs, every = windows_within(op.orientation_deg, op.score_db, op.allowed)
        entry["within_1db_intervals_deg"] = [[_r(a, 1), _r(b, 1)] for a, b in runs]
        entry["within_1db_every_bearing"] = every
        entry["swept"] = len(op.orientation_deg) > 1
        if op.layout == "single":   # one vertical: no bearing to be within 1 dB of
            entry["within_1db_intervals_deg"], entry["within_1db_every_bearing"] = [], False
        if op.best_orientation_deg is not None:
            idx = int(np.argmin(np.abs(op.orientation_deg - op.best_orientation_deg)))
            entry["goals"] = [_goal_row(g) for g in goal_rows(op, plan.goal_bands, idx, plan.reference_gain_dbi)]
        comparison.append(entry)
    scores = [{"option": op.option, "spacing_m": _r(op.spacing_m, 3),
               "orientation_deg": [_r(t, 2) for t in op.orientation_deg],
               "score_db": [_r(s, 3) for s in op.score_db],
               "allowed_orientation_deg": [list(a) for a in site.orientation.allowed_deg]}
              for op in plan.options]
    st = site.station
    return {
        "station": {"name": st.name, "lat_deg": _r(st.lat_deg, 6), "lon_deg": _r(st.lon_deg, 6),
                    "locator": st.locator},
        "model": site.propagation.model,
        "ranking": ranking,
        "spacing_comparison": comparison,
        "orientation_scores": scores,
        "months": list(site.propagation.month_list),
        "schedule_options": schedule_options(plan),
        "schedule": schedule_rows(schedule_of(site, plan)),
        "states": _state_kinds(plan),
        "stakes": stakes_json(site, plan),
        "caveats": list(plan.caveats) + list(height_caveats(site)) + list(mesh_caveats(site))
        + list(radial_caveats(site))
        + list(element_caveats(site)),
        "ground_system": ground_summary(site),
        "cautions": list(CAUTIONS),
        "goal_paths": goal_path_rows(site),   # bearings and distances the plan page shows
    }


def _chosen_bearing(site, plan, op) -> float:
    """The best-ranked bearing of an option (its own best when it is not ranked)."""
    for e in plan.ranking:
        if e.option == op.option:
            return float(e.orientation_deg)
    if op.best_orientation_deg is not None:
        return float(op.best_orientation_deg)
    return float(site.orientation.fixed_deg or 0.0)


def staking_plans(site, plan) -> list:
    """A staking plan per option at its best-ranked bearing (lines: each state's)."""
    from ..antenna.pattern import state_network
    from ..plan.stakes import staking_plan

    out = []
    for option, op in zip(site.array.options, plan.options):
        lines = {}
        for s in option.states:
            if s.is_fed:
                lines[s.name] = s.line_m
            elif s.design_freq_hz is not None and option.n_elements > 1:
                lines[s.name] = state_network(site.array, option, s).line_m
        out.append(staking_plan(option.name, option.positions_m, option.junction_point_m,
                                _chosen_bearing(site, plan, op), site.station.lon_deg, site.station.lat_deg,
                                lines))
    return out


def _stake_dict(s) -> dict:
    return {"element": s.name, "along_m": _r(s.along_m, 3), "across_m": _r(s.across_m, 3),
            "north_m": _r(s.north_m, 3), "east_m": _r(s.east_m, 3), "lat_deg": _r(s.lat_deg, 7),
            "lon_deg": _r(s.lon_deg, 7)}


def stakes_json(site, plan) -> list[dict]:
    out = []
    for sp in staking_plans(site, plan):
        junction = _stake_dict(sp.junction)
        junction.pop("element")
        out.append({"option": sp.option, "orientation_deg": _r(sp.orientation_deg, 1),
                    "elements": [_stake_dict(s) for s in sp.elements], "junction": junction,
                    "runs": [{"element": r.element, "run_m": _r(r.run_m, 3), "bearing_deg": _r(r.bearing_deg, 1),
                              "line_m": {k: _r(v, 3) for k, v in r.line_m.items()}} for r in sp.runs]})
    return out


def build(site, args=None) -> dict:
    return build_from_plan(site, run_plan(site, bool(getattr(args, "json", False))))


def _f(x, spec: str = "+6.2f", none: str = "—") -> str:
    return none.rjust(len(format(0.0, spec))) if x is None else format(x, spec)


def format_text(result: dict) -> str:
    st = result["station"]
    out = [f"Plan for {st['name']} ({st['locator']}), propagation model: {result['model']}"]
    if "ground_system" in result:
        out.append(ground_line(result["ground_system"]))
    out.append("")
    avoid = any(g.get("avoid_advantage_db") is not None for e in result["ranking"] for g in e["goals"])
    out.append("Best baseline bearings (score in dB, defined below)"
               if any(e["orientation_deg"] is not None for e in result["ranking"])
               else "Score in dB, defined below (one vertical has no baseline to turn)")
    wo = width(24, [e["option"] for e in result["ranking"]] + [c["option"] for c in result["spacing_comparison"]])
    out.append(f"  {'#':>2}  {'option':<{wo}} {'bearing':>8} {'score':>7}")
    for i, e in enumerate(result["ranking"], 1):
        where = "no baseline" if e["orientation_deg"] is None else f"{e['orientation_deg']:>7.1f}°"
        out.append(f"  {i:>2}  {e['option']:<{wo}} {where:>8} {_f(e['score_db'], '+7.2f')}")
    if not result["ranking"]:
        out.append("  (no allowed bearing serves an open goal)")
    flat = [c["option"] for c in result["spacing_comparison"]
            if c.get("swept", True) and c.get("within_1db_every_bearing")]
    if result["ranking"] and flat:
        out.append(f"  ({', '.join(flat)}: every allowed bearing is within 1 dB of the best, so the order "
                   "of its bearings means little)")
    out += [f"  {line}" for line in score_definition(avoid)]
    if result["ranking"]:
        best = result["ranking"][0]
        along = ("one vertical (no baseline)" if best["orientation_deg"] is None
                 else f"with the baseline along {best['orientation_deg']:.1f}°")
        how = {"as-built": "as built", "forced": "forced", "fed": "own lines", None: ""}
        wg = width(22, (g["goal"] for g in best["goals"]))
        wb = width(7, (g["band"] for g in best["goals"]))
        wst = width(18, ((g["state"] or "closed") for g in best["goals"]))
        out += ["", f"Per goal, {best['option']} {along}",
                f"  {'goal':<{wg}} {'path':<5} {'band':<{wb}} {'state':<{wst}} {'mean':>7} {'p10':>7} {'vs one':>7} {'open':>5}"
                f"  {'currents':<9}" + (f" {'avoid':>7} {'value':>7}" if avoid else ""),
                f"  {'':<{wg}} {'':<5} {'':<{wb}} {'':<{wst}} {'dBi':>7} {'dBi':>7} {'dB':>7} {'':>5}  {'':<9}"
                + (f" {'dB':>7} {'dB':>7}" if avoid else "")]
        for g in best["goals"]:
            out.append(f"  {g['goal']:<{wg}} {g['path']:<5} {g['band']:<{wb}} {(g['state'] or 'closed'):<{wst}}"
                       f" {_f(g['mean_gain_dbi'], '7.2f')} {_f(g['p10_gain_dbi'], '7.2f')}"
                       f" {_f(g['advantage_db'], '+7.2f')} {g['open_fraction']:5.2f}  {how.get(g.get('kind'), ''):<9}"
                       + (f" {_f(g.get('avoid_advantage_db'), '+7.2f')} {_f(g.get('value_db'), '+7.2f')}"
                          if avoid else ""))
        out += ["  mean: mean gain over the goal's takeoff-angle needs; p10: 10 % of the need gets less;",
                "  vs one: mean minus one vertical's; open: share of the need the band serves;",
                "  currents: as built (by the state's switch network), forced, or its own lines (see below)"]
        if avoid:
            out += ["  avoid: advantage over one vertical toward the goal's avoid regions; value: vs one minus",
                    "  avoid_weight x avoid (credit for a rear below one vertical capped), which the score averages"]
    out += _kinds_text(result.get("states", []))
    out += _stakes_text(result.get("stakes", []), result["ranking"][0]["option"] if result["ranking"] else None)
    if result.get("schedule"):
        out += ["", f"Hour by hour ({len(result['schedule'])} rows of band x month x UT hour in plan.json "
                "'schedule'): lobeplan schedule prints them; --out writes schedule.csv, the switch card and "
                "a schedule figure per band."]
    out += ["", "Spacing options side by side"]
    out.append(f"  {'option':<{wo}} {'spacing':>8} {'best':>7} {'score':>7}  within 1 dB of its best")
    for c in result["spacing_comparison"]:
        sp = "—" if c["spacing_m"] is None else f"{c['spacing_m']:.2f} m"
        win = _window_text(c, any(o["allowed_orientation_deg"] for o in result["orientation_scores"]))
        best_t = "—" if c["best_orientation_deg"] is None else f"{c['best_orientation_deg']:.1f}°"
        out.append(f"  {c['option']:<{wo}} {sp:>8} {best_t:>7} {_f(c['score_db'], '+7.2f')}  {win}")
    comp = result["spacing_comparison"]
    if len(comp) > 1 and all(c["goals"] for c in comp):
        out += ["", "  advantage over one vertical at each option's best bearing, dB"]
        labels = [g["goal"] + (" (long)" if g["path"] == "long" else "") for g in comp[0]["goals"]]
        wl = width(22, labels)
        wb2 = width(7, (g["band"] for g in comp[0]["goals"]))
        wc = [width(16, [c["option"]]) for c in comp]
        head = "  " + f"{'goal':<{wl}} {'band':<{wb2}}" + "".join(f" {c['option']:>{n}}" for c, n in zip(comp, wc))
        out.append(head)
        for rows in zip(*(c["goals"] for c in comp)):
            g0 = rows[0]
            label = g0["goal"] + (" (long)" if g0["path"] == "long" else "")
            out.append("  " + f"{label:<{wl}} {g0['band']:<{wb2}}"
                       + "".join(f" {_f(g['advantage_db'], f'+{n}.2f')}" for g, n in zip(rows, wc)))
    receive = [c["option"] for c in result["spacing_comparison"] if c.get("use") == "receive"]
    if receive:
        out += ["", "Scored by directivity, not gain (use = \"receive\"): " + ", ".join(receive) + ". For these "
                "the mean and p10 columns are dB over the sky mean (the solid-angle mean gain over the upper "
                "hemisphere, over this ground) and the advantage is over one vertical's directivity."]
    if result["caveats"]:
        out += ["", "Propagation model notes"]
        out += [f"  - {c}" for c in result["caveats"]]
    out += ["", "Cautions"]
    out += [f"  - {c}" for c in result["cautions"]]
    return "\n".join(out) + "\n"


def _kinds_text(states: list[dict]) -> list[str]:
    """One line per state: on which bands its currents are forced, as built or fed."""
    if not states or all(s["state"] == "single" for s in states):
        return []
    out = ["", "How each state's currents are made (the scores above use these)"]
    for s in states:
        if s["state"] == "single" and list(s["kind"].values()) == ["forced"] * len(s["kind"]):
            continue    # one vertical: fed at its base, no network
        built = [b for b, k in s["kind"].items() if k == "as-built"]
        forced = [b for b, k in s["kind"].items() if k == "forced"]
        fed = [b for b, k in s["kind"].items() if k == "fed"]
        parts = []
        if built:
            parts.append(f"as built from the {s['design_band']} network on " + ", ".join(built))
        if forced:
            parts.append("forced on " + ", ".join(forced))
        if fed:
            parts.append("its own lines (line_m) on " + ", ".join(fed))
        out.append(f"  {s['state']!r} ({s['option'][:24]}): " + "; ".join(parts))
    out.append("  as built: the currents the state's switch network, designed on the state's design band, "
               "really delivers on each band (coupling, line loss, fixed parts); forced: the wanted currents "
               "held exactly (an ideal feed, or forced_bands: a network of its own on that band).")
    return out


def _stakes_text(stakes: list[dict], option: str | None) -> list[str]:
    """Where to drive the stakes for the best-ranked option (all options: stakes.csv)."""
    sp = next((s for s in stakes if s["option"] == option), None)
    if sp is None or len(sp["elements"]) < 2:
        return []
    out = ["", f"Staking plan: {sp['option']} with the baseline along {sp['orientation_deg']:.1f}° "
           "(metres from element 1; element 1 at the station's position)",
           f"  {'stake':<9} {'along':>7} {'across':>7} {'north':>8} {'east':>8} {'latitude':>12} {'longitude':>13}"]
    j = dict(sp["junction"], element="junction")
    for s in sp["elements"] + [j]:
        out.append(f"  {s['element']:<9} {s['along_m']:>7.2f} {s['across_m']:>7.2f} {s['north_m']:>8.2f} "
                   f"{s['east_m']:>8.2f} {s['lat_deg']:>12.6f} {s['lon_deg']:>13.6f}")
    for r in sp["runs"]:
        lines = ", ".join(f"{k} {v:.2f} m" for k, v in r["line_m"].items())
        out.append(f"  run to element {r['element']}: {r['run_m']:.2f} m toward {r['bearing_deg']:.0f}° from the "
                   f"junction" + (f"; lines {lines}" if lines else ""))
    out.append("  Check the positions with a tape and a compass corrected for magnetic declination: bearings "
               "here are true.")
    return out


def _stakes_csv(result: dict) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(["option", "orientation_deg", "element", "along_m", "across_m", "north_m", "east_m", "lat_deg",
                "lon_deg"])
    for sp in result.get("stakes", []):
        for s in sp["elements"] + [dict(sp["junction"], element="junction")]:
            w.writerow([sp["option"], sp["orientation_deg"], s["element"], s["along_m"], s["across_m"],
                        s["north_m"], s["east_m"], f"{s['lat_deg']:.7f}", f"{s['lon_deg']:.7f}"])
    return buf.getvalue()


def write_layout(site, plan, result: dict, out_dir) -> Path:
    """The layout figure: every option's ground plan at its chosen bearing."""
    from ..antenna.pattern import lobe_bearings_deg
    from ..grid import to_true_bearing
    from ..render.layout import draw_layout

    plans = staking_plans(site, plan)
    beams = []
    for option, op, sp in zip(site.array.options, plan.options, plans):
        bm = {}
        for s in option.states:
            band = s.design_band or site.bands[0].name
            res = op.patterns.get((band, s.name)) or next(r for (b, n), r in op.patterns.items() if n == s.name)
            el = int(np.unravel_index(int(np.argmax(res.gain_dbi)), res.gain_dbi.shape)[0])
            row = to_true_bearing(res.gain_dbi[el], sp.orientation_deg)
            bm[s.name] = () if option.n_elements == 1 else tuple(b for b, _ in lobe_bearings_deg(row))
        beams.append(bm)
    title = f"{site.station.name}: where the elements go (top view, north up; beams on each state's design band)"
    return draw_layout(plans, site.orientation.allowed_deg, beams, title, Path(out_dir) / "layout.png")


def score_definition(avoid: bool) -> list[str]:
    """The score's definition, printed under the ranking (and in the README)."""
    lines = ["score: the mean of each open goal's value on each band, weighted by goal weight x open share",
             "  (the share of its takeoff-angle need the band serves), in dB over one vertical of the same",
             "  height on the same ground; value = advantage over one vertical"]
    if avoid:
        lines[-1] += " minus avoid_weight x the advantage"
        lines.append("  toward the avoid regions (a rear below one vertical earns at most 10 log10 N dB credit, "
                     "N elements)")
    return lines


def _window_text(c: dict, lot: bool) -> str:
    """Bearings within 1 dB of the option's best: every run, or what fixed / flat means."""
    runs = c.get("within_1db_intervals_deg")
    if c.get("layout") == "single":
        return "— (one vertical, no baseline)"
    if c["best_orientation_deg"] is None or not runs:
        return "—"
    if not c.get("swept", True):
        return "fixed bearing, not swept"
    text = ", ".join(f"{a:.0f}°" if a == b else f"{a:.0f}° to {b:.0f}°" for a, b in runs)
    if c.get("within_1db_every_bearing"):
        return f"every allowed bearing ({text})" if lot else "every bearing (the score is flat)"
    return text


def _csv(result: dict) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(["rank", "option", "layout", "spacing_m", "orientation_deg", "score_db", "goal", "path", "band",
                "state", "mean_gain_dbi", "p10_gain_dbi", "advantage_db", "open_fraction", "avoid_advantage_db",
                "value_db"])
    for i, e in enumerate(result["ranking"], 1):
        for g in e["goals"]:
            w.writerow([i, e["option"], e["layout"], e["spacing_m"], e["orientation_deg"], e["score_db"], g["goal"],
                        g["path"], g["band"], g["state"], g["mean_gain_dbi"], g["p10_gain_dbi"], g["advantage_db"],
                        g["open_fraction"], g["avoid_advantage_db"], g["value_db"]])
    return buf.getvalue()


def write_files(site, args, result, out_dir) -> list[Path]:
    """plan.json and plan.csv, then the maps (PNG per band), panels, GeoJSON and plan.html."""
    from ..fileio import atomic_write_json, atomic_write_text
    from ..render.page import write_page
    from .map import write_plan_figures

    out = Path(out_dir)
    written = [atomic_write_json(out / "plan.json", result), atomic_write_text(out / "plan.csv", _csv(result)),
               atomic_write_text(out / "stakes.csv", _stakes_csv(result))]
    plan = run_plan(site, bool(getattr(args, "json", False)))
    from .schedule import schedule_of, write_schedule_files

    written += write_schedule_files(site, plan, schedule_of(site, plan), result, args, out)
    return written + write_plan_figures(site, plan, args, out) + [write_layout(site, plan, result, out),
                                                                  write_page(site, plan, result, out / "plan.html")]
