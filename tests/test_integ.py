"""Where the verbs meet: one site through several verbs, as a new user runs them."""
import json

import pytest

from lobeplan.cli import main
from lobeplan.site import loads

HEAD = """
[station]
name = "Test lot"
lat = 45.0
lon = -93.0
"""

SINGLE = HEAD + """
[array]
height_m = 10.3
layout = "single"
[[band]]
name = "40 m"
freq_mhz = 7.1
[[goal]]
region = "continent:Europe"
[propagation]
model = "geometry"
points_per_goal = 30
hours_utc = [[12, 14]]
"""


def _figure_texts(fig) -> str:
    return " ".join(t.get_text() for t in fig.texts)


def test_single_vertical_schedule_says_it_has_no_baseline(write_site, capsys):
    path = write_site(SINGLE)
    assert main(["schedule", str(path)]) == 0
    text = capsys.readouterr().out
    assert "baseline along" not in text and "no baseline" in text
    assert main(["schedule", str(path), "--json"]) == 0
    doc = json.loads(capsys.readouterr().out)
    assert doc["schedule_options"][0]["layout"] == "single"

    from lobeplan.plan.planner import make_plan
    from lobeplan.plan.schedule import make_schedule
    from lobeplan.render.schedule import schedule_figure, switch_card_figure
    import matplotlib.pyplot as plt

    site = loads(SINGLE, file="t.toml")
    plan = make_plan(site)
    sched = make_schedule(site, plan)
    for fig in (schedule_figure(site, plan, sched, "40 m"), switch_card_figure(site, plan, sched, "2026-12-01")):
        fig = fig[0] if isinstance(fig, tuple) else fig
        words = _figure_texts(fig)
        assert "baseline along" not in words and "no baseline" in words
        plt.close(fig)


def test_map_without_out_keeps_clear_of_the_gallery_folder(write_site, tmp_path, monkeypatch, capsys):
    # the checkout commits its gallery in maps/; a bare `lobeplan map` run
    # there must write to a folder of its own
    path = write_site(SINGLE)
    monkeypatch.chdir(tmp_path)
    assert main(["map", str(path), "--date", "2026-12-01", "--dpi", "50"]) == 0
    capsys.readouterr()
    assert not (tmp_path / "maps").exists()
    assert (tmp_path / "lobeplan-maps" / "map-40m.png").is_file()


PAIR_BUILT = HEAD + """
[array]
height_m = 10.3
layout = "pair"
spacing_m = 10.5
design_band = "40 m"
[array.radials]
count = 32
length_m = 10.0
depth_m = 0.05
[[array.state]]
name = "along"
phase_deg = [0, -90]
[feed]
z0_ohm = 75
velocity_factor = 0.66
[[band]]
name = "40 m"
freq_mhz = 7.1
[[goal]]
region = "continent:Europe"
[propagation]
model = "geometry"
points_per_goal = 30
"""


def test_radial_table_keeps_the_network_as_built():
    # The switch box is cut once, on the site's own ground. Put 4 radials of
    # 0.1 wavelength in place of 32 x 10 m and the base resistance triples
    # (about 12 -> 36 ohm), so the same lines can no longer deliver the
    # designed 1/-90 deg currents (common practice: a phasing network is only
    # right for the load it was cut for). A table that cut the network again
    # for each radial system would show the designed currents in every row.
    import cmath
    import math

    from lobeplan.antenna.radial_table import radial_table

    site = loads(PAIR_BUILT, file="t.toml")
    option = site.array.options[0]
    table = radial_table(site.array, option, 7.1e6)
    (own,) = table.site_fed
    ratio = own.base_current_a[1] / own.base_current_a[0]
    assert abs(ratio) == pytest.approx(1.0, abs=0.01)                   # the network meets its design
    assert math.degrees(cmath.phase(ratio)) == pytest.approx(-90.0, abs=1.0)
    poor = next(r for r in table.rows if r.count == 4 and r.length_wavelengths == 0.1)
    (moved,) = poor.fed
    ratio = moved.base_current_a[1] / moved.base_current_a[0]
    assert abs(abs(ratio) - 1.0) > 0.05 or abs(math.degrees(cmath.phase(ratio)) + 90.0) > 5.0
    assert moved.front_to_back_db < own.front_to_back_db - 3.0          # the null fills in


SQUARE = HEAD + """
[array]
height_m = 10.3
layout = "square"
spacing_m = 10.5
orientation_deg = 30
""" + "".join(f"""
[[array.state]]
name = "{name}"
phase_deg = {phases}
""" for name, phases in (("NE", [0, -90, -180, -90]), ("SE", [-90, 0, -90, -180]),
                         ("SW", [-180, -90, 0, -90]), ("NW", [-90, -180, -90, 0]))) + """
[[band]]
name = "40 m"
freq_mhz = 7.1
[[goal]]
region = "continent:Europe"
[propagation]
model = "geometry"
points_per_goal = 30
"""


@pytest.mark.parametrize("text", [SINGLE, SQUARE], ids=["single", "square"])
def test_layout_figure_keeps_title_and_legend_on_the_page(text):
    # a one-panel page is 5.4 in wide: the title wraps, the legend of four
    # states and the line runs fits below the axes; one vertical has no
    # junction and no line runs to draw
    import matplotlib.pyplot as plt

    from lobeplan.plan.planner import make_plan
    from lobeplan.render.layout import layout_figure
    from lobeplan.report.plan import staking_plans

    site = loads(text, file="t.toml")
    plan = make_plan(site)
    beams = [{s.name: (0.0,) for s in o.states} for o in site.array.options]
    fig = layout_figure(staking_plans(site, plan), site.orientation.allowed_deg, beams,
                        f"{site.station.name}: where the elements go (top view, north up; beams on each "
                        "state's design band)")
    fig.canvas.draw()
    page = fig.bbox
    for artist in [fig._suptitle] + [ax.get_legend() for ax in fig.axes]:
        box = artist.get_window_extent()
        assert box.x0 >= page.x0 - 1 and box.x1 <= page.x1 + 1 and box.y0 >= page.y0 - 1, artist
    gids = {a.get_gid() for ax in fig.axes for a in ax.get_children()}
    assert ("junction" in gids) == (len(site.array.options[0].positions_m) > 1)
    plt.close(fig)


def test_site_file_guide_lists_every_key_the_loader_accepts():
    # docs/site-file.md is the user's reference: each key of every section
    # the loader reads must have a row (first cell) in that section's table
    import re
    from pathlib import Path

    from lobeplan import site as site_mod

    text = (Path(__file__).parent.parent / "docs" / "site-file.md").read_text()
    sections = {}
    for block in re.split(r"\n#+ ", text)[1:]:
        head = re.match(r"`([^`]+)`", block)
        if head is None:
            continue
        rows = re.findall(r"^\| ([^|]+) \|", block, flags=re.M)
        sections[head.group(1)] = {k for r in rows for k in re.findall(r"`([a-z0-9_]+)`", r)}
    wanted = {"[station]": site_mod._STATION, "[array]": site_mod._ARRAY,
              "[array.radials]": site_mod._RADIALS, "[[array.foreground]]": site_mod._FOREGROUND,
              "[[array.option]]": site_mod._OPTION, "[[array.state]]": site_mod._STATE,
              "[feed]": site_mod._FEED, "[[band]]": site_mod._BAND, "[[goal]]": site_mod._GOAL,
              "[propagation]": site_mod._PROP, "[map]": site_mod._MAP}
    missing = {sec: sorted(set(keys) - sections.get(sec, set())) for sec, keys in wanted.items()}
    assert not {s: m for s, m in missing.items() if m}, missing


def test_readme_usage_names_every_verb_and_what_plan_out_writes():
    from pathlib import Path

    from lobeplan.cli import VERBS

    readme = (Path(__file__).parent.parent / "README.md").read_text()
    usage = readme.split("## Usage", 1)[1].split("\n## ", 1)[0]
    for verb in VERBS:
        assert f"    lobeplan {verb} " in usage, verb
    for name in ("plan.json", "plan.csv", "plan.geojson", "stakes.csv", "layout.png", "schedule.csv",
                 "switch-card.png", "plan.html", "paths.json", "needs.json", "./lobeplan-demo", "./lobeplan-maps"):
        assert name in usage, name


def test_pattern_figure_note_stays_on_the_page():
    # the definitions under the charts must be readable whole: no line runs
    # past the right edge, and the note does not climb into the axes labels
    import matplotlib.pyplot as plt

    from lobeplan.render.goalchart import band_figure
    from lobeplan.report import pattern as pattern_verb
    from lobeplan.report.pattern import _blocks

    text = PAIR_BUILT.replace("[[band]]", """[[array.foreground]]
bearing_deg = [0, 120]
from_m = 80
ground = "sea"
[[band]]""", 1)
    site = loads(text, file="t.toml")
    result = pattern_verb.build(site, _Args())
    block = next(iter(_blocks(result["patterns"])))
    fig = band_figure(block, site.station.name, foreground=result.get("foreground", ()))
    fig.canvas.draw()
    renderer = fig.canvas.get_renderer()
    note = fig.texts[-1]
    box = note.get_window_extent(renderer)
    assert box.x1 <= fig.bbox.x1 and box.x0 >= fig.bbox.x0
    lowest_axes = min(ax.get_tightbbox(renderer).y0 for ax in fig.axes)
    assert box.y1 <= lowest_axes + 1
    plt.close(fig)


class _Args:
    json = True
    band = None
    state = None
    power_w = None
    date = "2026-12-01"


def test_ground_line_does_not_claim_a_loss_the_site_did_not_give():
    from lobeplan.report.ground import ground_line, ground_summary

    site = loads(SINGLE, file="t.toml")
    summary = ground_summary(site)
    assert summary["ground_loss_default"] is True
    assert "as given" not in ground_line(summary) and "default" in ground_line(summary)
    given = loads(SINGLE.replace('layout = "single"', 'layout = "single"\nground_loss_ohm = 5'), file="t.toml")
    assert "as given (ground_loss_ohm)" in ground_line(ground_summary(given))


def test_elevation_panel_keeps_its_layout_with_a_long_default_goal_name(tmp_path):
    # a goal without a name is named by its region string; a file: path can
    # run to hundreds of characters, and the legend must not push the panel
    # off the page (matplotlib warns when tight_layout gives up)
    import json as _json
    import warnings

    import matplotlib.pyplot as plt

    from lobeplan.plan.planner import make_plan
    from lobeplan.render.panels import elevation_figure

    name = "d" * 200 + ".geojson"
    ring = [[0, 40], [10, 40], [10, 50], [0, 50], [0, 40]]
    (tmp_path / name).write_text(_json.dumps({"type": "FeatureCollection", "features": [
        {"type": "Feature", "properties": {}, "geometry": {"type": "Polygon", "coordinates": [ring]}}]}))
    text = SINGLE.replace('region = "continent:Europe"', f'region = "file:{name}"')
    site = loads(text, file=str(tmp_path / "site.toml"), base_dir=str(tmp_path))
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        fig = elevation_figure(site, make_plan(site))
    plt.close(fig)


def test_a_foreground_edge_is_not_a_lobe():
    # A cardioid-like row (1 + cos) has one lobe. Add a hard foreground step
    # (+3 dB over 100..200 deg, as a sector of sea would): its edges make
    # local maxima of the blended row, but the lobes stay the smooth ones.
    import numpy as np

    from lobeplan.antenna.pattern import lobe_bearings_deg

    az = np.arange(360.0)
    row = 10 * np.log10(np.maximum((1 + np.cos(np.radians(az - 30))) / 2, 1e-6) + 0.05)
    assert [round(b) for b, _ in lobe_bearings_deg(row)] == [30]
    stepped = row + np.where((az >= 100) & (az < 200), 3.0, 0.0)
    assert [round(b) for b, _ in lobe_bearings_deg(stepped, within_db=30)] == [30]
    # a row that is nothing but a step still says where it is strongest
    flat = np.where((az >= 100) & (az < 200), 3.0, 0.0)
    assert len(lobe_bearings_deg(flat)) == 1


# the built pair, as a short receive pair (3 m elements, 15 m apart)
RECEIVE = (PAIR_BUILT.replace("height_m = 10.3\n", 'height_m = 3.0\nradius_m = 0.01\nuse = "receive"\n', 1)
           .replace("spacing_m = 10.5", "spacing_m = 15").replace("phase_deg = [0, -90]", "phase_deg = [0, -130]"))


def test_feed_designs_no_transmitter_match_for_a_receive_option():
    # docs/site-file.md: "feed designs no match for it" -- nor its part
    # stress at a transmitter power, nor an SWR
    from lobeplan.fileio import dumps_json
    from lobeplan.report import feed as feed_verb

    site = loads(RECEIVE, file="t.toml")
    res = json.loads(dumps_json(feed_verb.build(site, _Args())))
    (band,) = res["bands"]
    (state,) = band["states"]
    net = state["network"]
    assert net is not None and net["power_w"] is None
    assert not [p for p in net["parts"] + net["stress"] if p["name"].startswith("match ")]
    assert all(c["swr"] is None for c in net["checks"])
    for line in band["design"]["lines"]:
        assert not [p for p in line["network"]["parts"] if p["name"].startswith("match ")]
    text = feed_verb.format_text(res)
    assert " A rms at " not in text and "match series" not in text


@pytest.mark.parametrize("orientation, drawn", [("30", False), ('"sweep"', True)])
def test_orientation_panel_only_when_there_are_bearings_to_compare(orientation, drawn, tmp_path, monkeypatch):
    # a fixed orientation_deg scores one bearing per option: a panel of
    # "score against baseline bearing" would show a dot, so there is none
    from pathlib import Path

    import lobeplan.render.azimap as azimap
    from lobeplan.plan.planner import make_plan
    from lobeplan.report.map import write_plan_figures

    monkeypatch.setattr(azimap, "draw_map", lambda scene, path, *a, **k: Path(path))   # the maps are not the point
    site = loads(PAIR_BUILT.replace('layout = "pair"', f'layout = "pair"\norientation_deg = {orientation}'),
                 file="t.toml")
    names = {p.name for p in write_plan_figures(site, make_plan(site), _Args(), tmp_path)}
    assert ("orientation.png" in names) is drawn and "elevation.png" in names


def test_a_signal_just_after_the_staging_folder_is_made_leaves_nothing(write_site, tmp_path, monkeypatch, capsys):
    # Ctrl-C can land between the staging folder's making and the code that
    # discards it on failure; the run must still leave no folder behind
    import os
    import signal

    import lobeplan.fileio as fileio

    real = fileio.start_staging

    def make_then_signal(out_dir):
        staging = real(out_dir)
        os.kill(os.getpid(), signal.SIGINT)
        return staging

    monkeypatch.setattr(fileio, "start_staging", make_then_signal)
    site = write_site(SINGLE)
    out = tmp_path / "res"
    assert main(["paths", str(site), "--out", str(out)]) == 130
    capsys.readouterr()
    assert not out.exists()
    assert [p.name for p in tmp_path.iterdir() if p.name.startswith(".")] == []


def test_suggest_on_one_vertical_says_why_there_is_nothing(write_site, capsys):
    path = write_site(SINGLE)
    assert main(["feed", str(path), "--suggest", "goals"]) == 0
    assert "no phasing to choose" in capsys.readouterr().out


def test_short_receive_elements_get_no_base_coil():
    # common practice: receive verticals are short on purpose and are not
    # resonated or matched, so the transmit advice (a base coil at a stated Q)
    # does not apply to them; a transmit option of the same height gets it
    from lobeplan.fileio import dumps_json
    from lobeplan.report import feed as feed_verb
    from lobeplan.site import element_caveats

    site = loads(RECEIVE, file="t.toml")
    (band,) = json.loads(dumps_json(feed_verb.build(site, _Args())))["bands"]
    assert band["loading_coil"] is None
    assert element_caveats(site) == ()
    tx = loads(RECEIVE.replace('use = "receive"\n', ""), file="t.toml")
    (band,) = json.loads(dumps_json(feed_verb.build(tx, _Args())))["bands"]
    assert band["loading_coil"] is not None and element_caveats(tx)


def test_plan_page_lobes_are_the_maps_lobes_with_a_foreground():
    # the page and the maps draw the same lobes (one scene helper): with sea
    # beyond the array the lobes carry its low-angle gain on both
    import numpy as np

    from lobeplan.plan.planner import make_plan
    from lobeplan.render.page import page_drawing
    from lobeplan.render.scene import band_scene

    text = PAIR_BUILT + '\n[[array.foreground]]\nbearing_deg = [0, 120]\nfrom_m = 30\nground = "sea"\n'
    site = loads(text, file="t.toml")
    plan = make_plan(site)
    scene = band_scene(site, plan, "40 m")
    (drawn,) = [o for o in page_drawing(site, plan)["options"] if o["option"] == scene.option]
    for lobe in scene.lobes:
        assert np.abs(np.array(drawn["lobes_km"]["40 m"][lobe.state]) - lobe.radius_km).max() <= 0.5


def test_a_step_above_the_only_lobe_still_leaves_that_lobe():
    # A sector edge that stands more than the lobe window above the row's one
    # smooth maximum (here +6 dB of sea over 100..200 deg, beyond the
    # cardioid's -3 dB point) must not leave the row without a lobe: the
    # window counts from the strongest lobe kept. Found with sharp edges.
    import numpy as np

    from lobeplan.antenna.pattern import lobe_bearings_deg

    az = np.arange(360.0)
    row = 10 * np.log10(np.maximum((1 + np.cos(np.radians(az - 30))) / 2, 1e-6) + 0.05)
    stepped = row + np.where((az >= 100) & (az < 200), 6.0, 0.0)
    assert [round(b) for b, _ in lobe_bearings_deg(stepped)] == [30]
