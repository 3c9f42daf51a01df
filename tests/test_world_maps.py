"""Maps of the whole world: small territories, labels that keep apart, long
path, subtitles that fit, names in any script; and the `regions` verb."""
import json
import warnings

import matplotlib

matplotlib.use("Agg")

import numpy as np
import pytest

from lobeplan.cli import main
from lobeplan.geo.paths import bearing_arc, goal_paths
from lobeplan.geo.regions import resolve, sample_points
from lobeplan.geo.station import Station
from lobeplan.render.azimap import RIM_KM, map_figure
from lobeplan.render.scene import band_scene
from lobeplan.report.plan import run_plan
from lobeplan.site import loads

# An invented station on the North American east coast; goals chosen to
# crowd one another: Caribbean islands beside the USA, small Pacific
# territories, a long-path goal, and names in Greek, Cyrillic and Japanese.
SITE = """
[station]
name = "Saltmarsh test lot, a name long enough to test the title — Σ Ж 東京"
lat = 42.4
lon = -71.1
[array]
height_m = 10.0
layout = "pair"
spacing_m = 10.5
orientation_deg = 30
[[array.state]]
name = "fwd"
phase_deg = [0, -90]
[[array.state]]
name = "rev"
phase_deg = [-90, 0]
[[band]]
name = "20 m"
freq_mhz = 14.1
[[goal]]
name = "United States"
region = "country:USA"
[[goal]]
name = "Cayman"
region = "country:CYM"
[[goal]]
name = "Barbados"
region = "country:BRB"
[[goal]]
name = "Bermuda"
region = "country:BMU"
[[goal]]
name = "Malta Μάλτα"
region = "country:MLT"
[[goal]]
name = "Tonga"
region = "country:TON"
[[goal]]
name = "Samoa"
region = "country:WSM"
[[goal]]
name = "Fiji 東京"
region = "country:FJI"
[[goal]]
name = "Mauritius Маврикий"
region = "country:MUS"
[[goal]]
name = "East Australia"
region = "country:AUS"
clip = [140, -40, 155, -10]
path = "long"
[propagation]
points_per_goal = 40
"""


@pytest.fixture(scope="module")
def crowded():
    import matplotlib.pyplot as plt

    site = loads(SITE, file="crowded.toml")
    plan = run_plan(site, True)
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # a missing glyph or a layout warning fails here
        fig = map_figure(band_scene(site, plan, "20 m"), "2026-01-02", "a4")
        fig.canvas.draw()
    yield site, fig
    plt.close(fig)


def _texts(fig, prefix):
    out = []
    for ax in fig.axes:
        out += [t for t in ax.texts if (t.get_gid() or "").startswith(prefix)]
    out += [t for t in fig.texts if (t.get_gid() or "").startswith(prefix)]
    return out


def test_labels_never_overlap_and_stay_on_the_page(crowded):
    _, fig = crowded
    r = fig.canvas.get_renderer()
    boxes = [t.get_window_extent(r) for t in _texts(fig, "goal-label:") + _texts(fig, "long-label:")]
    assert len(boxes) == 11  # ten regions, and the long-path band of one
    ax = next(a for a in fig.axes if hasattr(a, "projection"))
    others = [t.get_window_extent(r) for t in ax.texts
              if t.get_text() and not (t.get_gid() or "").startswith(("goal-label:", "long-label:"))]
    assert others  # the range-ring and bearing labels
    for a in boxes:
        for b in others:
            assert not (a.x0 < b.x1 - 0.5 and b.x0 < a.x1 - 0.5 and a.y0 < b.y1 - 0.5 and b.y0 < a.y1 - 0.5)
    page = fig.bbox
    for i, a in enumerate(boxes):
        assert a.x0 >= page.x0 - 1 and a.x1 <= page.x1 + 1 and a.y0 >= page.y0 - 1 and a.y1 <= page.y1 + 1
        for b in boxes[i + 1:]:
            # strict overlap of the two text boxes (touching is fine)
            assert not (a.x0 < b.x1 - 0.5 and b.x0 < a.x1 - 0.5 and a.y0 < b.y1 - 0.5 and b.y0 < a.y1 - 0.5)


def test_small_territories_get_a_marker(crowded):
    _, fig = crowded
    markers = {ln.get_gid() for ax in fig.axes for ln in ax.lines if (ln.get_gid() or "").startswith("goal-marker:")}
    # Malta, Barbados, Bermuda, Cayman: each under 500 km2 of land (from memory)
    for name in ("Malta Μάλτα", "Barbados", "Bermuda", "Cayman"):
        assert f"goal-marker:{name}" in markers
    assert "goal-marker:United States" not in markers


def test_subtitle_fits_the_page(crowded):
    _, fig = crowded
    r = fig.canvas.get_renderer()
    for t in _texts(fig, "subtitle"):
        box = t.get_window_extent(r)
        assert box.x1 <= fig.bbox.x1 and box.x0 >= fig.bbox.x0
    title = _texts(fig, "title")[0].get_window_extent(r)
    band = next(t for t in fig.texts if t.get_text() == "20 m").get_window_extent(r)
    assert title.x1 < band.x0


def test_long_path_goal_drawn_at_its_long_path_bearings(crowded):
    # Long path = short-path bearing + 180 deg (great-circle geometry, common
    # practice); the rim band must span the long-path bearings of the region.
    site, fig = crowded
    ax = next(a for a in fig.axes if hasattr(a, "projection"))
    band = next(ln for ln in ax.lines if ln.get_gid() == "long-path:East Australia")
    x, y = band.get_data()
    bearings = np.degrees(np.arctan2(x, y)) % 360
    st = Station("", 42.4, -71.1, "")
    lons, lats = sample_points(resolve("country:AUS", st, clip=(140, -40, 155, -10)), 400, seed=1)
    short, _ = goal_paths(st, lons, lats, "short")
    start, end, _ = bearing_arc((short + 180.0) % 360.0)
    assert bearings.min() == pytest.approx(start, abs=1.0)
    assert bearings.max() == pytest.approx(end, abs=1.0)
    assert np.hypot(x, y).max() <= RIM_KM * 1000 * 1.001
    assert any("long path" in t.get_text() for t in _texts(fig, "long-label:"))


def test_names_in_other_scripts_draw_without_warnings(crowded):
    # the fixture drew with warnings as errors; a glyph no font has is a "?"
    _, fig = crowded
    text = " ".join(t.get_text() for t in _texts(fig, "goal-label:"))
    assert "Μάλτα" in text and "Маврикий" in text


def test_regions_verb_lists_matches_with_areas(capsys):
    assert main(["regions", "malta", "--json"]) == 0
    out = json.loads(capsys.readouterr().out)
    row = next(r for r in out["matches"] if r["code"] == "MLT")
    # Malta's land area is about 316 km2 (from memory, the usual published
    # figure); 1:10m coasts simplified to 300 m hold it within 10 %.
    assert row["area_km2"] == pytest.approx(316, rel=0.10)
    assert row["continents"] == ["Europe"]


def test_regions_verb_with_site_gives_bearings(capsys, tmp_path):
    site = tmp_path / "s.toml"
    site.write_text(SITE)
    assert main(["regions", "bermuda", "--site", str(site), "--json"]) == 0
    row = json.loads(capsys.readouterr().out)["matches"][0]
    # pyproj (Karney 2013) from the station to Hamilton, Bermuda, 32.29 N,
    # 64.78 W (from memory): Bermuda is 40 km long, so within 2 deg, 40 km.
    from pyproj import Geod

    az, _, d = Geod(ellps="WGS84").inv(-71.1, 42.4, -64.78, 32.29)
    assert row["bearing_deg"]["start"] - 2 <= az % 360 <= row["bearing_deg"]["end"] + 2
    assert row["distance_km"]["min"] - 40 <= d / 1000 <= row["distance_km"]["max"] + 40


def test_regions_verb_empty_search_says_so(capsys):
    assert main(["regions", "zzqx"]) == 0
    out = capsys.readouterr().out
    assert "No country or continent matches 'zzqx'" in out


def test_regions_verb_alias_note(capsys):
    assert main(["regions", "England"]) == 0
    out = capsys.readouterr().out
    assert "country:GBR" in out and "whole United Kingdom" in out


def test_tables_never_cut_names(capsys, tmp_path):
    site = tmp_path / "s.toml"
    site.write_text(SITE)
    assert main(["paths", str(site)]) == 0
    out = capsys.readouterr().out
    assert "Mauritius Маврикий" in out and "East Australia" in out


def test_sixty_goals_lay_out_without_warnings():
    # 60 goals used to overflow the elevation panel's legend (a layout
    # warning on stderr); circles so that no data look-up is involved
    import matplotlib.pyplot as plt

    from lobeplan.render.panels import elevation_figure

    goals = "".join(f'[[goal]]\nname = "Goal {i} with a longish name"\n'
                    f'region = "circle:{-60 + 2 * i},{-170 + 5.5 * i},800"\n' for i in range(60))
    text = SITE.split("[[goal]]")[0] + goals + "[propagation]\npoints_per_goal = 10\n"
    site = loads(text, file="sixty.toml")
    plan = run_plan(site, True)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        fig = elevation_figure(site, plan)
        fig.canvas.draw()
    plt.close(fig)


def test_map_png_is_byte_identical_between_runs(tmp_path):
    # the gallery is regenerated with a fixed --date: the same scene must
    # give the same bytes (no timestamp, no random ids, a fixed palette)
    from lobeplan.render.azimap import draw_map

    site = loads(SITE, file="crowded.toml")
    scene = band_scene(site, run_plan(site, True), "20 m")
    a = draw_map(scene, tmp_path / "a.png", "2026-05-01", "a4", 40).read_bytes()
    b = draw_map(scene, tmp_path / "b.png", "2026-05-01", "a4", 40).read_bytes()
    assert a == b


def test_paths_notes_what_an_alternative_name_means(capsys, tmp_path):
    site = tmp_path / "s.toml"
    site.write_text(SITE.replace('region = "country:BMU"', 'region = "country:England"'))
    assert main(["paths", str(site)]) == 0
    assert "Note: Bermuda: country:England: England is part of the United Kingdom" in capsys.readouterr().out


def test_pattern_figures_draw_other_scripts_without_warnings(tmp_path):
    site = tmp_path / "s.toml"
    site.write_text(SITE)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        assert main(["pattern", str(site), "--out", str(tmp_path / "out")]) == 0
    assert any(p.suffix == ".png" for p in (tmp_path / "out").iterdir())
