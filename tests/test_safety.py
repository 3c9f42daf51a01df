"""RF exposure distances recomputed from the published formula and limits."""
import json
import math

import pytest

from lobeplan.cli import main
from lobeplan.safety import exposure_distance, mpe_mw_per_cm2


@pytest.mark.parametrize("f, controlled, limit", [
    # 47 CFR 1.1310 Table 1 (from memory; also CHECKS.md): uncontrolled 180/f^2
    # at 1.34-30 MHz (7.1 MHz: 3.57, 14.2 MHz: 0.893 mW/cm^2), controlled 900/f^2
    # at 3-30 MHz, 100 mW/cm^2 below 3 MHz (controlled) and 1.34 MHz (uncontrolled).
    (7.1, False, 3.57), (14.2, False, 0.893), (7.1, True, 900 / 7.1**2), (1.9, True, 100.0),
    (1.0, False, 100.0), (28.5, True, 900 / 28.5**2)])
def test_limits_follow_47_cfr_1_1310(f, controlled, limit):
    assert mpe_mw_per_cm2(f, controlled) == pytest.approx(limit, rel=2e-3)


def test_distance_from_the_oet_65_formula():
    # FCC OET Bulletin 65 (from memory): S = 0.64 EIRP / (pi R^2). 1000 W average
    # at 14.2 MHz into 3 dBi: EIRP 1995 W; uncontrolled S = 0.8928 mW/cm^2 =
    # 8.928 W/m^2, so R = sqrt(0.64 * 1995.3 / (pi * 8.928)) = 6.75 m (computed).
    e = exposure_distance(1000.0, 1.0, 3.0, 14.2)
    eirp = 1000 * 10 ** 0.3
    assert e.eirp_w == pytest.approx(eirp)
    assert e.uncontrolled_distance_m == pytest.approx(math.sqrt(0.64 * eirp / (math.pi * 8.928)), rel=1e-3)
    assert e.uncontrolled_distance_m == pytest.approx(6.75, abs=0.01)
    # controlled: five times the density, so sqrt(5) times closer
    assert e.uncontrolled_distance_m / e.controlled_distance_m == pytest.approx(math.sqrt(5), rel=1e-9)


def test_duty_cycle_scales_average_power_and_near_field_is_flagged():
    full = exposure_distance(100.0, 1.0, 0.0, 7.1)
    half = exposure_distance(100.0, 0.5, 0.0, 7.1)
    assert half.uncontrolled_distance_m == pytest.approx(full.uncontrolled_distance_m / math.sqrt(2))
    # lambda / 2 pi at 7.1 MHz = 42.22 / 6.283 = 6.72 m (computed)
    assert full.near_field_m == pytest.approx(299.792458 / 7.1 / (2 * math.pi))
    assert full.uncontrolled_in_near_field


def test_exposure_verb_json(demo_path, capsys):
    assert main(["exposure", str(demo_path), "--power-w", "500", "--duty-cycle", "0.4", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    rows = data["exposure"]
    assert {r["band"] for r in rows} == {"40 m", "30 m", "20 m"}
    for r in rows:
        assert {"band", "freq_mhz", "peak_gain_dbi", "eirp_w", "controlled_distance_m",
                "uncontrolled_distance_m"} <= set(r)
        assert r["eirp_w"] == pytest.approx(500 * 0.4 * 10 ** (r["peak_gain_dbi"] / 10), rel=2e-3)
    text = " ".join(data["notes"])
    assert "ICNIRP" in text and "twice" in text and "near" in text.lower()


@pytest.mark.parametrize("args", [["--power-w", "0"], ["--power-w", "abc"], ["--power-w", "100", "--duty-cycle", "1.5"],
                                  []])
def test_exposure_bad_arguments(demo_path, capsys, args):
    assert main(["exposure", str(demo_path), *args]) == 2
    err = capsys.readouterr().err
    assert len(err.strip().splitlines()) == 1 and "Traceback" not in err
