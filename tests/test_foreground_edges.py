"""Foreground sector edges in bearing: the first Fresnel zone's width across the ray."""
import math
from dataclasses import replace

import numpy as np
import pytest

from lobeplan.antenna.foreground import (bearing_share, foreground_masks, fresnel_ellipse_m, fresnel_interval_m,
                                         sector_share, share_beyond)
from lobeplan.antenna.model import GROUND_CLASSES, ForegroundSector
from lobeplan.grid import AZIMUTH_DEG, ELEVATION_DEG

from _antenna_cases import spec

Z_M, LAM_M = 3.6, 42.2          # a 40 m band element's current centroid, and its wavelength
F_HZ = 7.1e6


def _path_excess_m(x, y, psi_deg, z=Z_M):
    """Reflected path via ground point (x, y) less the specular one, toward a far observer (geometry)."""
    psi = np.radians(psi_deg)
    return np.sqrt(x * x + y * y + z * z) - x * np.cos(psi) - z * np.sin(psi)


def _sharp(sector, elevation_deg=ELEVATION_DEG, z=Z_M, lam=LAM_M):
    """The former model: the share beyond from_m on every whole-degree bearing in [from, to), none elsewhere."""
    span = (sector.to_deg - sector.from_deg) % 360.0 or 360.0
    inside = ((AZIMUTH_DEG - sector.from_deg) % 360.0) < span - 1e-9
    return share_beyond(*fresnel_interval_m(z, lam, elevation_deg), sector.from_m)[:, None] * inside[None, :]


def _reach_deg(from_m, elevation_deg, z=Z_M, lam=LAM_M):
    """How far in bearing the zone's forward part beyond from_m reaches off the ray (closed form).

    The zone contains the array's foot (x1 < 0), so its boundary seen from
    there turns monotonically and the widest bearing beyond x = f is at x = f:
    atan(y_f / f), y_f = b sqrt(1 - ((f - x_c) / a)^2); 90 deg when f is 0.
    """
    c, a, b = fresnel_ellipse_m(z, lam, elevation_deg)
    if from_m <= 0:
        return np.full(np.shape(c), 90.0)
    with np.errstate(invalid="ignore"):  # elevation 0 (an infinite zone) comes out nan: callers set it
        y_f = b * np.sqrt(np.clip(1.0 - ((from_m - c) / a) ** 2, 0.0, 1.0))
    return np.degrees(np.arctan2(y_f, from_m))


# --- (3) the zone's half-width, and the blur it gives -----------------------

def test_the_zone_half_width_satisfies_the_path_difference():
    # The first Fresnel zone of a ground reflection seen by a far observer:
    # reflected path within lambda/2 of the specular one (ITU-R P.526's
    # definition of the zone; the ellipse follows by squaring, geometry). Its
    # ends, the ends of its widest chord (x_c, +-b) and the ends of the chord
    # at any range lie on that boundary.
    psi = np.array([1.0, 3.0, 10.0, 30.0, 60.0, 90.0])
    c, a, b = fresnel_ellipse_m(Z_M, LAM_M, psi)
    for x, y in ((c - a, 0 * c), (c + a, 0 * c), (c, b), (c, -b), (c + 0.6 * a, 0.8 * b)):
        assert np.allclose(_path_excess_m(x, y, psi), LAM_M / 2, rtol=1e-9)
    # the widest chord is the widest: just outside it the excess is larger
    assert np.all(_path_excess_m(c, 1.001 * b, psi) > LAM_M / 2)
    assert np.allclose(b, a * np.sin(np.radians(psi)), rtol=1e-12)


def test_the_blur_in_bearing_shrinks_with_the_takeoff_angle():
    # As psi -> 0 the zone is long (a ~ lambda / (2 sin^2 psi)) and thin
    # (b = a sin psi), with the array's foot at its near tip. The share of a
    # unit disk below a chord from a point of its rim at angle alpha is
    # 1/2 + (2 alpha + sin 2 alpha) / (2 pi) (a circular segment; geometry),
    # and the map to the disk turns tan(offset) into tan(alpha) = tan(offset) /
    # sin psi. So the share across a straight edge from the foot goes from 1/4 to
    # 3/4 over +-atan(0.4416 sin psi): the blur shrinks with the takeoff angle.
    def limit(offset_deg, psi_deg):
        al = np.arctan(np.tan(np.radians(offset_deg)) / np.sin(np.radians(psi_deg)))
        return 0.5 + (2 * al + np.sin(2 * al)) / (2 * math.pi)

    offsets = np.linspace(-5.0, 5.0, 41)
    for psi in (0.5, 1.0, 2.0):
        # the limit's error is the foot's distance from the tip over the zone's
        # length, (x1 / a ~ sin^2 psi / 4): under 1e-3 here
        assert np.max(np.abs(bearing_share(Z_M, LAM_M, psi, 0.0, offsets) - limit(offsets, psi))) < 1e-3
    # the quartile of the share across an edge, found by bisection, widens with psi
    quartile = []
    for psi in (1.0, 2.0, 4.0, 8.0, 16.0, 32.0):
        lo, hi = 0.0, 90.0
        for _ in range(50):
            mid = 0.5 * (lo + hi)
            lo, hi = (mid, hi) if bearing_share(Z_M, LAM_M, psi, 0.0, mid) < 0.75 else (lo, mid)
        quartile.append(lo)
    assert np.all(np.diff(quartile) > 0)
    u = math.tan(0.5 * 0.8317112)  # 2 alpha + sin 2 alpha = pi / 2
    assert quartile[0] == pytest.approx(math.degrees(math.atan(u * math.sin(math.radians(1.0)))), rel=2e-3)


def test_beyond_from_m_the_blur_ends_where_the_zone_does():
    # Beyond from_m the zone's forward part spans atan(y_f / f) either side of
    # the ray (closed form above): the share is exactly 0 further off on one
    # side, the whole share beyond from_m on the other, and in between inside.
    for f in (40.0, 150.0, 1000.0):
        psi = np.array([2.0, 5.0, 10.0, 20.0])
        whole = share_beyond(*fresnel_interval_m(Z_M, LAM_M, psi), f)
        reach = _reach_deg(f, psi)
        live = whole > 0
        assert live.sum() >= 2
        assert np.all(bearing_share(Z_M, LAM_M, psi, f, -reach * (1 + 1e-9) - 1e-9)[live] == 0.0)
        assert np.allclose(bearing_share(Z_M, LAM_M, psi, f, reach * (1 + 1e-9) + 1e-9), whole, atol=1e-12)
        mid = bearing_share(Z_M, LAM_M, psi, f, 0.98 * reach)
        assert np.all(((mid > 0.5 * whole) & (mid < whole))[live])


# --- (2) a ray along a straight edge -----------------------------------------

@pytest.mark.parametrize("from_m", [0.0, 300.0])
def test_a_ray_along_an_edge_between_two_half_planes_sees_half_of_each(from_m):
    # Sea on bearings 0..180, wet ground on 180..360, both from the same
    # distance: a ray toward 0 or 180 runs along the edge, and the zone is
    # symmetric about the ray (geometry), so each side holds half of what lies
    # beyond from_m, at every takeoff angle (elevation 0 included: the limit).
    s = replace(spec("average"), foreground=(ForegroundSector(0, 180, from_m, GROUND_CLASSES["sea"]),
                                             ForegroundSector(180, 360, from_m, GROUND_CLASSES["wet"])))
    m = foreground_masks(s, F_HZ)
    # toward 90 deg the forward half-plane is all sea: the whole share beyond from_m
    whole = m[1][:, 90]
    assert np.all(whole[:4] > 0.9) and np.allclose(m[0][:, 90] + whole, 1.0, atol=1e-12)
    for bearing in (0, 180):
        assert np.allclose(m[1][:, bearing], 0.5 * whole, atol=1e-12)
        assert np.allclose(m[2][:, bearing], 0.5 * whole, atol=1e-12)
    if from_m == 0.0:
        assert np.allclose(m[1][:, [0, 180]], 0.5, atol=1e-12)


# --- (1) far from the edges nothing changes ------------------------------------

SECTORS = (ForegroundSector(200.0, 300.0, 150.0, GROUND_CLASSES["sea"]),
           ForegroundSector(350.0, 30.0, 0.0, GROUND_CLASSES["wet"]),
           ForegroundSector(40.5, 170.25, 1000.0, GROUND_CLASSES["sea"]))


@pytest.mark.parametrize("sector", SECTORS)
def test_far_from_the_edges_the_share_is_the_former_one(sector):
    # Where the zone's forward part beyond from_m lies wholly on one side of
    # both edges (its reach, closed form above), the smooth share is the sharp
    # one: the whole share beyond from_m inside the wedge, none outside (1e-9:
    # both are closed forms, the difference is round-off).
    smooth = sector_share(sector, Z_M, LAM_M, ELEVATION_DEG)
    sharp = _sharp(sector)
    reach = _reach_deg(sector.from_m, ELEVATION_DEG)[:, None]
    reach[0] = 0.0  # elevation 0: the zone is a line along the ray
    off = [np.abs((edge - AZIMUTH_DEG + 180.0) % 360.0 - 180.0)[None, :] for edge in (sector.from_deg, sector.to_deg)]
    far = (off[0] > reach + 1e-6) & (off[1] > reach + 1e-6)
    assert far.sum() > 0.3 * far.size
    assert np.max(np.abs(smooth - sharp)[far]) < 1e-9
    # and near the edges it is a blend, not a step (else this test says nothing)
    assert np.any((smooth > 0.05) & (smooth < 0.95) & ~far)


# --- (4) against an independent count of the zone's area -----------------------

def _grid_points(n=1000):
    u = (np.arange(n) + 0.5) / n * 2.0 - 1.0
    xx, yy = np.meshgrid(u, u)
    inside = xx * xx + yy * yy <= 1.0
    return xx[inside], yy[inside]


CASES = [(1.0, 0.0), (3.0, 0.0), (3.0, 400.0), (10.0, 60.0), (25.0, 0.0), (25.0, 20.0), (60.0, 10.0), (90.0, 0.0)]


@pytest.mark.parametrize("psi,from_m", CASES)
def test_the_share_agrees_with_a_dense_grid_and_with_polygon_clipping(psi, from_m):
    # (a) a midpoint grid of 1000 x 1000 cells over the ellipse (in its own
    # axes: uniform in area), counted forward, beyond from_m and on the near
    # side of a bearing line from the foot. The count's error is some cells
    # along the boundaries, h L / A (h = 0.002 in the unit disk, L / A ~ 3):
    # 2e-3 is that bound with room; the errors mostly cancel, so typically 1e-4.
    # (b) shapely (an independent geometry library) clips a 4096-gon of the
    # ellipse with the half-planes: exact for the polygon, whose area is short
    # of the ellipse's by (2 pi^2 / 3) / 4096^2 ~ 4e-7 (inscribed regular
    # polygon), hence 2e-6.
    from shapely.geometry import Polygon, box

    c, a, b = (float(v[0]) for v in fresnel_ellipse_m(Z_M, LAM_M, np.array([psi])))
    gx, gy = _grid_points()
    x, y = c + a * gx, b * gy
    forward = x > 0
    t = np.linspace(0.0, 2 * math.pi, 4096, endpoint=False)
    ellipse = Polygon(np.c_[c + a * np.cos(t), b * np.sin(t)])
    big = 10.0 * (abs(c) + a + b)
    fwd_area = ellipse.intersection(box(0.0, -big, big, big)).area
    offsets = np.array([-60.0, -8.0, -1.5, -0.3, 0.0, 0.4, 2.0, 12.0, 45.0, 85.0])
    ours = bearing_share(Z_M, LAM_M, psi, from_m, offsets)
    for off, got in zip(offsets, ours):
        k = math.tan(math.radians(off))
        count = np.sum(forward & (x >= from_m) & (y <= x * k)) / np.sum(forward)
        assert got == pytest.approx(count, abs=2e-3)
        below = Polygon([(0.0, 0.0), (big, big * k), (big, -big * (abs(k) + 1)), (0.0, -big * (abs(k) + 1))])
        clip = ellipse.intersection(box(max(from_m, 0.0), -big, big, big)).intersection(below).area / fwd_area
        assert got == pytest.approx(clip, abs=2e-6)


def test_a_wrapping_sector_agrees_with_a_dense_grid_of_true_bearings():
    # the whole path, wedge edges and wrap past 0 deg included: each grid point
    # of a ray's zone takes its true bearing from the array's centre and is
    # counted in the sector when that bearing is in [from, to) and it lies
    # beyond from_m along the ray (tolerance as above)
    sector = ForegroundSector(330.5, 20.25, 30.0, GROUND_CLASSES["sea"])
    span = (sector.to_deg - sector.from_deg) % 360.0
    psis = np.array([2.0, 8.0, 30.0])
    share = sector_share(sector, Z_M, LAM_M, psis)
    gx, gy = _grid_points(700)
    for i, psi in enumerate(psis):
        c, a, b = (float(v[0]) for v in fresnel_ellipse_m(Z_M, LAM_M, np.array([psi])))
        x, y = c + a * gx, b * gy
        forward = x > 0
        rel = np.degrees(np.arctan2(y, x))
        for bearing in (300, 329, 330, 331, 345, 0, 10, 20, 21, 50, 150):
            inside = ((bearing + rel - sector.from_deg) % 360.0) < span
            count = np.sum(forward & (x >= sector.from_m) & inside) / np.sum(forward)
            assert share[i, bearing] == pytest.approx(count, abs=3e-3)


# --- (5) the masks stay fractions that sum to one -------------------------------

def test_masks_of_fractional_wrapping_sectors_sum_to_one():
    s = replace(spec("average"), foreground=(ForegroundSector(10.5, 100.25, 0.0, GROUND_CLASSES["sea"]),
                                             ForegroundSector(100.25, 170.0, 500.0, GROUND_CLASSES["wet"]),
                                             ForegroundSector(300.0, 10.5, 40.0, GROUND_CLASSES["sea"])))
    m = foreground_masks(s, F_HZ)
    assert m.shape == (3, 91, 360)
    assert np.all(m >= 0.0) and np.all(m <= 1.0)
    assert np.allclose(m.sum(axis=0), 1.0, atol=1e-12)
    # all the ground round the array: every ray reflects on it alone
    ring = replace(spec("average"), foreground=(ForegroundSector(0.0, 360.0, 0.0, GROUND_CLASSES["sea"]),))
    assert np.allclose(foreground_masks(ring, F_HZ)[1], 1.0, atol=1e-12)
