"""Maps, panels and the GeoJSON export: assertions on what is drawn and written.

Rendered small and at low dpi; the plan of a tiny site is shared by the module.
"""
import json
import math
import re
import socket

import matplotlib

matplotlib.use("Agg")

import numpy as np
import pytest
import shapely
from shapely.geometry import shape

from lobeplan.cli import main
from lobeplan.render.azimap import RIM_KM, map_figure, outline_lines
from lobeplan.render.geojson import lobe_geometry, plan_geojson
from lobeplan.render.panels import elevation_figure, orientation_figure
from lobeplan.render.scene import band_scene
from lobeplan.report.plan import run_plan
from lobeplan.site import loads

SITE = """
[station]
name = "Test lot"
lat = 45.0
lon = -93.0
[array]
height_m = 10.0
layout = "pair"
spacing_m = [10.5, 21.0]
orientation_deg = "sweep"
orientation_step_deg = 5
allowed_orientation_deg = [[0, 140]]
[[array.state]]
name = "fwd"
phase_deg = [0, -90]
[[array.state]]
name = "rev"
phase_deg = [-90, 0]
[[array.state]]
name = "both"
phase_deg = [0, 0]
[[band]]
name = "40 m"
freq_mhz = 7.1
[[goal]]
name = "Europe"
region = "continent:Europe"
clip = [-30, 34, 45, 72]
avoid = ["country:JPN"]
[[goal]]
name = "Fiji"
region = "country:FJI"
[propagation]
points_per_goal = 60
"""


@pytest.fixture(scope="module")
def site_plan():
    site = loads(SITE, file="test.toml")
    return site, run_plan(site, True)


@pytest.fixture(scope="module")
def figure(site_plan):
    import matplotlib.pyplot as plt

    site, plan = site_plan
    fig = map_figure(band_scene(site, plan, "40 m"), "2026-01-02", "a4")
    yield fig
    plt.close(fig)


def _map_axes(fig):
    return next(a for a in fig.axes if hasattr(a, "projection"))


def _gids(fig, prefix):
    out = []
    for ax in fig.axes:
        for art in list(ax.patches) + list(ax.lines) + list(ax.texts) + list(ax.collections):
            gid = art.get_gid()
            if gid and gid.startswith(prefix):
                out.append(gid)
    return out


def test_one_lobe_patch_per_state(figure, site_plan):
    site, _ = site_plan
    assert sorted(_gids(figure, "lobe:")) == sorted(f"lobe:{s}" for s in ("fwd", "rev", "both"))


def test_goal_and_avoid_patches_present(figure):
    goals = set(_gids(figure, "goal:"))
    assert goals == {"goal:Europe", "goal:Fiji"}
    assert _gids(figure, "avoid:country:JPN")


def test_extent_reaches_the_antipode(figure):
    # half the circumference of a 6371 km sphere: pi * 6371 = 20015 km (computed)
    ax = _map_axes(figure)
    x0, x1 = ax.get_xlim()
    y0, y1 = ax.get_ylim()
    half_circumference_km = math.pi * 6371.0
    for lim in (x0, x1, y0, y1):
        assert abs(abs(lim) / 1000.0 - half_circumference_km) < 1.0
    assert abs(RIM_KM - 20015.0) < 1.0


def test_rim_labels_every_30_degrees(figure):
    ax = _map_axes(figure)
    labels = {t.get_text() for t in ax.texts if (t.get_gid() or "").startswith("rim-label:")}
    assert labels == {f"{b}°" for b in range(0, 360, 30)}


def test_range_rings_every_step(figure, site_plan):
    site, _ = site_plan
    rings = sorted(float(g.split(":")[1]) for g in _gids(figure, "ring:"))
    step = site.map.ring_step_km
    assert rings == [step * k for k in range(1, len(rings) + 1)]
    assert rings[-1] < RIM_KM < rings[-1] + 2 * step


def test_lobe_reaches_peak_km_along_its_peak_bearing(figure, site_plan):
    site, plan = site_plan
    scene = band_scene(site, plan, "40 m")
    best = max(scene.lobes, key=lambda lobe: lobe.peak_gain_dbi)
    assert abs(best.radius_km.max() - site.map.lobe_peak_km) < 1e-6
    ax = _map_axes(figure)
    patch = next(p for p in ax.patches if p.get_gid() == f"lobe:{best.state}")
    xy = patch.get_xy()
    assert abs(np.hypot(xy[:, 0], xy[:, 1]).max() / 1000.0 - site.map.lobe_peak_km) < 1.0


def test_outline_drops_the_seams():
    # a box closed along +180 and along the South Pole: only the two real sides stay
    from shapely.geometry import Polygon

    poly = Polygon([(170, -90), (180, -90), (180, -60), (170, -60)])
    lines = outline_lines(poly)
    coords = [tuple(map(tuple, np.asarray(line.coords))) for line in lines]
    flat = [pt for c in coords for pt in c]
    for (a, b) in zip(flat, flat[1:]):
        assert not (a[0] == b[0] == 180)
    assert sum(len(c) - 1 for c in coords) == 2


def test_renders_with_sockets_blocked(site_plan, monkeypatch, tmp_path):
    import lobeplan.render.azimap as azimap

    site, plan = site_plan

    def refuse(*a, **k):
        raise OSError("network refused in this test")

    monkeypatch.setattr(socket, "socket", refuse)
    monkeypatch.setattr(socket, "create_connection", refuse)
    azimap._world.cache_clear()  # project the countries again, under the block
    out = azimap.draw_map(band_scene(site, plan, "40 m"), tmp_path / "m.png", "2026-01-02", "a4", dpi=40)
    assert out.stat().st_size > 10000


@pytest.mark.parametrize("paper,size_pt", [("a4", (595, 842)), ("letter", (612, 792))])
def test_pdf_is_one_page_of_the_paper(tmp_path, site_plan, paper, size_pt):
    # A4 210 x 297 mm = 595 x 842 pt (ISO 216); Letter 8.5 x 11 in = 612 x 792 pt (ANSI); common practice
    from lobeplan.render.azimap import draw_map

    site, plan = site_plan
    path = draw_map(band_scene(site, plan, "40 m"), tmp_path / "m.pdf", "2026-01-02", paper)
    data = path.read_bytes()
    assert len(re.findall(rb"/Type\s*/Page(?!s)", data)) == 1
    box = re.search(rb"/MediaBox\s*\[\s*([\d.\s]+)\]", data).group(1).split()
    w, h = float(box[2]) - float(box[0]), float(box[3]) - float(box[1])
    assert abs(w - size_pt[0]) < 1.0 and abs(h - size_pt[1]) < 1.0


def test_png_default_width(tmp_path, site_plan):
    from PIL import Image

    from lobeplan.render.azimap import draw_map
    from lobeplan.report.map import DEFAULT_DPI

    site, plan = site_plan
    path = draw_map(band_scene(site, plan, "40 m"), tmp_path / "m.png", "2026-01-02", "a4", DEFAULT_DPI)
    with Image.open(path) as im:
        assert im.size[0] >= 1600


def _ring_ok(ring):
    # a long step in longitude is only allowed along a pole line (the pole is one point)
    assert all(-180.0 <= p[0] <= 180.0 for p in ring)
    for a, b in zip(ring, ring[1:]):
        along_pole = abs(a[1]) == abs(b[1]) == 90.0
        assert along_pole or abs(b[0] - a[0]) < 180.0, f"a ring crosses the antimeridian at {a} -> {b}"


def test_geojson_validates(site_plan):
    site, plan = site_plan
    doc = json.loads(json.dumps(plan_geojson(site, plan), allow_nan=False))
    assert doc["type"] == "FeatureCollection"
    kinds = [f["properties"]["kind"] for f in doc["features"]]
    assert kinds.count("lobe") == 3 and kinds.count("goal") == 2 and kinds.count("avoid") == 1
    for f in doc["features"]:
        geom = shape(f["geometry"])
        assert geom.is_valid
        if f["geometry"]["type"] == "MultiPolygon":
            for poly in f["geometry"]["coordinates"]:
                for ring in poly:
                    _ring_ok(ring)
                # right-hand rule: exterior counterclockwise (RFC 7946 sec. 3.1.6)
                assert shapely.Polygon(poly[0]).exterior.is_ccw


def test_lobe_vertex_at_its_distance():
    # a circle of 3000 km centred near the antimeridian: every vertex 3000 km away on WGS84.
    # The vertices are made with pyproj's direct geodesic; the inverse geodesic
    # (Karney 2013) checks that unwrapping and cutting at +-180 moved none of
    # them (10 m: far below the 6-decimal rounding's 0.1 m, far above float noise).
    from lobeplan.geo.paths import GEOD

    geom = lobe_geometry(178.0, -17.0, np.full(360, 3000.0))
    assert len(geom.geoms) == 2  # cut at +-180
    for poly in geom.geoms:
        xy = np.asarray(poly.exterior.coords)
        inner = np.abs(np.abs(xy[:, 0]) - 180.0) > 1e-9
        _, _, d = GEOD.inv(np.full(inner.sum(), 178.0), np.full(inner.sum(), -17.0), xy[inner, 0], xy[inner, 1])
        assert np.allclose(np.asarray(d) / 1000.0, 3000.0, atol=0.01)


def test_lobe_over_the_north_pole():
    # 7000 km from 45 N reaches past the pole (5000 km away: 45 deg of arc, computed)
    geom = lobe_geometry(-93.0, 45.0, np.full(360, 7000.0))
    assert geom.is_valid and geom.contains(shapely.Point(10.0, 89.5))
    assert not geom.contains(shapely.Point(10.0, -89.5))


def test_panels_draw(site_plan):
    import matplotlib.pyplot as plt

    site, plan = site_plan
    fig = elevation_figure(site, plan)
    assert len(_gids(fig, "cut:40 m:")) == 3 and _gids(fig, "need:40 m:")
    plt.close(fig)
    fig = orientation_figure(site, plan)
    assert len(_gids(fig, "score:")) == 2 and _gids(fig, "allowed:")
    plt.close(fig)


def test_map_verb_errors(demo_path, capsys, tmp_path):
    assert main(["map", str(demo_path), "--band", "2 m", "--out", str(tmp_path / "x")]) == 2
    assert main(["map", str(demo_path), "--date", "2026-02-30", "--out", str(tmp_path / "x")]) == 2
    assert main(["map", str(demo_path), "--dpi", "9", "--out", str(tmp_path / "x")]) == 2
    err = capsys.readouterr().err.splitlines()
    assert len(err) == 3 and all(line.startswith("lobeplan: --") for line in err)
    assert not (tmp_path / "x").exists()


def test_map_verb_json_has_no_date(demo_path, capsys, tmp_path):
    out = tmp_path / "maps"
    assert main(["map", str(demo_path), "--band", "20 m", "--json", "--dpi", "50", "--date", "2026-01-02",
                 "--out", str(out)]) == 0
    text = capsys.readouterr().out
    result = json.loads(text)
    assert [m["file"] for m in result["maps"]] == ["map-20m.png"]
    assert "2026" not in text
    assert (out / "map-20m.png").is_file()


CARDIOID_SITE = """
[station]
name = "Southern test lot"
lat = {lat}
lon = {lon}
[array]
height_m = 10.56
radius_m = 0.01
ground = "perfect"
ground_loss_ohm = 0
layout = "pair"
spacing_m = 10.56
orientation_deg = {orientation}
[[array.state]]
name = "toward"
phase_deg = [0, -90]
[[band]]
name = "40 m"
freq_mhz = 7.1
[[goal]]
name = "ring"
region = "circle:{goal_lat},{goal_lon},1500"
[propagation]
points_per_goal = 60
"""


def _cardioid(lat, lon, orientation, goal_lat, goal_lon):
    site = loads(CARDIOID_SITE.format(lat=lat, lon=lon, orientation=orientation, goal_lat=goal_lat,
                                      goal_lon=goal_lon))
    return site, run_plan(site, True)


@pytest.mark.parametrize("orientation", [30.0, 200.0])
def test_lobe_points_along_the_baseline_toward_the_lagging_element(orientation):
    # CHECKS.md (common practice): two verticals a quarter wave apart fed
    # 0 / -90 deg beam toward the lagging element, which the conventions put
    # along the baseline bearing. On an azimuthal map x is east and y north, so
    # the lobe's farthest vertex lies at atan2(x, y) = the baseline bearing.
    site, plan = _cardioid(45.0, -93.0, orientation, 30.0, -60.0)
    scene = band_scene(site, plan, "40 m")
    fig = map_figure(scene, "2026-01-01")
    ax = _map_axes(fig)
    patch = next(p for p in ax.patches if p.get_gid() == "lobe:toward")
    xy = patch.get_xy()
    far = xy[int(np.argmax(np.hypot(xy[:, 0], xy[:, 1])))]
    bearing = math.degrees(math.atan2(far[0], far[1])) % 360.0
    assert abs((bearing - orientation + 180.0) % 360.0 - 180.0) <= 1.5
    assert abs((scene.lobes[0].peak_bearing_deg - orientation + 180.0) % 360.0 - 180.0) <= 1.5
    matplotlib.pyplot.close(fig)


def test_geojson_valid_for_a_southward_lobe_and_a_circle_across_180():
    # A station at 45 S whose cardioid points south reaches over the South
    # Pole (5000 km away, 45 deg of arc, computed); a circle goal centred near
    # the antimeridian is cut in two. Every feature must be a valid polygon
    # with rings of four or more positions (RFC 7946 sec. 3.1.6).
    site, plan = _cardioid(-45.0, 170.0, 180.0, -17.0, 179.0)
    doc = json.loads(json.dumps(plan_geojson(site, plan), allow_nan=False))
    lobes = [f for f in doc["features"] if f["properties"]["kind"] == "lobe"]
    goals = [f for f in doc["features"] if f["properties"]["kind"] == "goal"]
    assert lobes and goals
    for f in lobes + goals:
        geom = shape(f["geometry"])
        assert geom.is_valid, shapely.is_valid_reason(geom)
        for poly in f["geometry"]["coordinates"]:
            for ring in poly:
                assert len(ring) >= 4
                _ring_ok(ring)
    lobe = shape(lobes[0]["geometry"])
    assert lobe.contains(shapely.Point(0.0, -89.5))  # over the pole
    assert len(shape(goals[0]["geometry"]).geoms) == 2  # the circle is cut at +-180
