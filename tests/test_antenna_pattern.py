"""Patterns: textbook gains of single verticals and ideal pairs, power balance,
steering, real ground, figures."""
import math

import numpy as np
import pytest
from _antenna_cases import FREQ_HZ, WAVELENGTH_M, fed, forced, option, spec

from lobeplan.antenna.model import Ground
from lobeplan.antenna.pattern import array_pattern, pattern_figures, vertical_gain_dbi
from lobeplan.grid import AZIMUTH_DEG, ELEVATION_DEG

LAM = WAVELENGTH_M


def _hemisphere_fraction(gain_dbi):
    """(1/4 pi) integral of G over the upper hemisphere = P_rad / P_in."""
    g = 10.0 ** (np.asarray(gain_dbi) / 10.0)
    el = np.radians(ELEVATION_DEG)
    return np.trapezoid(g.mean(axis=1) * np.cos(el), el) * 2 * math.pi / (4 * math.pi)


def _pair(d_wl, phase2, **kw):
    st = forced("s", 0.0, phase2)
    return spec(**kw), option("pair", [st], spacing_m=d_wl * LAM), st


def test_quarter_wave_monopole_5_16_dbi():
    # Balanis sec. 4.7 (image theory): directivity 2 x 1.643 = 3.286 -> 5.16 dBi
    # for a sinusoidal current; the moment-method current on a 5e-5 lambda wire
    # is not exactly sinusoidal, so allow 0.05 dB. Peak at the horizon over
    # perfect ground, no loss.
    g = vertical_gain_dbi(spec(), FREQ_HZ)
    assert g.shape == (91,)
    assert g.max() == pytest.approx(5.16, abs=0.05)
    assert int(np.argmax(g)) == 0


def test_ground_loss_lowers_gain_by_the_resistance_ratio():
    # Efficiency R / (R + R_loss) for a single element (definition of radiation
    # efficiency, Balanis sec. 2.14): exact, up to floating point.
    from lobeplan.antenna.mom import solve_elements
    s0, s10 = spec(), spec(loss_ohm=10.0)
    r = solve_elements(s0.height_m, s0.radius_m, [(0, 0)], FREQ_HZ).impedance_ohm[0, 0].real
    drop = vertical_gain_dbi(s0, FREQ_HZ) - vertical_gain_dbi(s10, FREQ_HZ)
    assert drop[:60] == pytest.approx(-10 * math.log10(r / (r + 10.0)), abs=1e-9)


@pytest.mark.parametrize("d_wl, phase2, gain_db, beam_az", [
    (0.25, -90.0, 3.01, 0.0),     # cardioid, beam toward the lagging element
    (0.5, 0.0, 3.83, 90.0),       # broadside
    (0.5, 180.0, 2.32, 0.0),      # endfire
])
def test_ideal_pairs_over_one_vertical(d_wl, phase2, gain_db, beam_az):
    # CHECKS.md: G = 2 R11 / (R11 + R12 cos alpha) with induced-EMF resistances
    # (computed); the direction is common practice. The closed form assumes
    # identical sinusoidal element patterns; in the moment method the partner's
    # open-circuit current shifts R11 by ~2 %, so allow 0.1 dB.
    from lobeplan.antenna.mom import emf_monopole_mutual_ohm, emf_monopole_self_ohm
    r11 = emf_monopole_self_ohm(FREQ_HZ).real
    r12 = emf_monopole_mutual_ohm(d_wl * LAM, FREQ_HZ).real
    formula_db = 10 * math.log10(2 * r11 / (r11 + r12 * math.cos(math.radians(phase2))))
    assert formula_db == pytest.approx(gain_db, abs=0.01)
    s, op, st = _pair(d_wl, phase2)
    res = array_pattern(s, op, st, FREQ_HZ)
    fig = pattern_figures(res.gain_dbi)
    single = vertical_gain_dbi(s, FREQ_HZ).max()
    assert fig["peak_gain_dbi"] - single == pytest.approx(formula_db, abs=0.1)
    assert fig["peak_elevation_deg"] == 0.0
    assert min(abs(fig["peak_azimuth_deg"] - beam_az), abs(fig["peak_azimuth_deg"] - beam_az - 180)) <= 1.0
    if phase2 == -90.0:
        assert fig["peak_azimuth_deg"] == 0.0      # toward element 2, the lagging one
        assert fig["front_to_back_db"] > 25.0      # ideal rear null (CHECKS.md)


def test_reverse_state_beams_the_other_way():
    s, op, _ = _pair(0.25, -90.0)
    st = forced("rev", -90.0, 0.0)
    fig = pattern_figures(array_pattern(s, op, st, FREQ_HZ).gain_dbi)
    assert fig["peak_azimuth_deg"] == 180.0


@pytest.mark.parametrize("d_wl, phase2", [(0.25, -90.0), (0.5, 0.0), (0.125, -135.0), (0.6, -60.0)])
def test_power_balance_perfect_lossless(d_wl, phase2):
    # Energy conservation: over a perfect lossless plane all input power is
    # radiated into the upper hemisphere; the issue asks for 2 %, the 1 deg
    # trapezoid integration itself is good to ~0.1 %.
    s, op, st = _pair(d_wl, phase2)
    res = array_pattern(s, op, st, FREQ_HZ)
    assert _hemisphere_fraction(res.gain_dbi) == pytest.approx(1.0, rel=0.02)
    assert res.element_power_w.sum() == pytest.approx(1.0, rel=1e-9)


def test_power_balance_tall_elements():
    # Same law at 0.6 lambda (the array used on a higher band).
    s = spec(height_m=0.6 * LAM, radius_m=1e-3 * LAM)
    st = forced("s", 0.0, -90.0, -180.0)
    op = option("line", [st], spacing_m=0.25 * LAM, elements=3)
    assert _hemisphere_fraction(array_pattern(s, op, st, FREQ_HZ).gain_dbi) == pytest.approx(1.0, rel=0.02)


def test_line_of_three_progressive_phase_beams_along_axis():
    # Endfire array: progressive phase -k d on each element puts the beam on
    # the axis toward the last (most lagging) element (Balanis sec. 6.3).
    st = forced("s", 0.0, -90.0, -180.0)
    s = spec(ground="average", loss_ohm=2.0, radius_m=0.02)
    op = option("line", [st], spacing_m=0.25 * LAM, elements=3)
    res = array_pattern(s, op, st, FREQ_HZ)
    fig = pattern_figures(res.gain_dbi)
    assert res.gain_dbi.shape == (91, 360)
    assert fig["peak_azimuth_deg"] == 0.0
    # hand computation of the array factor at the peak elevation psi:
    # F/B = |sum e^{jn(kd cos psi - pi/2)}| / |sum e^{jn(-kd cos psi - pi/2)}|
    # (uniform endfire: 20 log 3 = 9.5 dB on the horizon). The forced currents
    # are exact; coupling only changes the element patterns, so allow 1 dB.
    kd = 2 * math.pi * 0.25 * math.cos(math.radians(fig["peak_elevation_deg"]))
    n = np.arange(3)
    hand = 20 * math.log10(abs(np.exp(1j * n * (kd - math.pi / 2)).sum())
                           / abs(np.exp(1j * n * (-kd - math.pi / 2)).sum()))
    assert fig["front_to_back_db"] == pytest.approx(hand, abs=1.0)
    # beamwidth is narrower than the two-element cardioid's
    s2, op2, st2 = _pair(0.25, -90.0, ground="average", loss_ohm=2.0, radius_m=0.02)
    fig2 = pattern_figures(array_pattern(s2, op2, st2, FREQ_HZ).gain_dbi)
    assert fig["beamwidth_deg"] < fig2["beamwidth_deg"]


def test_asymmetric_custom_layout_beam_where_hand_computation_says():
    # Hand computation: with base currents exp(-j k p_n . u), u the horizontal
    # unit vector toward azimuth 120 deg in (along, across), all contributions
    # arrive in phase at 120 deg on the horizon (Balanis sec. 6.3, phased
    # array steering); coupling only reshapes the element patterns slightly,
    # so allow 2 deg.
    pos = [(0.0, 0.0), (7.0, 2.0), (3.0, -9.0), (13.0, 6.0)]
    target = math.radians(120.0)
    k = 2 * math.pi / LAM
    u = np.array([math.cos(target), math.sin(target)])
    phases = [-math.degrees(k * np.dot(p, u)) for p in pos]
    st = forced("steer", *phases)
    op = option("custom", [st], custom_m=pos)
    fig = pattern_figures(array_pattern(spec(), op, st, FREQ_HZ).gain_dbi)
    assert fig["peak_elevation_deg"] <= 2.0
    az = fig["peak_azimuth_deg"]
    assert min(abs(az - 120.0), 360 - abs(az - 120.0)) <= 2.0


def test_square_four_square_diagonal_beam():
    # Square with quadrature phases 0, -90, -180, -90 beams along the diagonal
    # from element 1 to element 3 (common practice, "four-square").
    st = forced("diag", 0.0, -90.0, -180.0, -90.0)
    op = option("square", [st], spacing_m=0.25 * LAM)
    fig = pattern_figures(array_pattern(spec(ground="average"), op, st, FREQ_HZ).gain_dbi)
    assert fig["peak_azimuth_deg"] == 45.0


def test_real_ground_peak_elevations_and_low_angle_order():
    # CHECKS.md: lambda/4 vertical over average ground (13, 0.005) peaks about
    # 26 deg (computed with the Fresnel coefficient; handbooks "20-30 deg",
    # from memory): allow +-3 deg. Over sea under 12 deg (CHECKS: 9-10 deg).
    # Very good ground about 21-23 deg.
    peak = {g: int(np.argmax(vertical_gain_dbi(spec(ground=g), FREQ_HZ)))
            for g in ("average", "sea", "very-good")}
    assert abs(peak["average"] - 26) <= 3
    assert peak["sea"] < 12
    assert 19 <= peak["very-good"] <= 24
    # low-angle gain falls as the ground gets poorer (same eps_r, lower sigma,
    # then a poorer class): Fresnel coefficient physics
    order = ["sea", "very-good", "average", "poor", "very-dry"]
    low = [vertical_gain_dbi(spec(ground=g), FREQ_HZ)[5] for g in order]
    assert all(a > b for a, b in zip(low, low[1:]))
    # at the horizon a real ground cancels the direct ray (Rv -> -1)
    assert vertical_gain_dbi(spec(ground="average"), FREQ_HZ)[0] == -60.0


def test_custom_ground_constants_match_class():
    g = Ground("mine", 13.0, 0.005)
    a = vertical_gain_dbi(spec(ground=g), FREQ_HZ)
    b = vertical_gain_dbi(spec(ground="average"), FREQ_HZ)
    assert a == pytest.approx(b)


def test_pattern_is_finite_and_floored():
    s, op, st = _pair(0.25, -90.0, ground="sea")
    res = array_pattern(s, op, st, FREQ_HZ)
    assert np.all(np.isfinite(res.gain_dbi))
    assert res.gain_dbi.min() >= -60.0
    assert res.gain_dbi[90].max() == -60.0   # verticals are silent at the zenith


def test_figures_on_hand_made_pattern():
    # A pattern built by hand: cos^2 lobe at az 30 deg, el 10 deg.
    az = np.radians(AZIMUTH_DEG - 30.0)
    lin = np.maximum(np.cos(az / 2) ** 2, 1e-9)   # 1 at 30 deg, 0 at 210 deg
    g = np.full((91, 360), -60.0)
    g[10] = 10 * np.log10(lin) + 5.0
    f = pattern_figures(g)
    assert f["peak_gain_dbi"] == pytest.approx(5.0)
    assert f["peak_azimuth_deg"] == 30.0 and f["peak_elevation_deg"] == 10.0
    assert f["front_to_back_db"] == 60.0     # capped
    # rear 120 deg worst point at +-60 deg from 210: cos^2(120/2 deg)... = cos^2(60) = 0.25
    assert f["front_to_rear_db"] == pytest.approx(-10 * math.log10(0.25), abs=1e-9)
    # -3 dB where cos^2(x/2) = 0.5, x = 90 deg: beamwidth 180 deg; crossings are
    # interpolated linearly in dB between 1 deg samples (< 0.25 deg per side)
    assert f["beamwidth_deg"] == pytest.approx(180.0, abs=0.5)
    omni = pattern_figures(np.zeros((91, 360)))
    assert omni["beamwidth_deg"] is None and omni["front_to_back_db"] == 0.0


def test_fed_state_runs_and_changes_with_band():
    st = fed("as-built", 5.0, 12.1)
    s = spec(ground="average", loss_ohm=2.0, radius_m=0.02, height_m=10.4)
    op = option("pair", [st], spacing_m=10.5)
    r1 = array_pattern(s, op, st, 7.1e6)
    r2 = array_pattern(s, op, st, 7.2e6)
    assert r1.junction_impedance_ohm is not None
    assert not np.allclose(r1.base_current_a, r2.base_current_a)
    assert r1.element_power_w.sum() + r1.line_loss_w == pytest.approx(1.0, rel=1e-9)
    assert r1.line_loss_w > 0


def test_lobes_lists_twin_beams_in_a_fixed_order():
    # common practice: a pair at 0.35 wavelength fed 0/-90 deg has twin beams
    # symmetric about the baseline; both must be listed, and equal gains
    # must come out in the same order whatever the round-off
    from lobeplan.antenna.pattern import lobe_bearings_deg

    az = np.radians(np.arange(360.0))
    row = 10 * np.log10(np.abs(1 + np.exp(1j * (2 * np.pi * 0.35 * np.cos(az) - np.pi / 2))) ** 2 + 1e-9)
    lobes = lobe_bearings_deg(row)
    assert len(lobes) == 2
    assert [round(b) for b, _ in lobes] == sorted(round(b) for b, _ in lobes)
    noisy = row + np.where(np.arange(360) > 180, 1e-9, 0.0)
    assert [round(b, 3) for b, _ in lobe_bearings_deg(noisy)] == [round(b, 3) for b, _ in lobes]
    assert lobe_bearings_deg(np.zeros(360)) == ()
