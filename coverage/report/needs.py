"""`lobeplan needs`: takeoff-angle needs per band and goal."""
from __future__ import annotations

from ..geo.paths import goal_paths
from ..geo.regions import goal_points
from ..progress import ProgressBar
from ..propagation.needs import band_needs, prepare_goal

HELP = "takeoff angles each band needs to reach each goal, and the hours it is open"

__all__ = ["HELP", "site_needs", "build", "format_text"]


def site_needs(site, progress_bar: ProgressBar | None = None) -> list[tuple]:
    """Needs of every (goal, band) pair of a site.

    The heavy, band-independent part (control points, ionosphere) is done
    once per goal.

    Returns
    -------
    list of (Goal, Band, Needs)
    """
    settings = site.propagation
    goals = [(g, site.goal_bands(g)) for g in site.goals]
    out = []
    for i, (goal, bands) in enumerate(goals):
        lons, lats = goal_points(site, goal)
        bearing, dist = goal_paths(site.station, lons, lats, goal.path)
        callback = progress_bar.callback(i, 0.8) if progress_bar is not None else None
        geo = prepare_goal(settings, site.station.lon_deg, site.station.lat_deg,
                           lons, lats, bearing, dist, goal.path, progress=callback)
        for j, band in enumerate(bands):
            out.append((goal, band, band_needs(geo, band.freq_hz, settings)))
            if progress_bar is not None:
                progress_bar.set(i + 0.8 + 0.2 * (j + 1) / len(bands))
    return out


def _round(x, nd):
    return None if x is None else round(float(x), nd)


def build(site, args) -> dict:
    total = max(len(site.goals), 1)
    with ProgressBar(total, "needs", enabled=not getattr(args, "json", False)) as bar:
        rows = site_needs(site, bar)
    caveats: list[str] = []
    needs = []
    for goal, band, n in rows:
        for c in n.caveats:
            if c not in caveats:
                caveats.append(c)
        needs.append({
            "band": band.name,
            "goal": goal.name,
            "path": goal.path,
            "open_fraction": round(n.open_fraction, 4),
            "elevation_deg": {"p10": _round(n.elevation_p10, 1), "median": _round(n.elevation_median, 1),
                              "p90": _round(n.elevation_p90, 1)},
            "modes": [{"layer": m.layer, "hops": m.hops, "share": round(m.share, 4),
                       "elevation_deg": round(m.elevation_deg, 1)} for m in n.modes],
            "open_hours_utc": list(n.open_hours_utc),
        })
    return {"model": site.propagation.model, "needs": needs, "caveats": caveats}


def _hour_ranges(hours: list[int]) -> str:
    if not hours:
        return "-"
    if len(hours) == 24:
        return "all day"
    hs = sorted(hours)
    runs = []
    start = prev = hs[0]
    for h in hs[1:]:
        if h != prev + 1:
            runs.append((start, prev))
            start = h
        prev = h
    runs.append((start, prev))
    # a run ending at 23 and one starting at 0 are one run across midnight
    if len(runs) > 1 and runs[0][0] == 0 and runs[-1][1] == 23:
        runs = [(runs[-1][0], runs[0][1])] + runs[1:-1]
    return " ".join(f"{a:02d}-{b + 1:02d}" for a, b in runs)


def _mode_text(modes: list[dict], limit: int = 3) -> str:
    if not modes:
        return "-"
    parts = [f"{m['layer']} {m['hops']}-hop {100 * m['share']:.0f}% @{m['elevation_deg']:.0f}"
             for m in modes[:limit]]
    if len(modes) > limit:
        parts.append(f"+{len(modes) - limit} more")
    return ", ".join(parts)


def format_text(result: dict) -> str:
    def fmt(x):
        return "    -" if x is None else f"{x:5.1f}"

    lines = [f"Takeoff-angle needs ({result['model']} model)", ""]
    bands: list[str] = []
    for row in result["needs"]:
        if row["band"] not in bands:
            bands.append(row["band"])
    for band in bands:
        lines.append(f"{band}")
        lines.append(f"  {'goal':<26} {'path':<5} {'open':>5}  {'p10':>5} {'median':>6} {'p90':>5}"
                     f"  {'open UT hours':<24} modes (share @ median elevation deg)")
        for row in (r for r in result["needs"] if r["band"] == band):
            e = row["elevation_deg"]
            lines.append(f"  {row['goal'][:26]:<26} {row['path']:<5} {100 * row['open_fraction']:4.0f}%"
                         f"  {fmt(e['p10'])} {fmt(e['median']):>6} {fmt(e['p90'])}"
                         f"  {_hour_ranges(row['open_hours_utc']):<24} {_mode_text(row['modes'])}")
        lines.append("")
    lines.append("open: share of the region's sampled points x hours with an open mode. Elevations "
                 "in degrees (10th, 50th, 90th percentile). Open UT hours: [start-end) hours on which "
                 "at least half the region is open.")
    for c in result.get("caveats", []):
        lines.append(f"Note: {c}")
    return "\n".join(lines) + "\n"
