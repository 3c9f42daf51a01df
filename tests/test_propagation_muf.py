"""MUF, probabilities, control points and the absorption estimate."""
import numpy as np
import pytest

from lobeplan.propagation.hops import EARTH_RADIUS_KM
from lobeplan.propagation.muf import (ABSORPTION_NIGHT_FLOOR, F2_DECILE_FACTORS, absorption_db,
                                      absorption_index, control_point_distances_km, control_points,
                                      f2_decile_factors, open_probability, p1240_dmax_km, p1240_f2_muf,
                                      secant_law_muf)


@pytest.mark.parametrize("d_km, sec", [(1000, 1.86), (2000, 2.82), (3000, 3.28)])
def test_secant_law_muf(d_km, sec):
    # CHECKS.md secant law: MUF = foF2 sec i, h = 300 km; two decimals given
    assert secant_law_muf(7.0, d_km, 300.0) == pytest.approx(7.0 * sec, abs=7.0 * 0.005)


def test_p1240_basic_muf_worked_example():
    # ITU-R P.1240 F2 basic MUF (constants from memory), worked by hand:
    # foF2 8, foE 3, M(3000)F2 3.0, fH 1.2 MHz, d 2000 km:
    #   x = 2.667, B = 3.0 - 0.124 + 5 (0.0215 + 0.005 sin(7.854/x - 1.9635)) = 3.0043
    #   d_max = 4780 + (12610 + 301 - 983 + 1916)(1/B - 0.303) = 5193 -> capped 4000 km
    #   Z(2000) = 0 -> C = 0.74; Z(3000) = -0.5 -> C = 0.94209
    #   MUF = (1 + 0.74/0.94209 x 2.0043) x 8 + 0.6 x (1 - 0.5) = 20.895 MHz
    # the hand figures carry 5 digits, hence 1e-3 MHz
    assert p1240_dmax_km(8.0, 3.0, 3.0) == pytest.approx(4000.0)
    # below the cap (M(3000)F2 4.0, same x): B = 4 - 0.124 + 12 (0.0215 + 0.005 sin(0.9817)) = 4.1839,
    # d_max = 4780 + 13843.5 (1/4.1839 - 0.303) = 3894.2 km (by hand, hence 0.5 km)
    assert p1240_dmax_km(8.0, 3.0, 4.0) == pytest.approx(3894.2, abs=0.5)
    assert p1240_f2_muf(8.0, 3.0, 3.0, 2000.0, 1.2) == pytest.approx(20.895, abs=1e-3)


def test_p1240_muf_limits_and_gyro_term():
    # at vertical incidence the basic MUF is the extraordinary-wave critical
    # frequency foF2 + fH/2 (Davies 1990, ch. 5: fx - fo = fH/2 for fo >> fH);
    # at d_max the gyro term vanishes; exact by the formula's C(0) = 0, C(d_max) = 1
    fo, foe, m, fh = np.array([4.0, 9.0]), np.array([0.7, 3.2]), np.array([2.8, 3.3]), np.array([1.4, 0.8])
    assert p1240_f2_muf(fo, foe, m, 0.0, fh) == pytest.approx(fo + fh / 2, rel=1e-9)
    dmax = p1240_dmax_km(fo, foe, m)
    no_gyro = p1240_f2_muf(fo, foe, m, dmax, 0.0)
    assert p1240_f2_muf(fo, foe, m, dmax, fh) == pytest.approx(no_gyro, rel=1e-9)
    # the night case of the complaint: at 500 km the fH/2 (1 - D/d_max)
    # term is about a tenth of the MUF (foF2 4, foE 0.7, fH 1.2: 0.53 of 5.33 MHz)
    with_fh = float(p1240_f2_muf(4.0, 0.7, 2.8, 500.0, 1.2))
    without = float(p1240_f2_muf(4.0, 0.7, 2.8, 500.0, 0.0))
    assert (with_fh - without) / with_fh == pytest.approx(0.0985, abs=2e-3)
    # rising with hop length beyond the first few hundred km (the distance
    # polynomial has a slight dip next to d = 0)
    d = np.linspace(300, 4000, 60)
    assert (np.diff(p1240_f2_muf(9.0, 3.0, 3.0, d, 1.2)) > 0).all()


def test_decile_ratios_widen_by_night_and_toward_the_poles():
    # ITU-R P.1240's table pattern (from memory): nights and high latitudes
    # are more variable than middle-latitude days
    lo_day, hi_day = f2_decile_factors(40.0, 30.0)
    lo_night, hi_night = f2_decile_factors(120.0, 30.0)
    lo_high, hi_high = f2_decile_factors(40.0, 70.0)
    assert (lo_day, hi_day) == pytest.approx(F2_DECILE_FACTORS)
    assert lo_night < lo_day and hi_night > hi_day
    assert lo_high < lo_day and hi_high > hi_day
    lo_all, hi_all = f2_decile_factors(np.linspace(0, 180, 50), 50.0)
    assert (lo_all < 1).all() and (hi_all > 1).all()


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
    # George & Bradley form (constants from memory): by night only P.533's
    # floor of the diurnal factor remains; more with a higher sun and more spots
    assert absorption_index(110.0, 100.0) == pytest.approx(1.37 * ABSORPTION_NIGHT_FLOOR)
    assert absorption_index(20.0, 100.0) > absorption_index(60.0, 100.0) > absorption_index(110.0, 100.0)
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


@pytest.mark.parametrize("f_mhz, expect_db", [(10.1, 20.0), (14.1, 11.4)])
def test_absorption_worked_example(f_mhz, expect_db):
    # George & Bradley (1974) form, worked by hand (constants from memory):
    # R12 65, solar zenith 40 deg, one hop at 10 deg takeoff, fH 1.2 MHz
    #   I = (1 + 0.0037 x 65) cos(0.881 x 40)^1.3 = 1.2405 x 0.7686 = 0.9535
    #   sec phi at 100 km: sin phi = 6371 cos 10 / 6471 = 0.96958 -> 4.085
    #   10.1 MHz: 677.2 x 0.9535 x 4.085 / (11.3^1.98 + 10.2 = 131.8) = 20.0 dB
    #   14.1 MHz: ... / (15.3^1.98 + 10.2 = 231.9) = 11.4 dB
    # hand arithmetic to 3 digits: 2 % tolerance
    got = float(absorption_db(f_mhz, 10.0, 1, absorption_index(40.0, 65.0), 1.2))
    assert got == pytest.approx(expect_db, rel=0.02)
