"""`lobeplan schedule`: which switch state to use on each band, month and UT hour.

The same results come out of `lobeplan plan` (plan.json's ``schedule``
key, schedule.csv, the switch card and the schedule figures).
"""
from __future__ import annotations

import csv
import io
import math
from pathlib import Path

from ..safety import CAUTIONS

__all__ = ["add_arguments", "check_arguments", "build", "build_from_plan", "schedule_rows", "schedule_options",
           "schedule_of", "run_schedule", "format_text", "write_files", "write_schedule_files", "goal_label",
           "SCHEDULE_NOTES"]

SCHEDULE_NOTES = (
    "state: the switch state with the best score in that month and UT hour (the plan's score over the goals "
    "open then, weighted by goal weight and open share); runner-up: the next best state and how many dB of "
    "score it gives up.",
    "open share: share of the goal's sampled points with an open mode in that hour (monthly median "
    "ionosphere, day-to-day spread included); advantage: mean gain over the goal's takeoff-angle needs in that "
    "hour, minus one vertical's, dB.",
    "A goal open on fewer than the closed share of its points in an hour (propagation.closed_share) counts "
    "as closed then; '.' marks an hour with no goal open.",
)


def add_arguments(p) -> None:
    p.add_argument("--date", default=None, metavar="YYYY-MM-DD",
                   help="date printed on the switch card (default: today); results carry none")


def check_arguments(args) -> None:
    from .map import map_date

    map_date(args)


def _r(x, nd: int = 3):
    if x is None:
        return None
    x = float(x)
    return round(x, nd) if math.isfinite(x) else None


def goal_label(name: str, path: str) -> str:
    """A goal's name as the schedule lists it: the long path says so."""
    return f"{name} (long path)" if path == "long" else name


def schedule_rows(schedule) -> list[dict]:
    """The rows of plan.json's ``schedule``: the issue's shape plus the runner-up."""
    out = []
    for r in schedule.rows:
        out.append({"band": r.band, "month": r.month, "hour_utc": r.hour_utc, "option": r.option,
                    "state": r.state, "score_db": _r(r.score_db, 2),
                    "goals": [{"name": goal_label(g.name, g.path), "open_share": _r(g.open_share, 3),
                               "advantage_db": _r(g.advantage_db, 2)} for g in r.goals],
                    "runner_up_state": r.runner_up_state, "runner_up_loss_db": _r(r.runner_up_loss_db, 2)})
    return out


def schedule_options(plan) -> list[dict]:
    return [{"option": op.option, "layout": op.layout, "orientation_deg": _r(op.best_orientation_deg, 1),
             "states": list(op.state_names)} for op in plan.options]



def build_from_plan(site, plan, schedule) -> dict:
    prop = site.propagation
    st = site.station
    return {
        "station": {"name": st.name, "lat_deg": _r(st.lat_deg, 6), "lon_deg": _r(st.lon_deg, 6),
                    "locator": st.locator},
        "model": prop.model,
        "months": list(schedule.months),
        "hours_utc": list(schedule.hours_utc),
        "closed_share": schedule.closed_share,
        "schedule_options": schedule_options(plan),
        "schedule": schedule_rows(schedule),
        "notes": list(SCHEDULE_NOTES),
        "caveats": list(plan.caveats),
        "cautions": list(CAUTIONS),
    }


_SCHEDULES: dict = {}


def schedule_of(site, plan):
    """The schedule of a plan, computed once (the plan's report and files share it)."""
    from ..plan.schedule import make_schedule

    key = (id(site), id(plan))
    if key not in _SCHEDULES:
        if len(_SCHEDULES) >= 2:
            _SCHEDULES.pop(next(iter(_SCHEDULES)))
        # the entry keeps site and plan alive, so their ids stay theirs
        _SCHEDULES[key] = (site, plan, make_schedule(site, plan))
    return _SCHEDULES[key][2]


def run_schedule(site, quiet: bool = False):
    """The plan (computed once per site, see ``plan.run_plan``) and its schedule."""
    from .plan import run_plan

    plan = run_plan(site, quiet)
    return plan, schedule_of(site, plan)


def build(site, args=None) -> dict:
    plan, schedule = run_schedule(site, bool(getattr(args, "json", False)))
    return build_from_plan(site, plan, schedule)


_MONTHS = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")


def _from_the_gap(hours: list[int]) -> list[int]:
    """Hours in clock order starting after the longest gap, so [22, 4) reads 22 23 00 01 02 03."""
    hs = sorted(hours)
    if len(hs) in (0, 24):
        return hs
    gaps = [((hs[(i + 1) % len(hs)] - h) % 24, i) for i, h in enumerate(hs)]
    _, i = max(gaps)
    return hs[i + 1:] + hs[:i + 1]


def format_text(result: dict) -> str:
    st = result["station"]
    out = [f"Switch schedule for {st['name']} ({st['locator']}), propagation model: {result['model']}", ""]
    hours = _from_the_gap(result["hours_utc"])
    for opt in result["schedule_options"]:
        rows = [r for r in result["schedule"] if r["option"] == opt["option"]]
        if opt["orientation_deg"] is None or not rows:
            out += [f"{opt['option']}: no allowed bearing serves an open goal", ""]
            continue
        codes = {s: chr(ord("A") + i) for i, s in enumerate(opt["states"])}
        from ..render.scene import where_text
        out.append(f"{opt['option']}, {where_text(opt.get('layout', ''), opt['orientation_deg'])}   states: "
                   + ", ".join(f"{c} = {s}" for s, c in codes.items()))
        bands = list(dict.fromkeys(r["band"] for r in rows))
        for band in bands:
            out.append(f"  {band}   UT " + "".join(f"{h:02d}"[-2:].rjust(3) for h in hours))
            for m in result["months"]:
                cells = {r["hour_utc"]: r for r in rows if r["band"] == band and r["month"] == m}
                line = "".join(("  " + codes[cells[h]["state"]]) if cells[h]["state"] else "  ." for h in hours)
                out.append(f"  {'':<{len(band)}}   {_MONTHS[m - 1]}" + line)
            losses = [r["runner_up_loss_db"] for r in rows if r["band"] == band and r["runner_up_loss_db"] is not None]
            if losses:
                close = sum(1 for x in losses if x < 1.0)
                out.append(f"  {'':<{len(band)}}   runner-up within 1 dB in {close} of {len(losses)} open "
                           f"month-hours; median loss {sorted(losses)[len(losses) // 2]:.1f} dB")
        out.append("")
    out += [f"  {n}" for n in result["notes"]]
    if result["caveats"]:
        out += ["", "Propagation model notes"]
        out += [f"  - {c}" for c in result["caveats"]]
    out += ["", "Cautions"] + [f"  - {c}" for c in result.get("cautions", [])]
    return "\n".join(out) + "\n"


def _csv(result: dict) -> str:
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(["option", "orientation_deg", "band", "month", "hour_utc", "state", "score_db",
                "runner_up_state", "runner_up_loss_db", "goals"])
    orient = {o["option"]: o["orientation_deg"] for o in result["schedule_options"]}
    for r in result["schedule"]:
        goals = "; ".join(f"{g['name']} open {g['open_share']:.2f} adv {g['advantage_db']:+.2f} dB"
                          for g in r["goals"])
        w.writerow([r["option"], orient.get(r["option"]), r["band"], r["month"], r["hour_utc"], r["state"],
                    r["score_db"], r["runner_up_state"], r["runner_up_loss_db"], goals])
    return buf.getvalue()


def write_schedule_files(site, plan, schedule, result: dict, args, out_dir) -> list[Path]:
    """schedule.csv, the switch card (PDF and PNG) and a schedule figure per band."""
    from ..fileio import atomic_write_text
    from ..render.schedule import draw_schedule_figure, draw_switch_card, schedule_file_name
    from .map import map_date

    out = Path(out_dir)
    written = [atomic_write_text(out / "schedule.csv", _csv(result))]
    if not any(op.best_orientation_deg is not None for op in plan.options):
        return written
    date_text = map_date(args)
    written += draw_switch_card(site, plan, schedule, out / "switch-card", date_text)
    for band in site.bands:
        written.append(draw_schedule_figure(site, plan, schedule, band.name, out / schedule_file_name(band.name)))
    return written


def write_files(site, args, result, out_dir) -> list[Path]:
    from ..fileio import atomic_write_json

    plan, schedule = run_schedule(site, bool(getattr(args, "json", False)))
    return [atomic_write_json(Path(out_dir) / "schedule.json", result)] + write_schedule_files(
        site, plan, schedule, result, args, out_dir)
