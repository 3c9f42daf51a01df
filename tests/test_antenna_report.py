"""The pattern and feed verbs: JSON shape, strictness, rotation, errors, files."""
import json
from types import SimpleNamespace

import numpy as np
import pytest

from lobeplan.errors import UsageError
from lobeplan.fileio import dumps_json
from lobeplan.report import feed as feed_verb
from lobeplan.report import pattern as pattern_verb
from lobeplan.site import loads

SITE = """
[station]
name = "Invented test lot"
locator = "JN13"

[array]
height_m = 10.4
radius_m = 0.02
layout = "{layout}"
{geometry}
orientation_deg = {orientation}
ground = "average"
ground_loss_ohm = 2.0

[[array.state]]
name = "{state}"
{state_body}

[feed]
z0_ohm = 50
velocity_factor = 0.66
loss_db_per_100m_at_10mhz = 1.7

[[band]]
name = "40 m"
freq_mhz = 7.1

[[goal]]
region = "circle:10,10,500"
"""


def _site(layout="pair", geometry="spacing_m = 10.5", orientation=30, state="fwd",
          state_body="phase_deg = [0, -90]"):
    return loads(SITE.format(layout=layout, geometry=geometry, orientation=orientation, state=state,
                             state_body=state_body), file="test.toml")


def _args(**kw):
    return SimpleNamespace(band=kw.get("band"), state=kw.get("state"), json=True, out=None)


# the keys issue 3 names, plus the option name (two options may share a spacing)
KEYS = {"band", "option", "state", "spacing_m", "orientation_deg", "peak_gain_dbi", "peak_azimuth_deg",
        "peak_elevation_deg", "front_to_back_db", "front_to_rear_db", "beamwidth_deg", "element_currents",
        "feedpoint_impedance_ohm", "azimuth_deg", "elevation_deg", "gain_dbi",
        # issue 10: how the currents are made on this band, and every lobe
        "kind", "design_band", "lobes_deg"}
# issue 14: the goal-centred and receiving figures
KEYS_14 = {"use", "orientation_from", "key_takeoff_deg", "lobes", "sky_mean_gain_dbi", "rdf_db",
           "rdf_elevation_deg", "goals"}


def test_pattern_json_shape_and_rotation():
    res = pattern_verb.build(_site(orientation=30), _args())
    json.loads(dumps_json(res))  # strict JSON: raises on NaN/Infinity
    (p,) = res["patterns"]
    assert set(p) == KEYS | KEYS_14
    assert p["orientation_deg"] == 30.0 and p["spacing_m"] == 10.5
    # beam along the baseline bearing: 30 deg true (DESIGN.md convention)
    assert p["peak_azimuth_deg"] == 30.0
    g = np.asarray(p["gain_dbi"])
    assert g.shape == (91, 360) and g.min() >= -60.0
    # the true-bearing grid is the array-frame grid turned by 30 deg (2-decimal output)
    from lobeplan.antenna.pattern import array_pattern
    site = _site(orientation=30)
    opt = site.array.options[0]
    frame = array_pattern(site.array, opt, opt.states[0], 7.1e6).gain_dbi
    assert g == pytest.approx(np.roll(frame, 30, axis=1), abs=0.006)
    assert p["element_currents"][1] == {"amplitude": 1.0, "phase_deg": -90.0}


def test_pattern_fractional_orientation_interpolates():
    a = pattern_verb.to_true_bearing(np.tile(np.arange(360.0), (91, 1)), 10.5)
    # true bearing 20 looks at frame azimuth 9.5
    assert a[0, 20] == pytest.approx(9.5)


def test_spacing_null_for_custom_and_single():
    custom = _site(layout="custom", geometry="positions_m = [[0, 0], [7, 3]]")
    assert pattern_verb.build(custom, _args())["patterns"][0]["spacing_m"] is None
    single = _site(layout="single", geometry="", state="alone", state_body="phase_deg = [0]")
    p = pattern_verb.build(single, _args())["patterns"][0]
    assert p["spacing_m"] is None and p["beamwidth_deg"] is None


def test_unknown_names_are_usage_errors():
    site = _site()
    with pytest.raises(UsageError, match="'40 m'"):
        pattern_verb.build(site, _args(band="80 m"))
    with pytest.raises(UsageError, match="'fwd'"):
        pattern_verb.build(site, _args(state="nope"))
    with pytest.raises(UsageError):
        feed_verb.build(site, _args(band="80 m"))


def test_pattern_files(tmp_path):
    site = _site()
    res = pattern_verb.build(site, _args())
    files = pattern_verb.write_files(site, _args(), res, tmp_path)
    # pattern.json, one figure for the band and option, one gain grid per state
    assert [f.suffix for f in files] == [".json", ".png", ".csv"]
    assert files[1].stat().st_size > 1000
    assert "fwd" in pattern_verb.format_text(res)


def test_feed_json():
    site = _site(state="built", state_body="line_m = [5.5, 12.1]")
    res = feed_verb.build(site, _args())
    json.loads(dumps_json(res))
    (b,) = res["bands"]
    assert {"band", "freq_mhz", "spacing_m", "impedance_matrix_ohm", "states", "design"} <= set(b)
    assert np.asarray(b["impedance_matrix_ohm"]).shape == (2, 2, 2)
    (s,) = b["states"]
    assert s["kind"] == "fed" and s["junction_impedance_ohm"] is not None
    assert s["match"]["swr"][1]["swr"] == pytest.approx(1.0, abs=1e-3)   # matched at the centre
    # no forced state: the default wish (equal, -90 deg) is designed
    (d,) = b["design"]["lines"]
    assert d["line_m"] is not None and d["current_error"] < 1e-3
    assert "junction" in feed_verb.format_text(res)
