"""Site-file mistakes that used to exit 1 or hang: each is now one line and exit 2."""
import json
import os
import threading

import pytest

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
