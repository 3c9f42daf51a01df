"""The plan page (plan.html): embedded data, escaping, projection, and a real browser.

The browser tests drive Debian's ``chromium`` with ``chromium-driver``
through Selenium, one session for the module; they skip, saying why, where
either is missing. The schedule and staking plan are built here in the shape
the schedule and array verbs write (``schedule`` rows and ``stakes``
entries), from the plan's own per-goal rows, so that every control has
something to change.
"""
from __future__ import annotations

import json
import math
import re
import shutil

import pytest
from hypothesis import given
from hypothesis import strategies as st
from browser import NoBrowser, set_viewport, start_chromium

from lobeplan.fileio import atomic_write_json
from lobeplan.render.page import script_json, svg_path, write_page
from lobeplan.report.plan import build_from_plan, run_plan
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
[[band]]
name = "20 m"
freq_mhz = 14.1
[[goal]]
name = "Europe"
region = "continent:Europe"
clip = [-30, 34, 45, 72]
avoid = ["country:JPN"]
[[goal]]
name = "South America"
region = "continent:South America"
path = "both"
[[goal]]
name = "Reef"
region = "circle:-17.8,178.0,80"
bands = ["20 m"]
[propagation]
points_per_goal = 40
months = [6, 12]
solar_flux = 120
"""

# names with quotes, angle brackets, an ampersand and non-Latin letters
EVIL_STATION = 'Øster "Lot" <script>alert(1)</script> & 北の畑'
EVIL_GOAL = 'Тест </script><b>"goal"</b> & ́ä'
EVIL_SITE = f"""
[station]
name = {json.dumps(EVIL_STATION)}
lat = 45.0
lon = -93.0
[array]
height_m = 10.0
layout = "pair"
spacing_m = 10.5
orientation_deg = 30
[[array.state]]
name = "fwd <&> \\"q\\""
phase_deg = [0, -90]
[[band]]
name = "40 m"
freq_mhz = 7.1
[[goal]]
name = {json.dumps(EVIL_GOAL)}
region = "circle:50,10,1500"
[propagation]
points_per_goal = 30
"""

MONTHS = (6, 12)


def fake_schedule(result: dict, states_of: dict) -> list[dict]:
    """Rows in the schedule's shape: state by hour and month, from the plan's own goal rows.

    As the schedule writes them: a row per option, band, month and hour; its
    goals are those open in the slot (name, with " (long path)" for a long
    path, open share, advantage), so the last hour, closed, lists none.
    """
    rows = []
    for comp in result["spacing_comparison"]:
        states = states_of[comp["option"]]
        for band in dict.fromkeys(g["band"] for g in comp["goals"]):
            goals = [g for g in comp["goals"] if g["band"] == band]
            for month in MONTHS:
                for hour in range(24):
                    closed = hour == 23
                    state = None if closed else states[(hour // 2 + MONTHS.index(month)) % len(states)]
                    rows.append({
                        "option": comp["option"], "orientation_deg": comp["best_orientation_deg"], "band": band,
                        "month": month, "hour_utc": hour, "state": state,
                        "score_db": None if closed else round(1.0 + 0.05 * hour, 2),
                        "goals": [] if closed else [
                            {"name": g["goal"] + (" (long path)" if g["path"] == "long" else ""),
                             "open_share": round(0.1 + 0.08 * ((hour + i) % 10), 3),
                             "advantage_db": round((g["advantage_db"] or 0.0) - 0.4 * (hour % 5), 2)}
                            for i, g in enumerate(goals)],
                        "runner_up_state": None if closed else states[0], "runner_up_loss_db": None if closed else 0.5})
    return rows


def fake_stakes(result: dict) -> list[dict]:
    comp = result["spacing_comparison"][0]
    return [{"option": comp["option"], "orientation_deg": comp["best_orientation_deg"],
             "elements": [{"element": 1, "along_m": 0.0, "across_m": 0.0, "north_m": 0.0, "east_m": 0.0,
                           "lat_deg": 45.0, "lon_deg": -93.0},
                          {"element": 2, "along_m": 10.5, "across_m": 0.0, "north_m": 10.1, "east_m": 2.9,
                           "lat_deg": 45.000091, "lon_deg": -92.999963}],
             "junction": {"along_m": 5.25, "across_m": 0.0, "north_m": 5.05, "east_m": 1.45},
             "runs": [{"element": 1, "run_m": 5.4, "bearing_deg": 196.0, "line_m": {"fwd": 6.0, "rev": 13.0}},
                      {"element": 2, "run_m": 5.4, "bearing_deg": 16.0, "line_m": {"fwd": 13.0, "rev": 6.0}}]}]


@pytest.fixture(scope="module")
def pages(tmp_path_factory):
    """(folder, plan.json dict, site, plan) of the test site with the schedule and stakes built here.

    Beside it: ``real/`` (the plan's own keys), ``bare/`` (no schedule, no
    stakes) and ``evil/`` (hostile names, one month).
    """
    out = tmp_path_factory.mktemp("page")
    site = loads(SITE, file="test.toml")
    plan = run_plan(site, True)
    result = build_from_plan(site, plan)
    result["months"] = list(MONTHS)
    result["schedule"] = fake_schedule(result, {op.option: list(op.state_names) for op in plan.options})
    result["stakes"] = fake_stakes(result)
    atomic_write_json(out / "plan.json", result)
    write_page(site, plan, result, out / "plan.html")

    def page(folder: str, site, plan, res: dict) -> None:
        (out / folder).mkdir()
        atomic_write_json(out / folder / "plan.json", res)
        write_page(site, plan, res, out / folder / "plan.html")

    # the same plan as it comes from plan, without the data built here; and without a schedule at all
    page("real", site, plan, build_from_plan(site, plan))
    bare = {k: v for k, v in build_from_plan(site, plan).items() if k not in ("months", "schedule", "stakes")}
    page("bare", site, plan, bare)
    evil = loads(EVIL_SITE, file="evil.toml")
    eplan = run_plan(evil, True)
    page("evil", evil, eplan, build_from_plan(evil, eplan))
    return out, result, site, plan


def _block(html: str, block_id: str) -> str:
    m = re.search(rf'<script type="application/json" id="{block_id}">(.*?)</script>', html, re.S)
    assert m, block_id
    return m.group(1)


def _unescape(text: str) -> str:
    return (text.replace("\\u003c", "<").replace("\\u003e", ">").replace("\\u0026", "&")
            .replace("\\u2028", "\u2028").replace("\\u2029", "\u2029"))


# ---------- without a browser ----------

def test_embedded_plan_is_the_file(pages):
    out, _, _, _ = pages
    html = (out / "plan.html").read_text(encoding="utf-8")
    text = (out / "plan.json").read_text(encoding="utf-8")
    embedded = _block(html, "plan-json")
    assert _unescape(embedded) == text.rstrip("\n")       # the file's own text, escapes undone
    assert json.loads(embedded) == json.loads(text)       # and the same data once parsed


def test_names_are_escaped(pages):
    out = pages[0] / "evil"
    html = (out / "plan.html").read_text(encoding="utf-8")
    # only the page's own three script blocks close; no tag from a name survives
    assert html.count("</script>") == 3
    assert "<b>" not in html and "alert(1)</script>" not in html
    plan = json.loads(_block(html, "plan-json"))
    assert plan["station"]["name"] == EVIL_STATION
    drawing = json.loads(_block(html, "page-drawing"))
    assert [g["name"] for g in drawing["goals"]] == [EVIL_GOAL]
    assert json.loads(script_json({"a": "</script><!--&\u2028"})) == {"a": "</script><!--&\u2028"}


@given(st.recursive(st.text() | st.integers() | st.none(),
                    lambda inner: st.lists(inner, max_size=3) | st.dictionaries(st.text(), inner, max_size=3),
                    max_leaves=8))
def test_script_json_round_trips_and_cannot_close_the_block(value):
    text = script_json(value)
    assert json.loads(text) == value
    # HTML ends a script block at "</script" and comments at "<!--": no "<" survives at all
    assert "<" not in text and ">" not in text and "&" not in text


def test_plan_verb_writes_the_page(tmp_path, write_site):
    from lobeplan.cli import main

    from helpers import MINIMAL

    path = write_site(MINIMAL + "[propagation]\npoints_per_goal = 20\n")
    assert main(["plan", str(path), "--out", str(tmp_path / "out"), "--date", "2026-01-02"]) == 0
    html = (tmp_path / "out" / "plan.html").read_text(encoding="utf-8")
    assert json.loads(_block(html, "plan-json")) == json.loads((tmp_path / "out" / "plan.json").read_text())
    assert "http://" not in html.replace("http://www.w3.org/2000/svg", "") and "https://" not in html


def test_svg_path_is_the_azimuthal_equidistant_map(pages):
    """A small square's corner lands at the great-circle bearing and distance.

    Snyder (1987), USGS PP 1395, p. 191: on the azimuthal equidistant
    projection the distance from the centre is the great-circle distance and
    the direction is the azimuth. Checked against the spherical law of
    cosines and the forward-azimuth formula (common practice), on the 6371 km
    sphere the maps use; 2 km tolerance: the page keeps whole kilometres and
    simplifies outlines by 0.1 deg, but a corner is a kept vertex.
    """
    from shapely.geometry import Polygon

    from lobeplan.render.azimap import projection

    lon0, lat0 = -93.0, 45.0
    proj, src = projection(lon0, lat0)
    sq = Polygon([(10.0, 50.0), (12.0, 50.0), (12.0, 52.0), (10.0, 52.0)])
    d = svg_path(proj.project_geometry(sq, src))
    m = re.match(r"M(-?\d+) (-?\d+)l", d)
    x_km, y_km = int(m.group(1)), -int(m.group(2))        # the page's y grows downward
    corner = proj.transform_point(10.0, 50.0, src)
    assert (x_km, y_km) == (round(corner[0] / 1000), round(corner[1] / 1000))
    p1, p2, dl = math.radians(lat0), math.radians(50.0), math.radians(10.0 - lon0)
    dist = 6371.0 * math.acos(math.sin(p1) * math.sin(p2) + math.cos(p1) * math.cos(p2) * math.cos(dl))
    az = math.degrees(math.atan2(math.sin(dl) * math.cos(p2),
                                 math.cos(p1) * math.sin(p2) - math.sin(p1) * math.cos(p2) * math.cos(dl))) % 360
    assert math.hypot(x_km, y_km) == pytest.approx(dist, abs=2.0)
    assert math.degrees(math.atan2(x_km, y_km)) % 360 == pytest.approx(az, abs=0.05)


def _drawing(out) -> dict:
    return json.loads(_block((out / "plan.html").read_text(encoding="utf-8"), "page-drawing"))


def test_small_goals_are_kept_and_marked(pages):
    drawing = _drawing(pages[0])
    reef = next(g for g in drawing["goals"] if g["name"] == "Reef")
    assert reef["fill"] and reef["size_km"] < 600     # 160 km across: drawn, and given a marker ring
    # land parts under 400 km2 are dropped, so the page stays small; the goal is not
    assert len((pages[0] / "plan.html").read_bytes()) < 3_000_000


def test_lobes_reach_the_scale_peak(pages):
    _, _, site, _ = pages
    drawing = _drawing(pages[0])
    for op in drawing["options"]:
        for band, lobes in op["lobes_km"].items():
            assert set(lobes) == set(op["states"])
            assert all(len(r) == 360 for r in lobes.values())
            # the strongest state of the band is drawn at the peak radius (scene.lobe_radius_km)
            assert max(max(r) for r in lobes.values()) == round(site.map.lobe_peak_km)


# ---------- in a real browser ----------

@pytest.fixture(scope="module")
def browser():
    try:
        drv, profile = start_chromium()
    except NoBrowser as exc:
        pytest.skip(str(exc))
    set_viewport(drv, 1280, 800)
    yield drv
    drv.quit()
    shutil.rmtree(profile, ignore_errors=True)


def _open(drv, path):
    drv.get(path.as_uri())
    drv.get_log("browser")
    drv.get_log("performance")
    drv.get(path.as_uri())
    return drv.find_element("css selector", "html").get_attribute("data-ready-ms")


def _number(text: str) -> float:
    m = re.search(r"[+\-\u2212]?\d+(?:\.\d+)?", text)
    assert m, text
    return float(m.group(0).replace("\u2212", "-"))


def test_loads_offline_without_errors(browser, pages, capsys):
    out = pages[0]
    for path in (out / "plan.html", out / "real" / "plan.html", out / "bare" / "plan.html", out / "evil" / "plan.html"):
        ready = _open(browser, path)
        assert ready is not None, "the page script did not finish"
        errors = [e for e in browser.get_log("browser") if e["level"] in ("SEVERE", "WARNING")]
        assert errors == []
        urls = []
        for entry in browser.get_log("performance"):
            msg = json.loads(entry["message"])["message"]
            if msg["method"] == "Network.requestWillBeSent":
                urls.append(msg["params"]["request"]["url"])
        assert urls and all(u.startswith(("file://", "data:")) for u in urls), urls
        interactive = browser.execute_script(
            "var n = performance.getEntriesByType('navigation')[0]; return n.loadEventEnd - n.startTime")
        with capsys.disabled():  # measured and logged, not asserted (benchmarks/page.py keeps the budget)
            print(f"\n  plan page {path.parent.name}/{path.name}: script {float(ready):.0f} ms, "
                  f"interactive {interactive:.0f} ms")
    # the evil names arrive as text, not markup
    assert browser.find_element("id", "station-name").text == EVIL_STATION
    assert EVIL_GOAL in browser.find_element("id", "goal-table").text
    assert browser.find_elements("css selector", "b") == []


def test_sections_follow_their_data(browser, pages):
    from selenium.webdriver.support.ui import Select

    out, result, _, _ = pages
    _open(browser, out / "plan.html")
    staked = result["stakes"][0]["option"]
    Select(browser.find_element("id", "ctl-option")).select_by_value(staked)
    rows = browser.find_elements("css selector", "#stakes-table tbody tr")
    assert [r.find_element("css selector", "td").text for r in rows] == ["1", "2"]
    other = next(c["option"] for c in result["spacing_comparison"] if c["option"] != staked)
    Select(browser.find_element("id", "ctl-option")).select_by_value(other)
    assert "No staking plan for" in browser.find_element("id", "stakes").text
    cells = browser.find_elements("css selector", "#schedule-svg rect[data-hour]")
    assert len(cells) == 2 * len(MONTHS) * 24          # two bands x months x hours
    # a plan without a schedule or stakes says so, and its month and hour controls are off
    _open(browser, out / "bare" / "plan.html")
    assert "no hour-by-hour schedule" in browser.find_element("id", "schedule-fig").text
    assert "no staking plan" in browser.find_element("id", "stakes").text
    assert not browser.find_element("id", "ctl-month").is_enabled()
    assert not browser.find_element("id", "ctl-hour").is_enabled()
    # one month: the month list is off and the schedule says it holds one month
    _open(browser, out / "evil" / "plan.html")
    assert not browser.find_element("id", "ctl-month").is_enabled()
    assert browser.find_element("id", "ctl-hour").is_enabled()
    assert "A single-month plan" in browser.find_element("id", "schedule-fig").text


def _drawn(drv) -> str:
    return drv.execute_script(
        "return ['layer-lobes','layer-goals','layer-baseline'].map(function(i){"
        "var g=document.getElementById(i); return Array.from(g.querySelectorAll('[fill],[points],[x1]'))"
        ".map(function(e){return (e.getAttribute('fill')||'')+(e.getAttribute('points')||'')+(e.getAttribute('x1')||'')})"
        ".join('|')}).join('#')")


def test_each_control_changes_the_map(browser, pages):
    from selenium.webdriver.common.keys import Keys
    from selenium.webdriver.support.ui import Select

    out, result, _, _ = pages
    _open(browser, out / "plan.html")
    svg = browser.find_element("id", "map")

    def changed(action):
        before, shot = _drawn(browser), svg.screenshot_as_png
        action()
        assert _drawn(browser) != before
        assert svg.screenshot_as_png != shot

    shown = browser.find_element("id", "ctl-option").get_attribute("value")
    other_option = next(c["option"] for c in result["spacing_comparison"] if c["option"] != shown)
    changed(lambda: Select(browser.find_element("id", "ctl-option")).select_by_value(other_option))
    changed(lambda: Select(browser.find_element("id", "ctl-band")).select_by_value("20 m"))
    drawn = browser.find_element("css selector", "#layer-lobes polygon").get_attribute("data-state")
    other = next(o.get_attribute("value") for o in browser.find_elements("css selector", "#ctl-state option")
                 if o.get_attribute("value") not in ("best", drawn))
    changed(lambda: Select(browser.find_element("id", "ctl-state")).select_by_value(other))
    changed(lambda: Select(browser.find_element("id", "ctl-state")).select_by_value("best"))
    changed(lambda: Select(browser.find_element("id", "ctl-month")).select_by_value(str(MONTHS[1])))
    # the slider by keyboard alone: two steps to the next state
    hour = browser.find_element("id", "ctl-hour")
    changed(lambda: hour.send_keys(Keys.ARROW_RIGHT, Keys.ARROW_RIGHT))
    assert browser.find_element("id", "hour-out").text == "02:00"
    assert browser.find_element("id", "schedule-here") is not None


def test_keyboard_reaches_controls_and_goals(browser, pages):
    from selenium.webdriver.common.keys import Keys

    _open(browser, pages[0] / "plan.html")
    body = browser.find_element("css selector", "body")
    body.send_keys(Keys.TAB)
    seen = []
    for _ in range(40):
        active = browser.switch_to.active_element
        seen.append(active.get_attribute("id") or active.get_attribute("data-goal"))
        if active.get_attribute("data-goal"):
            break
        active.send_keys(Keys.TAB)
    assert {"ctl-option", "ctl-band", "ctl-state", "ctl-month", "ctl-hour"} <= set(seen)
    goal = browser.switch_to.active_element.get_attribute("data-goal")
    assert goal and browser.find_element("id", "goal-info-title").text == goal
    # a select changes from the keyboard too (two steps: the first state is the one scheduled at 00 UTC)
    state = browser.find_element("id", "ctl-state")
    before = _drawn(browser)
    state.send_keys(Keys.ARROW_DOWN, Keys.ARROW_DOWN)
    assert state.get_attribute("value") not in ("best", "fwd") and _drawn(browser) != before


def test_three_figures_are_plan_json(browser, pages):
    out, result, _, _ = pages
    plan = json.loads((out / "plan.json").read_text())
    _open(browser, out / "plan.html")
    # 1. the best score in the header
    best = browser.find_element("id", "best-line").text
    assert _number(best.split("score")[1]) == plan["ranking"][0]["score_db"]
    # 2. the advantage in the first row of the table by goal (the best option, shown first)
    comp = next(c for c in plan["spacing_comparison"] if c["option"] == plan["ranking"][0]["option"])
    cell = browser.find_element("css selector", '#goal-table tr[data-row="0"] td[data-key="advantage_db"]')
    assert _number(cell.text) == comp["goals"][0]["advantage_db"]
    # 3. a goal's bearing span and its open share at the chosen hour
    goal = browser.find_element("css selector", '#layer-goals [data-goal="Europe"]')
    browser.execute_script("arguments[0].focus()", goal)
    info = browser.find_element("id", "goal-info")
    span = info.find_element("css selector", '[data-figure="bearing"]').text
    ref = next(p for p in plan["goal_paths"] if p["name"] == "Europe")["bearing_deg"]
    assert _number(span) == ref["start"]
    assert _number(span.split(" to ")[1]) == ref["end"]
    row = next(r for r in plan["schedule"] if r["option"] == comp["option"] and r["band"] == "40 m"
               and r["month"] == MONTHS[0] and r["hour_utc"] == 0)
    open_share = next(g["open_share"] for g in row["goals"] if g["name"] == "Europe")
    shown = info.find_element("css selector", '[data-figure="open-share"]').text
    assert _number(shown) / 100.0 == pytest.approx(open_share, abs=1e-12)
    # the long path, which the schedule names "... (long path)", gets its own figures
    goal = browser.find_element("css selector", '#layer-goals [data-goal="South America"]')
    browser.execute_script("arguments[0].focus()", goal)
    long_dl = info.find_element("css selector", 'dl[data-path="long"]')
    want = next(g["open_share"] for g in row["goals"] if g["name"] == "South America (long path)")
    shown = long_dl.find_element("css selector", '[data-figure="open-share"]').text
    assert _number(shown) / 100.0 == pytest.approx(want, abs=1e-12)


def test_the_plans_own_schedule_reads_as_plan_json(browser, pages):
    """The schedule written by plan (not built here): month, hour and figures as plan.json holds them."""
    from selenium.webdriver.support.ui import Select

    out = pages[0] / "real"
    plan = json.loads((out / "plan.json").read_text())
    _open(browser, out / "plan.html")
    option = browser.find_element("id", "ctl-option").get_attribute("value")
    Select(browser.find_element("id", "ctl-month")).select_by_value("12")
    browser.execute_script("var h = document.getElementById('ctl-hour'); h.value = 14;"
                           "h.dispatchEvent(new Event('input'))")
    row = next(r for r in plan["schedule"] if r["option"] == option and r["band"] == "40 m"
               and r["month"] == 12 and r["hour_utc"] == 14)
    line = browser.find_element("id", "map-line").text
    assert "December 14 UTC" in line
    assert _number(line.split("score this hour")[1]) == row["score_db"]
    lobes = browser.find_elements("css selector", "#layer-lobes polygon")
    assert [p.get_attribute("data-state") for p in lobes] == [row["state"]]
    goal = browser.find_element("css selector", '#layer-goals [data-goal="Europe"]')
    browser.execute_script("arguments[0].focus()", goal)
    shown = browser.find_element("css selector", '#goal-info [data-figure="advantage"]').text
    assert _number(shown) == next(g["advantage_db"] for g in row["goals"] if g["name"] == "Europe")
    n_bands = len({r["band"] for r in plan["schedule"]})
    cells = browser.find_elements("css selector", "#schedule-svg rect[data-hour]")
    assert len(cells) == n_bands * len(plan["months"]) * 24
    # the staking plan written by plan: each element's north and east as plan.json gives them
    stakes = next(sp for sp in plan["stakes"] if sp["option"] == option)
    heads = [h.text for h in browser.find_elements("css selector", "#stakes-table th")]
    for tr, want in zip(browser.find_elements("css selector", "#stakes-table tbody tr"), stakes["elements"], strict=True):
        cells = [td.text for td in tr.find_elements("css selector", "td")]
        assert float(cells[heads.index("north (m)")]) == want["north_m"]
        assert float(cells[heads.index("east (m)")]) == want["east_m"]


def test_a_cardioid_lobe_points_along_the_baseline(browser, pages):
    """A quarter-wave pair fed 0/-90 deg fires toward the lagging element (common
    practice: the endfire cardioid), so on 40 m (spacing 0.25 wavelength) the
    drawn "fwd" lobe is longest along the baseline bearing and "rev" opposite
    (the pattern is symmetric about the axis, so the middle of its top is on
    it). 2 deg: the lobes are sampled on a 1 deg grid and drawn in whole km."""
    from selenium.webdriver.support.ui import Select

    out, result, _, _ = pages
    _open(browser, out / "plan.html")
    comp = next(c for c in result["spacing_comparison"] if c["spacing_m"] == 10.5)
    Select(browser.find_element("id", "ctl-option")).select_by_value(comp["option"])
    Select(browser.find_element("id", "ctl-band")).select_by_value("40 m")
    for state, offset in (("fwd", 0.0), ("rev", 180.0)):
        Select(browser.find_element("id", "ctl-state")).select_by_value(state)
        pts = browser.find_element("css selector", "#layer-lobes polygon").get_attribute("points").split()
        xy = [(float(pts[i]), float(pts[i + 1])) for i in range(0, len(pts), 2)]
        # the middle of the lobe's flat top (radii within 1 % of the longest), as a mean direction
        top = max(math.hypot(*p) for p in xy)
        near = [p for p in xy if math.hypot(*p) >= 0.99 * top]
        x, y = sum(p[0] for p in near), sum(p[1] for p in near)
        bearing = math.degrees(math.atan2(x, -y)) % 360          # the page's y grows southward
        want = (comp["best_orientation_deg"] + offset) % 360
        assert abs((bearing - want + 180) % 360 - 180) <= 2.0, (state, bearing, want)


@pytest.mark.parametrize("width,height", [(1280, 800), (380, 800)])
def test_nothing_overflows_sideways(browser, pages, width, height, tmp_path):
    set_viewport(browser, width, height)
    try:
        _open(browser, pages[0] / "plan.html")
        assert browser.execute_script("return [window.innerWidth, window.innerHeight]") == [width, height]
        sw, cw = browser.execute_script(
            "return [document.documentElement.scrollWidth, document.documentElement.clientWidth]")
        assert sw <= cw, f"{width} px: the page is {sw} px wide"
        shot = tmp_path / f"page-{width}.png"
        assert browser.save_screenshot(str(shot)) and shot.stat().st_size > 10000
    finally:
        set_viewport(browser, 1280, 800)
