"""The plan page: one self-contained HTML file to click through the plan.

``plan.html`` holds two embedded JSON blocks and the page's own script and
styles, all inline, so it works opened from disk with no network:

- ``plan-json``: the plan's results, the same text that ``plan.json`` holds.
  Every figure the page prints as a number is read from here; the page
  computes none of its own.
- ``page-drawing``: what only drawing needs: land, goal and avoid outlines
  projected on the azimuthal-equidistant map of the station (the maps'
  projection, simplified to about a tenth of a degree), and the lobe radii of
  every option, band and switch state at the option's best bearing.

Both blocks are escaped for the inside of ``<script>``: every ``<``, ``>`` and
``&`` becomes a JSON ``\\u`` escape, so a name such as ``</script>`` can
neither end the block nor open a tag, and ``JSON.parse`` gives the exact data
back.

References
----------
J. P. Snyder, "Map Projections: A Working Manual", USGS Professional Paper
1395 (1987), pp. 191-202: the azimuthal equidistant projection.
"""
from __future__ import annotations

import functools
import json
from importlib import resources
from pathlib import Path

import numpy as np

from ..fileio import atomic_write_text, dumps_json

__all__ = ["SIMPLIFY_DEG", "script_json", "svg_path", "page_drawing", "page_html", "write_page"]

SIMPLIFY_DEG = 0.1
"""Outline tolerance in degrees (about 11 km): under a pixel on any screen map."""

_MIN_PART_KM2 = 400.0        # land parts smaller than a 20 km square vanish at page scale
_MIN_GOAL_PART_KM2 = 50.0    # a goal's islets too; a goal made only of islets keeps them


def script_json(obj, text: str | None = None) -> str:
    """JSON (or the given JSON text) made safe inside an HTML ``<script>`` block.

    ``<``, ``>`` and ``&`` can only appear inside JSON strings, where the
    ``\\u003c`` style escapes mean the same characters, so the parsed value is
    unchanged while ``</script>`` and ``<!--`` can no longer appear.
    """
    if text is None:
        text = json.dumps(obj, allow_nan=False, ensure_ascii=False, separators=(",", ":"))
    return (text.replace("&", "\\u0026").replace("<", "\\u003c").replace(">", "\\u003e")
            .replace("\u2028", "\\u2028").replace("\u2029", "\\u2029"))


def _ring_d(xy_km: np.ndarray, closed: bool) -> str:
    """One ring or line as relative SVG path commands, in whole kilometres."""
    pts = np.rint(np.asarray(xy_km, dtype=float)).astype(np.int64)
    if len(pts) > 1:
        keep = np.concatenate([[True], np.any(np.diff(pts, axis=0) != 0, axis=1)])
        pts = pts[keep]
    if len(pts) < (3 if closed else 2):
        return ""
    steps = np.diff(pts, axis=0).ravel()
    return f"M{pts[0, 0]} {pts[0, 1]}l" + " ".join(map(str, steps)) + ("z" if closed else "")


def svg_path(geom) -> str:
    """A projected shapely geometry (metres, y north) as an SVG path in km, y down.

    Every part is kept: small parts are dropped before projecting
    (:func:`_simplified`)."""
    out = []

    def xy(coords):
        a = np.asarray(coords, dtype=float)[:, :2] / 1000.0
        return np.column_stack([a[:, 0], -a[:, 1]])

    for part in getattr(geom, "geoms", [geom]):
        if part.is_empty:
            continue
        if part.geom_type == "Polygon":
            out.append(_ring_d(xy(part.exterior.coords), True))
            out += [_ring_d(xy(r.coords), True) for r in part.interiors]
        elif part.geom_type in ("LineString", "LinearRing"):
            out.append(_ring_d(xy(part.coords), False))
        elif hasattr(part, "geoms"):
            out.append(svg_path(part))
    return "".join(out)


def _big_parts(geom, min_km2: float):
    """The polygon parts of a lon/lat geometry of at least ``min_km2`` (spherical
    estimate: square degrees x 111.2 km squared x cos latitude), or None."""
    from shapely.geometry import MultiPolygon

    parts = [p for p in getattr(geom, "geoms", [geom]) if p.geom_type == "Polygon"]
    keep = [p for p in parts
            if p.area * 111.2 ** 2 * max(np.cos(np.radians(p.centroid.y)), 0.01) >= min_km2]
    return MultiPolygon(keep) if keep else None


def _simplified(geom, min_km2: float, keep_one: bool = False):
    """Parts of at least ``min_km2``, simplified by ``SIMPLIFY_DEG`` (lon/lat), or None.

    ``keep_one``: a region made only of small parts (a goal island) keeps them all.
    """
    if geom is None or geom.is_empty:
        return None
    big = _big_parts(geom, min_km2) if min_km2 > 0.0 else geom
    if big is None and keep_one:
        big = geom
    return None if big is None else big.simplify(SIMPLIFY_DEG, preserve_topology=True)


def _fill_d(proj, src, small) -> str:
    """A simplified lon/lat geometry projected as the maps project it, as an SVG path."""
    from .azimap import project_parts

    if small is None or small.is_empty:
        return ""
    return "".join(svg_path(g) for g in project_parts(proj, src, small))


def _edge_d(proj, src, small) -> str:
    """Its coastlines and borders, without the cuts along +-180 deg and the South Pole."""
    from shapely.geometry import MultiLineString

    from .azimap import outline_lines

    segs = outline_lines(small) if small is not None and not small.is_empty else []
    return _fill_d(proj, src, MultiLineString(segs)) if segs else ""


def _label_km(proj, src, geom) -> list[int] | None:
    """Where a goal's name goes: a point inside its largest part, page km (y down)."""
    parts = [p for p in getattr(geom, "geoms", [geom]) if not p.is_empty]
    if not parts:
        return None
    pt = max(parts, key=lambda p: p.area).representative_point()
    x, y = proj.transform_point(pt.x, pt.y, src)
    if not (np.isfinite(x) and np.isfinite(y)):
        return None
    return [int(round(x / 1000.0)), int(round(-y / 1000.0))]


def _size_km(proj, src, small) -> int:
    """The larger side of the goal's projected bounding box, km (small goals get a marker)."""
    from .azimap import project_parts

    pieces = [] if small is None or small.is_empty else project_parts(proj, src, small)
    if not pieces:
        return 0
    x0, y0 = min(g.bounds[0] for g in pieces), min(g.bounds[1] for g in pieces)
    x1, y1 = max(g.bounds[2] for g in pieces), max(g.bounds[3] for g in pieces)
    return int(round(max(x1 - x0, y1 - y0) / 1000.0))


def _option_lobes(site, plan, op, theta_deg: float) -> dict:
    """Lobe radii (km, whole numbers, 360 true bearings) per band and state."""
    from .scene import lobe_radius_km, lobe_rows

    bands = {}
    for band in site.bands:
        _, _, rows = lobe_rows(plan, op, band.name, theta_deg)  # as the maps draw them, foreground included
        top = max(float(r.max()) for r in rows)
        bands[band.name] = {s: [int(v) for v in np.rint(lobe_radius_km(r, top, site.map.lobe_floor_db,
                                                                        site.map.lobe_peak_km))]
                            for s, r in zip(op.state_names, rows)}
    return bands


@functools.lru_cache(maxsize=4)
def _land(lon_deg: float, lat_deg: float) -> tuple[tuple[str, ...], tuple[str, ...]]:
    """Land fills and outlines (SVG paths) for one station, kept for later pages.

    From the maps' light background outlines; goals come at full detail."""
    from ..geo.regions import basemap_geometries
    from .azimap import projection

    proj, src = projection(lon_deg, lat_deg)
    land, borders = [], []
    for geom in basemap_geometries():
        small = _simplified(geom, _MIN_PART_KM2)
        d = _fill_d(proj, src, small)
        if d:
            land.append(d)
            borders.append(_edge_d(proj, src, small))
    return tuple(land), tuple(b for b in borders if b)


def page_drawing(site, plan) -> dict:
    """Everything the page draws but does not print: outlines, lobe radii, colours.

    Parameters
    ----------
    site : Site
    plan : Plan
        From :func:`lobeplan.report.plan.run_plan`.

    Returns
    -------
    dict
        JSON-ready. ``land``, ``borders`` and each goal's ``fill``/``edge``
        are SVG path strings in km on the station's azimuthal-equidistant
        map (x east, y south, the station at 0 0; the antipode at
        ``rim_km``). ``options[i].lobes_km[band][state]`` holds 360 whole-km
        radii over true bearings 0..359 deg, at the option's best bearing
        (the first swept bearing when it has none), scaled as the maps
        scale them (:func:`lobeplan.render.scene.lobe_radius_km`).
    """
    from ..geo.regions import goal_area, region_area
    from . import azimap

    st = site.station
    proj, src = azimap.projection(float(st.lon_deg), float(st.lat_deg))
    land, borders = _land(float(st.lon_deg), float(st.lat_deg))
    goals: dict[str, dict] = {}
    for goal in site.goals:
        if goal.name in goals:   # the long path of a goal: the same region
            continue
        geom = goal_area(site, goal).geometry
        small = _simplified(geom, _MIN_GOAL_PART_KM2, keep_one=True)
        goals[goal.name] = {"name": goal.name, "fill": _fill_d(proj, src, small), "edge": _edge_d(proj, src, small),
                            "label_km": _label_km(proj, src, geom), "size_km": _size_km(proj, src, small)}
    avoid = {}
    for goal in site.goals:
        for text in goal.avoid:
            if text not in avoid:
                geom = region_area(site, text).geometry
                avoid[text] = {"region": text, "for": [],
                               "fill": _fill_d(proj, src, _simplified(geom, _MIN_GOAL_PART_KM2, keep_one=True))}
            if goal.name not in avoid[text]["for"]:
                avoid[text]["for"].append(goal.name)
    options = []
    for op in plan.options:
        theta = op.best_orientation_deg if op.best_orientation_deg is not None else float(op.orientation_deg[0])
        options.append({"option": op.option, "states": list(op.state_names),
                        "lobes_km": _option_lobes(site, plan, op, float(theta))})
    stops = [[float(p), c] for p, c in azimap._GOAL_STOPS]
    return {
        "rim_km": round(azimap.RIM_KM, 1),
        "ring_step_km": float(site.map.ring_step_km),
        "bands": [b.name for b in site.bands],
        "colours": {"sea": azimap.SEA, "land": azimap.LAND, "land_edge": azimap.LAND_EDGE, "ink": azimap.INK,
                    "ring": azimap.RING, "avoid": azimap.AVOID, "closed": azimap.CLOSED,
                    "states": list(azimap.STATE_COLOURS), "goal_stops": stops,
                    "advantage_range_db": azimap.ADVANTAGE_RANGE_DB},
        "land": list(land),
        "borders": list(borders),
        "goals": list(goals.values()),
        "avoid": list(avoid.values()),
        "options": options,
    }


def _asset(name: str) -> str:
    return resources.files("lobeplan.render").joinpath(name).read_text(encoding="utf-8")


def page_html(plan_json_text: str, drawing: dict) -> str:
    """The whole page; ``plan_json_text`` is the text written to ``plan.json``."""
    from .. import __version__ as version

    c = drawing["colours"]
    root = (f":root{{--sea:{c['sea']};--land:{c['land']};--land-edge:{c['land_edge']};--ink:{c['ink']};"
            f"--ring:{c['ring']};--avoid:{c['avoid']};--closed:{c['closed']};}}")
    return "".join([
        "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n",
        "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n",
        f"<meta name=\"generator\" content=\"lobeplan {version}\">\n",
        # no request may leave the file: a policy that allows only what is inline
        "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; "
        "style-src 'unsafe-inline'; script-src 'unsafe-inline'; img-src data:\">\n",
        "<link rel=\"icon\" href=\"data:,\">\n<title>lobeplan plan</title>\n",
        "<style>\n", root, "\n", _asset("page.css"), "</style>\n</head>\n<body>\n",
        _asset("page-body.html"),
        "<script type=\"application/json\" id=\"plan-json\">", script_json(None, plan_json_text.rstrip("\n")),
        "</script>\n<script type=\"application/json\" id=\"page-drawing\">", script_json(drawing),
        "</script>\n<script>\n", _asset("page.js"), "</script>\n</body>\n</html>\n",
    ])


def write_page(site, plan, result: dict, path: str | Path) -> Path:
    """Write ``plan.html`` atomically.

    ``result`` is the dict written to ``plan.json``; the page embeds the
    same text (:func:`lobeplan.fileio.dumps_json`), so its figures are the
    file's.
    """
    return atomic_write_text(path, page_html(dumps_json(result), page_drawing(site, plan)))
