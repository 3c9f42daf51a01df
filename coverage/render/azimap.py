"""The wall map: azimuthal equidistant, centred on the station, to the antipode.

On this projection a straight line from the centre is a great circle and the
distance from the centre is the great-circle distance, so the lobes drawn as
polar shapes around the station point where the signals go.

Drawing choices (each one fixes a problem seen while building it):

- The globe is a sphere of 6371 km, the radius the hop geometry uses. On the
  WGS84 ellipsoid the antipodal rim is not a circle and cartopy's 61-point
  approximation of it leaves slivers next to a country that wraps the
  antipode; on the sphere the rim is an exact circle, drawn here with 721
  points.
- Countries come from the shipped Natural Earth file, never from a download
  (``ax.coastlines()`` and ``NaturalEarthFeature`` would fetch one). Fills
  are drawn without edges; outlines are drawn separately from the polygon
  rings with the cut segments along +-180 deg and along the South Pole
  removed, which would otherwise show as false lines.
- Projected world outlines are kept per station, so maps of several bands
  project the countries once.

Colours are our own scheme, "fieldbook": dun land on a pale slate sea, goals
from ember (the plan does worse than one vertical) through lavender (no
better) to spruce (better), lobes in ink colours.
"""
from __future__ import annotations

import functools
import math
from pathlib import Path

import numpy as np

from ..fileio import atomic_savefig
from ..grid import AZIMUTH_DEG
from ..safety import CAUTION_LINE
from ..geo.regions import _area_m2
from .fonts import drawable, setup as _font_setup
from .scene import BandScene, kind_label, where_text

__all__ = ["projection", "project_parts", "save_png_palette", "display_geometry", "PAPER_IN", "SPHERE_RADIUS_M", "RIM_KM", "draw_map", "map_figure", "outline_lines",
           "ADVANTAGE_RANGE_DB", "STATE_COLOURS"]

PAPER_IN = {"a4": (8.27, 11.69), "letter": (8.5, 11.0)}
"""Page sizes in inches, portrait: ISO 216 A4 (210 x 297 mm) and ANSI Letter."""

SPHERE_RADIUS_M = 6371000.0
RIM_KM = math.pi * SPHERE_RADIUS_M / 1000.0   # the antipode, half the circumference
ADVANTAGE_RANGE_DB = 6.0                      # colour bar runs -6..+6 dB on every map

# "fieldbook" colours
SEA = "#e4ecf0"
LAND = "#c9c1ab"
LAND_EDGE = "#f6f3ea"
INK = "#23272b"
RING = "#6f7d87"
AVOID = "#7a1f3d"
CLOSED = "#9a9a92"
STATE_COLOURS = ("#1f4e79", "#c0522f", "#4f7f2f", "#7b4f9d", "#b8860b", "#1d7f86", "#8a3b5b", "#505050")
# the neutral stop is a pale lavender, so a goal near 0 dB never reads as bare (dun) land
_GOAL_STOPS = ((0.0, "#8c3a1f"), (0.35, "#e2a27a"), (0.5, "#e4dcf2"), (0.68, "#8fc0a5"),
               (0.85, "#3f8a72"), (1.0, "#15463f"))


def _advantage_cmap():
    from matplotlib.colors import LinearSegmentedColormap

    return LinearSegmentedColormap.from_list("ember-lavender-spruce", list(_GOAL_STOPS))


@functools.lru_cache(maxsize=8)
def projection(lon_deg: float, lat_deg: float):
    """(map projection, lon/lat CRS), both on the 6371 km sphere, centred on the station."""
    import cartopy.crs as ccrs
    import shapely

    globe = ccrs.Globe(ellipse=None, semimajor_axis=SPHERE_RADIUS_M, semiminor_axis=SPHERE_RADIUS_M)

    class SphereAEQD(ccrs.AzimuthalEquidistant):
        def __init__(self):
            super().__init__(central_longitude=lon_deg, central_latitude=lat_deg, globe=globe)
            t = np.linspace(0.0, 2.0 * np.pi, 721)
            r = math.pi * SPHERE_RADIUS_M
            self._boundary = shapely.LinearRing(np.column_stack([r * np.cos(t), r * np.sin(t)]))
            self._x_limits = (-r, r)
            self._y_limits = (-r, r)

    return SphereAEQD(), ccrs.PlateCarree(globe=globe)


def outline_lines(geom) -> list:
    """The rings of a lon/lat (multi)polygon as lines, without the cut segments.

    A segment is a cut when both ends lie on the same side of +-180 deg, or
    both lie on the South Pole line (latitude -90): Natural Earth closes
    polygons along those, and they are not coastlines or borders.
    """
    from shapely.geometry import LineString

    eps = 1e-6
    out = []
    polys = getattr(geom, "geoms", [geom])
    for poly in polys:
        for ring in [poly.exterior, *poly.interiors]:
            xy = np.asarray(ring.coords)
            if len(xy) < 2:
                continue
            lon, lat = xy[:, 0], xy[:, 1]
            on_edge = np.abs(lon) >= 180.0 - eps
            cut = (on_edge[:-1] & on_edge[1:] & (np.sign(lon[:-1]) == np.sign(lon[1:])))
            cut |= (lat[:-1] <= -90.0 + eps) & (lat[1:] <= -90.0 + eps)
            if not cut.any():
                out.append(LineString(xy))
                continue
            start = 0
            for i in np.flatnonzero(cut):
                if i + 1 - start >= 2:
                    out.append(LineString(xy[start:i + 1]))
                start = i + 1
            if len(xy) - start >= 2:
                out.append(LineString(xy[start:]))
    return out


def _to_path(geom):
    """One matplotlib Path of a projected (multi)polygon or (multi)line.

    Written out with numpy rather than cartopy's converter, which was half
    the time of projecting the world."""
    from matplotlib.path import Path as MplPath

    verts, codes = [], []

    def add(xy, closed: bool) -> None:
        xy = np.asarray(xy, dtype=float)[:, :2]
        if len(xy) < 2:
            return
        c = np.full(len(xy), MplPath.LINETO, dtype=np.uint8)
        c[0] = MplPath.MOVETO
        if closed:
            c[-1] = MplPath.CLOSEPOLY
        verts.append(xy)
        codes.append(c)

    for part in getattr(geom, "geoms", [geom]):
        if part.is_empty:
            continue
        if part.geom_type == "Polygon":
            add(part.exterior.coords, True)
            for ring in part.interiors:
                add(ring.coords, True)
        elif part.geom_type in ("LineString", "LinearRing"):
            add(part.coords, False)
        elif hasattr(part, "geoms"):
            sub = _to_path(part)
            if sub is not None:
                verts.append(sub.vertices)
                codes.append(sub.codes)
    if not verts:
        return None
    return MplPath(np.concatenate(verts), np.concatenate(codes))


def _paths(proj, src, geom) -> list:
    projected = proj.project_geometry(geom, src)
    if projected.is_empty:
        return []
    path = _to_path(projected)
    return [] if path is None else [path]


_NEAR_ANTIPODE_DEG = 3.0  # parts with a vertex this close to the antipode go through cartopy


def _fast_paths(proj, src, geom) -> list:
    """``_paths`` for a region of many parts, through :func:`project_parts`:
    the same map, a tenth of the time for 1:10m coasts."""
    out = []
    for projected in project_parts(proj, src, geom):
        path = _to_path(projected)
        if path is not None:
            out.append(path)
    return out


def project_parts(proj, src, geom) -> list:
    """A lon/lat geometry on the map, as up to two projected geometries.

    The parts far from the antipode (and not around it) are projected vertex
    by vertex with PROJ in one call (edges densified to 1 deg first, so long
    straight lon/lat edges still bend as they should); cartopy, which cuts
    shapes at the antipodal rim, takes only the parts near the antipode.
    """
    import shapely

    parts = [p for p in getattr(geom, "geoms", [geom]) if not p.is_empty]
    if not parts:
        return []
    lon0, lat0 = proj.proj4_params["lon_0"], proj.proj4_params["lat_0"]
    to_map = _transformer(proj, src)
    dense = shapely.segmentize(np.asarray(parts, dtype=object), 1.0)
    xy, idx = shapely.get_coordinates(dense, return_index=True)
    # angular distance of every vertex from the antipode (spherical law of cosines)
    la, lo = np.radians(xy[:, 1]), np.radians(xy[:, 0])
    cos_c = np.sin(la) * np.sin(np.radians(-lat0)) + np.cos(la) * np.cos(np.radians(-lat0)) * np.cos(
        lo - np.radians(lon0 + 180.0))
    near = np.zeros(len(parts), dtype=bool)
    near[idx[cos_c > np.cos(np.radians(_NEAR_ANTIPODE_DEG))]] = True
    alon = (lon0 + 360.0) % 360.0 - 180.0  # the antipode: a part around it wraps the rim
    near |= shapely.contains_xy(np.asarray(parts, dtype=object), alon, -lat0)
    out = []
    far = [d for d, n in zip(dense, near) if not n]
    if far:
        out.append(shapely.transform(shapely.GeometryCollection(far),
                                     lambda c: np.column_stack(to_map.transform(c[:, 0], c[:, 1]))))
    rest = [p for p, n in zip(parts, near) if n]
    if rest:
        projected = proj.project_geometry(shapely.GeometryCollection(rest), src)
        if not projected.is_empty:
            out.append(projected)
    return out


@functools.lru_cache(maxsize=8)
def _transformer(proj, src):
    from pyproj import Transformer

    return Transformer.from_crs(src, proj, always_xy=True)


@functools.lru_cache(maxsize=8)
def _world(lon_deg: float, lat_deg: float):
    """Projected land fills and land outlines (matplotlib paths) for one station."""
    from shapely.geometry import MultiLineString

    from ..geo.regions import basemap_geometries

    proj, src = projection(lon_deg, lat_deg)
    fills, lines = [], []
    for geom in basemap_geometries():
        if geom is None or geom.is_empty:
            continue
        fills += _paths(proj, src, geom)
        segs = outline_lines(geom)
        if segs:
            lines += _paths(proj, src, MultiLineString(segs))
    return fills, lines


def _xy(bearing_deg, distance_km):
    b = np.radians(np.asarray(bearing_deg, dtype=float))
    d = np.asarray(distance_km, dtype=float) * 1000.0
    return d * np.sin(b), d * np.cos(b)


def _km(d: float) -> str:
    return f"{d:,.0f} km".replace(",", "\u2009")


def _fmt_db(x: float | None) -> str:
    return "closed" if x is None else f"{x:+.1f} dB"


def _quiet_bearing(scene: BandScene, busy_deg=()) -> float:
    """A bearing where the lobes are shortest, for the ring labels, away from
    the baseline and from the bearings in ``busy_deg`` (goal labels)."""
    # horizontal labels stack best on a near-vertical line
    # (within 35 deg of north or south; rings 2500 km apart leave no room side by side)
    total = sum(lobe.radius_km for lobe in scene.lobes) + 4000.0 * np.abs(np.sin(np.radians(AZIMUTH_DEG)))
    total = np.where(np.abs(np.sin(np.radians(AZIMUTH_DEG))) > math.sin(math.radians(35.0)), total + 1e8, total)
    for b in (scene.orientation_deg, scene.orientation_deg + 180.0, *busy_deg):
        near = np.abs((AZIMUTH_DEG - b + 180.0) % 360.0 - 180.0) < 12.0
        total = np.where(near, total + 1e9, total)
    smooth = np.convolve(np.concatenate([total[-15:], total, total[:15]]), np.ones(31) / 31, "valid")
    return float(AZIMUTH_DEG[int(np.argmin(smooth))])


def _halo(width: float = 2.2):
    from matplotlib import patheffects

    return [patheffects.withStroke(linewidth=width, foreground="white", alpha=0.85)]


def map_figure(scene: BandScene, date_text: str, paper: str = "a4"):
    """Build the figure of one band's map (not saved). Artists carry gids:
    ``lobe:<state>``, ``goal:<name>``, ``avoid:<region>``, ``ring:<km>``,
    ``rim-label:<deg>``, ``baseline``, ``lobe-scale``."""
    import matplotlib.pyplot as plt
    from matplotlib.collections import PathCollection
    from matplotlib.patches import PathPatch, Polygon, Rectangle
    from shapely.geometry import MultiLineString, Point

    from .. import __version__ as version

    _font_setup()
    w_in, h_in = PAPER_IN[paper]
    fig = plt.figure(figsize=(w_in, h_in))
    fig.patch.set_facecolor("white")
    proj, src = projection(scene.lon_deg, scene.lat_deg)

    top_gap = 1.7
    # below the map: the legends (0.72 in gap, colour bar, ruler: about 2.3 in)
    # and the two footer lines (0.6 in); Letter is shorter than A4, so its map shrinks
    below_in = 2.95
    diam = min(w_in - 1.4, 6.9, h_in - top_gap - below_in)
    left = (w_in - diam) / 2.0
    bottom = h_in - top_gap - diam
    ax = fig.add_axes([left / w_in, bottom / h_in, diam / w_in, diam / h_in], projection=proj)
    ax.set_global()
    ax.patch.set_facecolor(SEA)
    ax.spines["geo"].set_edgecolor(INK)
    ax.spines["geo"].set_linewidth(1.1)

    fills, lines = _world(scene.lon_deg, scene.lat_deg)
    ax.add_collection(PathCollection(fills, facecolor=LAND, edgecolor="none", linewidth=0, zorder=1,
                                     transform=ax.transData))
    ax.add_collection(PathCollection(lines, facecolor="none", edgecolor=LAND_EDGE, linewidth=0.45,
                                     zorder=2.3, transform=ax.transData))

    cmap = _advantage_cmap()
    from matplotlib.colors import Normalize

    norm = Normalize(-ADVANTAGE_RANGE_DB, ADVANTAGE_RANGE_DB)
    label_spots = []
    for g in scene.goals:
        closed = g.advantage_db is None
        face = CLOSED if closed else cmap(norm(g.advantage_db))
        shown = display_geometry(g.geometry)
        for p in _fast_paths(proj, src, shown):
            ax.add_patch(PathPatch(p, facecolor=face, edgecolor="none", alpha=0.8, zorder=2,
                                   hatch="...." if closed else None, gid=f"goal:{g.name}"))
        segs = outline_lines(shown)
        if segs:
            for p in _fast_paths(proj, src, MultiLineString(segs)):
                ax.add_patch(PathPatch(p, facecolor="none", edgecolor=INK, linewidth=0.7, zorder=2.35))
        label_spots.append((g, _label_point(proj, src, shown)))

    for a in scene.avoid:
        # the hatch takes the edge colour; the outline is stroked separately,
        # without the cuts along +-180 deg and the South Pole
        shown = display_geometry(a.geometry)
        for p in _fast_paths(proj, src, shown):
            ax.add_patch(PathPatch(p, facecolor="none", edgecolor=AVOID, linewidth=0.0, hatch="xxx",
                                   zorder=2.4, gid=f"avoid:{a.region}"))
        segs = outline_lines(shown)
        if segs:
            for p in _fast_paths(proj, src, MultiLineString(segs)):
                ax.add_patch(PathPatch(p, facecolor="none", edgecolor=AVOID, linewidth=0.9, zorder=2.45))

    # range rings, labelled along the quietest bearing
    quiet = _quiet_bearing(scene, [math.degrees(math.atan2(p[0], p[1])) for _, p in label_spots if p])
    t = np.linspace(0.0, 360.0, 361)
    k = 1
    while k * scene.ring_step_km < RIM_KM - 0.25 * scene.ring_step_km:
        d = k * scene.ring_step_km
        x, y = _xy(t, np.full_like(t, d))
        ax.plot(x, y, color=RING, linewidth=0.55, linestyle=(0, (2, 2.5)), zorder=3, gid=f"ring:{d:g}")
        lx, ly = _xy(quiet, d)
        ax.text(lx, ly, _km(d), fontsize=6.3, color="#3c474f",
                ha="center", va="center", zorder=6, path_effects=_halo())
        k += 1

    # the array baseline: a great circle through the station, bold near it
    # (one vertical has none)
    th = scene.orientation_deg
    if scene.layout != "single":
        x, y = _xy([th + 180.0, th], [RIM_KM, RIM_KM])
        ax.plot([x[0], 0, x[1]], [y[0], 0, y[1]], color=INK, linewidth=0.6, linestyle=(0, (6, 3)), zorder=3.5)
        bx, by = _xy([th + 180.0, th], [1100.0, 1100.0])
        ax.plot(bx, by, color=INK, linewidth=2.6, solid_capstyle="butt", zorder=5, gid="baseline")
        ax.plot([bx[1]], [by[1]], marker=(3, 0, -th), markersize=7, color=INK, zorder=5)

    _foreground(ax, scene)

    # lobes
    for i, lobe in enumerate(scene.lobes):
        col = STATE_COLOURS[i % len(STATE_COLOURS)]
        lx, ly = _xy(AZIMUTH_DEG, lobe.radius_km)
        ax.add_patch(Polygon(np.column_stack([lx, ly]), closed=True, facecolor=col, alpha=0.12,
                             edgecolor="none", zorder=4, gid=f"lobe:{lobe.state}"))
        ax.add_patch(Polygon(np.column_stack([lx, ly]), closed=True, facecolor="none", edgecolor=col,
                             linewidth=1.5, zorder=4.5))
    ax.plot([0], [0], marker="o", markersize=4.5, color="white", markeredgecolor=INK, markeredgewidth=1.2,
            zorder=6)

    labels = []
    for g, spot in label_spots:
        if spot is None:
            continue
        if len(g.rows) > 1:
            value = " / ".join(f"{r[0]} {_fmt_db(r[2])}" for r in g.rows)
        else:
            value = _fmt_db(g.advantage_db)
        x, y, size_m = spot
        name = g.name
        if g.geometry.contains(Point(scene.lon_deg, scene.lat_deg)):
            name += " (holds the station)"
        tiny = _area_m2(g.geometry) < _TINY_M**2
        if tiny:  # smaller than a few pixels: a marker shows where it is
            closed = g.advantage_db is None
            ax.plot([x], [y], marker="o", markersize=4.2, markeredgewidth=0.8, markeredgecolor=INK,
                    color=CLOSED if closed else cmap(norm(g.advantage_db)), zorder=6.5, gid=f"goal-marker:{g.name}")
        labels.append((drawable(f"{name}\n{value}"), x, y, size_m < 3.0e6, f"goal-label:{g.name}"))
    for g in scene.goals:  # long-path goals: a band on the rim at their long-path bearings
        arc = _long_path_arc(scene, g)
        if arc is None:
            continue
        start, span = arc
        t_arc = start + np.linspace(0.0, span, max(2, int(span * 2) + 2))
        rx, ry = _xy(t_arc, np.full_like(t_arc, RIM_KM * 0.975))
        closed = g.advantage_db is None
        ax.plot(rx, ry, color=CLOSED if closed else cmap(norm(g.advantage_db)), linewidth=5.5,
                solid_capstyle="butt", zorder=6.4, gid=f"long-path:{g.name}")
        ax.plot(rx, ry, color=INK, linewidth=0.5, zorder=6.45)
        mx, my = _xy(start + span / 2.0, RIM_KM * 0.975)
        row = next(r for r in g.rows if r[0] == "long")
        labels.append((drawable(f"{g.name}\nlong path {_fmt_db(row[2])}"), float(mx), float(my), True,
                       f"long-label:{g.name}"))
    _rim(ax)  # first: goal labels keep clear of the bearing and ring labels
    _place_labels(fig, ax, labels)

    _title_block(fig, scene, date_text, w_in, h_in)
    _legends(fig, scene, cmap, norm, diam, bottom, w_in, h_in, Rectangle)
    fig.text(0.5, 0.42 / h_in, CAUTION_LINE, ha="center", va="center", fontsize=7.2, color="#5b2a1a")
    fig.text(0.5, 0.24 / h_in, f"Azimuthal equidistant on a {SPHERE_RADIUS_M / 1000:.0f} km sphere, centred on "
             "the station: lines from the centre are great circles, rings are great-circle distance.  "
             f"lobeplan {version}", ha="center", va="center", fontsize=6.2, color="#5f666b")
    return fig


# a region of less than (100 km)^2 is a few pixels at most on a map 40,000 km across
_TINY_M = 100e3


# coasts thinned to 0.02 deg (about 2 km) for drawing: far below a pixel of
# a map 40,000 km across (some 30 km), and it spares projecting the 1:10m
# coasts vertex by vertex (seconds per map)
_DRAW_TOLERANCE_DEG = 0.02


@functools.lru_cache(maxsize=64)
def display_geometry(geom):
    """A region's polygons thinned for drawing; every part kept (islands too)."""
    import shapely
    from shapely.geometry import MultiPolygon
    from shapely.geometry import Polygon as ShapelyPolygon

    out = []
    for part in getattr(geom, "geoms", [geom]):
        thin = part.simplify(_DRAW_TOLERANCE_DEG, preserve_topology=True)
        ok = isinstance(thin, ShapelyPolygon) and thin.is_valid and not thin.is_empty
        out.append(thin if ok else part)
    return shapely.make_valid(MultiPolygon(out)) if out else geom


def _long_path_arc(scene: BandScene, g) -> tuple[float, float] | None:
    """(first bearing, clockwise span) in degrees of a goal's long path, or None."""
    if not any(r[0] == "long" for r in g.rows):
        return None
    from ..geo.paths import bearing_arc, goal_paths
    from ..geo.regions import sample_points
    from ..geo.station import Station

    lons, lats = sample_points(g.geometry, 400, seed=1)
    bearing, _ = goal_paths(Station("", scene.lat_deg, scene.lon_deg, ""), lons, lats, "long")
    start, end, _ = bearing_arc(bearing)
    return float(start), float((end - start) % 360.0)


def _place_labels(fig, ax, labels) -> None:
    """Draw goal labels so that no two overlap, nor leave the page.

    ``labels`` holds (text, x, y, beside, gid) with x, y in map metres;
    ``beside`` labels (small regions, markers, rim bands) start beside
    their point, away from the station. Each label takes the first spot
    of a fixed list (on the point, then rings of offsets around it, the
    outward ones first) where its drawn box is clear of every label placed
    before (and of the ring and bearing labels already drawn); a moved
    label gets a leader line to its point. Regions drawn large go first,
    so that their labels sit on them.
    """
    renderer = fig.canvas.get_renderer()
    page = fig.bbox
    placed = [t.get_window_extent(renderer) for t in ax.texts if t.get_text()]  # ring and rim labels

    def clear(b) -> bool:
        if b.x0 < page.x0 + 2 or b.y0 < page.y0 + 2 or b.x1 > page.x1 - 2 or b.y1 > page.y1 - 2:
            return False
        return all(b.x1 <= o.x0 or b.x0 >= o.x1 or b.y1 <= o.y0 or b.y0 >= o.y1 for o in placed)

    for text, x, y, beside, gid in sorted(labels, key=lambda lab: lab[3]):  # regions first, then the rest
        rr = math.hypot(x, y)
        ux, uy = (x / rr, y / rr) if rr > 1.0 else (0.0, 1.0)
        offsets = [] if beside else [(0.0, 0.0)]
        for dist in (28.0, 40.0, 55.0, 75.0, 100.0, 130.0, 170.0):
            for turn in (0, 40, -40, 80, -80, 120, -120, 160, -160, 180):
                c, s_ = math.cos(math.radians(turn)), math.sin(math.radians(turn))
                offsets.append((dist * (ux * c - uy * s_), dist * (ux * s_ + uy * c)))
        note = ax.annotate(text, (x, y), xytext=offsets[0], textcoords="offset points", fontsize=7, ha="center",
                           va="center", color=INK, zorder=7, linespacing=1.1, path_effects=_halo(2.5),
                           annotation_clip=False, gid=gid)
        chosen = offsets[0]
        for off in offsets:
            note.set_position(off)
            if clear(note.get_window_extent(renderer)):
                chosen = off
                break
        note.set_position(chosen)
        placed.append(note.get_window_extent(renderer))
        if chosen != (0.0, 0.0):  # moved off its point: a leader line back to it
            ax.annotate("", (x, y), xytext=chosen, textcoords="offset points", zorder=6.9,
                        arrowprops=dict(arrowstyle="-", linewidth=0.6, color=INK, shrinkA=0.0, shrinkB=0.0),
                        annotation_clip=False)


FOREGROUND_COLOURS = ("#2f7fb8", "#b08a1f", "#4f8f4f", "#8a4f9a")
FOREGROUND_KM = 1500.0  # drawing radius of a foreground wedge: a symbol at the station, not to scale


def _foreground(ax, scene: BandScene) -> None:
    """Foreground sectors as wedges at the station (gid ``foreground:<i>``), labelled."""
    from matplotlib.patches import Polygon

    for i, f in enumerate(scene.foreground):
        span = (f.to_deg - f.from_deg) % 360.0 or 360.0
        b = f.from_deg + np.linspace(0.0, span, max(int(span), 2) + 1)
        x, y = _xy(b, np.full(b.size, FOREGROUND_KM))
        col = FOREGROUND_COLOURS[i % len(FOREGROUND_COLOURS)]
        pts = np.column_stack([np.append(x, 0.0), np.append(y, 0.0)])
        ax.add_patch(Polygon(pts, closed=True, facecolor=col, alpha=0.25, edgecolor="none", zorder=4.6,
                             gid=f"foreground:{i}"))
        ax.add_patch(Polygon(pts, closed=True, facecolor="none", edgecolor=col, linewidth=1.0,
                             linestyle=(0, (3, 2)), zorder=4.7))
        lx, ly = _xy(f.from_deg + span / 2.0, FOREGROUND_KM * 0.6)
        ax.text(lx, ly, f"{f.ground}\nfrom {f.from_m:g} m", fontsize=6.2, color=col, ha="center", va="center",
                zorder=6, path_effects=_halo())


def _label_point(proj, src, geom):
    """(x, y, size) in map metres: a point inside the largest part, and the
    larger side of the region's projected bounding box."""
    parts = list(getattr(geom, "geoms", [geom]))
    if not parts:
        return None
    biggest = max(parts, key=lambda p: p.area)
    pt = biggest.representative_point()
    x, y = proj.transform_point(pt.x, pt.y, src)
    if not (np.isfinite(x) and np.isfinite(y)):
        return None
    paths = _fast_paths(proj, src, geom)
    if not paths:
        return None
    verts = np.concatenate([p.vertices for p in paths])
    x0, y0 = verts.min(axis=0)
    x1, y1 = verts.max(axis=0)
    return float(x), float(y), float(max(x1 - x0, y1 - y0))


def _rim(ax) -> None:
    """Bearing ticks every 10 deg outside the rim, labelled every 30 deg."""
    for b in range(0, 360, 10):
        major = b % 30 == 0
        x, y = _xy([b, b], [RIM_KM, RIM_KM * (1.028 if major else 1.016)])
        ax.plot(x, y, color=INK, linewidth=0.9 if major else 0.6, clip_on=False, zorder=8)
        if major:
            lx, ly = _xy(b, RIM_KM * 1.075)
            ax.text(lx, ly, f"{b}°", fontsize=8, ha="center", va="center", color=INK, clip_on=False,
                    gid=f"rim-label:{b}")


def _title_block(fig, scene: BandScene, date_text: str, w_in: float, h_in: float) -> None:
    def at(y_from_top_in: float) -> float:
        return 1.0 - y_from_top_in / h_in

    x0 = 0.6 / w_in
    band = fig.text(1 - x0, at(0.55), drawable(scene.band), fontsize=20, fontweight="bold", color=STATE_COLOURS[0],
                    ha="right", va="baseline")
    band_in = band.get_window_extent(fig.canvas.get_renderer()).width / fig.dpi
    _fit_title(fig, drawable(f"{scene.station_name}"), x0, at(0.55), w_in - 2 * 0.6 - band_in - 0.3)
    lat = f"{abs(scene.lat_deg):.2f}°{'N' if scene.lat_deg >= 0 else 'S'}"
    lon = f"{abs(scene.lon_deg):.2f}°{'E' if scene.lon_deg >= 0 else 'W'}"
    spacing = "" if scene.spacing_m is None else f", {scene.spacing_m:.2f} m spacing"
    score = "" if scene.score_db is None else f"; score {scene.score_db:+.2f} dB over one vertical"
    # a default option name already says layout and spacing ("pair 10.5 m")
    what = scene.option if scene.option.startswith(scene.layout) else f"{scene.option} ({scene.layout}{spacing})"
    width_in = w_in - 2 * 0.6
    y = 0.86
    where = where_text(scene.layout, scene.orientation_deg)
    y = _fit_line(fig, drawable(f"{scene.locator}  ·  {lat} {lon}  ·  {what}  ·  "
                                f"{where}{score}"), x0, y, width_in, h_in)
    how = ("median takeoff angle the goals need on this band" if scene.takeoff_from_needs
           else "no goal opens on this band: elevation of the first state's peak")
    y = _fit_line(fig, f"Lobes at {scene.takeoff_deg:.0f}° takeoff ({how})  ·  {date_text}", x0, y + 0.22,
                  width_in, h_in)
    prop = scene.propagation_text or f"propagation model: {scene.model}"
    _fit_line(fig, drawable(prop[:1].upper() + prop[1:]), x0, y + 0.22, width_in, h_in)


def _fit_title(fig, text: str, x0: float, y: float, width_in: float) -> None:
    """The station name in bold, 15 pt, shrunk to fit beside the band name
    (down to 9 pt), then wrapped upward at words."""
    import textwrap

    t = fig.text(x0, y, text, fontsize=15, fontweight="bold", color=INK, va="baseline", gid="title")
    r = fig.canvas.get_renderer()
    pt = 15.0
    while pt > 9.0 and t.get_window_extent(r).width / fig.dpi > width_in:
        pt -= 0.5
        t.set_fontsize(pt)
    w = t.get_window_extent(r).width / fig.dpi
    if w > width_in:
        t.set_text("\n".join(textwrap.wrap(text, max(10, int(len(text) * width_in / w)))))
        t.set_va("bottom")  # the lines grow upward, into the top margin
        t.set_linespacing(1.05)


def _fit_line(fig, text: str, x0: float, y_in: float, width_in: float, h_in: float,
              size: float = 8.3, least: float = 7.0) -> float:
    """Write a subtitle line that fits the page: shrunk down to ``least`` pt,
    then wrapped at the "·" separators (or words). Returns the top offset
    (inches) of its last line, so the next line goes below it."""
    import textwrap

    r = fig.canvas.get_renderer()
    probe = fig.text(0, 0, "", fontsize=size)

    def width(t: str, pt: float) -> float:
        probe.set_text(t)
        probe.set_fontsize(pt)
        return probe.get_window_extent(r).width / fig.dpi

    pt = size
    while pt > least and width(text, pt) > width_in:
        pt -= 0.1
    lines = [text]
    if width(text, pt) > width_in:
        pieces = text.split("  ·  ")
        lines = [pieces[0]]
        for piece in pieces[1:]:
            trial = lines[-1] + "  ·  " + piece
            if width(trial, pt) <= width_in:
                lines[-1] = trial
            else:
                lines.append(piece)
        fitted = []
        for ln in lines:  # a single piece still too long: by words
            chars = max(10, int(len(ln) * width_in / max(width(ln, pt), 1e-6)))
            fitted += textwrap.wrap(ln, chars) if width(ln, pt) > width_in else [ln]
        lines = fitted
    probe.remove()
    step = pt * 1.3 / 72.0
    for i, ln in enumerate(lines):
        fig.text(x0, 1.0 - (y_in + i * step) / h_in, ln, fontsize=pt, color=INK, va="baseline",
                 gid="subtitle" if i == 0 else f"subtitle-{i + 1}")
    return y_in + (len(lines) - 1) * step


def _short_kind(lobe) -> str:
    """Legend wording of how a state's currents are made (the long form is :func:`kind_label`)."""
    if lobe.kind == "as-built":
        return f"{lobe.design_band} network"
    return kind_label(lobe.kind, lobe.design_band)


def _legends(fig, scene: BandScene, cmap, norm, diam: float, map_bottom: float, w_in: float, h_in: float,
             Rectangle) -> None:
    from matplotlib.cm import ScalarMappable
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    y_top = map_bottom - 0.72          # inches from the bottom of the page
    # colour bar of the goal shading
    cax = fig.add_axes([0.7 / w_in, (y_top - 0.18) / h_in, 3.3 / w_in, 0.15 / h_in])
    cb = fig.colorbar(ScalarMappable(norm=norm, cmap=cmap), cax=cax, orientation="horizontal", extend="both")
    cb.set_ticks(np.arange(-ADVANTAGE_RANGE_DB, ADVANTAGE_RANGE_DB + 0.1, 2.0))
    cb.ax.tick_params(labelsize=7, length=2.5)
    cb.outline.set_linewidth(0.5)
    cax.set_title("Goals: advantage over one vertical (dB); \u25bc this band's goals", fontsize=8, loc="left", color=INK, pad=9)
    for g in scene.goals:
        if g.advantage_db is not None:
            v = float(np.clip(g.advantage_db, -ADVANTAGE_RANGE_DB, ADVANTAGE_RANGE_DB))
            cax.plot([v], [1.3], marker="v", markersize=4.5, color=INK, clip_on=False,
                     transform=cax.get_xaxis_transform())

    # lobe scale: a ruler drawn at the map's own scale, in dBi
    km_per_in = 2.0 * RIM_KM / diam
    length_in = scene.lobe_peak_km / km_per_in
    sax = fig.add_axes([0.7 / w_in, (y_top - 1.5) / h_in, length_in / w_in, 0.5 / h_in], gid="lobe-scale")
    sax.set_xlim(0.0, scene.lobe_peak_km)
    sax.set_ylim(0.0, 1.0)
    sax.axis("off")
    top = scene.lobe_top_dbi
    step = 5.0 if scene.lobe_floor_db >= 10 else 1.0
    sax.plot([0, scene.lobe_peak_km], [0.35, 0.35], color=INK, linewidth=1.2, clip_on=False)
    for dbdown in np.arange(0.0, scene.lobe_floor_db + 1e-9, step):
        xk = (scene.lobe_floor_db - dbdown) / scene.lobe_floor_db * scene.lobe_peak_km
        sax.plot([xk, xk], [0.35, 0.55], color=INK, linewidth=0.8, clip_on=False)
        sax.text(xk, 0.62, "peak" if dbdown == 0 else f"\u2212{dbdown:.0f}", fontsize=6.5, ha="center",
                 va="bottom", color=INK)
    sax.text(0.0, 1.25, f"Lobe radius: gain at {scene.takeoff_deg:.0f}° takeoff, dB below the peak\n"
             f"(the peak, {top:.1f} dBi, is drawn at {_km(scene.lobe_peak_km)})",
             fontsize=7.2, color=INK, ha="left", va="bottom", transform=sax.get_yaxis_transform())
    sax.text(0.0, 0.05, "on the map's own scale, measured from the station", fontsize=6.2, color="#5f666b",
             ha="left", va="bottom")

    handles = []
    for i, lobe in enumerate(scene.lobes):
        col = STATE_COLOURS[i % len(STATE_COLOURS)]
        how = "one element" if scene.layout == "single" else _short_kind(lobe)
        toward = ("all round" if not lobe.lobes_deg
                  else "toward " + "/".join(f"{b:.0f}°" for b in lobe.lobes_deg))
        handles.append(Patch(facecolor=col, alpha=0.45, edgecolor=col,
                             label=f"{lobe.state} ({how}): {lobe.peak_gain_dbi:.1f} dBi {toward}"))
    if scene.layout != "single":
        handles.append(Line2D([], [], color=INK, linewidth=2.6, label=f"baseline, along {scene.orientation_deg:.0f}°"))
    if scene.avoid:
        handles.append(Patch(facecolor="none", edgecolor=AVOID, hatch="xxx", label="keep in the rear (avoid)"))
    if any(g.advantage_db is None for g in scene.goals):
        handles.append(Patch(facecolor=CLOSED, hatch="....",
                             label=f"goal closed on this band (open < {100 * scene.closed_share:.0f} % of "
                                   "its point-hours)"))
    if any(_area_m2(g.geometry) < _TINY_M**2 for g in scene.goals):
        handles.append(Line2D([], [], linestyle="none", marker="o", markersize=4.2, markeredgecolor=INK,
                              color=LAND, label="goal too small to shade: a marker"))
    if any(r[0] == "long" for g in scene.goals for r in g.rows):
        handles.append(Line2D([], [], color=RING, linewidth=5.5, solid_capstyle="butt",
                              label="band on the rim: a goal's long-path bearings"))
    fig.legend(handles=handles, loc="upper left", bbox_to_anchor=(4.55 / w_in, (y_top + 0.28) / h_in),
               fontsize=7.2, frameon=False, title="Switch states (lobes)", title_fontsize=8,
               alignment="left", handlelength=1.6)


def draw_map(scene: BandScene, path: str | Path, date_text: str, paper: str = "a4", dpi: int = 200) -> Path:
    """Draw one band's map and save it atomically; the format follows the suffix."""
    import matplotlib

    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot as plt

    fig = map_figure(scene, date_text, paper)
    try:
        meta = {"Creator": "lobeplan"}
        suffix = Path(path).suffix.lower()
        if suffix == ".png":
            meta = {"Software": "lobeplan"}
        elif suffix == ".svg":
            meta = {"Creator": "lobeplan", "Date": None}
        elif suffix == ".pdf":
            meta = {"Creator": "lobeplan", "CreationDate": None}
        if suffix == ".png":
            return save_png_palette(fig, path, dpi)
        return atomic_savefig(fig, path, dpi=dpi, metadata=meta)
    finally:
        plt.close(fig)


def save_png_palette(fig, path, dpi: int) -> Path:
    """PNG with a 256-colour palette: a quarter of the RGBA size, no visible loss
    on flat map colours (checked by eye on the gallery)."""
    import io

    from PIL import Image

    from ..fileio import atomic_write_bytes

    from matplotlib.backends.backend_agg import FigureCanvasAgg

    fig.set_dpi(dpi)
    canvas = FigureCanvasAgg(fig)
    canvas.draw()
    rgba = np.asarray(canvas.buffer_rgba())
    small = Image.fromarray(rgba[:, :, :3]).quantize(colors=256, method=Image.Quantize.FASTOCTREE,
                                                     dither=Image.Dither.NONE)
    out = io.BytesIO()
    small.save(out, format="PNG", compress_level=9)
    return atomic_write_bytes(path, out.getvalue())
