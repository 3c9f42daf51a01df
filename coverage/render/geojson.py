"""GeoJSON export (RFC 7946) of the mapped plan: lobes, goals, avoid regions.

Every band's map scene (:func:`.scene.band_scene`) becomes features that any
GIS opens:

- ``kind = "lobe"``: one polygon per (band, state). Its vertex at bearing b
  lies along b from the station at the map's radius taken as a WGS84
  geodesic distance (the map itself draws it on a 6371 km sphere):
  ``lobe_peak_km`` at the band's peak gain, falling linearly in dB to the
  station at ``lobe_floor_db`` below it. ``lobes_deg`` lists every lobe
  within 1 dB of the state's peak (strongest first); ``state_kind`` is
  "forced", "as-built" (from its ``design_band`` network) or "fed".
- ``kind = "goal"``: the goal region with, for every band and path, the
  state that serves it and its advantage over one vertical.
- ``kind = "avoid"``: the regions to keep in the rear.
- ``kind = "station"``: a point, with the baseline bearing.

As RFC 7946 asks (sec. 3.1.9), no ring crosses the antimeridian: polygons are
cut at +-180 deg into a MultiPolygon. Rings follow the right-hand rule
(exterior counterclockwise, sec. 3.1.6); coordinates are WGS84 longitude,
latitude in degrees, rounded to 6 decimals (sec. 11.2 suggests that
precision). A lobe that reaches over a pole is closed through the pole.
"""
from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np

from ..fileio import atomic_write_text
from .scene import band_scene

__all__ = ["lobe_geometry", "plan_geojson", "write_geojson"]

_DIGITS = 6


def _r(x, nd: int = 3):
    if x is None:
        return None
    x = float(x)
    return round(x, nd) if math.isfinite(x) else None


def _fwd(lon0: float, lat0: float, bearing_deg: np.ndarray, distance_km: np.ndarray):
    from ..geo.paths import GEOD

    n = bearing_deg.size
    lons, lats, _ = GEOD.fwd(np.full(n, lon0), np.full(n, lat0), bearing_deg, distance_km * 1000.0)
    return np.asarray(lons, dtype=float), np.asarray(lats, dtype=float)


def _ring_points(lon0: float, lat0: float, radius_km: np.ndarray):
    """Vertices at every whole bearing, refined where the longitude jumps far
    (near a pole), so that unwrapping the longitudes is unambiguous."""
    n = radius_km.size
    bearings = np.arange(n, dtype=float) * (360.0 / n)
    radii = np.asarray(radius_km, dtype=float)
    lons, lats = _fwd(lon0, lat0, bearings, radii)
    for _ in range(12):
        dl = np.abs((np.diff(np.append(lons, lons[0])) + 180.0) % 360.0 - 180.0)
        bad = np.flatnonzero(dl > 60.0)
        if bad.size == 0:
            break
        nxt = (bad + 1) % bearings.size
        b_hi = np.where(nxt == 0, 360.0, bearings[nxt])
        mid_b = 0.5 * (bearings[bad] + b_hi)
        mid_r = 0.5 * (radii[bad] + radii[nxt])
        mlon, mlat = _fwd(lon0, lat0, mid_b, mid_r)
        bearings = np.insert(bearings, bad + 1, mid_b)
        radii = np.insert(radii, bad + 1, mid_r)
        lons = np.insert(lons, bad + 1, mlon)
        lats = np.insert(lats, bad + 1, mlat)
    return lons, lats


def _split_at_antimeridian(poly) -> list:
    import shapely
    from shapely.geometry import box

    out = []
    for k in range(-2, 3):
        shift = 360.0 * k
        piece = poly.intersection(box(-180.0 + shift, -90.0, 180.0 + shift, 90.0))
        if piece.is_empty:
            continue
        piece = shapely.affinity.translate(piece, xoff=-shift)
        out.extend(p for p in _polygons(piece) if p.area > 0)
    return out


def _polygons(geom) -> list:
    if geom.is_empty:
        return []
    if geom.geom_type == "Polygon":
        return [geom]
    if hasattr(geom, "geoms"):
        return [p for g in geom.geoms for p in _polygons(g)]
    return []


def lobe_geometry(lon0_deg: float, lat0_deg: float, radius_km: np.ndarray):
    """The lobe as a lon/lat MultiPolygon cut at the antimeridian (None if empty).

    Parameters
    ----------
    lon0_deg, lat0_deg : float
        The station.
    radius_km : ndarray, shape (n,)
        Geodesic distance of the vertex at bearings 0, 360/n, ... deg.
    """
    import shapely
    from shapely.geometry import MultiPolygon, Polygon

    if float(np.max(radius_km)) <= 0.0:
        return None
    lons, lats = _ring_points(lon0_deg, lat0_deg, radius_km)
    lon_u = np.unwrap(np.append(lons, lons[0]), period=360.0)
    winding = lon_u[-1] - lon_u[0]
    # every vertex, and the first one again, unwrapped: a ring that winds
    # round a pole keeps its last wedge (from the last bearing back to 0)
    ring = list(zip(lon_u, np.append(lats, lats[0])))
    if abs(winding) > 180.0:  # winds round a pole: close the ring along it
        pole = 90.0 if winding < 0 else -90.0   # clockwise bearings wind west round the North Pole
        ring += [(lon_u[-1], pole), (lon_u[0], pole)]
    poly = shapely.make_valid(Polygon(ring))
    parts = []
    for p in _polygons(poly):
        parts.extend(_split_at_antimeridian(p))
    # pieces cut apart and shifted back may touch along a shared meridian:
    # merge them, so that the result is a valid MultiPolygon
    merged = shapely.make_valid(shapely.union_all(parts)) if parts else None
    polys = [p for p in _polygons(merged) if p.area > 0] if merged is not None else []
    if not polys:
        return None
    return MultiPolygon(polys)


def _coords(geom) -> list:
    """GeoJSON MultiPolygon coordinates, right-hand rule, on a 1e-6 deg grid.

    The geometry is snapped to the grid (``shapely.set_precision`` keeps it
    valid there) before the rings are written, so rounding cannot pinch or
    collapse a ring (RFC 7946 sec. 3.1.6: four or more positions).
    """
    import shapely
    from shapely.geometry.polygon import orient

    snapped = shapely.make_valid(shapely.set_precision(geom, 10.0 ** -_DIGITS))
    out = []
    for p in _polygons(snapped):
        p = orient(p, 1.0)
        rings = [[[round(float(x), _DIGITS), round(float(y), _DIGITS)] for x, y in r.coords]
                 for r in [p.exterior, *p.interiors]]
        out.append([r for r in rings if len(r) >= 4])
    return [poly for poly in out if poly and len(poly[0]) >= 4]


def _feature(geometry: dict, properties: dict) -> dict:
    return {"type": "Feature", "geometry": geometry, "properties": properties}


FOREGROUND_DRAWN_M = 5000.0  # a sector's ground goes on; its polygon is drawn this far beyond from_m


def foreground_features(site) -> list[dict]:
    """Foreground sectors as wedge polygons on the ground (kind ``foreground``)."""
    out = []
    st = site.station
    for f in site.array.foreground:
        span = (f.to_deg - f.from_deg) % 360.0 or 360.0
        b = f.from_deg + np.linspace(0.0, span, max(int(span), 2) + 1)
        far = np.full(b.size, (f.from_m + FOREGROUND_DRAWN_M) / 1000.0)
        lon_o, lat_o = _fwd(st.lon_deg, st.lat_deg, b, far)
        if f.from_m > 0:
            lon_i, lat_i = _fwd(st.lon_deg, st.lat_deg, b[::-1], np.full(b.size, f.from_m / 1000.0))
        else:
            lon_i, lat_i = np.array([st.lon_deg]), np.array([st.lat_deg])
        lons = np.concatenate([lon_o, lon_i, lon_o[:1]])
        lats = np.concatenate([lat_o, lat_i, lat_o[:1]])
        # bearings run clockwise; RFC 7946 wants the outer ring counterclockwise
        ring = [[round(float(x), _DIGITS), round(float(y), _DIGITS)] for x, y in zip(lons[::-1], lats[::-1])]
        out.append(_feature({"type": "Polygon", "coordinates": [ring]}, {
            "kind": "foreground", "ground": f.ground.name, "bearing_deg": [f.from_deg, f.to_deg],
            "from_m": f.from_m, "drawn_to_m": f.from_m + FOREGROUND_DRAWN_M}))
    return out


def plan_geojson(site, plan) -> dict:
    """The FeatureCollection of every band's scene (strict JSON, no timestamp)."""
    features = []
    goals: dict[tuple, dict] = {}
    avoid: dict[str, dict] = {}
    first = None
    for band in site.bands:
        scene = band_scene(site, plan, band.name)
        first = first or scene
        for lobe in scene.lobes:
            geom = lobe_geometry(scene.lon_deg, scene.lat_deg, lobe.radius_km)
            if geom is None:
                continue
            features.append(_feature({"type": "MultiPolygon", "coordinates": _coords(geom)}, {
                "kind": "lobe", "band": scene.band, "option": scene.option, "state": lobe.state,
                "orientation_deg": None if scene.layout == "single" else _r(scene.orientation_deg, 1),
                "takeoff_deg": _r(scene.takeoff_deg, 1),
                "peak_gain_dbi": _r(lobe.peak_gain_dbi, 2), "peak_bearing_deg": _r(lobe.peak_bearing_deg, 1),
                "state_kind": lobe.kind, "design_band": lobe.design_band,
                "lobes_deg": [_r(b, 1) for b in lobe.lobes_deg],
                "scale_peak_km": _r(scene.lobe_peak_km, 1), "scale_floor_db": _r(scene.lobe_floor_db, 1),
                "scale_top_dbi": _r(scene.lobe_top_dbi, 2)}))
        for g in scene.goals:
            entry = goals.setdefault((g.name, g.region), {"shade": g, "served": []})
            for path, state, adv, open_f in g.rows:
                entry["served"].append({"band": scene.band, "path": path, "state": state or None,
                                        "advantage_db": _r(adv, 2), "open_fraction": _r(open_f, 3)})
        for a in scene.avoid:
            avoid.setdefault(a.region, {"shade": a, "goals": []})["goals"].extend(a.for_goals)
    for (name, region), entry in goals.items():
        advs = [s["advantage_db"] for s in entry["served"] if s["advantage_db"] is not None]
        features.append(_feature({"type": "MultiPolygon", "coordinates": _coords(entry["shade"].geometry)}, {
            "kind": "goal", "name": name, "region": region,
            "best_advantage_db": max(advs) if advs else None, "served": entry["served"]}))
    for region, entry in avoid.items():
        features.append(_feature({"type": "MultiPolygon", "coordinates": _coords(entry["shade"].geometry)}, {
            "kind": "avoid", "region": region, "for_goals": list(dict.fromkeys(entry["goals"]))}))
    features.extend(foreground_features(site))
    st = site.station
    props = {"kind": "station", "name": st.name, "locator": st.locator, "ground": site.array.ground.name}
    if first is not None:
        props.update({"option": first.option,
                      "orientation_deg": None if first.layout == "single" else _r(first.orientation_deg, 1),
                      "score_db": _r(first.score_db, 2)})
    features.append(_feature({"type": "Point", "coordinates": [round(float(st.lon_deg), _DIGITS),
                                                               round(float(st.lat_deg), _DIGITS)]}, props))
    return {"type": "FeatureCollection", "features": features}


def write_geojson(site, plan, path: str | Path) -> Path:
    """Write compactly (one feature per line): goal outlines make it long otherwise."""
    doc = plan_geojson(site, plan)
    lines = [json.dumps(f, allow_nan=False, ensure_ascii=False, separators=(",", ":")) for f in doc["features"]]
    text = '{"type":"FeatureCollection","features":[\n' + ",\n".join(lines) + "\n]}\n"
    return atomic_write_text(path, text)
