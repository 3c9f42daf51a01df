"""Fresnel reflection coefficient for vertical polarization."""
import math

import numpy as np
import pytest

from lobeplan.antenna.ground import complex_permittivity, reflection_vertical
from lobeplan.antenna.model import GROUND_CLASSES

AVG = GROUND_CLASSES["average"]


def test_perfect_ground_is_plus_one():
    assert reflection_vertical(GROUND_CLASSES["perfect"], 7e6, np.arange(91.0)) == pytest.approx(1.0)


def test_complex_permittivity_convention():
    # eps_r - j 60 sigma lambda (CHECKS.md, e^{j omega t}): lambda = 299.79 m
    # at 1 MHz, so 60 * 0.005 * 299.79 = 89.94
    e = complex_permittivity(AVG, 1e6)
    assert e.real == 13.0
    assert e.imag == pytest.approx(-60 * 0.005 * 299.792458, rel=1e-12)


def test_grazing_and_normal_incidence():
    # Kraus sec. 12-2: Rv -> -1 at grazing; at normal incidence the Fresnel
    # coefficient is (sqrt(e) - 1)/(sqrt(e) + 1) (textbook normal-incidence form).
    r = reflection_vertical(AVG, 7e6, np.array([0.0, 90.0]))
    e = complex_permittivity(AVG, 7e6)
    assert r[0] == pytest.approx(-1.0, abs=1e-12)
    assert r[1] == pytest.approx((np.sqrt(e) - 1) / (np.sqrt(e) + 1), abs=1e-12)
    # passive ground never reflects more than it receives
    assert np.all(np.abs(reflection_vertical(AVG, 7e6, np.arange(91.0))) <= 1.0 + 1e-12)


@pytest.mark.parametrize("freq_hz", [7e6, 14e6])
def test_pseudo_brewster_angle_average_ground(freq_hz):
    # CHECKS.md: pseudo-Brewster angle (minimum |Rv|) over average ground about
    # 13-15 deg at 7-14 MHz (computed); search a 0.1 deg grid, allow +-1.5 deg
    # for "about".
    el = np.arange(0.0, 90.0, 0.1)
    psi = el[int(np.argmin(np.abs(reflection_vertical(AVG, freq_hz, el))))]
    assert 11.5 <= psi <= 16.5


def test_sea_reflects_nearly_perfectly_above_a_few_degrees():
    # Sea water (ITU-R P.527, 70 / 5 S/m) is a near conductor at HF: its
    # pseudo-Brewster angle is below 2 deg (computed: atan(1/sqrt|e|)).
    sea = GROUND_CLASSES["sea"]
    e = complex_permittivity(sea, 7e6)
    el = np.arange(0.0, 10.0, 0.05)
    psi = el[int(np.argmin(np.abs(reflection_vertical(sea, 7e6, el))))]
    assert psi < 2.0
    assert psi == pytest.approx(math.degrees(math.atan(1 / math.sqrt(abs(e)))), abs=0.3)
    r = reflection_vertical(sea, 7e6, np.array([10.0, 30.0]))
    assert np.all(r.real > 0.8)
