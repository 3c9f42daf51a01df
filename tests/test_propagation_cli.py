"""`lobeplan needs`: strict JSON with the agreed keys, and the text table."""
import json
import math

from lobeplan.cli import main

SITE = """
[station]
name = "Invented hilltop"
lat = 45.0
lon = -93.0
[array]
height_m = 10.0
layout = "pair"
spacing_m = 10.5
[[array.state]]
name = "fwd"
phase_deg = [0, -90]
[[band]]
name = "40 m"
freq_mhz = 7.1
[[band]]
name = "10 m"
freq_mhz = 28.4
[[goal]]
name = "Near ring"
region = "circle:40.0,-80.0,400"
[[goal]]
name = "Far disc"
region = "circle:-30.0,150.0,600"
path = "both"
[propagation]
model = "{model}"
month = 12
year = 2026
solar_flux = 70
hours_utc = [[20, 24], [0, 6]]
points_per_goal = 40
"""


def _walk(x):
    if isinstance(x, dict):
        for v in x.values():
            yield from _walk(v)
    elif isinstance(x, list):
        for v in x:
            yield from _walk(v)
    else:
        yield x


def _run(capsys, write_site, model, *extra):
    path = write_site(SITE.replace("{model}", model))
    code = main(["needs", str(path), *extra])
    out = capsys.readouterr()
    assert code == 0, out.err
    return out


def test_needs_json_shape(capsys, write_site):
    for model in ("geometry", "climatology"):
        out = _run(capsys, write_site, model, "--json")
        assert out.err == ""  # no progress bar with --json (and stderr is no terminal)
        doc = json.loads(out.out, parse_constant=lambda c: (_ for _ in ()).throw(ValueError(c)))
        assert doc["model"] == model
        assert set(doc) == {"model", "needs", "caveats"}
        # one entry per (band, goal, path): 2 bands x (1 + 2 paths)
        assert len(doc["needs"]) == 6
        for row in doc["needs"]:
            assert set(row) == {"band", "goal", "path", "open_fraction", "elevation_deg", "modes",
                                "open_hours_utc", "by_month"}
            # per month the open share of each of the 24 UT hours, None where not modelled
            assert [m["month"] for m in row["by_month"]] == [12]
            by_hour = row["by_month"][0]["open_share_by_hour"]
            assert len(by_hour) == 24
            modelled = set(range(0, 6)) | set(range(20, 24))
            assert all((v is None) == (h not in modelled) for h, v in enumerate(by_hour))
            shares = [v for v in by_hour if v is not None]
            assert abs(sum(shares) / len(shares) - row["open_fraction"]) < 1e-3
            assert set(row["elevation_deg"]) == {"p10", "median", "p90"}
            assert 0.0 <= row["open_fraction"] <= 1.0
            assert set(row["open_hours_utc"]) <= set(range(0, 6)) | set(range(20, 24))
            for m in row["modes"]:
                assert set(m) == {"layer", "hops", "share", "elevation_deg"}
            if row["elevation_deg"]["median"] is None:  # never open
                assert row["elevation_deg"] == {"p10": None, "median": None, "p90": None}
                assert row["modes"] == [] and row["open_fraction"] == 0.0 and row["open_hours_utc"] == []
            else:
                assert row["modes"] and abs(sum(m["share"] for m in row["modes"]) - 1) < 1e-3
        assert all(not (isinstance(v, float) and not math.isfinite(v)) for v in _walk(doc))
        if model == "geometry":
            assert any("No ionosphere was consulted" in c for c in doc["caveats"])
        else:
            # common practice: 10 m at solar minimum in a December night is shut
            ten = [r for r in doc["needs"] if r["band"] == "10 m"]
            assert all(r["open_fraction"] < 0.01 for r in ten)
            assert any(r["elevation_deg"]["median"] is None for r in ten)
            assert {r["path"] for r in doc["needs"] if r["goal"] == "Far disc"} == {"short", "long"}


def test_needs_text_table(capsys, write_site):
    out = _run(capsys, write_site, "climatology")
    assert "40 m" in out.out and "10 m" in out.out and "Far disc" in out.out
    assert "lowest usable frequency" in out.out


class _Tty:
    def __init__(self, tty):
        self.tty, self.text = tty, ""

    def isatty(self):
        return self.tty

    def write(self, s):
        self.text += s

    def flush(self):
        pass


def test_progress_bar_only_on_a_terminal():
    from lobeplan.progress import ProgressBar

    tty = _Tty(True)
    with ProgressBar(4, "needs", stream=tty, delay_s=0.0) as bar:
        bar.callback(0, 2)(1, 2)
    assert "needs [" in tty.text and tty.text.endswith("\n") and "100.0%" in tty.text
    pipe = _Tty(False)
    with ProgressBar(4, "needs", stream=pipe, delay_s=0.0) as bar:
        bar.advance(2)
    assert pipe.text == ""
    off = _Tty(True)
    with ProgressBar(4, "needs", enabled=False, stream=off, delay_s=0.0) as bar:
        bar.advance(2)
    assert off.text == ""
    quick = _Tty(True)  # a run shorter than the delay prints nothing
    with ProgressBar(4, "needs", stream=quick, delay_s=60.0) as bar:
        bar.advance(4)
    assert quick.text == ""
