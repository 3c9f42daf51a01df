"""Site-file mistakes that used to exit 1 or hang: each is now one line and exit 2."""
import json
import os
import threading

import pytest
from hypothesis import example, given, settings
from hypothesis import strategies as st

from helpers import MINIMAL
from lobeplan.cli import main
from lobeplan.errors import SiteError
from lobeplan.site import load, loads


def _one_line(capsys, *fragments):
    err = capsys.readouterr().err
    assert len(err.strip().splitlines()) == 1 and "Traceback" not in err, err
    for f in fragments:
        assert f in err, err
    return err


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="needs named pipes")
def test_a_fifo_as_the_site_file_is_refused_without_blocking(tmp_path, capsys):
    fifo = tmp_path / "site.toml"
    os.mkfifo(fifo)
    result = []
    t = threading.Thread(target=lambda: result.append(main(["paths", str(fifo)])), daemon=True)
    t.start()
    t.join(10)  # a blocking open would hang here; the refusal takes milliseconds
    if t.is_alive():  # unblock the reader so the test process can end
        with open(fifo, "w"):
            pass
        t.join(5)
        pytest.fail("reading a FIFO blocked")
    assert result == [2]
    _one_line(capsys, str(fifo), "named pipe (FIFO)", "expected a TOML site file")


def test_a_device_as_the_site_file_is_refused(capsys):
    assert main(["paths", os.devnull]) == 2
    _one_line(capsys, "is a device")


def test_a_byte_order_mark_is_read_as_utf8(write_site):
    p = write_site("")
    p.write_bytes("\ufeff".encode() + MINIMAL.encode())
    assert load(p).station.locator == "EN35ma"


def test_a_huge_station_name_is_refused_quickly():
    text = MINIMAL.replace("[station]", '[station]\nname = "' + "N" * 100_000 + '"')
    with pytest.raises(SiteError) as e:
        loads(text)
    assert e.value.key == "station.name" and "at most 80" in e.value.reason


def test_paths_and_needs_do_not_need_an_array(write_site, capsys):
    text = MINIMAL.split("[array]")[0] + "[[band]]" + MINIMAL.split("[[band]]")[1]
    p = write_site(text)
    assert main(["paths", str(p), "--json"]) == 0
    assert json.loads(capsys.readouterr().out)["goals"]
    assert main(["needs", str(p), "--json"]) == 0
    json.loads(capsys.readouterr().out)
    assert main(["plan", str(p)]) == 2
    _one_line(capsys, "array: missing")
    # paths needs no band either; needs does
    q = write_site(text.split("[[band]]")[0] + "[[goal]]" + text.split("[[goal]]")[1], "nob.toml")
    assert main(["paths", str(q)]) == 0
    capsys.readouterr()
    assert main(["needs", str(q)]) == 2
    _one_line(capsys, "band: missing")


def test_a_given_array_is_checked_even_where_unused(write_site, capsys):
    p = write_site(MINIMAL.replace("height_m = 10.0", "height_m = -1"))
    assert main(["paths", str(p)]) == 2
    _one_line(capsys, "array.height_m")


def test_two_bands_whose_maps_would_collide_are_refused():
    text = MINIMAL.replace("[[goal]]", '[[band]]\nname = "40m"\nfreq_mhz = 7.2\n[[goal]]')
    with pytest.raises(SiteError) as e:
        loads(text)
    assert e.value.key == "band[2].name" and "map-40m.png" in e.value.reason


def test_tiny_amplitudes_are_refused_but_small_ones_pass():
    base = MINIMAL.replace("phase_deg = [0, -90]", "phase_deg = [0, -90]\namplitude = [{a}, 1]")
    with pytest.raises(SiteError):
        loads(base.format(a="0.0009"))
    assert loads(base.format(a="0.001")).array.options[0].states[0].amplitude == (0.001, 1.0)


def test_a_lot_with_a_swept_bearing_passes():
    text = MINIMAL.replace("spacing_m = 10.5", "spacing_m = 10.5\norientation_step_deg = 30\n"
                           "allowed_orientation_deg = [[25, 35]]")
    assert loads(text).orientation.allowed_deg == ((25.0, 35.0),)
    # a fixed bearing is evaluated where it is, whatever the step
    fixed = text.replace("[[25, 35]]", "[[5, 6]]\norientation_deg = 5.5")
    assert loads(fixed).orientation.fixed_deg == 5.5


def test_an_avoid_region_clipped_differently_from_its_goal_is_allowed():
    text = MINIMAL.replace('region = "continent:Europe"',
                           'region = "continent:Europe"\nclip = [-10, 35, 20, 60]\navoid = ["continent:Europe"]')
    assert loads(text).goals[0].avoid == ("continent:Europe",)


# --- any value at any key: a SiteError or a site, never another exception

_KEYS = [("station", "name"), ("station", "lat"), ("station", "lon"), ("station", "locator"),
         ("array", "height_m"), ("array", "radius_m"), ("array", "spacing_m"), ("array", "layout"),
         ("array", "orientation_deg"), ("array", "orientation_step_deg"), ("array", "allowed_orientation_deg"),
         ("array", "ground"), ("array", "ground_loss_ohm"), ("array", "elements"), ("array", "positions_m"),
         ("feed", "velocity_factor"), ("feed", "z0_ohm"), ("band", "freq_mhz"), ("band", "name"),
         ("band", "edges_mhz"), ("goal", "region"), ("goal", "weight"), ("goal", "clip"), ("goal", "avoid"),
         ("goal", "bands"), ("goal", "path"), ("propagation", "hours_utc"), ("propagation", "points_per_goal"),
         ("propagation", "seed"), ("propagation", "month"), ("propagation", "model"), ("state", "amplitude"),
         ("state", "phase_deg"), ("state", "line_m")]

_SCALARS = st.one_of(
    st.integers(-10**30, 10**30), st.floats(allow_nan=True, allow_infinity=True),
    st.sampled_from(["", "sweep", "circle:0,0,0", "sector:1,1,0,1", "country:", "file:", "continent:Atlantis",
                     "circle:95,0,100", "both", "climatology", "A" * 300, "IN93zz", "sector:0,10,0,1e-9"]),
    st.text(max_size=20), st.booleans())
_VALUES = st.recursive(_SCALARS, lambda inner: st.lists(inner, max_size=5), max_leaves=12)


def _toml_value(v) -> str:
    import math

    if isinstance(v, bool):
        return "true" if v else "false"
    if isinstance(v, float):
        return "nan" if math.isnan(v) else ("inf" if v > 0 else "-inf") if math.isinf(v) else repr(v)
    if isinstance(v, int):
        return str(v)
    if isinstance(v, str):
        return json.dumps(v)
    return "[" + ", ".join(_toml_value(x) for x in v) + "]"


_BASE = {"station": {"lat": "45.0", "lon": "-93.0"},
         "array": {"height_m": "10.0", "layout": '"pair"', "spacing_m": "10.5"},
         "state": {"name": '"fwd"', "phase_deg": "[0, -90]"},
         "feed": {"z0_ohm": "50"},
         "band": {"name": '"40 m"', "freq_mhz": "7.1"},
         "goal": {"region": '"continent:Europe"'},
         "propagation": {"seed": "1"}}
_HEADS = {"station": "[station]", "array": "[array]", "state": "[[array.state]]", "feed": "[feed]",
          "band": "[[band]]", "goal": "[[goal]]", "propagation": "[propagation]"}


def _with(section: str, key: str, value: str) -> str:
    """The minimal site with ``key`` of ``section`` set to ``value`` (TOML text)."""
    tables = {k: dict(v) for k, v in _BASE.items()}
    tables[section][key] = value
    if section == "state":  # line_m is the other form of a state
        tables["state"].pop("phase_deg" if key == "line_m" else "line_m", None)
    if (section, key) == ("station", "locator"):
        tables["station"] = {"locator": value}
    return "\n".join(_HEADS[name] + "\n" + "\n".join(f"{k} = {v}" for k, v in t.items())
                     for name, t in tables.items()) + "\n"


@settings(max_examples=150, deadline=None)
@given(where=st.sampled_from(_KEYS), value=_VALUES)
@example(where=("array", "height_m"), value=10**400)
@example(where=("state", "amplitude"), value=[0, 1])
@example(where=("band", "freq_mhz"), value=0.1)
def test_any_value_at_any_key_is_a_site_or_a_site_error(where, value):
    text = _with(*where, _toml_value(value))
    try:
        loads(text)
    except SiteError as exc:
        assert "\n" not in str(exc)
