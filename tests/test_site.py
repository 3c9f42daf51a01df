"""Site-file validation: every broken file gets one line naming file and key."""
import json
import subprocess
import sys
from pathlib import Path

import pytest

from lobeplan.cli import main
from lobeplan.errors import SiteError
from lobeplan.site import load, loads

from helpers import MINIMAL

BAD = sorted((Path(__file__).parent / "bad_sites").glob("*.toml"))
EXPECT_WITHOUT_HEADER = {"empty.toml": "is empty"}


def _expected(path: Path) -> list[str]:
    """The fragments the message must hold: the header's parts split at ' | '."""
    first = path.read_bytes().split(b"\n", 1)[0].decode("utf-8", "replace").removeprefix("\ufeff")
    if first.startswith("# expect: "):
        return [part.strip() for part in first[len("# expect: "):].split(" | ")]
    return [EXPECT_WITHOUT_HEADER[path.name]]


def test_the_corpus_is_large_enough():
    assert len(BAD) >= 60


@pytest.mark.parametrize("verb", ["paths", "plan"])
@pytest.mark.parametrize("path", BAD, ids=[p.name for p in BAD])
def test_broken_site_gives_one_line_exit_2_and_no_files(path, verb, tmp_path, capsys):
    out = tmp_path / "out"
    code = main([verb, str(path), "--out", str(out)])
    captured = capsys.readouterr()
    assert code == 2
    lines = captured.err.strip().splitlines()
    assert len(lines) == 1, captured.err
    prefix = f"lobeplan: {path}: "
    assert lines[0].startswith(prefix)
    message = lines[0][len(prefix):]  # the file name itself must not satisfy the check
    for fragment in _expected(path):
        assert fragment in message
    assert "Traceback" not in captured.err
    assert captured.out == ""
    assert not out.exists()


def test_output_folder_under_a_regular_file(tmp_path, demo_path, capsys):
    # root ignores permissions, so an unwritable folder is made by asking for
    # one below a regular file
    blocker = tmp_path / "plain"
    blocker.write_text("x")
    code = main(["paths", str(demo_path), "--out", str(blocker / "maps")])
    err = capsys.readouterr().err
    assert code == 2 and "--out" in err and len(err.strip().splitlines()) == 1


def test_unknown_key_suggests_the_closest(write_site):
    p = write_site(MINIMAL.replace("height_m", "hieght_m"))
    with pytest.raises(SiteError) as e:
        load(p)
    assert e.value.key == "array.hieght_m" and "height_m" in e.value.reason


def test_minimal_site_defaults():
    site = loads(MINIMAL)
    # by hand from the locator standard: lon -93 -> field E, square 3, subsquare m;
    # lat 45 -> field N, square 5, subsquare a
    assert site.station.locator == "EN35ma"
    assert site.array.options[0].positions_m == ((0.0, 0.0), (10.5, 0.0))
    assert site.goals[0].name == "continent:Europe" and site.goals[0].path == "short"
    assert site.propagation.model == "geometry" and site.propagation.hours == tuple(range(24))
    assert site.orientation.fixed_deg is None


def test_path_both_gives_two_goals_and_options_from_a_list():
    text = MINIMAL.replace("spacing_m = 10.5", "spacing_m = [10.5, 21.0]").replace(
        'region = "continent:Europe"', 'region = "continent:Europe"\npath = "both"')
    site = loads(text)
    assert [g.path for g in site.goals] == ["short", "long"]
    assert [o.spacing_m for o in site.array.options] == [10.5, 21.0]


def test_layouts_place_elements_as_the_conventions_say():
    square = loads(MINIMAL.replace('layout = "pair"', 'layout = "square"').replace(
        "phase_deg = [0, -90]", "phase_deg = [0, -90, -180, -90]"))
    assert square.array.options[0].positions_m == ((0, 0), (10.5, 0), (10.5, 10.5), (0, 10.5))
    line = loads(MINIMAL.replace('layout = "pair"', 'layout = "line"\nelements = 3').replace(
        "phase_deg = [0, -90]", "phase_deg = [0, -90, -180]"))
    assert line.array.options[0].positions_m == ((0, 0), (10.5, 0), (21.0, 0))


def test_hours_wrap_midnight():
    site = loads(MINIMAL + "[propagation]\nhours_utc = [[20, 24], [0, 6]]\n")
    assert site.propagation.hours == (0, 1, 2, 3, 4, 5, 20, 21, 22, 23)
    site = loads(MINIMAL + "[propagation]\nhours_utc = [[22, 2]]\n")
    assert site.propagation.hours == (0, 1, 22, 23)


def test_demo_site_loads(demo_path):
    site = load(demo_path)
    assert site.station.locator == "EN35fe"
    assert len(site.array.options) == 2


def test_paths_json_shape(demo_path, capsys):
    assert main(["paths", str(demo_path), "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    assert set(data) == {"station", "points_per_goal", "goals"}
    assert set(data["station"]) == {"lat_deg", "lon_deg", "locator"}
    g = data["goals"][0]
    assert set(g) == {"name", "region", "path", "points", "bearing_deg", "distance_km"}
    assert set(g["bearing_deg"]) == {"start", "end", "median"}
    assert set(g["distance_km"]) == {"min", "median", "max"}
    paths = [x["path"] for x in data["goals"] if x["name"] == "Australia"]
    assert paths == ["short", "long"]


def test_python_dash_m_runs(demo_path, tmp_path):
    res = subprocess.run([sys.executable, "-m", "lobeplan", "paths", str(demo_path), "--json"],
                         capture_output=True, text=True, cwd=tmp_path, check=False)
    assert res.returncode == 0, res.stderr
    assert json.loads(res.stdout)["station"]["locator"] == "EN35fe"


def test_bad_argument_is_one_line_exit_2(capsys):
    assert main(["paths"]) == 2
    assert len(capsys.readouterr().err.strip().splitlines()) == 1
