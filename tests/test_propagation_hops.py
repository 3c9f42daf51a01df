"""Hop geometry against spherical geometry and the values of CHECKS.md."""
import numpy as np
import pytest

from lobeplan.propagation.hops import (EARTH_RADIUS_KM, elevation_deg, incidence_secant,
                                       longest_hop_km, min_hops, path_modes)


def _elevation_by_vectors(d_km, h_km):
    # Independent route: put the transmitter and the reflection point in the
    # plane of the great circle and measure the ray against the local
    # horizontal (plain vector geometry, no closed form shared with the code).
    r = EARTH_RADIUS_KM
    half = d_km / (2 * r)
    tx = np.array([0.0, r])
    top = (r + h_km) * np.array([np.sin(half), np.cos(half)])
    ray = top - tx
    horizontal = np.array([1.0, 0.0])
    return np.degrees(np.arctan2(ray @ np.array([0.0, 1.0]), ray @ horizontal))


@pytest.mark.parametrize("d_km, expected_deg", [(1000, 28.1), (2000, 11.8), (3000, 4.3)])
def test_elevation_matches_checks_table(d_km, expected_deg):
    # CHECKS.md, propagation, "h = 300 km" row (computed from the published
    # spherical form); the table gives one decimal, hence 0.05 deg.
    assert elevation_deg(d_km, 300.0) == pytest.approx(expected_deg, abs=0.05)


@pytest.mark.parametrize("d_km", [0.0, 50.0, 700.0, 2500.0, 3800.0])
@pytest.mark.parametrize("h_km", [110.0, 300.0, 420.0])
def test_elevation_matches_vector_geometry(d_km, h_km):
    # computed: the same triangle by vectors; both are exact, so 1e-9 deg
    assert elevation_deg(d_km, h_km) == pytest.approx(_elevation_by_vectors(d_km, h_km), abs=1e-9)


def test_longest_hops_match_checks_table():
    # CHECKS.md: longest single F2 hop (h = 300 km) 3836 km at 0 deg and
    # 3225 km at 3 deg; E (110 km) 2351 and 1776 km (computed, given to 1 km)
    assert longest_hop_km(300.0, 0.0) == pytest.approx(3836, abs=1)
    assert longest_hop_km(300.0, 3.0) == pytest.approx(3225, abs=1)
    assert longest_hop_km(110.0, 0.0) == pytest.approx(2351, abs=1)
    assert longest_hop_km(110.0, 3.0) == pytest.approx(1776, abs=1)
    # common practice: "about 4000 km" for one F2 hop, "about 2000 km" for E
    assert 3500 < longest_hop_km(300.0, 0.0) < 4200
    assert 1700 < longest_hop_km(110.0, 3.0) < 2400


def test_longest_hop_is_where_the_elevation_reaches_the_minimum():
    # consistency of the two closed forms (computed, exact)
    for h in (110.0, 300.0, 400.0):
        for el in (0.0, 3.0, 10.0):
            assert elevation_deg(longest_hop_km(h, el), h) == pytest.approx(el, abs=1e-9)


@pytest.mark.parametrize("d_km, sec", [(1000, 1.86), (2000, 2.82), (3000, 3.28)])
def test_incidence_secant_matches_checks_table(d_km, sec):
    # CHECKS.md secant law row, h = 300 km (published form, computed values
    # to two decimals, hence 0.005)
    assert incidence_secant(elevation_deg(d_km, 300.0), 300.0) == pytest.approx(sec, abs=0.005)


def test_min_hops_and_mode_list():
    d = np.array([500.0, 3000.0, 3300.0, 6000.0, 12000.0])
    # 3225 km per hop at 3 deg (CHECKS.md): 3300 km needs two hops
    assert min_hops(d, 300.0, 3.0).tolist() == [1, 1, 2, 2, 4]
    m = path_modes(d, 300.0, 110.0, 3.0, extra_f2_hops=2, extra_e_hops=1, max_e_distance_km=4000.0)
    assert m.layer == ("F2", "F2", "F2", "E", "E")
    assert m.hops[:, 0].tolist() == [1, 1, 2, 2, 4]
    assert m.hops[:, 1].tolist() == [2, 2, 3, 3, 5]
    # E: 1776 km per hop at 3 deg; no E modes past 4000 km
    assert m.hops[:, 3].tolist() == [1, 2, 2, 0, 0]
    assert np.isnan(m.elevation_deg[3:, 3:]).all()
    # every listed mode meets the minimum elevation, higher orders go higher
    ok = ~np.isnan(m.elevation_deg)
    assert (m.elevation_deg[ok] >= 3.0 - 1e-9).all()
    assert (np.diff(m.elevation_deg[:, :3], axis=1) > 0).all()
    # a 6000 km two-hop F2 mode is two 3000 km hops: 4.3 deg (CHECKS.md)
    assert m.elevation_deg[3, 0] == pytest.approx(4.3, abs=0.05)
