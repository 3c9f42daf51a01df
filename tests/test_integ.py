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
