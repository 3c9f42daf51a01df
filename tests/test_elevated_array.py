"""Elevated radials as wires of the whole array: base impedances, coupling and far field.

Independent checks: the perfect-plane moment method of ``mom.py`` (a
different basis and kernel), energy conservation (the far field's power over
the upper half space against the power into the bases), and the copper
loss from the currents against the change of input resistance it causes.
"""
import math

import numpy as np
import pytest

from lobeplan.antenna.elevated import MIDLINE_GAP, copper_loss_ohm, radial_directions, solve_elevated_array
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


def test_the_ground_field_keeps_amperes_law_on_every_plane():
    # Ampere's law (any electromagnetics text; Ramo, Whinnery and Van Duzer
    # sec. 2.x, from memory): across an infinite plane under a long straight
    # line current the tangential H integrates to half the current (the
    # other half closes above). The loss model reads the field on a plane
    # below the surface; that plane must carry it too. A 400 m wire 0.3 m up
    # with 1 A, integrated over +-300 m at low frequency: 0.5 within 3 % (the
    # finite wire and range lose a little more the deeper the plane).
    from lobeplan.antenna.elevated import ElevatedSolution, _ground_field

    n = 40
    x = np.linspace(-200.0, 200.0, n + 1)
    start = np.stack([x[:-1], np.zeros(n), np.full(n, 0.3)], axis=1)
    end = np.stack([x[1:], np.zeros(n), np.full(n, 0.3)], axis=1)
    wire = ElevatedSolution(1e3, 0j, start, end, np.ones((n, 2), dtype=complex))
    y = 0.05 * np.sinh(np.linspace(-9.39, 9.39, 4001))          # +-300 m, dense under the wire
    pts = np.stack([np.zeros_like(y), y, np.zeros_like(y)], axis=1)
    for depth in (0.0, 1.0, 5.0):
        h = _ground_field(wire, pts, 2 * math.pi * 1e3 / C0_M_S, depth)
        assert np.trapezoid(h[:, 1].real, y) == pytest.approx(0.5, rel=0.03)


def test_more_elevated_radials_never_cost_more_soil_loss_at_any_height():
    # Common practice (Brown, Lewis and Epstein's trend for buried radials,
    # and the same for elevated ones): more radials of the same length lose
    # less in the soil, whatever their height (here 5 mm and 2.5 m over
    # average soil on 40 m)
    from lobeplan.antenna.elevated import elevated_loss_ohm

    g = GROUND_CLASSES["average"]
    for hub in (0.005, 2.5):
        losses = [elevated_loss_ohm(g, H_M, 0.02, hub, n, 0.25 * LAM_M, 1e-3, F_HZ) for n in (4, 8, 16)]
        assert losses[0] > losses[1] > losses[2] > 0.0


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


def test_the_coarse_rules_for_distant_pairs_change_nothing_that_matters():
    # the pair integrals use 2 x 2 and 3 x 3 points for distant segments; the
    # fine rule everywhere gives the same base impedances within 1e-4
    # (relative), far below what the model's approximations leave
    from lobeplan.antenna import elevated

    args = (H_M, 0.02, 2.0, 4, 10.0, 1e-3, PAIR, F_HZ, GROUND_CLASSES["average"], True, 40.0)
    quick = elevated._solve_array(*args).impedance_ohm
    saved = elevated._NEAR_FACTOR
    try:
        elevated._NEAR_FACTOR = 1e9
        elevated._solve_array.cache_clear()
        fine = elevated._solve_array(*args).impedance_ohm
    finally:
        elevated._NEAR_FACTOR = saved
        elevated._solve_array.cache_clear()
    assert np.max(np.abs(quick - fine)) < 1e-4 * np.max(np.abs(fine))


def test_a_site_on_elevated_radials_plans_with_the_wire_model(capsys):
    # end to end: the feed's matrix is the wires' (not the perfect plane's),
    # the copper loss is shown, the as-built network is cut on that matrix
    # and the plan's lobes come from the wires' far field
    import json

    from test_ground_system import _SITE, _goal_site

    from lobeplan.antenna.elevated import ElevatedArray
    from lobeplan.antenna.pattern import coupled_elements
    from lobeplan.cli import main
    from lobeplan.plan.planner import make_plan
    from lobeplan.site import loads

    elevated = "[array.radials]\ncount = 4\nlength_m = 10.5\nheight_m = 2.5"
    site = loads(_goal_site(elevated))
    sol = coupled_elements(site.array, site.array.options[0], site.bands[0].freq_hz)
    assert isinstance(sol, ElevatedArray) and sol.n_elements == 2
    plane = solve_elements(site.array.height_m, site.array.radius_m, site.array.options[0].positions_m,
                           site.bands[0].freq_hz).impedance_ohm
    assert np.max(np.abs(sol.impedance_ohm - plane)) > 2.0      # the radials change the bases
    plan = make_plan(site)
    assert np.all(np.isfinite(plan.options[0].score_db))
    import tempfile
    from pathlib import Path

    with tempfile.TemporaryDirectory() as tmp:
        path = Path(tmp) / "site.toml"
        path.write_text(_SITE.format(array=elevated))
        assert main(["feed", str(path), "--json"]) == 0
        band = json.loads(capsys.readouterr().out)["bands"][0]
        got = np.array([[complex(*z) for z in row] for row in band["impedance_matrix_ohm"]])
        assert np.allclose(got, sol.impedance_ohm, atol=0.01)
        assert 0.0 < band["elevated_copper_loss_ohm"] < 1.0
        assert main(["feed", str(path)]) == 0
        text = capsys.readouterr().out
        assert "solved together as copper wires" in text and "copper (" in text


def test_a_horizontal_half_wave_over_a_perfect_plane_has_the_textbook_pattern():
    # Independent of the moment method: a half-wave wire along the baseline
    # with the sinusoidal current I0 cos(kx), at height h over a perfect
    # plane (Balanis, Antenna Theory, sec. 4.7.5, horizontal dipole above
    # ground, from memory): broadside (horizontal polarization) the field is
    # 2 |sin(k h sin psi)| times the dipole's; end-on (vertical polarization,
    # in the wire's plane) |cos(pi/2 cos psi) / sin psi| times 2 |sin(k h sin psi)|.
    # Shapes compared, normalised at 30 deg, to 0.02 dB (the 3-point rule per
    # tenth of a wavelength).
    from lobeplan.antenna.elevated import ElevatedArray, radiation_vectors
    from lobeplan.antenna.pattern import _wire_power

    k = 2 * math.pi / LAM_M
    h = 0.3 * LAM_M
    x = np.linspace(-0.25 * LAM_M, 0.25 * LAM_M, 41)
    start = np.stack([x[:-1], np.zeros(40), np.full(40, h)], axis=1)
    end = np.stack([x[1:], np.zeros(40), np.full(40, h)], axis=1)
    cur = np.stack([np.cos(k * x[:-1]), np.cos(k * x[1:])], axis=1)[:, :, None].astype(complex)
    wire = ElevatedArray(F_HZ, np.zeros((1, 2)), h, np.eye(1, dtype=complex), start, end, np.zeros(40, int),
                         cur, np.zeros((1, 0)))
    psi = np.array([5.0, 15.0, 30.0, 45.0, 60.0, 80.0])
    vec = radiation_vectors(wire, psi, np.array([0.0, 90.0]))
    power = _wire_power(wire, (PEC,), np.array([1.0]), vec, psi)[0]
    s = np.radians(psi)
    height = 2 * np.abs(np.sin(k * h * np.sin(s)))
    broadside = height ** 2
    end_on = (np.cos(0.5 * math.pi * np.cos(s)) / np.sin(s) * height) ** 2
    ref = 2                                   # index of 30 deg
    got_b = 10 * np.log10(power[:, 1] / power[ref, 1])
    got_e = 10 * np.log10(power[:, 0] / power[ref, 0])
    assert np.allclose(got_b, 10 * np.log10(broadside / broadside[ref]), atol=0.02)
    assert np.allclose(got_e, 10 * np.log10(end_on / end_on[ref]), atol=0.02)


def test_a_big_array_is_meshed_within_the_segment_budget():
    # 32 radials on each corner of a four-square: the element's own converged
    # mesh would exceed the budget, so the array's is halved until it fits
    from lobeplan.antenna.elevated import SEGMENT_BUDGET, array_mesh, elevated_mesh, segment_count
    from lobeplan.antenna.layout import layout_positions_m

    pos = layout_positions_m("square", 10.5)
    args = (10.3, 0.02, 2.5, 32, 10.5, 1e-3)
    pw = array_mesh(*args, pos, F_HZ, GROUND_CLASSES["average"])
    assert pw < elevated_mesh(*args, F_HZ, GROUND_CLASSES["average"]).per_wavelength
    assert segment_count(10.3, 32, 10.5, pos, F_HZ, pw) <= SEGMENT_BUDGET
    # a pair of four radials keeps the element's mesh
    assert array_mesh(10.3, 0.02, 2.5, 4, 10.5, 1e-3, PAIR, F_HZ) == elevated_mesh(10.3, 0.02, 2.5, 4, 10.5, 1e-3,
                                                                                   F_HZ).per_wavelength
