"""Switch networks: forms, symmetry, as-built currents against an independent nodal solve."""
import math

import numpy as np
import pytest
from hypothesis import example, given, settings, strategies as st

from lobeplan.antenna.asbuilt import FB_LOSS_DB, _fb, _front, check_network, cut_tolerance
from lobeplan.antenna.layout import layout_positions_m
from lobeplan.antenna.model import GROUND_CLASSES, ArrayOption, ArraySpec, Feed, State
from lobeplan.antenna.network import (current_error, design_network, geometric_runs_m, layout_symmetries,
                                      network_drive, part_stress)
from lobeplan.antenna.pattern import array_pattern, base_impedance_ohm, state_network
from lobeplan.antenna.mom import solve_elements

F0 = 7.1e6
CABLE = Feed(75.0, 0.66, 2.2)
LOSSLESS = Feed(50.0, 0.66, 0.0)
FOUR_SQUARE = ((0, -90, -180, -90), (-90, 0, -90, -180), (-180, -90, 0, -90), (-90, -180, -90, 0))


def _z(pos, f=F0):
    return solve_elements(10.3, 0.02, pos, f).impedance_ohm + 2.0 * np.eye(len(pos))


def _w(phases):
    return np.exp(1j * np.radians(phases))


def test_current_error_is_blind_to_a_common_factor_and_to_order():
    # the definition (docs/feed.md): after the best common complex factor
    w = _w((0, -90, -180))
    assert current_error(w * 3.0 * np.exp(0.7j), w) == pytest.approx(0.0, abs=1e-12)
    a = w + np.array([0.0, 0.1, 0.0])
    perm = [2, 0, 1]
    assert current_error(a[perm], w[perm]) == pytest.approx(current_error(a, w), rel=1e-12)
    assert current_error(a, w) > 0.03


def test_current_forcing_on_a_lossless_cable_meets_any_phasing_exactly():
    # Current forcing (ARRL Antenna Book, phased-array chapter, from memory;
    # the property is the line equations of Collin ch. 3): odd quarter waves
    # make each base current follow its line-input voltage, and the L
    # sections set those voltages, so on a lossless cable the design is exact
    # whatever the coupling (error at round-off level).
    pos = layout_positions_m("line", 10.5, 3)
    w = _w((0, -90, -180)) * np.array([0.6, 1.0, 0.6])   # a binomial-ish taper
    net = design_network(_z(pos), LOSSLESS, F0, w, pos)
    assert net.meets
    if net.form == "current-forcing":
        q = 0.25 * 299_792_458.0 * 0.66 / F0
        for length in net.line_m:
            assert (length / q) % 2.0 == pytest.approx(1.0, abs=1e-9)   # an odd number of lambda/4
    drive = network_drive(_z(pos), LOSSLESS, net, F0)
    assert current_error(drive.base_current_a, w) < 1e-6


def _nodal_base_currents(z_base, feed, net, freq_hz):
    """Independent solve: nodal admittances of the junction, the line inputs and
    the bases (lines as two-port Y matrices from their ABCD), a 1 A source at
    the junction. Returns the base currents."""
    from lobeplan.antenna.feed import line_chain_matrix

    n = len(net.branches)
    # nodes: 0 junction, 1..n line inputs, n+1..2n bases
    size = 2 * n + 1
    y = np.zeros((size, size), dtype=complex)
    for b in net.branches:
        e = b.element
        inp, base = 1 + e, 1 + n + e
        if b.series is None:    # line input tied to the junction by a tiny resistance (a wire)
            ys = 1e9
        else:
            ys = 1.0 / (1j * b.series.reactance_ohm(freq_hz))
        y[0, 0] += ys
        y[inp, inp] += ys
        y[0, inp] -= ys
        y[inp, 0] -= ys
        if b.shunt is not None:
            y[inp, inp] += 1.0 / (1j * b.shunt.reactance_ohm(freq_hz))
        m = line_chain_matrix(feed, freq_hz, b.line_m)
        a_, b_, c_, d_ = m[0, 0], m[0, 1], m[1, 0], m[1, 1]
        y2 = np.array([[d_ / b_, -(a_ * d_ - b_ * c_) / b_], [-1.0 / b_, a_ / b_]])
        for (r, rr), (c, cc) in [((0, inp), (0, inp)), ((0, inp), (1, base)), ((1, base), (0, inp)),
                                 ((1, base), (1, base))]:
            y[rr, cc] += y2[r, c]
    y[n + 1:, n + 1:] += np.linalg.inv(z_base)
    src = np.zeros(size, dtype=complex)
    src[0] = 1.0
    v = np.linalg.solve(y, src)
    return np.linalg.inv(z_base) @ v[n + 1:]


@pytest.mark.parametrize("phases, layout", [((0, -90), "pair"), ((0, -90, -180, -90), "square"),
                                            ((0, -90, -180), "line")])
def test_as_built_currents_on_a_second_band_match_an_independent_nodal_solve(phases, layout):
    # Independent check: the chain-matrix solve (drive_chains) against a
    # nodal-admittance solve of the same network written separately here
    # (Pozar, Microwave Engineering, ch. 4: ABCD -> Y conversion). Both are
    # exact linear algebra, so they agree to 1e-6 relative.
    pos = layout_positions_m(layout, 10.5, 3 if layout == "line" else None)
    net = design_network(_z(pos), CABLE, F0, _w(phases), pos)
    for f in (10.12e6, 14.1e6):
        z = _z(pos, f)
        ours = network_drive(z, CABLE, net, f).base_current_a
        theirs = _nodal_base_currents(z, CABLE, net, f)
        assert current_error(ours, theirs) < 1e-6


def test_four_square_rotations_get_one_design_permuted():
    # The four switch states of a four-square are 90 deg rotations of one
    # another (common practice): their designs must be the same lines and
    # parts, moved round the square, and so must their as-built currents on
    # another band.
    pos = layout_positions_m("square", 10.5)
    nets = [design_network(_z(pos), CABLE, F0, _w(p), pos) for p in FOUR_SQUARE]
    syms = layout_symmetries(pos, np.mean(pos, axis=0))
    assert len(syms) == 8   # the square's four turns and four mirrors
    ref = nets[0]
    for net, phases in zip(nets, FOUR_SQUARE):
        assert net.form == ref.form and net.current_error == pytest.approx(ref.current_error, abs=1e-12)
        # some symmetry of the square carries state 0 onto this state, and the branches with it
        match = [p for p in syms if np.allclose(_w(phases)[list(p)] / _w(phases)[p[0]],
                                                _w(FOUR_SQUARE[0]) / _w(FOUR_SQUARE[0])[0])]
        assert match
        p = match[0]
        for i in range(4):
            assert net.branches[p[i]].line_m == pytest.approx(ref.branches[i].line_m, abs=1e-9)
            assert net.branches[p[i]].series == ref.branches[i].series
        i_ref = network_drive(_z(pos, 14.1e6), CABLE, ref, 14.1e6).base_current_a
        i_net = network_drive(_z(pos, 14.1e6), CABLE, net, 14.1e6).base_current_a
        assert current_error(i_net[list(p)], i_ref) < 1e-6


def test_mirror_states_of_a_line_get_mirrored_designs():
    pos = layout_positions_m("line", 10.5, 3)
    a = design_network(_z(pos), CABLE, F0, _w((0, -90, -180)), pos)
    b = design_network(_z(pos), CABLE, F0, _w((-180, -90, 0)), pos)
    assert a.line_m == pytest.approx(b.line_m[::-1], abs=1e-9)
    assert [x.series for x in a.branches] == [x.series for x in b.branches[::-1]]


@pytest.mark.parametrize("layout, junction", [("pair", None), ("square", None), ("line", None),
                                              ("pair", (-4.0, 3.0)), ("square", (0.0, 0.0))])
def test_lines_never_shorter_than_their_run_plus_slack(layout, junction):
    pos = layout_positions_m(layout, 10.5, 4 if layout == "line" else None)
    slack = 1.5
    for phases in ((0, -90, -180, -90), (0, 0, 0, 0), (0, -135, -270, -45)):
        w = _w(phases[:len(pos)])
        net = design_network(_z(pos), CABLE, F0, w, pos, junction, slack)
        runs = geometric_runs_m(pos, np.mean(pos, axis=0) if junction is None else junction)
        assert np.all(np.array(net.line_m) >= runs + slack - 1e-9)


def _pair_spec(phases=(0, -90), design=F0):
    state = State("fwd", phase_deg=tuple(float(p) for p in phases), amplitude=(1.0, 1.0),
                  design_band="40 m", design_freq_hz=design)
    option = ArrayOption("pair", "pair", 10.5, layout_positions_m("pair", 10.5), (state,))
    return ArraySpec(10.3, 0.02, GROUND_CLASSES["average"], 2.0, CABLE, (option,)), option, state


def test_as_built_pattern_differs_off_the_design_band_and_forced_bands_hold():
    spec, option, state = _pair_spec()
    on = array_pattern(spec, option, state, F0)
    assert on.kind == "as-built" and on.design_band == "40 m"
    rel = on.base_current_a / on.base_current_a[0]
    assert abs(rel[1] - (-1j)) < 1e-6        # on its own band the network meets the wish
    off = array_pattern(spec, option, state, 14.1e6)
    rel = off.base_current_a / off.base_current_a[0]
    assert abs(rel[1] - (-1j)) > 0.2         # a 40 m network does not give quadrature on 20 m
    from dataclasses import replace

    held = replace(state, forced_freqs_hz=(14.1e6,))
    forced = array_pattern(spec, replace(option, states=(held,)), held, 14.1e6)
    assert forced.kind == "forced"
    rel = forced.base_current_a / forced.base_current_a[0]
    assert abs(rel[1] - (-1j)) < 1e-9


def test_cut_tolerance_is_where_front_to_back_drops_3_db():
    # Self-consistency of the definition: the most sensitive line cut wrong by
    # the tolerance loses 3 dB of F/B (within the bisection's resolution), by
    # half of it clearly less.
    spec, option, state = _pair_spec()
    tol_cm, tol_vf, by_line = cut_tolerance(spec, option, state)
    assert tol_cm is not None and 0.5 < tol_cm < 250 and tol_vf is not None
    assert tol_cm == min(x for x in by_line if x is not None) and len(by_line) == 2
    net = state_network(spec, option, state)
    el, az = _front(spec, option, state)
    fb0 = _fb(spec, option, net, F0, el, az)[2]
    from dataclasses import replace

    losses = []
    for scale in (1.0, 0.5):
        worst = 0.0
        for e in range(2):
            for sign in (1, -1):
                br = list(net.branches)
                br[e] = replace(br[e], line_m=br[e].line_m + sign * scale * tol_cm / 100.0)
                worst = max(worst, fb0 - _fb(spec, option, replace(net, branches=tuple(br)), F0, el, az)[2])
        losses.append(worst)
    assert losses[0] == pytest.approx(FB_LOSS_DB, abs=0.1)
    assert losses[1] < FB_LOSS_DB - 0.5


def test_match_stress_follows_the_power():
    # A matched lossless L-network passes P into R = 50 ohm: the part across
    # the 50 ohm side sees V_peak = sqrt(2 P R) (Bowick ch. 4 with P = V^2/2R).
    spec, option, state = _pair_spec()
    net = state_network(spec, option, state)
    stress = {p.name: p for p in part_stress(base_impedance_ohm(spec, option, F0), CABLE, net, F0, 1500.0)}
    side = "match shunt" if not net.match.shunt_at_load else "match series"
    if not net.match.shunt_at_load:
        assert stress[side].voltage_v_peak == pytest.approx(math.sqrt(2 * 1500.0 * 50.0), rel=1e-6)
    else:   # the series part carries the source current sqrt(2 P / R) peak
        assert stress[side].current_a_rms == pytest.approx(math.sqrt(1500.0 / 50.0), rel=1e-6)
    chk = check_network(spec, option, state, [7.0e6, F0, 7.3e6], 100.0)
    assert chk.checks[1].swr == pytest.approx(1.0, abs=1e-6)
    assert chk.checks[0].swr > 1.0 and chk.checks[2].swr > 1.0


@settings(max_examples=8, deadline=None)
@given(st.lists(st.floats(-180.0, 180.0), min_size=3, max_size=3), st.integers(0, 7))
@example(phases=[0.0, 2.0, 0.0], k=1)
def test_any_square_state_and_its_image_share_one_design(phases, k):
    # property: whatever the wanted phases, a symmetry of the square carries
    # the state's design onto its image's (the geometry is the same plan).
    # A state that its own symmetry maps onto itself (the pinned example: a
    # mirror through elements 1 and 3) is one design, and the lines of the
    # two mirrored elements agree only to the line solver's convergence
    # (1.1e-9 m found): a micrometre is the tolerance, far below any cut.
    pos = layout_positions_m("square", 10.5)
    w = _w([0.0, *phases])
    perm = layout_symmetries(pos, np.mean(pos, axis=0))[k]
    image = np.empty_like(w)
    image[list(perm)] = w
    a = design_network(_z(pos), CABLE, F0, w, pos)
    b = design_network(_z(pos), CABLE, F0, image, pos)
    assert a.form == b.form
    for i in range(4):
        assert b.branches[perm[i]].line_m == pytest.approx(a.branches[i].line_m, abs=1e-6)


def test_cut_tolerance_watches_the_rear_null_of_a_split_beam():
    # Array-factor theory (Balanis sec. 6.2; the endfire null condition
    # kd + alpha = pi): a 3/8-wavelength pair fed 0/-45 deg nulls along the
    # baseline behind it while its beam splits off the baseline, so the
    # opposite of the peak is no null at all. Mis-cut lines fill that rear
    # null: the tolerance must exist (it read "nothing to lose" before).
    spacing = 0.375 * 299_792_458.0 / F0
    state = State("null", phase_deg=(0.0, -45.0), amplitude=(1.0, 1.0), design_band="40 m", design_freq_hz=F0)
    option = ArrayOption("pair", "pair", spacing, layout_positions_m("pair", spacing), (state,))
    spec = ArraySpec(10.3, 0.02, GROUND_CLASSES["average"], 2.0, CABLE, (option,))
    tol_cm, tol_vf, _ = cut_tolerance(spec, option, state)
    assert tol_cm is not None and 1.0 < tol_cm < 250.0 and tol_vf is not None
