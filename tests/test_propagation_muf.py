"""MUF, probabilities, control points and the absorption estimate."""
import numpy as np
import pytest

from lobeplan.propagation.hops import EARTH_RADIUS_KM
from lobeplan.propagation.muf import (F2_DECILE_FACTORS, absorption_db, absorption_index,
                                      control_point_distances_km, control_points, m3000_muf,
                                      open_probability, secant_law_muf)


@pytest.mark.parametrize("d_km, sec", [(1000, 1.86), (2000, 2.82), (3000, 3.28)])
def test_secant_law_muf(d_km, sec):
    # CHECKS.md secant law: MUF = foF2 sec i, h = 300 km; two decimals given
    assert secant_law_muf(7.0, d_km, 300.0) == pytest.approx(7.0 * sec, abs=7.0 * 0.005)


def test_m3000_muf_meets_its_definition():
    # published definition (URSI/ITU-R P.1239): M(3000)F2 = MUF(3000)F2/foF2,
    # and at vertical incidence the MUF is foF2; exact by construction, 1e-9
    fo = np.array([4.0, 9.0, 12.0])
    m = np.array([2.4, 3.0, 3.4])
    h = np.array([390.0, 300.0, 260.0])
    assert m3000_muf(fo, m, 3000.0, h) == pytest.approx(fo * m, rel=1e-9)
    assert m3000_muf(fo, m, 0.0, h) == pytest.approx(fo, rel=1e-9)
    d = np.linspace(0, 3800, 50)
    assert (np.diff(m3000_muf(9.0, 3.0, d, 300.0)) > 0).all()


def test_open_probability_at_the_deciles():
    # ITU-R P.1240 decile definition (values from memory, CHECKS.md): the
    # lower decile MUF is exceeded on 90 % of days, the upper on 10 %
    lo, hi = F2_DECILE_FACTORS
    p = open_probability(np.array([lo * 20.0, 20.0, hi * 20.0]), 20.0)
    assert p == pytest.approx([0.9, 0.5, 0.1], abs=1e-9)
    assert open_probability(10.0, 0.0) == 0.0
    assert open_probability(10.0, np.nan) == 0.0
    f = np.linspace(1, 40, 100)
    assert (np.diff(open_probability(f, 20.0)) <= 0).all()


def test_control_point_distances():
    # ITU-R P.533 control points (from memory, CHECKS.md)
    d = np.array([1500.0, 2000.0, 3000.0, 4000.0, 9000.0])
    hop = np.array([1500.0, 2000.0, 3000.0, 2000.0, 3000.0])
    cp = control_point_distances_km(d, hop)
    assert cp[:, 0].tolist() == [750.0, 1000.0, 1000.0, 1000.0, 1500.0]
    assert cp[:, 1].tolist() == [750.0, 1000.0, 2000.0, 3000.0, 7500.0]


def _sphere_destination(lon0, lat0, az, dist_km):
    # spherical direct problem (standard navigation formula), independent of pyproj
    p1, l1, a = np.radians(lat0), np.radians(lon0), np.radians(az)
    s = dist_km / EARTH_RADIUS_KM
    p2 = np.arcsin(np.sin(p1) * np.cos(s) + np.cos(p1) * np.sin(s) * np.cos(a))
    l2 = l1 + np.arctan2(np.sin(a) * np.sin(s) * np.cos(p1), np.cos(s) - np.sin(p1) * np.sin(p2))
    return (np.degrees(l2) + 180) % 360 - 180, np.degrees(p2)


def test_control_point_positions_follow_the_great_circle():
    lon, lat = control_points(0.0, 0.0, np.array([90.0]), np.array([[1500.0]]))
    # equator, WGS84: 111.3195 km per degree of longitude (published WGS84 a)
    assert lon[0, 0] == pytest.approx(1500 / 111.3195, abs=1e-3)
    assert lat[0, 0] == pytest.approx(0.0, abs=1e-9)
    # elsewhere, against the sphere: ellipsoid and sphere differ by ~0.3 %
    # of the distance, so 0.5 % of it (in degrees of arc) is the tolerance
    bearings = np.array([10.0, 135.0, 250.0])
    along = np.array([[1000.0, 2000.0], [1000.0, 5000.0], [7000.0, 18000.0]])
    lon, lat = control_points(12.0, 47.0, bearings, along)
    for i in range(3):
        for j in range(2):
            slon, slat = _sphere_destination(12.0, 47.0, bearings[i], along[i, j])
            tol = 0.005 * along[i, j] / 111.2
            dlon = ((lon[i, j] - slon + 180) % 360 - 180) * np.cos(np.radians(slat))
            assert np.hypot(dlon, lat[i, j] - slat) < tol


def test_absorption_estimate_sense():
    # George & Bradley form (constants from memory): no absorption once
    # 0.881 chi passes 90 deg (night), more with a higher sun and more spots
    assert absorption_index(110.0, 100.0) == 0.0
    assert absorption_index(20.0, 100.0) > absorption_index(60.0, 100.0) > 0
    assert absorption_index(20.0, 150.0) > absorption_index(20.0, 0.0)
    # computed from the stated form: sun overhead, R12 = 0, 7 MHz,
    # one hop at 90 deg elevation: 677.2 / ((7 + 1.2)^1.98 + 10.2)
    expect = 677.2 / ((7.0 + 1.2) ** 1.98 + 10.2)
    assert absorption_db(7.0, 90.0, 1, absorption_index(0.0, 0.0)) == pytest.approx(expect, rel=1e-9)
    # common practice: absorption falls roughly as 1/(f + fH)^2 (the form's
    # +10.2 softens it at low f: 80 m about 2.3 times 40 m, not 3) and grows
    # with obliquity and hop count
    assert absorption_db(3.6, 20.0, 1, 1.0) > 2 * absorption_db(7.1, 20.0, 1, 1.0)
    assert absorption_db(7.1, 5.0, 1, 1.0) > absorption_db(7.1, 30.0, 1, 1.0)
    assert absorption_db(7.1, 5.0, 2, 1.0) == pytest.approx(2 * absorption_db(7.1, 5.0, 1, 1.0))
