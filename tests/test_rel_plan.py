"""The plan's text says what its figures mean: score, avoid credit, every 1 dB window."""
import csv
import io
import json

import numpy as np
import pytest

from helpers import MINIMAL
from lobeplan.cli import main
from lobeplan.plan.planner import windows_within

T = np.arange(360.0)
ALL = np.ones(360, dtype=bool)


def test_a_pair_has_two_windows_and_a_square_four():
    # a score with the symmetry of a pair (period 180 deg) or a square (90 deg):
    # each copy of the best bearing has its own run within 1 dB
    # (cos(2t) >= 1 - 1/3 for |t| <= 24.1 deg, by hand)
    runs, every = windows_within(T, 3.0 * np.cos(np.radians(2 * T)), ALL)
    assert runs == [(336.0, 24.0), (156.0, 204.0)] and not every
    runs, _ = windows_within(T, 3.0 * np.cos(np.radians(4 * (T - 20))), ALL)
    assert [a for a, _ in runs] == [8.0, 98.0, 188.0, 278.0]


def test_the_run_holding_the_best_comes_first():
    score = np.where((T >= 200) & (T <= 220), 5.0, 0.0) + np.where((T >= 10) & (T <= 30), 4.5, 0.0)
    runs, _ = windows_within(T, score, ALL)
    assert runs == [(200.0, 220.0), (10.0, 30.0)]


def test_flat_and_fixed_are_every_bearing():
    assert windows_within(T, np.zeros(360), ALL) == ([(0.0, 359.0)], True)
    assert windows_within(np.array([40.0]), np.array([1.0]), np.ones(1, bool)) == ([(40.0, 40.0)], True)
    lot = (T >= 100) & (T <= 200)
    assert windows_within(T, np.zeros(360), lot) == ([(100.0, 200.0)], True)
    nothing = np.full(360, np.nan)
    assert windows_within(T, nothing, ALL) == ([], False)


def _plan_text(write_site, capsys, text, *extra):
    assert main(["plan", str(write_site(text)), *extra]) == 0
    return capsys.readouterr().out


def test_score_is_defined_under_the_ranking(write_site, capsys):
    # forward and reverse states: bearings t and t + 180 are the same plan
    both = MINIMAL.replace("phase_deg = [0, -90]", "phase_deg = [0, -90]\n[[array.state]]\nname = \"rev\"\n"
                           "phase_deg = [-90, 0]")
    out = _plan_text(write_site, capsys, both + "[propagation]\npoints_per_goal = 30\n")
    ranking, rest = out.split("Per goal", 1)
    assert "score: the mean of each open goal's value" in ranking and "weight x open share" in ranking
    assert "avoid" not in ranking  # no avoid region: no credit to explain
    # the pair's two copies of its best bearing are both listed
    window = [line for line in rest.splitlines() if line.strip().startswith("pair 10.5 m")][0]
    assert window.count(" to ") == 2


AVOID = MINIMAL.replace('region = "continent:Europe"',
                        'region = "continent:Europe"\navoid = ["continent:Asia"]') + \
    "[propagation]\npoints_per_goal = 30\n"


def test_avoid_credit_is_shown_in_text_and_csv(write_site, capsys, tmp_path):
    out = _plan_text(write_site, capsys, AVOID, "--json")
    data = json.loads(out)
    g = data["ranking"][0]["goals"][0]
    assert g["avoid_advantage_db"] is not None
    text = _plan_text(write_site, capsys, AVOID)
    assert "avoid_weight x the advantage" in text.split("Per goal")[0]
    header = [line for line in text.splitlines() if line.strip().startswith("goal ")][0]
    assert header.split()[-2:] == ["avoid", "value"]
    row = [line for line in text.splitlines() if line.strip().startswith("continent:Europe")][0]
    assert f"{g['value_db']:+.2f}" in row and f"{g['avoid_advantage_db']:+.2f}" in row
    # the score is the mean of the values (one goal, one band): the table adds up
    assert data["ranking"][0]["score_db"] == pytest.approx(g["value_db"], abs=0.011)

    from lobeplan.report.plan import _csv

    rows = list(csv.DictReader(io.StringIO(_csv(data))))
    assert float(rows[0]["value_db"]) == g["value_db"]
    assert float(rows[0]["avoid_advantage_db"]) == g["avoid_advantage_db"]


def test_fixed_and_flat_windows_read_as_such(write_site, capsys):
    fixed = MINIMAL.replace("spacing_m = 10.5", "spacing_m = 10.5\norientation_deg = 40") + \
        "[propagation]\npoints_per_goal = 30\n"
    out = _plan_text(write_site, capsys, fixed)
    assert "fixed bearing, not swept" in out and "40° to 40°" not in out
    single = MINIMAL.replace('layout = "pair"\nspacing_m = 10.5', 'layout = "single"').replace(
        '[[array.state]]\nname = "fwd"\nphase_deg = [0, -90]\n', "") + "[propagation]\npoints_per_goal = 30\n"
    out = _plan_text(write_site, capsys, single)
    # issue 10: one vertical is one, with no baseline to sweep or rank
    assert "no baseline" in out.split("Per goal")[0] and "every bearing" not in out
