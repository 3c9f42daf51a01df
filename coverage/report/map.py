"""`lobeplan map`: the azimuthal-equidistant wall map with the lobes, per band.

The result (and its JSON) names the files and what each map shows; it has no
date, so it stays byte-identical from one day to the next. The date printed
on the maps is ``--date`` or today.
"""
from __future__ import annotations

import datetime as _dt
import re
from pathlib import Path

from ..errors import UsageError
from .widths import width

__all__ = ["add_arguments", "check_arguments", "default_out", "build", "format_text", "write_files",
           "map_date", "FORMATS", "PAPERS", "DEFAULT_DPI", "map_file_name", "write_plan_figures"]

FORMATS = ("png", "pdf", "svg")
PAPERS = ("a4", "letter")
DEFAULT_DPI = 200            # A4 at 200 dpi is 1654 px wide
DPI_RANGE = (50, 1200)


def add_arguments(p) -> None:
    p.add_argument("--band", metavar="B", default=None, help="only this band (its name in the site file)")
    p.add_argument("--format", default="png", choices=FORMATS, help="file format (default png)")
    p.add_argument("--paper", default="a4", choices=PAPERS, help="page size, portrait (default a4)")
    p.add_argument("--dpi", default=None, metavar="N", help=f"PNG resolution (default {DEFAULT_DPI})")
    p.add_argument("--date", default=None, metavar="YYYY-MM-DD", help="date printed on the maps (default: today)")


def map_date(args) -> str:
    """The date to print: ``--date`` checked, or today (the clock is read here, at the edge)."""
    text = getattr(args, "date", None)
    if text is None:
        return _dt.date.today().isoformat()
    if not re.fullmatch(r"\d{4}-\d{2}-\d{2}", str(text)):
        raise UsageError(f"--date: {text!r} is not a date; expected YYYY-MM-DD, such as 2026-12-01")
    try:
        return _dt.date.fromisoformat(text).isoformat()
    except ValueError:
        raise UsageError(f"--date: {text!r} is not a calendar date; expected YYYY-MM-DD") from None


def _dpi(args) -> int:
    text = getattr(args, "dpi", None)
    if text is None:
        return DEFAULT_DPI
    try:
        value = int(str(text))
    except ValueError:
        raise UsageError(f"--dpi: {text!r} is not a whole number; expected {DPI_RANGE[0]} to {DPI_RANGE[1]}") from None
    if not DPI_RANGE[0] <= value <= DPI_RANGE[1]:
        raise UsageError(f"--dpi: {value} is out of range; expected {DPI_RANGE[0]} to {DPI_RANGE[1]}")
    return value


def check_arguments(args) -> None:
    map_date(args)
    _dpi(args)


def default_out(args) -> str:
    # a folder of its own, like demo's: a run inside the checkout must not
    # rewrite the committed gallery in maps/
    return "lobeplan-maps"


def map_file_name(band_name: str, fmt: str = "png") -> str:
    from ..render.scene import slug

    return f"map-{slug(band_name)}.{fmt}"


def _r(x, nd=2):
    return None if x is None else round(float(x), nd)


def _bands(site, args):
    from .pattern import select_bands

    return select_bands(site, getattr(args, "band", None))


def build(site, args) -> dict:
    from ..render.scene import band_scene
    from .plan import run_plan

    bands = _bands(site, args)
    plan = run_plan(site, bool(getattr(args, "json", False)))
    fmt = getattr(args, "format", "png") or "png"
    maps = []
    for band in bands:
        sc = band_scene(site, plan, band.name)
        maps.append({
            "band": band.name,
            "file": map_file_name(band.name, fmt),
            "takeoff_deg": _r(sc.takeoff_deg, 1),
            "takeoff_from": "needs" if sc.takeoff_from_needs else "pattern peak",
            "lobes": [{"state": lobe.state, "peak_gain_dbi": _r(lobe.peak_gain_dbi),
                       "peak_bearing_deg": _r(lobe.peak_bearing_deg, 1), "kind": lobe.kind,
                       "design_band": lobe.design_band, "lobes_deg": [_r(b, 1) for b in lobe.lobes_deg]}
                      for lobe in sc.lobes],
            "goals": [{"goal": g.name, "region": g.region,
                       "paths": [{"path": p, "state": s or None, "advantage_db": _r(a), "open_fraction": _r(o, 3)}
                                 for p, s, a, o in g.rows]} for g in sc.goals],
            "avoid": [a.region for a in sc.avoid],
        })
    first = band_scene(site, plan, bands[0].name) if bands else None
    st = site.station
    return {
        "station": {"name": st.name, "locator": st.locator, "lat_deg": _r(st.lat_deg, 6),
                    "lon_deg": _r(st.lon_deg, 6)},
        "option": first.option if first else None,
        "orientation_deg": _r(first.orientation_deg, 1) if first and first.layout != "single" else None,
        "score_db": _r(first.score_db) if first else None,
        "format": fmt,
        "paper": getattr(args, "paper", "a4") or "a4",
        "scale": {"lobe_peak_km": site.map.lobe_peak_km, "lobe_floor_db": site.map.lobe_floor_db,
                  "ring_step_km": site.map.ring_step_km},
        "maps": maps,
    }


def format_text(result: dict) -> str:
    st = result["station"]
    where = ("one vertical, no baseline" if result["orientation_deg"] is None
             else f"baseline along {result['orientation_deg']:.1f}°")
    out = [f"Maps for {st['name']} ({st['locator']}): {result['option']}, {where}", ""]
    w = width(8, (m["band"] for m in result["maps"]))
    wf = width(24, (m["file"] for m in result["maps"]))
    out.append(f"  {'band':<{w}} {'takeoff':>7}  {'file':<{wf}} lobes (peak dBi toward bearing)")
    for m in result["maps"]:
        lobes = ", ".join(f"{lo['state']}{'' if lo['kind'] != 'as-built' else ' (as built)'} "
                          f"{lo['peak_gain_dbi']:+.1f} @ "
                          + ("/".join(f"{b:.0f}°" for b in lo["lobes_deg"]) or "all round")
                          for lo in m["lobes"])
        out.append(f"  {m['band']:<{w}} {m['takeoff_deg']:>6.0f}°  {m['file']:<{wf}} {lobes}")
    built = sorted({lo["design_band"] for m in result["maps"] for lo in m["lobes"] if lo["kind"] == "as-built"})
    if built:
        out.append("")
        out.append("  (as built): the currents the state's network, designed on " + ", ".join(built)
                   + ", delivers on that band (coupling, line loss, fixed parts).")
    out.append("  Bearings after @: every lobe within 1 dB of the state's peak at the takeoff angle, strongest first.")
    return "\n".join(out) + "\n"


def write_files(site, args, result, out_dir) -> list[Path]:
    from ..render.azimap import draw_map
    from ..render.scene import band_scene
    from .plan import run_plan

    plan = run_plan(site, bool(getattr(args, "json", False)))
    date_text = map_date(args)
    dpi = _dpi(args)
    written = []
    for m in result["maps"]:
        scene = band_scene(site, plan, m["band"])
        written.append(draw_map(scene, Path(out_dir) / m["file"], date_text, result["paper"], dpi))
    return written


def write_plan_figures(site, plan, args, out_dir) -> list[Path]:
    """Everything graphic beside the plan results: a PNG map per band, the
    elevation and orientation panels, and the GeoJSON of lobes and goals."""
    from ..render.azimap import draw_map
    from ..render.geojson import write_geojson
    from ..render.panels import draw_elevation_panel, draw_orientation_panel
    from ..render.scene import band_scene

    out = Path(out_dir)
    date_text = map_date(args)
    written = [draw_map(band_scene(site, plan, b.name), out / map_file_name(b.name), date_text, "a4", DEFAULT_DPI)
               for b in site.bands]
    written.append(draw_elevation_panel(site, plan, out / "elevation.png"))
    # one vertical, or a fixed orientation_deg: no bearings to score against each other
    if any(op.layout != "single" and len(op.orientation_deg) > 1 for op in plan.options):
        written.append(draw_orientation_panel(site, plan, out / "orientation.png"))
    written.append(write_geojson(site, plan, out / "plan.geojson"))
    return written
