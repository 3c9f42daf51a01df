"""`lobeplan paths`: bearings and distances from the station to every goal."""
from __future__ import annotations

import numpy as np

from ..geo.paths import bearing_arc, goal_paths
from ..geo.regions import goal_points, parse_region, region_area
from .widths import width

__all__ = ["SITE_SECTIONS", "build", "format_text", "goal_path_rows", "region_notes"]

SITE_SECTIONS = ("station", "goal")  # [array] is not used here


def goal_path_rows(site) -> list[dict]:
    rows = []
    for goal in site.goals:
        for j, text in enumerate(goal.avoid):  # refuse a bad avoid region here too, not only in plan
            region_area(site, text, None, f"{goal.key}.avoid[{j + 1}]")
        lons, lats = goal_points(site, goal)
        bearing, dist = goal_paths(site.station, lons, lats, goal.path)
        start, end, median = bearing_arc(bearing)
        rows.append({
            "name": goal.name,
            "region": goal.region,
            "path": goal.path,
            "points": int(lons.size),
            "bearing_deg": {"start": round(start, 1), "end": round(end, 1), "median": round(median, 1)},
            "distance_km": {"min": round(float(np.min(dist)), 1), "median": round(float(np.median(dist)), 1),
                            "max": round(float(np.max(dist)), 1)},
        })
    return rows


def region_notes(site) -> list[str]:
    """What alternative country names in the goals were taken to mean ("England" -> the United Kingdom)."""
    notes = []
    for goal in site.goals:
        for text in (goal.region, *goal.avoid):
            reg = parse_region(text)
            if reg.note:
                notes.append(f"{goal.name}: {text}: {reg.note}")
    return list(dict.fromkeys(notes))


def build(site, args=None) -> dict:
    st = site.station
    out = {
        "station": {"lat_deg": round(st.lat_deg, 6), "lon_deg": round(st.lon_deg, 6), "locator": st.locator},
        "points_per_goal": site.propagation.points_per_goal,
        "goals": goal_path_rows(site),
    }
    notes = region_notes(site)
    if notes:
        out["notes"] = notes
    return out


def format_text(result: dict) -> str:
    st = result["station"]
    w = width(28, (g["name"] for g in result["goals"]))
    lines = [f"Great-circle paths from {st['locator']} ({st['lat_deg']:.4f}, {st['lon_deg']:.4f})",
             "",
             f"{'goal':<{w}} {'path':<5} {'bearings (clockwise)':>22} {'median':>7}"
             f" {'nearest':>9} {'median':>9} {'farthest':>9} {'points':>6}",
             f"{'':<{w}} {'':<5} {'deg':>22} {'deg':>7} {'km':>9} {'km':>9} {'km':>9}"]
    for g in result["goals"]:
        b, d = g["bearing_deg"], g["distance_km"]
        arc = f"{b['start']:5.1f} -> {b['end']:5.1f}"
        lines.append(f"{g['name']:<{w}} {g['path']:<5} {arc:>22} {b['median']:7.1f}"
                     f" {d['min']:9.0f} {d['median']:9.0f} {d['max']:9.0f} {g['points']:6d}")
    lines.append("")
    few = [g["name"] for g in result["goals"] if g["points"] < result.get("points_per_goal", 0)]
    if few:
        lines.append(f"Fewer points than points_per_goal ({result['points_per_goal']}) for "
                     f"{', '.join(few)}: the region is smaller than 1 km2 (one point stands for it) or too "
                     "thin to sample finer.")
    lines.append("Bearings are true (clockwise from north); long path = bearing + 180 deg, "
                 "distance = 40030 km - short.")
    lines += [f"Note: {n}" for n in result.get("notes", [])]
    return "\n".join(lines) + "\n"
