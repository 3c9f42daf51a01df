"""`lobeplan needs`: takeoff-angle needs per band and goal."""
from __future__ import annotations

from ..plan.planner import needs_for_site
from ..progress import ProgressBar
from .widths import width

__all__ = ["SITE_SECTIONS", "build", "build_from_goal_bands", "format_text"]

SITE_SECTIONS = ("station", "band", "goal")  # [array] is not used here


def _round(x, nd):
    return None if x is None else round(float(x), nd)


def build(site, args) -> dict:
    with ProgressBar(1.0, "takeoff-angle needs", enabled=not getattr(args, "json", False)) as bar:
        rows, caveats = needs_for_site(site, lambda done, total: bar.set(done / total if total else 1.0))
    return build_from_goal_bands(site, rows, caveats)


def build_from_goal_bands(site, rows, caveats) -> dict:
    """The verb's result from needs already computed (the planner's goal-bands)."""
    needs = []
    for gb in rows:
        n = gb.needs
        needs.append({
            "band": gb.band_name,
            "goal": gb.goal_name,
            "path": gb.path,
            "open_fraction": round(n.open_fraction, 4),
            "elevation_deg": {"p10": _round(n.elevation_p10, 1), "median": _round(n.elevation_median, 1),
                              "p90": _round(n.elevation_p90, 1)},
            "modes": [{"layer": m.layer, "hops": m.hops, "share": round(m.share, 4),
                       "elevation_deg": round(m.elevation_deg, 1)} for m in n.modes],
            "open_hours_utc": list(n.open_hours_utc),
            "by_month": _by_month(n),
        })
    return {"model": site.propagation.model, "needs": needs, "caveats": list(caveats)}


def _by_month(n) -> list[dict]:
    """Per month, the open share of each UT hour 0..23 (None for an hour not modelled)."""
    if n.open_share_by_slot is None:
        return []
    out = []
    for mi, month in enumerate(n.months):
        hours = [None] * 24
        for hi, h in enumerate(n.hours_utc):
            hours[h] = round(float(n.open_share_by_slot[mi, hi]), 4)
        out.append({"month": int(month), "open_share_by_hour": hours})
    return out


def _hour_ranges(hours: list[int]) -> str:
    from ..propagation.model import hour_ranges_text

    return hour_ranges_text(hours, " ") or "-"


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
    w = width(26, (r["goal"] for r in result["needs"]))
    bands: list[str] = []
    for row in result["needs"]:
        if row["band"] not in bands:
            bands.append(row["band"])
    for band in bands:
        lines.append(f"{band}")
        lines.append(f"  {'goal':<{w}} {'path':<5} {'open':>5}  {'p10':>5} {'median':>6} {'p90':>5}"
                     f"  {'open UT hours':<24} modes (share @ median elevation deg)")
        for row in (r for r in result["needs"] if r["band"] == band):
            e = row["elevation_deg"]
            share = row["open_fraction"]
            open_text = "  <1%" if 0 < share < 0.005 else f"{100 * share:4.0f}%"
            lines.append(f"  {row['goal']:<{w}} {row['path']:<5} {open_text}"
                         f"  {fmt(e['p10'])} {fmt(e['median']):>6} {fmt(e['p90'])}"
                         f"  {_hour_ranges(row['open_hours_utc']):<24} {_mode_text(row['modes'])}")
        lines.append("")
    lines.append("open: share of the region's sampled points x hours with an open mode. Elevations "
                 "in degrees (10th, 50th, 90th percentile). Open UT hours: [start-end) hours on which "
                 "at least half the region is open.")
    for c in result.get("caveats", []):
        lines.append(f"Note: {c}")
    return "\n".join(lines) + "\n"
