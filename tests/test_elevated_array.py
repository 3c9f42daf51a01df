"""Elevated radials as wires of the whole array: base impedances, coupling and far field.

Independent checks: the perfect-plane moment method of ``mom.py`` (a
different basis and kernel), energy conservation (the far field's power over
the upper half space against the power into the bases), and the copper
loss from the currents against the change of input resistance it causes.
"""
import math

import numpy as np
import pytest

from lobeplan.antenna.elevated import (MIDLINE_GAP, copper_loss_ohm, radial_directions, solve_elevated,
                                       solve_elevated_array)
from lobeplan.antenna.ground import reflection_horizontal
from lobeplan.antenna.model import GROUND_CLASSES
from lobeplan.antenna.mom import C0_M_S, solve_elements
from lobeplan.antenna.pattern import gain_from_currents_dbi, gain_toward_dbi, gains_from_currents_dbi
from lobeplan.grid import ELEVATION_DEG

F_HZ = 7.1e6
LAM_M = C0_M_S / F_HZ
H_M = 0.25 * LAM_M
PEC = GROUND_CLASSES["perfect"]
PAIR = ((0.0, 0.0), (0.25 * LAM_M, 0.0))


def _power_w(sol, i):
    return 0.5 * float(np.real(np.conj(i) @ sol.impedance_ohm @ i))


def _hemisphere_mean(gain_dbi):
    # mean of the gain over the upper half space (cos-weighted trapezoid in elevation;
    # the azimuth mean is exact for a pattern this band-limited)
    psi = np.radians(ELEVATION_DEG)
    w = np.cos(psi) * math.radians(1.0)
    w[0] *= 0.5
    w[-1] *= 0.5
    return float(np.sum(np.mean(10.0 ** (gain_dbi / 10.0), axis=1) * w))


@pytest.mark.parametrize("currents", [(1.0, 0.0), (1.0, -1j), (1.0, 1.0)])
def test_the_far_field_carries_the_power_into_the_bases(currents):
    # Energy conservation (Poynting; Balanis sec. 2.9): over a lossless perfect
    # plane every watt into the bases leaves through the upper half space, so
    # the gain averages to 2 there. The Galerkin method conserves power for its
    # own currents; 0.5 % allows the 1-degree quadrature.
    sol = solve_elevated_array(H_M, 0.02, 0.05 * LAM_M, 4, 0.25 * LAM_M, 1e-3, PAIR, F_HZ, PEC, copper=False)
    i = np.asarray(currents, dtype=complex)
    g = gains_from_currents_dbi(sol, (PEC,), i, _power_w(sol, i))[0]
    assert _hemisphere_mean(g) == pytest.approx(2.0, rel=0.005)


def test_low_radials_over_a_perfect_plane_give_the_coupled_monopoles():
    # Radials 0.005 wavelength over a perfect plane are shorted stubs: the pair
    # behaves as two monopoles on the plane. Independent: the image moment
    # method of mom.py. As for one element (test_ground_system): 8 % in R and
    # 10 ohm in X on the self term (the stubs leave a few ohm of reactance and
    # the two feed gaps differ); 8 % on the mutual term, where neither matters.
    mono = solve_elements(H_M, 0.02, PAIR, F_HZ).impedance_ohm
    low = solve_elevated_array(H_M, 0.02, 0.005 * LAM_M, 16, 0.25 * LAM_M, 1e-3, PAIR, F_HZ, PEC,
                               copper=False).impedance_ohm
    assert low[0, 0].real == pytest.approx(mono[0, 0].real, rel=0.08)
    assert abs(low[0, 0].imag - mono[0, 0].imag) < 10.0
    assert abs(low[0, 1] - mono[0, 1]) < 0.08 * abs(mono[0, 1])
    assert low[0, 1] == pytest.approx(low[1, 0], abs=1e-9)      # reciprocity


def test_low_radials_give_the_monopole_pair_pattern():
    # The cardioid of the pair (quarter wave apart, 90 deg): forward gain and
    # the shape of the front half within 0.3 dB of the monopoles on the plane
    # (the same independent method; the rear null's depth depends on the
    # details and is left out).
    i = np.array([1.0, -1j])
    mono = solve_elements(H_M, 0.02, PAIR, F_HZ)
    low = solve_elevated_array(H_M, 0.02, 0.005 * LAM_M, 16, 0.25 * LAM_M, 1e-3, PAIR, F_HZ, PEC, copper=False)
    gm = gain_from_currents_dbi(mono, PEC, i, _power_w(mono, i))
    gl = gain_from_currents_dbi(low, PEC, i, _power_w(low, i))
    front = np.r_[0:90, 270:360]
    assert np.max(np.abs(gm[5:60, front] - gl[5:60, front])) < 0.3


def test_the_radials_copper_loss_is_what_the_currents_dissipate():
    # Loading the radials with R' per metre raises the input resistance by
    # R' int |I|^2 dl (first-order perturbation; the load barely moves the
    # currents): the two agree within 1 %.
    args = (H_M, 0.02, 0.05 * LAM_M, 4, 0.25 * LAM_M, 0.25e-3, ((0.0, 0.0),), F_HZ, GROUND_CLASSES["average"])
    lossy = solve_elevated_array(*args, copper=True)
    ideal = solve_elevated_array(*args, copper=False)
    delta = lossy.impedance_ohm[0, 0].real - ideal.impedance_ohm[0, 0].real
    assert copper_loss_ohm(lossy) == pytest.approx(delta, rel=0.01)
    assert 0.0 < delta < 2.0          # common practice: copper radials cost tenths of an ohm
    assert copper_loss_ohm(ideal) == 0.0


def test_radials_stop_short_of_the_midline():
    # elements 10 m apart along the baseline: the radial toward the neighbour
    # stops 2 % short of the midline (5 m); the one across the baseline keeps
    # its length; the neighbour's mirror radial matches
    sol = solve_elevated_array(H_M, 0.02, 2.0, 4, 8.0, 1e-3, ((0.0, 0.0), (10.0, 0.0)), F_HZ)
    lengths = sol.radial_length_m
    assert lengths[0, 0] == pytest.approx(5.0 * (1 - MIDLINE_GAP))
    assert lengths[0, 1] == lengths[0, 3] == 8.0 and lengths[0, 2] == 8.0
    assert lengths[1, 2] == pytest.approx(5.0 * (1 - MIDLINE_GAP)) and lengths[1, 0] == 8.0
    assert np.allclose(radial_directions(4), [[1, 0], [0, 1], [-1, 0], [0, -1]], atol=1e-12)


def test_the_single_element_is_the_arrays_case_of_one():
    one = solve_elevated(H_M, 0.02, 2.0, 4, 10.0, 1e-3, F_HZ, GROUND_CLASSES["average"])
    arr = solve_elevated_array(H_M, 0.02, 2.0, 4, 10.0, 1e-3, ((0.0, 0.0),), F_HZ, GROUND_CLASSES["average"],
                               copper=False)
    assert one.input_impedance_ohm == arr.impedance_ohm[0, 0]


def test_horizontal_reflection_of_a_perfect_plane_and_of_soil():
    # Fresnel, horizontal polarization (Kraus sec. 12-2): -1 for a perfect
    # conductor; for soil -1 at grazing, and |Rh| below 1 higher up
    assert np.all(reflection_horizontal(PEC, F_HZ, [0.0, 30.0, 90.0]) == -1.0)
    rh = reflection_horizontal(GROUND_CLASSES["average"], F_HZ, [0.0, 30.0, 90.0])
    assert rh[0] == pytest.approx(-1.0, abs=1e-12) and np.all(np.abs(rh[1:]) < 1.0)


def test_gain_toward_agrees_with_the_grid():
    sol = solve_elevated_array(H_M, 0.02, 2.0, 4, 10.0, 1e-3, PAIR, F_HZ, GROUND_CLASSES["average"])
    i = np.array([1.0, 0.8j])
    grid = gain_from_currents_dbi(sol, GROUND_CLASSES["average"], i, 1.0)
    few = gain_toward_dbi(sol, GROUND_CLASSES["average"], i, 1.0, 12, [0.0, 77.0, 180.0])
    assert np.allclose(few, grid[12, [0, 77, 180]], atol=1e-9)


def test_radials_over_soil_radiate_a_little_horizontal_polarization():
    # A lone element on four symmetric radials: their horizontal currents
    # cancel broadside and nearly cancel with the soil's image, so the pattern
    # stays within 0.5 dB of round at 20 deg (common practice: a ground plane
    # on four radials is omnidirectional)
    sol = solve_elevated_array(H_M, 0.02, 2.0, 4, 10.0, 1e-3, ((0.0, 0.0),), F_HZ, GROUND_CLASSES["average"])
    g = gain_from_currents_dbi(sol, GROUND_CLASSES["average"], np.array([1.0]), 1.0)
    assert np.ptp(g[20]) < 0.5
