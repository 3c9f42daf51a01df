"""Station position, geodesic paths and goal regions against outside references."""
import math

import maidenhead
import numpy as np
import pytest
import shapely
from hypothesis import example, given, settings
from hypothesis import strategies as st
from pyproj import Geod

from lobeplan.geo import regions as R
from lobeplan.geo.locator import latlon_to_locator, locator_to_latlon
from lobeplan.geo.paths import EARTH_RADIUS_KM, bearing_arc, goal_paths, inverse
from lobeplan.geo.station import Station


def dms(d, m, s):
    sign = -1 if d < 0 else 1
    return sign * (abs(d) + m / 60 + s / 3600)


def test_inverse_geodesic_vincenty_worked_example():
    # Published: Vincenty (1975) worked example as given by Geoscience Australia /
    # ICSM GDA technical manual, on GRS80: Flinders Peak -> Buninyong,
    # 54 972.271 m, azimuth 306 52 05.37, reverse 127 10 25.07.
    # Tolerance: the published figures are rounded to 1 mm and 0.01 arc-second.
    geod = Geod(ellps="GRS80")
    lat1, lon1 = dms(-37, 57, 3.72030), dms(144, 25, 29.52440)
    lat2, lon2 = dms(-37, 39, 10.15610), dms(143, 55, 35.38390)
    az, dist_km = inverse(lon1, lat1, np.array([lon2]), np.array([lat2]), geod=geod)
    assert dist_km[0] * 1000 == pytest.approx(54972.271, abs=0.0015)
    assert abs(az[0] - dms(306, 52, 5.37)) * 3600 < 0.01
    back, _, _ = geod.inv(lon2, lat2, lon1, lat1)  # azimuth at Buninyong towards Flinders Peak
    assert abs((back % 360) - dms(127, 10, 25.07)) * 3600 < 0.01


def test_long_path_is_reverse_bearing_and_complement():
    # On a sphere, the long path runs the other way round the same great circle
    # (bearing + 180 deg) over 2 pi R minus the short distance (spherical
    # geometry). On WGS84 the true long-path geodesic differs by tens of km,
    # which HF does not notice: tolerance 0.5 % of the distance.
    station = Station("s", 45.0, -93.0, "")
    lons, lats = np.array([2.35, 139.7, -58.4]), np.array([48.85, 35.7, -34.6])
    b_s, d_s = goal_paths(station, lons, lats, "short")
    b_l, d_l = goal_paths(station, lons, lats, "long")
    assert np.allclose(np.mod(b_l - b_s, 360), 180)
    assert np.allclose(d_l + d_s, 2 * math.pi * EARTH_RADIUS_KM)
    geod = Geod(ellps="WGS84")
    for b, d in zip(b_l, d_l):
        # walk the long way and land on the goal: the end point is within 0.5 % of d
        lon, lat, _ = geod.fwd(station.lon_deg, station.lat_deg, b, d * 1000)
        _, _, miss = geod.inv(lon, lat, lons[list(b_l).index(b)], lats[list(b_l).index(b)])
        assert miss / 1000 < 0.005 * d


def test_bearing_arc_across_north():
    start, end, median = bearing_arc(np.array([350.0, 355.0, 5.0, 10.0, 0.0]))
    assert (start, end) == (350.0, 10.0)
    assert median == pytest.approx(0.0, abs=1e-9)


_CELL_DEG = {2: (20.0, 10.0), 4: (2.0, 1.0), 6: (2 / 24, 1 / 24), 8: (2 / 240, 1 / 240)}


@pytest.mark.parametrize("length", [2, 4, 6, 8])
def test_locator_matches_reference_package_both_ways(length):
    # Independent implementation: the `maidenhead` package from PyPI (open
    # standard). Two quirks of it, read from its source: it rounds to the
    # nearest 1/4320 deg before taking the square, so points that close to a
    # square's edge are skipped; and its precision 1 does not give the field,
    # so the 2-character check compares with the first two characters of its
    # 4-character locator.
    rng = np.random.default_rng(length)
    dlon, dlat = _CELL_DEG[length]
    checked = 0
    for lat, lon in zip(rng.uniform(-89.9, 89.9, 300), rng.uniform(-179.9, 179.9, 300)):
        flon, flat = ((lon + 180) / dlon) % 1, ((lat + 90) / dlat) % 1
        if min(flon, 1 - flon) * dlon < 3e-4 or min(flat, 1 - flat) * dlat < 1.5e-4:
            continue
        ref = maidenhead.to_maiden(lat, lon, max(2, length // 2))[:length]
        ours = latlon_to_locator(lat, lon, length)
        assert ours.upper() == ref.upper()
        # and back: the centre of the square, as the package gives it
        clat, clon = locator_to_latlon(ours)
        rlat, rlon = maidenhead.to_location(ref, center=True)
        assert clat == pytest.approx(rlat, abs=1e-9) and clon == pytest.approx(rlon, abs=1e-9)
        checked += 1
    assert checked > 250


@pytest.mark.parametrize("bad", ["", "S", "SA12", "AA1", "AAA1", "JN13zz", "JN13ab1", "JN13ab1x"])
def test_locator_rejects_malformed(bad):
    with pytest.raises(ValueError):
        locator_to_latlon(bad)


STATION = Station("s", 44.0, -2.0, "")


def _area_mkm2(text, station=STATION, clip=None):
    return R._area_m2(R.resolve(text, station, clip=clip).geometry) / 1e12


def cap_mkm2(radius_km, r=6371.0088):
    # Spherical cap area 2 pi R^2 (1 - cos(d / R)) (spherical geometry).
    return 2 * math.pi * r**2 * (1 - math.cos(radius_km / r)) / 1e6


def _binomial_ok(share, expect, n, sds=4.0):
    # a sample share against its expected value: within 4 binomial standard deviations
    return abs(share - expect) <= sds * math.sqrt(expect * (1 - expect) / n) + 1e-9


@pytest.mark.parametrize("code", ["FJI", "RUS", "USA", "IDN"])
def test_points_share_out_among_parts_by_geodesic_area(code):
    # Independent reference: pyproj's geodesic area of each part on WGS84
    # (Karney 2013), not the planar equal-area computation the sampler uses.
    # Countries split by the antimeridian (Fiji, Russia) or with far-flung
    # parts (Alaska and Hawaii; the islands of Indonesia).
    n = 3000
    geom = R.resolve(f"country:{code}", STATION).geometry
    lons, lats = R.sample_points(geom, n, seed=7)
    geod = Geod(ellps="WGS84")
    parts = list(geom.geoms)
    areas = np.array([abs(geod.geometry_area_perimeter(p)[0]) for p in parts])
    big = int(np.argmax(areas))
    inside_big = shapely.contains_xy(parts[big], lons, lats).mean()
    assert _binomial_ok(inside_big, areas[big] / areas.sum(), n)


def test_sampling_is_uniform_by_area():
    # Two parts far apart in latitude and a triangle (so that rejection and the
    # share-out between parts both matter). On the sphere the area of a lon/lat
    # shape is the integral of cos(lat) (computed, scipy's quad as the
    # integrator): box A 0..10 N has (sin 10 - sin 0) / (sin 70 - sin 60) =
    # 2.357 times the area of box B 60..70 N.
    from scipy.integrate import quad
    from shapely.geometry import MultiPolygon, Polygon, box

    n = 6000
    tri = Polygon([(100, 0), (120, 0), (100, 20)])
    geom = MultiPolygon([box(0, 0, 10, 10), box(0, 60, 10, 70), tri])
    lons, lats = R.sample_points(geom, n, seed=11)
    rad = math.radians
    area_a = 10 * (math.sin(rad(10)) - math.sin(0))
    area_b = 10 * (math.sin(rad(70)) - math.sin(rad(60)))
    tri_width = lambda lat: 20 - lat  # degrees of longitude at latitude lat
    area_t = quad(lambda lat: tri_width(lat) * math.cos(rad(lat)) * rad(1), 0, 20)[0]
    total = area_a + area_b + area_t
    in_a = (lons <= 10) & (lats <= 10)
    in_b = (lons <= 10) & (lats >= 60)
    in_t = lons >= 100
    assert _binomial_ok(in_a.mean(), area_a / total, n)
    assert _binomial_ok(in_b.mean(), area_b / total, n)
    # inside the triangle, the share north of 10 N
    north = quad(lambda lat: tri_width(lat) * math.cos(rad(lat)) * rad(1), 10, 20)[0] / area_t
    assert _binomial_ok((lats[in_t] > 10).mean(), north, int(in_t.sum()))
    # uniform in degrees would put half of box A's points north of 5 N; by
    # area it is (sin 10 - sin 5) / sin 10 = 0.498: too close to tell, so test box B,
    # where by area 0.4806 lie north of 65 N (uniform in degrees: 0.5)
    share_b = (lats[in_b] > 65).mean()
    assert _binomial_ok(share_b, (math.sin(rad(70)) - math.sin(rad(65))) / (math.sin(rad(70)) - math.sin(rad(60))),
                        int(in_b.sum()))


def test_sampling_is_deterministic():
    a = R.sample_points(R.resolve("continent:Africa", STATION), 300, seed=5)
    b = R.sample_points(R.resolve("continent:Africa", STATION), 300, seed=5)
    assert np.array_equal(a[0], b[0]) and np.array_equal(a[1], b[1])


def test_fiji_bearing_arc_is_narrow_across_antimeridian():
    # Fiji straddles 180 deg: from a station far away its bearings span a few
    # degrees, not 360 (common practice: a distant island group is one heading).
    lons, lats = R.sample_points(R.resolve("country:FJI", STATION), 500)
    start, end, _ = bearing_arc(goal_paths(STATION, lons, lats)[0])
    assert (end - start) % 360 < 10
    assert (lons > 0).any() and (lons < 0).any()


@pytest.mark.parametrize("text, radius", [("circle:89,0,500", 500), ("circle:90,0,500", 500),
                                          ("circle:-89.5,30,2000", 2000), ("circle:0,0,15000", 15000),
                                          ("circle:45,179.9,3000", 3000)])
def test_circle_area_near_poles_and_antimeridian(text, radius):
    # The polygon drawn for a circle against the spherical cap formula
    # (computed). The circle is a geodesic one on WGS84, so it is not quite a
    # spherical cap: near a pole the meridian's radius of curvature is
    # 6399.6 km, and the circle covers (6371 / 6399.6)^2 = 0.991 of the cap
    # (computed); hence 1.2 %.
    assert _area_mkm2(text) == pytest.approx(cap_mkm2(radius), rel=0.012)


def _cap_share(r_inner_km, r_outer_km, r=6371.0):
    # share of a spherical cap of radius r_outer lying within r_inner (computed)
    return (1 - math.cos(r_inner_km / r)) / (1 - math.cos(r_outer_km / r))


def test_circle_samples_fill_the_cap_around_a_pole():
    # Around the pole: the share within half the radius follows the cap
    # formula (computed; the ellipsoid changes it by well under 1 %), and every
    # longitude is filled (the sampler must not lose the part across 180 deg).
    n = 3000
    area = R.resolve("circle:89,0,500", STATION)
    lons, lats = R.sample_points(area, n, seed=2)
    geod = Geod(ellps="WGS84")
    _, _, d = geod.inv(np.zeros_like(lons), np.full_like(lats, 89.0), lons, lats)
    assert _binomial_ok(np.mean(d < 250e3), _cap_share(250, 500), n)
    counts, _ = np.histogram(lons, bins=8, range=(-180, 180))
    assert counts.min() > 0.5 * counts.mean()
    # and the drawn polygon holds (almost) all the exact sample points
    assert shapely.contains_xy(area.geometry, lons, lats).mean() > 0.99


def test_region_holding_the_station_and_the_antipode():
    here = Station("s", 44.0, -2.0, "")
    n = 2000
    lons, lats = R.sample_points(R.resolve("circle:44,-2,800", here), n)
    _, d = goal_paths(here, lons, lats)
    assert d.min() < 100
    assert _binomial_ok(np.mean(d < 400), _cap_share(400, 800), n)
    # the antipode of (44, -2) is (-44, 178): a circle round it
    lons, lats = R.sample_points(R.resolve("circle:-44,178,300", here), n)
    b, d = goal_paths(here, lons, lats)
    _, _, anti_m = Geod(ellps="WGS84").inv(-2.0, 44.0, 178.0, -44.0)
    assert _binomial_ok(np.mean(d > anti_m / 1000 - 150), _cap_share(150, 300), n)
    start, end, _ = bearing_arc(b)
    assert (end - start) % 360 > 300  # near the antipode every heading leads there


def test_sector_points_spread_by_area():
    # A sector's area grows with its bearing span and, in distance, as
    # cos(d_min / R) - cos(d / R) (spherical geometry, computed): check both
    # shares of the sample.
    n = 3000
    area = R.resolve("sector:300,30,1000,8000", STATION)
    lons, lats = R.sample_points(area, n)
    b, d = goal_paths(STATION, lons, lats)
    assert _binomial_ok(np.mean(np.mod(b - 300, 360) < 45), 0.5, n)
    r = 6371.0
    share = (math.cos(1000 / r) - math.cos(4000 / r)) / (math.cos(1000 / r) - math.cos(8000 / r))
    assert _binomial_ok(np.mean(d < 4000), share, n, sds=5)


def test_sector_area_is_its_share_of_the_sphere():
    # 90 deg of bearing out to the antipode is a quarter of the Earth
    # (spherical geometry); 510.1 Mkm2 is the sphere's area (4 pi R^2).
    assert _area_mkm2("sector:300,30,0,20015") == pytest.approx(510.07 / 4, rel=0.02)


def _continent_of_point(lon, lat):
    hits = [c for c in R.CONTINENTS if shapely.contains_xy(R.continent_geometry(c), lon, lat)]
    return hits


def test_continents_by_where_parts_lie():
    # Where places lie (common practice): Cayenne, French Guiana is in South
    # America although France is labelled Europe; Novosibirsk (83 E) is Asia;
    # Moscow (37.6 E) is Europe; Jayapura (Indonesian New Guinea) is Oceania;
    # Longyearbyen (Svalbard) stays Europe.
    assert _continent_of_point(-52.3, 4.9) == ["South America"]
    assert _continent_of_point(82.9, 55.0) == ["Asia"]
    assert _continent_of_point(37.6, 55.75) == ["Europe"]
    assert _continent_of_point(140.7, -2.6) == ["Oceania"]
    assert _continent_of_point(15.6, 78.2) == ["Europe"]


def test_continents_do_not_overlap_and_cover_the_countries():
    total = sum(R._area_m2(R.continent_geometry(c)) for c in R.CONTINENTS)
    land = R._area_m2(shapely.union_all(list(R.countries().geometry)))
    assert total == pytest.approx(land, rel=1e-3)


def test_clip_box_across_antimeridian():
    area = R.resolve("circle:0,180,2000", STATION, clip=(170, -90, -170, 90))
    lons, _ = R.sample_points(area, 300)
    assert np.all(np.abs(lons) >= 170 - 1e-9)


@pytest.mark.parametrize("text, fragment", [
    ("country:Frnace", "France"), ("continent:Eurpoe", "Europe"), ("planet:Mars", "region kind"),
    ("circle:95,0,100", "off the globe"), ("circle:10,10,-5", "radius"), ("sector:0,90,500,100", "MIN_KM"),
    ("circle:1,2", "three numbers"), ("Europe", "KIND:ARGS")])
def test_region_errors_say_what_is_expected(text, fragment):
    with pytest.raises(R.RegionError, match=fragment):
        R.parse_region(text)


def test_country_by_code_or_name_any_case():
    a = R.resolve("country:fra", STATION).geometry
    b = R.resolve("country:France", STATION).geometry
    c = R.resolve("country:NOR", STATION).geometry  # ISO_A2 is -99 in this file
    assert a.equals(b) and not c.is_empty


def test_file_region(tmp_path):
    import geopandas as gpd
    from shapely.geometry import box

    p = tmp_path / "club.geojson"
    gpd.GeoDataFrame({"name": ["club"]}, geometry=[box(10, 40, 20, 50)], crs="EPSG:4326").to_file(p)
    area = R.resolve(f"file:{p.name}", STATION, base_dir=tmp_path)
    lons, lats = R.sample_points(area, 100)
    assert lons.min() >= 10 and lons.max() <= 20 and lats.min() >= 40 and lats.max() <= 50


@settings(max_examples=25, deadline=None)
@given(lat=st.floats(-89, 89), lon=st.floats(-179.9, 179.9), radius=st.floats(50, 9000))
@example(lat=-47.0, lon=14.0, radius=50.0)  # lost a wedge of its outline (issue 16)
def test_any_circle_resolves_and_samples(lat, lon, radius):
    # property: any circle on the globe gives a valid polygon and the asked
    # number of valid points, and its drawn polygon holds nearly all of them
    area = R.resolve(f"circle:{lat},{lon},{radius}", STATION)
    lons, lats = R.sample_points(area, 200)
    assert area.geometry.is_valid
    assert lons.size == 200 and np.all(np.abs(lons) <= 180) and np.all(np.abs(lats) <= 90)
    assert shapely.contains_xy(area.geometry, lons, lats).mean() > 0.95
