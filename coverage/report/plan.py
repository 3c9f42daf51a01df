"""`lobeplan plan`: ranking, per-goal table, spacing comparison, results files."""
from __future__ import annotations

import csv
import functools
import io
import math
from pathlib import Path

from ..safety import CAUTIONS
from ..site import height_caveats
from .ground import ground_line, ground_summary

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
    return round(x, nd)


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
            "open_fraction": _r(g.open_fraction, 3), "avoid_advantage_db": _r(g.avoid_advantage_db, 2)}


def build_from_plan(site, plan) -> dict:
    from ..plan.planner import goal_rows, windows_within
    from .paths import goal_path_rows
    from .schedule import schedule_of, schedule_options, schedule_rows

    ranking = [{"option": e.option, "orientation_deg": _r(e.orientation_deg, 1), "spacing_m": _r(e.spacing_m, 3),
                "layout": e.layout, "score_db": _r(e.score_db, 2),
                "goals": [_goal_row(g) for g in e.goals]} for e in plan.ranking]
    uses = {op.option: op.use for op in plan.options}
    for entry in ranking:  # issue 14: receive options are scored by directivity
        entry["use"] = uses[entry["option"]]
    comparison = []
    for op in plan.options:
        entry = {"option": op.option, "spacing_m": _r(op.spacing_m, 3), "layout": op.layout,
                 "best_orientation_deg": _r(op.best_orientation_deg, 1), "score_db": _r(op.best_score_db, 2),
                 "within_1db_deg": [_r(op.window_deg[0], 1), _r(op.window_deg[1], 1)] if op.window_deg else None,
                 "goals": [], "use": op.use}
        runs, every = windows_within(op.orientation_deg, op.score_db, op.allowed)
        entry["within_1db_intervals_deg"] = [[_r(a, 1), _r(b, 1)] for a, b in runs]
        entry["within_1db_every_bearing"] = every
        entry["swept"] = len(op.orientation_deg) > 1
        if op.best_orientation_deg is not None:
            idx = int(list(op.orientation_deg).index(op.best_orientation_deg))
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
        "caveats": list(plan.caveats) + list(height_caveats(site)),
        "ground_system": ground_summary(site),
        "cautions": list(CAUTIONS),
        "goal_paths": goal_path_rows(site),   # bearings and distances the plan page shows
    }


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
    out.append("Best baseline bearings (score in dB, defined below)")
    out.append(f"  {'#':>2}  {'option':<24} {'bearing':>8} {'score':>7}")
    for i, e in enumerate(result["ranking"], 1):
        out.append(f"  {i:>2}  {e['option'][:24]:<24} {e['orientation_deg']:>7.1f}° {_f(e['score_db'], '+7.2f')}")
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
        out += ["", f"Per goal, {best['option']} with the baseline along {best['orientation_deg']:.1f}°",
                f"  {'goal':<22} {'path':<5} {'band':<7} {'state':<18} {'mean':>7} {'p10':>7} {'vs one':>7} {'open':>5}"
                + (f" {'avoid':>7} {'value':>7}" if avoid else ""),
                f"  {'':<22} {'':<5} {'':<7} {'':<18} {'dBi':>7} {'dBi':>7} {'dB':>7} {'':>5}"
                + (f" {'dB':>7} {'dB':>7}" if avoid else "")]
        for g in best["goals"]:
            out.append(f"  {g['goal'][:22]:<22} {g['path']:<5} {g['band'][:7]:<7} {(g['state'] or 'closed')[:18]:<18}"
                       f" {_f(g['mean_gain_dbi'], '7.2f')} {_f(g['p10_gain_dbi'], '7.2f')}"
                       f" {_f(g['advantage_db'], '+7.2f')} {g['open_fraction']:5.2f}"
                       + (f" {_f(g.get('avoid_advantage_db'), '+7.2f')} {_f(g.get('value_db'), '+7.2f')}"
                          if avoid else ""))
        out += ["  mean: mean gain over the goal's takeoff-angle needs; p10: 10 % of the need gets less;",
                "  vs one: mean minus one vertical's; open: share of the need the band serves"]
        if avoid:
            out += ["  avoid: advantage over one vertical toward the goal's avoid regions; value: vs one minus",
                    "  avoid_weight x avoid (credit for a rear below one vertical capped), which the score averages"]
    if result.get("schedule"):
        out += ["", f"Hour by hour ({len(result['schedule'])} rows of band x month x UT hour in plan.json "
                "'schedule'): lobeplan schedule prints them; --out writes schedule.csv, the switch card and "
                "a schedule figure per band."]
    out += ["", "Spacing options side by side"]
    out.append(f"  {'option':<24} {'spacing':>8} {'best':>7} {'score':>7}  within 1 dB of its best")
    for c in result["spacing_comparison"]:
        sp = "—" if c["spacing_m"] is None else f"{c['spacing_m']:.2f} m"
        win = _window_text(c, any(o["allowed_orientation_deg"] for o in result["orientation_scores"]))
        best_t = "—" if c["best_orientation_deg"] is None else f"{c['best_orientation_deg']:.1f}°"
        out.append(f"  {c['option'][:24]:<24} {sp:>8} {best_t:>7} {_f(c['score_db'], '+7.2f')}  {win}")
    comp = result["spacing_comparison"]
    if len(comp) > 1 and all(c["goals"] for c in comp):
        out += ["", "  advantage over one vertical at each option's best bearing, dB"]
        head = "  " + f"{'goal':<22} {'band':<7}" + "".join(f" {c['option'][:16]:>16}" for c in comp)
        out.append(head)
        for rows in zip(*(c["goals"] for c in comp)):
            g0 = rows[0]
            label = g0["goal"] + (" (long)" if g0["path"] == "long" else "")
            out.append("  " + f"{label[:22]:<22} {g0['band'][:7]:<7}"
                       + "".join(f" {_f(g['advantage_db'], '+16.2f')}" for g in rows))
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
    written = [atomic_write_json(out / "plan.json", result), atomic_write_text(out / "plan.csv", _csv(result))]
    plan = run_plan(site, bool(getattr(args, "json", False)))
    from .schedule import schedule_of, write_schedule_files

    written += write_schedule_files(site, plan, schedule_of(site, plan), result, args, out)
    return written + write_plan_figures(site, plan, args, out) + [write_page(site, plan, result, out / "plan.html")]
