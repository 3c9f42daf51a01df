"""Goal regions on the real Earth, and points sampled uniformly by area.

Region strings (the ``region`` and ``avoid`` keys of a site file):

- ``country:NAME`` -- a Natural Earth admin-0 country by name (``NAME``,
  ``NAME_LONG`` or ``ADMIN``, case-insensitive) or ISO 3166 alpha-3 code.
- ``continent:NAME`` -- Europe, Asia, Africa, North America, South America,
  Oceania or Antarctica, built from where each polygon part lies (below).
- ``circle:LAT,LON,RADIUS_KM`` -- a geodesic circle.
- ``sector:FROM_DEG,TO_DEG,MIN_KM,MAX_KM`` -- bearings clockwise from FROM to
  TO and distances between MIN and MAX, both from the station.
- ``file:PATH`` -- every polygon of any vector file geopandas reads
  (relative paths are taken from the site file's folder).

Countries are the Natural Earth 1:10m admin-0 features (territories that
Natural Earth keeps apart, such as Bermuda or Guam, are countries of their
own), found by name, ISO alpha-3 code or a common alternative name
(``ALIASES``: ``England`` means the United Kingdom, with a note saying so).

Continents are built part by part: every polygon part is assigned by where
it lies (rules in :mod:`lobeplan.geo.continents`; the labels ship with the
data). Russia is split at 60 deg E: the part of it from 0 to 60 deg E is
Europe, the rest Asia. Egypt (Sinai), Turkey (Anatolia and Thrace) and
Kazakhstan are not cut: each part near its country's home part follows
the country's label.
"""
from __future__ import annotations

import difflib
import functools
import os
import re
from dataclasses import dataclass
from importlib import resources
from pathlib import Path

import numpy as np
import shapely
import shapely.affinity
from shapely.geometry import MultiPolygon, Polygon, box
from shapely.geometry.base import BaseGeometry

from .paths import GEOD
from .station import Station

__all__ = ["CONTINENTS", "ALIASES", "RegionError", "Region", "Disc", "GoalArea", "parse_region", "resolve",
           "sample_points", "countries", "basemap_geometries", "country_lookup", "country_suggestions",
           "part_continents", "continent_geometry", "CountryTable",
           "region_area", "region_points", "goal_area", "goal_points"]

CONTINENTS = ("Africa", "Antarctica", "Asia", "Europe", "North America", "Oceania", "South America")
_KINDS = ("country", "continent", "circle", "sector", "file")
_RUSSIA_SPLIT_LON_DEG = 60.0
# smallest circle radius or sector depth: below 1 m the lon/lat outline
# (vertices 1e-11 deg apart) can no longer be drawn
_MIN_SIZE_KM = 0.001


class RegionError(ValueError):
    """A region string cannot be resolved; ``str()`` says why and what is expected."""


@dataclass(frozen=True, slots=True)
class Region:
    """A parsed region string: its kind and its arguments (not yet resolved)."""

    kind: str
    text: str
    name: str = ""                      # country / continent / file
    numbers: tuple[float, ...] = ()     # circle / sector
    note: str = ""                      # what an alternative name was taken to mean


# --------------------------------------------------------------------------
# Shipped countries and the continents built from them


@dataclass(frozen=True)
class CountryTable:
    """The country table: one text array per attribute, one geometry per row.

    ``table["NAME"]`` is an array of str; ``table.geometry`` an array of
    shapely (Multi)Polygons in lon/lat degrees.
    """

    columns: dict
    geometry: np.ndarray
    continents: dict            # continent name -> one valid (Multi)Polygon

    def __getitem__(self, column: str) -> np.ndarray:
        return self.columns[column]

    def __len__(self) -> int:
        return len(self.geometry)


@functools.lru_cache(maxsize=1)
def countries() -> CountryTable:
    """The shipped Natural Earth 1:10m admin-0 countries.

    Columns: ``NAME``, ``NAME_LONG``, ``ADMIN``, ``ADM0_A3``, ``ISO_A3_EH``,
    ``SOVEREIGNT``, ``TYPE``, ``CONTINENT`` (Natural Earth's label) and
    ``PART_CONTINENTS`` (the continent of each polygon part, ``;``-separated,
    see :mod:`lobeplan.geo.continents`); ``continents`` holds each
    continent merged from those parts (Russia split at 60 deg E). Territories that Natural Earth
    keeps as features of their own (Bermuda, Guam, ...) are rows of their own.
    The file (made by ``tools/make_countries.py``) holds the features' WKB
    back to back with their offsets, and the attributes as text arrays.
    """
    ref = resources.files("lobeplan.data").joinpath("countries_10m.zip")

    def wkb(blob: np.ndarray, offsets: np.ndarray) -> np.ndarray:
        raw = blob.tobytes()
        return shapely.from_wkb([raw[i:j] for i, j in zip(offsets[:-1], offsets[1:])])

    with resources.as_file(ref) as path, np.load(path, allow_pickle=False) as z:
        geometry = wkb(z["wkb"], z["offsets"])
        continents = dict(zip((str(c) for c in z["continent_names"]),
                              wkb(z["continent_wkb"], z["continent_offsets"])))
        columns = {k: z[k] for k in z.files if not k.startswith("continent_") and k not in ("wkb", "offsets")}
    return CountryTable(columns, geometry, continents)


@functools.lru_cache(maxsize=1)
def basemap_geometries() -> tuple[BaseGeometry, ...]:
    """Land outlines for the map background (Natural Earth 1:110m, a light file).

    Small territories missing from it are drawn as goals or markers.
    """
    import geopandas as gpd

    ref = resources.files("lobeplan.data").joinpath("countries_110m.geojson")
    with resources.as_file(ref) as path:
        return tuple(g for g in gpd.read_file(path).geometry if g is not None and not g.is_empty)


# Names people use that are not Natural Earth admin-0 names: alias ->
# (ADM0_A3, note). A note says what the name is taken to mean.
ALIASES: dict[str, tuple[str, str]] = {
    "england": ("GBR", "England is part of the United Kingdom: the whole United Kingdom is used"),
    "scotland": ("GBR", "Scotland is part of the United Kingdom: the whole United Kingdom is used"),
    "wales": ("GBR", "Wales is part of the United Kingdom: the whole United Kingdom is used"),
    "northern ireland": ("GBR", "Northern Ireland is part of the United Kingdom: the whole United Kingdom is used"),
    "great britain": ("GBR", "taken as the United Kingdom"),
    "britain": ("GBR", "taken as the United Kingdom"),
    "uk": ("GBR", ""),
    "usa": ("USA", ""),
    "us": ("USA", ""),
    "america": ("USA", "taken as the United States of America"),
    "alaska": ("USA", "Alaska is part of the United States: the whole United States is used "
               "(clip it, e.g. clip = [-180, 50, -129, 72])"),
    "hawaii": ("USA", "Hawaii is part of the United States: the whole United States is used "
               "(clip it, e.g. clip = [-161, 18, -154, 23])"),
    "holland": ("NLD", "taken as the Netherlands"),
    "burma": ("MMR", ""),
    "ivory coast": ("CIV", ""),
    "czech republic": ("CZE", ""),
    "swaziland": ("SWZ", ""),
    "east timor": ("TLS", ""),
    "cape verde": ("CPV", ""),
    "vatican": ("VAT", ""),
    "south korea": ("KOR", ""),
    "korea": ("KOR", "taken as South Korea (North Korea is 'Dem. Rep. Korea' or PRK)"),
    "north korea": ("PRK", ""),
    "dr congo": ("COD", ""),
    "drc": ("COD", ""),
    "zaire": ("COD", ""),
    "congo brazzaville": ("COG", ""),
    "russian federation": ("RUS", ""),
    "corsica": ("FRA", "Corsica is part of France: the whole of France (with its overseas regions) is used"),
    "sicily": ("ITA", "Sicily is part of Italy: the whole of Italy is used"),
    "sardinia": ("ITA", "Sardinia is part of Italy: the whole of Italy is used"),
    "crete": ("GRC", "Crete is part of Greece: the whole of Greece is used"),
    "tasmania": ("AUS", "Tasmania is part of Australia: the whole of Australia is used"),
    "canary islands": ("ESP", "the Canary Islands are part of Spain: the whole of Spain is used"),
    "balearic islands": ("ESP", "the Balearic Islands are part of Spain: the whole of Spain is used"),
    "azores": ("PRT", "the Azores are part of Portugal: the whole of Portugal is used"),
    "madeira": ("PRT", "Madeira is part of Portugal: the whole of Portugal is used"),
    "svalbard": ("NOR", "Svalbard is part of Norway: the whole of Norway is used"),
    "galapagos": ("ECU", "the Galapagos are part of Ecuador: the whole of Ecuador is used"),
    "easter island": ("CHL", "Easter Island is part of Chile: the whole of Chile is used"),
    "reunion": ("FRA", "Reunion is part of France: the whole of France (with its overseas regions) is used"),
    "martinique": ("FRA", "Martinique is part of France: the whole of France (with its overseas regions) is used"),
    "guadeloupe": ("FRA", "Guadeloupe is part of France: the whole of France (with its overseas regions) is used"),
    "french guiana": ("FRA", "French Guiana is part of France: the whole of France (with its overseas regions) is used"),
    "sao tome": ("STP", ""),
    "east pakistan": ("BGD", ""),
}


def _norm(text: str) -> str:
    """Lower case, accents and punctuation dropped, 'saint'/'st' made one."""
    import unicodedata

    t = unicodedata.normalize("NFKD", str(text)).encode("ascii", "ignore").decode().lower()
    t = re.sub(r"&", " and ", t)
    t = re.sub(r"[^a-z0-9]+", " ", t).strip()
    t = re.sub(r"^the ", "", t)
    return re.sub(r"\bsaint\b", "st", t)


@functools.lru_cache(maxsize=1)
def _country_index() -> dict[str, int]:
    """Normalised name, code or alias -> row of the country table."""
    table = countries()
    index: dict[str, int] = {}
    for col in ("ADM0_A3", "ISO_A3_EH", "NAME", "NAME_LONG", "ADMIN"):
        for row, value in enumerate(table[col]):
            key = _norm(value)
            if key and key != "99":
                index.setdefault(key, row)
    by_code = {str(c): r for r, c in enumerate(table["ADM0_A3"])}
    for alias, (code, _) in ALIASES.items():
        index.setdefault(_norm(alias), by_code[code])
    return index


def country_lookup(name: str) -> tuple[int, str] | None:
    """Row of the country table a name, code or alias means, and a note (or "")."""
    key = _norm(name)
    row = _country_index().get(key)
    if row is None:
        return None
    own = {_norm(countries()[c][row]) for c in ("ADM0_A3", "ISO_A3_EH", "NAME", "NAME_LONG", "ADMIN")}
    note = "" if key in own else next((n for a, (_, n) in ALIASES.items() if _norm(a) == key), "")
    return row, note


def country_suggestions(name: str, n: int = 3) -> list[str]:
    """The nearest real country names to an unknown one (display names)."""
    table = countries()
    names = {}
    for col in ("NAME", "ADMIN"):
        for value in table[col]:
            names.setdefault(_norm(value), str(value))
    for alias in ALIASES:
        names.setdefault(_norm(alias), alias.title())
    key = _norm(name)
    # a name that holds the text as a whole word first ("korea" -> both Koreas)
    hits = [v for k, v in names.items() if key and re.search(rf"\b{re.escape(key)}\b", k)]
    close = difflib.get_close_matches(key, list(names), n=n, cutoff=0.6)
    out = list(dict.fromkeys(hits + [names[c] for c in close]))
    return out[:n]


def _parts(geom: BaseGeometry) -> list[Polygon]:
    if geom is None or geom.is_empty:
        return []
    if isinstance(geom, Polygon):
        return [geom]
    return [g for g in getattr(geom, "geoms", []) if isinstance(g, Polygon) and not g.is_empty]


_SPHERE_RADIUS_M = 6371008.8  # IUGG mean radius: areas only share points out


def _area_m2(geom: BaseGeometry) -> float:
    """Area on the sphere of a polygon whose edges are straight in lon/lat.

    Region polygons are lon/lat shapes (``contains_xy`` tests them so), so
    their area is that of the shape in the cylindrical equal-area plane
    (lon in radians, sin lat), after densifying edges to 0.5 deg. A geodesic
    area would be wrong for long edges such as a cut along a pole.
    """
    dense = shapely.segmentize(geom, 0.5)
    flat = shapely.transform(dense, lambda xy: np.column_stack(
        [np.radians(xy[:, 0]), np.sin(np.radians(np.clip(xy[:, 1], -90.0, 90.0)))]))
    return float(flat.area) * _SPHERE_RADIUS_M**2


def _ring_areas(rings: np.ndarray) -> np.ndarray:
    """Unsigned area (unit sphere, sr) of lon/lat rings whose edges are straight in lon/lat.

    Green's theorem in the equal-area plane (lon in radians, sin lat): each
    edge adds the integral of sin(lat) dlon along it, which for latitude
    linear in longitude is dlon (cos lat1 - cos lat2) / (lat2 - lat1)
    (dlon sin lat where the edge runs along a parallel). Exact, and no
    densifying needed.
    """
    xy, idx = shapely.get_coordinates(rings, return_index=True)
    if xy.size == 0:
        return np.zeros(len(rings))
    lon, lat = np.radians(xy[:, 0]), np.radians(np.clip(xy[:, 1], -90.0, 90.0))
    same = idx[1:] == idx[:-1]
    l1, l2, p1, p2 = lon[:-1][same], lon[1:][same], lat[:-1][same], lat[1:][same]
    dp = p2 - p1
    flat = np.abs(dp) < 1e-12
    f = np.where(flat, np.sin(p1), (np.cos(p1) - np.cos(p2)) / np.where(flat, 1.0, dp))
    return np.abs(np.bincount(idx[1:][same], weights=(l2 - l1) * f, minlength=len(rings)))


def _areas_m2(parts) -> np.ndarray:
    """Area on the sphere of many lon/lat polygons at once (holes taken out), m2."""
    arr = np.asarray(list(parts), dtype=object)
    if arr.size == 0:
        return np.zeros(0)
    out = _ring_areas(shapely.get_exterior_ring(arr))
    n_holes = shapely.get_num_interior_rings(arr)
    for i in np.flatnonzero(n_holes):
        out[i] -= _ring_areas(np.asarray([shapely.get_interior_ring(arr[i], k) for k in range(n_holes[i])])).sum()
    return out * _SPHERE_RADIUS_M**2


@functools.lru_cache(maxsize=1)
def part_continents() -> list[list[str]]:
    """Continent of every polygon part of every country row (Russia by 60 deg E)."""
    table = countries()
    out = []
    for code, geom, labels in zip(table["ADM0_A3"], table.geometry, table["PART_CONTINENTS"]):
        if str(code) == "RUS":
            out.append(["Europe" if 0.0 <= p.representative_point().x < _RUSSIA_SPLIT_LON_DEG else "Asia"
                        for p in shapely.get_parts(geom)])
        else:
            out.append(str(labels).split(";"))
    return out


@functools.lru_cache(maxsize=512)
def _country_geometry(code: str) -> MultiPolygon:
    row = _country_index()[_norm(code)]
    return MultiPolygon(_parts(countries().geometry[row]))


@functools.lru_cache(maxsize=8)
def continent_geometry(name: str) -> MultiPolygon:
    key = _continent_key(name)
    if key is None:
        raise RegionError(_unknown("continent", name, CONTINENTS))
    return MultiPolygon(_parts(countries().continents[key]))


def _continent_key(name: str) -> str | None:
    norm = re.sub(r"[\s_\-]+", " ", name.strip().lower())
    for c in CONTINENTS:
        if c.lower() == norm:
            return c
    return None


def _unknown(kind: str, name: str, choices) -> str:
    close = difflib.get_close_matches(name, list(choices), n=3, cutoff=0.6)
    if not close:
        lowered = {str(c).lower(): str(c) for c in choices}
        close = [lowered[c] for c in difflib.get_close_matches(name.lower(), list(lowered), n=3, cutoff=0.6)]
    hint = f"; did you mean {' or '.join(repr(c) for c in close)}?" if close else ""
    return f"unknown {kind} {name!r}{hint}"


# --------------------------------------------------------------------------
# Parsing


def parse_region(text: str) -> Region:
    """Parse a region string; names are checked, files are not yet read."""
    if not isinstance(text, str) or ":" not in text:
        raise RegionError(f"{text!r} is not a region; expected KIND:ARGS with KIND one of "
                          + ", ".join(_KINDS))
    kind, _, arg = text.partition(":")
    kind = kind.strip().lower()
    arg = arg.strip()
    if kind not in _KINDS:
        raise RegionError(_unknown("region kind", kind, _KINDS) + f" (in {text!r})")
    if kind == "country":
        found = country_lookup(arg)
        if found is None:
            close = country_suggestions(arg)
            hint = f"; did you mean {' or '.join(repr(c) for c in close)}?" if close else \
                "; `lobeplan regions TEXT` lists the names"
            raise RegionError(f"unknown country {arg!r}{hint}")
        row, note = found
        return Region(kind, text, name=str(countries()["ADM0_A3"][row]), note=note)
    if kind == "continent":
        key = _continent_key(arg)
        if key is None:
            raise RegionError(_unknown("continent", arg, CONTINENTS))
        return Region(kind, text, name=key)
    if kind == "file":
        if not arg:
            raise RegionError("file: needs a path, e.g. file:regions/club.geojson")
        return Region(kind, text, name=arg)
    try:
        numbers = tuple(float(v) for v in arg.split(","))
    except ValueError:
        numbers = ()
    if kind == "circle":
        if len(numbers) != 3 or not all(np.isfinite(numbers)):
            raise RegionError(f"{text!r}: expected circle:LAT,LON,RADIUS_KM (three numbers)")
        lat, lon, radius = numbers
        if not -90.0 <= lat <= 90.0 or not -180.0 <= lon <= 180.0:
            raise RegionError(f"{text!r}: the centre is off the globe (latitude -90..90, longitude -180..180)")
        if not _MIN_SIZE_KM <= radius < 20000.0:
            raise RegionError(f"{text!r}: the radius must be more than 0 (at least {_MIN_SIZE_KM:g} km) "
                              "and less than 20000 km")
        return Region(kind, text, numbers=numbers)
    if len(numbers) != 4 or not all(np.isfinite(numbers)):
        raise RegionError(f"{text!r}: expected sector:FROM_DEG,TO_DEG,MIN_KM,MAX_KM (four numbers)")
    a, b, dmin, dmax = numbers
    if not 0.0 <= dmin < dmax <= 20038.0:
        raise RegionError(f"{text!r}: distances must satisfy 0 <= MIN_KM < MAX_KM <= 20038")
    if dmax - dmin < _MIN_SIZE_KM:
        raise RegionError(f"{text!r}: MAX_KM - MIN_KM must be at least {_MIN_SIZE_KM:g} km")
    if a == b:
        raise RegionError(f"{text!r}: FROM_DEG and TO_DEG are both {a:g}, which names no span of bearings; "
                          "give e.g. 80,100 for 20 deg, or 0,360 for every bearing")
    return Region(kind, text, numbers=numbers)


# --------------------------------------------------------------------------
# Geometry


def _wrap_to_lon_range(poly: Polygon) -> list[Polygon]:
    """Split a polygon whose longitudes run past +-180 into parts inside it."""
    out = []
    for shift in (-360.0, 0.0, 360.0):
        window = box(-180.0 - shift, -90.0, 180.0 - shift, 90.0)
        piece = poly.intersection(window)
        if piece.is_empty:
            continue
        piece = shapely.affinity.translate(piece, xoff=shift)
        out.extend(_parts(piece))
    return out


def _pole_longitudes(lons: np.ndarray, lats: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Replace each run of points at a pole (longitude undefined) by two points.

    The run becomes the pole at the longitude of the point before it and the
    pole at the longitude of the point after it, so that the ring runs along
    the pole line from one to the other.
    """
    at_pole = np.abs(lats) > 90.0 - 1e-9
    if not at_pole.any() or at_pole.all():
        return lons, lats
    n = lons.size
    start = int(np.flatnonzero(~at_pole)[0])  # walk the closed ring from a normal point
    order = np.roll(np.arange(n), -start)
    out_lon: list[float] = []
    out_lat: list[float] = []
    k = 0
    while k < n:
        i = order[k]
        if not at_pole[i]:
            out_lon.append(lons[i])
            out_lat.append(lats[i])
            k += 1
            continue
        pole = 90.0 if lats[i] > 0 else -90.0
        run_end = k
        while run_end + 1 < n and at_pole[order[run_end + 1]]:
            run_end += 1
        after = order[(run_end + 1) % n]
        out_lon += [out_lon[-1], lons[after]]
        out_lat += [pole, pole]
        k = run_end + 1
    return np.asarray(out_lon), np.asarray(out_lat)


def _drop_repeats(lons: np.ndarray, lats: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Remove consecutive repeats of a ring's points (a closed ring stays closed).

    A cell that starts at the centre of a circle has all its inner-edge
    points at the centre, equal up to rounding (1e-14 deg); such a ring
    touches itself, and ``buffer(0)`` may then drop the whole cell, which
    cut a wedge out of ``circle:-47,14,50``.
    """
    keep = np.ones(lons.size, dtype=bool)
    step = np.hypot(np.diff(lons), np.diff(lats))
    keep[1:] = step > 1e-11
    return lons[keep], lats[keep]


def _cell_polygon(lons: np.ndarray, lats: np.ndarray) -> list[Polygon]:
    """A small closed ring on the sphere (lon/lat in degrees) as lon/lat polygons.

    Longitudes are unwrapped along the ring; a ring that winds once around a
    pole is closed through that pole; the result is cut at +-180 deg.
    """
    lons, lats = _drop_repeats(np.asarray(lons, dtype=float), np.asarray(lats, dtype=float))
    if lons.size < 4:  # a closed ring needs three corners and the repeat of the first
        return []
    lons, lats = _pole_longitudes(lons, lats)
    lon_u = np.degrees(np.unwrap(np.radians(lons)))
    winding = lon_u[-1] - lon_u[0]  # the ring is closed: 0 or +-360 deg
    if abs(winding) > 180.0:  # encircles a pole: close the ring through it
        pole = 90.0 if np.mean(lats) > 0 else -90.0
        ring = np.column_stack([np.append(lon_u, [lon_u[-1], lon_u[0]]), np.append(lats, [pole, pole])])
        # whole turns only: a shift by any other amount would rotate the shape
        start = min(lon_u[0], lon_u[-1])
        poly = shapely.affinity.translate(Polygon(ring).buffer(0), xoff=-360.0 * np.floor((start + 180.0) / 360.0))
    else:
        poly = Polygon(np.column_stack([lon_u, lats]))
        if not poly.is_valid:
            poly = poly.buffer(0)
    parts = []
    for p in _parts(poly):
        west, _, east, _ = p.bounds
        parts.extend([p] if -180.0 <= west and east <= 180.0 else _wrap_to_lon_range(p))
    return parts


def _polar_region(lon0: float, lat0: float, az_from: float, az_to: float,
                  dmin_km: float, dmax_km: float) -> MultiPolygon:
    """Points at bearing az_from..az_to (clockwise) and distance dmin..dmax of a centre.

    Built as a union of small geodesic cells, so that any size works: cells
    around a pole are closed through it, cells across +-180 deg are cut.
    """
    span = (az_to - az_from) % 360.0
    if span == 0.0:
        span = 360.0
    n_az = max(4, int(np.ceil(span / 10.0)))
    n_d = max(1, int(np.ceil((dmax_km - dmin_km) / 2000.0)))
    az_edges = az_from + np.linspace(0.0, span, n_az + 1)
    d_edges = np.linspace(dmin_km, dmax_km, n_d + 1)
    k = 24  # points per cell edge, so cell edges follow the geodesics
    t = np.linspace(0.0, 1.0, k)
    # every cell's ring (inner arc, outer radial, outer arc back, inner radial
    # back) in one geodesic call: the per-call overhead dominated large regions
    i, j = np.meshgrid(np.arange(n_az), np.arange(n_d), indexing="ij")
    a0, a1 = az_edges[i.ravel()][:, None], az_edges[i.ravel() + 1][:, None]
    d0, d1 = d_edges[j.ravel()][:, None], d_edges[j.ravel() + 1][:, None]
    a = a0 + (a1 - a0) * t
    d = d0 + (d1 - d0) * t
    ones = np.ones_like(t)
    ring_az = np.hstack([a, a1 * ones, a[:, ::-1], a0 * ones])
    ring_d = np.hstack([d0 * ones, d, d1 * ones, d[:, ::-1]])
    lons, lats, _ = GEOD.fwd(np.full(ring_az.size, lon0), np.full(ring_az.size, lat0),
                             ring_az.ravel(), ring_d.ravel() * 1000.0)
    lons = np.asarray(lons).reshape(ring_az.shape)
    lats = np.asarray(lats).reshape(ring_az.shape)
    # the centre itself, exactly: the direct problem at zero distance returns it
    # with round-off that differs by azimuth, which left a notch of 1e-14 deg
    # between neighbouring cells' corners there
    at_centre = ring_d == 0.0
    lons[at_centre], lats[at_centre] = lon0, lat0
    cells = []
    for row in range(ring_az.shape[0]):
        cells.extend(_cell_polygon(lons[row], lats[row]))
    merged = shapely.union_all([c for c in cells if c.is_valid and c.area > 0]).buffer(0)
    # where cells were cut at +-180 deg or closed through a pole, the union
    # can leave sliver holes along the seams; a real hole (an annulus) is
    # far larger than a thousandth of its polygon
    clean = []
    for part in _parts(merged):
        holes = [h for h in part.interiors if Polygon(h).area > 1e-3 * Polygon(part.exterior).area]
        clean.append(Polygon(part.exterior, holes))
    # a speck that sat in a dropped sliver now overlaps its host: merge again
    return MultiPolygon(_parts(shapely.union_all(clean)))


def _read_file(name: str, base_dir: str) -> MultiPolygon:
    """Every polygon of a vector file, as valid lon/lat polygons in -180..180.

    Refused with a clear message: a folder, a device or pipe, a file that is
    not a vector file, one with no polygons, coordinates off the globe, and
    coordinates in metres (or any projected unit) without a CRS. Repaired:
    self-intersecting polygons (``shapely.make_valid``), and rings that cross
    the antimeridian without being split (RFC 7946 sec. 3.1.9 asks writers
    to split them; one that is not is taken to cross where two vertices are
    more than 180 deg of longitude apart, and is split there).
    """
    import stat

    import errno

    if "\x00" in name:  # the OS cannot take it (Python raises ValueError, not OSError)
        raise RegionError(f"file:{name!r}: holds a NUL character; expected a file path")
    path = Path(name)
    if not path.is_absolute():
        path = Path(base_dir) / path
    try:
        mode = path.stat().st_mode
    except OSError as exc:
        if exc.errno == errno.ENAMETOOLONG:
            raise RegionError(f"file:{name[:60]}...: the path is longer than the file system allows "
                              "(at most 255 bytes a folder or file name); expected a shorter path") from None
        raise RegionError(f"file:{name}: no such file ({path})") from None
    if stat.S_ISDIR(mode):
        raise RegionError(f"file:{name}: is a folder, not a file ({path}); expected a vector file such as GeoJSON")
    if not stat.S_ISREG(mode):
        raise RegionError(f"file:{name}: is not a regular file (a device or a pipe: {path}); "
                          "expected a vector file such as GeoJSON")
    import geopandas as gpd

    try:
        frame = gpd.read_file(path)
    except Exception as exc:  # pyogrio raises several kinds
        raise RegionError(f"file:{name}: cannot be read as a vector file ({type(exc).__name__})") from None
    if frame.crs is not None and not frame.crs.equals("EPSG:4326"):
        try:
            frame = frame.to_crs("EPSG:4326")
        except Exception as exc:
            raise RegionError(f"file:{name}: its CRS cannot be turned into longitude/latitude "
                              f"({type(exc).__name__})") from None
    polys = [p for g in frame.geometry if g is not None for p in _parts(g)]
    if not polys:
        raise RegionError(f"file:{name}: holds no polygons")
    xy = np.concatenate([shapely.get_coordinates(p) for p in polys])
    if not np.all(np.isfinite(xy)):
        raise RegionError(f"file:{name}: has coordinates that are not finite numbers")
    big = float(np.max(np.abs(xy)))
    if big > 1000.0:  # GeoJSON without a CRS is read as EPSG:4326 (RFC 7946)
        raise RegionError(f"file:{name}: coordinates reach {big:,.0f}, which looks like metres (a projected "
                          "CRS), and the file names no projected CRS; expected longitude/latitude degrees "
                          "(EPSG:4326), or a file that names its CRS")
    lat_off = float(np.max(np.abs(xy[:, 1])))
    if lat_off > 90.0:
        raise RegionError(f"file:{name}: latitude {lat_off:g} is off the globe; expected -90 to 90 degrees")
    if xy[:, 0].min() < -360.0 or xy[:, 0].max() > 360.0:
        raise RegionError(f"file:{name}: longitude {big:g} is off the globe; expected -180 to 180 degrees")
    out: list[Polygon] = []
    for k, poly in enumerate(polys):
        poly = _across_antimeridian(poly, name, k + 1)
        fixed = [q for q in _parts(shapely.make_valid(poly)) if q.area > 0] if not poly.is_valid else [poly]
        if not fixed:
            raise RegionError(f"file:{name}: polygon {k + 1} is self-intersecting and has no area left once "
                              "repaired; expected a simple ring")
        for q in fixed:
            out.extend(_wrap_to_lon_range(q) if q.bounds[0] < -180.0 or q.bounds[2] > 180.0 else [q])
    return MultiPolygon(out)


def _across_antimeridian(poly: Polygon, name: str, k: int) -> Polygon:
    """Unwrap the rings of a polygon that cross +-180 deg without being split."""
    def jumps(ring) -> bool:
        x = np.asarray(ring.coords)[:, 0]
        return bool(np.any(np.abs(np.diff(x)) > 180.0))

    if not any(jumps(r) for r in [poly.exterior, *poly.interiors]):
        return poly

    def unwrap(ring, ref: float | None = None) -> np.ndarray:
        xy = np.asarray(ring.coords, dtype=float)
        x = np.degrees(np.unwrap(np.radians(xy[:, 0])))
        if abs(x[-1] - x[0]) > 1e-6:
            raise RegionError(f"file:{name}: polygon {k} runs once around a pole; expected a ring that "
                              "closes without circling a pole (close it along the pole's latitude instead)")
        if ref is not None:  # a hole goes with its shell
            x += 360.0 * np.round((ref - x.mean()) / 360.0)
        return np.column_stack([x, xy[:, 1]])

    shell = unwrap(poly.exterior)
    width = float(np.ptp(shell[:, 0]))
    if width > 180.0:
        raise RegionError(f"file:{name}: polygon {k} spans {width:.0f} deg of longitude either way round; "
                          "split it at the antimeridian (RFC 7946 sec. 3.1.9), or put its vertices at most "
                          "180 deg of longitude apart to mean the wide way")
    holes = [unwrap(h, float(shell[:, 0].mean())) for h in poly.interiors]
    return Polygon(shell, holes)


@dataclass(frozen=True, slots=True)
class Disc:
    """The exact test of a circle or sector: bearing and distance from a centre."""

    lon_deg: float
    lat_deg: float
    az_from_deg: float
    span_deg: float          # clockwise from az_from; 360 is all round
    min_km: float
    max_km: float

    def contains(self, lons_deg: np.ndarray, lats_deg: np.ndarray) -> np.ndarray:
        lons = np.asarray(lons_deg, dtype=float)
        az, _, d = GEOD.inv(np.full_like(lons, self.lon_deg), np.full_like(lons, self.lat_deg),
                            lons, np.asarray(lats_deg, dtype=float))
        d_km = np.asarray(d) / 1000.0
        ok = (d_km >= self.min_km) & (d_km <= self.max_km)
        if self.span_deg < 360.0:
            ok &= np.mod(np.asarray(az) - self.az_from_deg, 360.0) <= self.span_deg
        return ok


@dataclass(frozen=True, slots=True)
class GoalArea:
    """A resolved region: lon/lat polygons for maps, plus how to sample it.

    ``geometry`` holds lon/lat polygons (degrees, longitudes in -180..180).
    Circles and sectors also carry their exact ``disc`` test, which sampling
    uses, so that their points are right even where the lon/lat polygon is
    only approximate (around a pole).
    """

    text: str
    geometry: MultiPolygon
    disc: Disc | None = None
    clip: tuple[float, float, float, float] | None = None


def _clip_geometry(clip: tuple[float, float, float, float]) -> BaseGeometry:
    west, south, east, north = clip
    if west <= east:
        return box(west, south, east, north)
    return shapely.union_all([box(west, south, 180.0, north), box(-180.0, south, east, north)])


def _in_clip(clip, lons: np.ndarray, lats: np.ndarray) -> np.ndarray:
    west, south, east, north = clip
    ok = (lats >= south) & (lats <= north)
    return ok & ((lons >= west) & (lons <= east) if west <= east else (lons >= west) | (lons <= east))


def _clip_misses(text: str, clip, whole: BaseGeometry) -> str:
    """Why a clip box left nothing: how the box was read, and where the region lies."""
    west, south, east, north = clip
    w, s, e, n = whole.bounds
    how = (f"read as west {west:g}, south {south:g}, east {east:g}, north {north:g}"
           + (" -- west > east: the box crosses 180 deg" if west > east else ""))
    return (f"{text!r} clipped to {[float(c) for c in clip]} ({how}): the region is empty, the box and the region "
            f"(longitude {w:.4g} to {e:.4g}, latitude {s:.4g} to {n:.4g}) do not meet; expected "
            "clip = [west, south, east, north] in degrees")


def resolve(region: Region | str, station: Station, base_dir: str | os.PathLike[str] = ".",
            clip: tuple[float, float, float, float] | None = None) -> GoalArea:
    """Resolve a region string against the shipped data, the station and files.

    ``clip`` is (west, south, east, north) in degrees; west > east means the
    box crosses the antimeridian.
    """
    reg = parse_region(region) if isinstance(region, str) else region
    disc = None
    if reg.kind == "country":
        geom = _country_geometry(reg.name)
    elif reg.kind == "continent":
        geom = continent_geometry(reg.name)
    elif reg.kind == "circle":
        lat, lon, radius = reg.numbers
        disc = Disc(lon, lat, 0.0, 360.0, 0.0, radius)
    elif reg.kind == "sector":
        a, b, dmin, dmax = reg.numbers
        span = (b - a) % 360.0 or 360.0
        disc = Disc(station.lon_deg, station.lat_deg, a % 360.0, span, dmin, dmax)
    else:
        geom = _read_file(reg.name, str(base_dir))
    if disc is not None:
        geom = _polar_region(disc.lon_deg, disc.lat_deg, disc.az_from_deg,
                             disc.az_from_deg + disc.span_deg, disc.min_km, disc.max_km)
    if clip is not None:
        whole = geom
        # part by part: a continent's parts (neighbouring countries) touch
        # along borders, which a MultiPolygon may not do, so GEOS cannot
        # intersect the whole at once
        pieces = shapely.intersection(np.asarray(_parts(geom), dtype=object), _clip_geometry(clip))
        geom = MultiPolygon([p for piece in pieces for p in _parts(piece)])
        if (geom.is_empty or _areas_m2(_parts(geom)).sum() <= 0.0) and not whole.is_empty:
            raise RegionError(_clip_misses(reg.text, clip, whole))
    if geom.is_empty or _areas_m2(_parts(geom)).sum() <= 0.0:
        raise RegionError(f"{reg.text!r}: the region is empty")
    return GoalArea(reg.text, geom, disc, clip)


# --------------------------------------------------------------------------
# Sampling


RESOLUTION_KM2 = 1.0
"""A region smaller than this (1 km x 1 km) is sampled as one point: one
1-deg bearing cell is 1 km wide only 57 km from the station, and the hop
geometry does not tell points 1 km apart."""

# Work bounds of the rejection sampler: at most this many candidates in all,
# in at most this many rounds (about 0.1 s for a polygon; a region that keeps
# almost none of them is a sliver, answered with the points it kept or one).
_MAX_CANDIDATES = 400_000
_MAX_ROUNDS = 12
_EARTH_KM = 6371.0


def _disc_candidates(disc: Disc, m: int, rng: np.random.Generator) -> tuple[np.ndarray, np.ndarray]:
    """``m`` points uniform by area on the sphere in the disc's bearing and
    distance ranges (annular sector about its centre).

    Distance d is drawn with cos(d / R) uniform, bearing uniform in the
    sector: equal area on the sphere of radius R, so nearly every candidate
    passes the exact test however small the region.
    """
    lo = min(np.pi, disc.min_km / _EARTH_KM)
    hi = min(np.pi, disc.max_km / _EARTH_KM)
    theta = np.arccos(rng.uniform(np.cos(hi), np.cos(lo), m))
    az = disc.az_from_deg + rng.uniform(0.0, disc.span_deg, m)
    lons, lats, _ = GEOD.fwd(np.full(m, disc.lon_deg), np.full(m, disc.lat_deg), az, theta * _EARTH_KM * 1000.0)
    return np.asarray(lons), np.asarray(lats)


def _box_candidates(clip, m: int, rng: np.random.Generator) -> tuple[np.ndarray, np.ndarray]:
    """``m`` points uniform by area on the sphere inside a clip box (may cross 180 deg)."""
    west, south, east, north = clip
    width = (east - west) % 360.0 or 360.0
    lon = (west + rng.uniform(0.0, width, m) + 180.0) % 360.0 - 180.0
    lat = np.degrees(np.arcsin(rng.uniform(np.sin(np.radians(south)), np.sin(np.radians(north)), m)))
    return lon, lat


def _box_area_km2(clip) -> float:
    west, south, east, north = clip
    width = np.radians((east - west) % 360.0 or 360.0)
    return float(width * (np.sin(np.radians(north)) - np.sin(np.radians(south)))) * _EARTH_KM**2


def _disc_area_km2(disc: Disc) -> float:
    """Area on the sphere of radius R of the disc's annular sector."""
    lo = min(np.pi, disc.min_km / _EARTH_KM)
    hi = min(np.pi, disc.max_km / _EARTH_KM)
    return float(np.radians(disc.span_deg) * (np.cos(lo) - np.cos(hi))) * _EARTH_KM**2


def _disc_middle(disc: Disc) -> tuple[float, float]:
    """The disc's one point: its centre, or a sector's middle bearing and distance."""
    if disc.min_km == 0.0 and disc.span_deg == 360.0:
        return disc.lon_deg, disc.lat_deg
    lon, lat, _ = GEOD.fwd(disc.lon_deg, disc.lat_deg, disc.az_from_deg + disc.span_deg / 2.0,
                           500.0 * (disc.min_km + disc.max_km))
    return float(lon), float(lat)


def sample_points(area: GoalArea | BaseGeometry, n: int, seed: int = 1) -> tuple[np.ndarray, np.ndarray]:
    """Up to ``n`` points uniform by area on the sphere inside the region, deterministic.

    Polygons: each part gets a share of the points by its area (largest
    remainder), then candidates uniform in longitude and in sin(latitude)
    over the part's bounding box -- uniform by area on the sphere -- are kept
    where ``shapely.contains_xy`` accepts them. Circles and sectors: points
    uniform in their bearing and distance ranges (or in the clip box, when
    that is smaller), kept by the exact bearing and distance test and the
    clip box.

    The work is bounded: a region below ``RESOLUTION_KM2`` is one point, and
    a sliver that keeps too few of ``_MAX_CANDIDATES`` candidates returns the
    points it kept (or one point inside it), so fewer than ``n`` points mean
    the region is too small or thin to sample finer.

    Returns
    -------
    lons_deg, lats_deg : ndarray, shape (m,), 1 <= m <= n (empty if n <= 0)
    """
    rng = np.random.default_rng(seed)
    if n <= 0:
        return np.empty(0), np.empty(0)
    if isinstance(area, GoalArea) and area.disc is not None:
        return _sample_disc(area, n, rng)
    geom = area.geometry if isinstance(area, GoalArea) else area
    parts = _parts(geom)
    if not parts:
        return np.empty(0), np.empty(0)
    areas = _areas_m2(parts)
    if areas.sum() < RESOLUTION_KM2 * 1e6:
        rp = max(zip(areas, parts), key=lambda ap: ap[0])[1].representative_point()
        return np.array([rp.x]), np.array([rp.y])
    share = areas / areas.sum() * n
    counts = np.floor(share).astype(int)
    for i in np.argsort(-(share - counts))[: n - counts.sum()]:
        counts[i] += 1
    lons_out, lats_out = [], []
    for part, count in zip(parts, counts):
        if count == 0:
            continue
        shapely.prepare(part)
        west, south, east, north = part.bounds
        s_lo, s_hi = np.sin(np.radians(south)), np.sin(np.radians(north))

        def draw(m: int, part=part, west=west, east=east, s_lo=s_lo, s_hi=s_hi):
            lon = rng.uniform(west, east, m)
            lat = np.degrees(np.arcsin(rng.uniform(s_lo, s_hi, m)))
            return lon, lat, shapely.contains_xy(part, lon, lat)

        # each part may use its share of the candidates, at least a few thousand
        lon, lat = _keep_until(draw, count, max(4096, int(_MAX_CANDIDATES * count / n)))
        if lon.size == 0:  # a sliver: fall back on a point that lies inside it
            rp = part.representative_point()
            lon, lat = np.array([rp.x]), np.array([rp.y])
        lons_out.append(lon)
        lats_out.append(lat)
    return np.concatenate(lons_out), np.concatenate(lats_out)


def _sample_disc(area: GoalArea, n: int, rng: np.random.Generator) -> tuple[np.ndarray, np.ndarray]:
    disc = area.disc
    disc_km2 = _disc_area_km2(disc)
    if area.clip is None and disc_km2 < RESOLUTION_KM2:
        lon, lat = _disc_middle(disc)
        return np.array([lon]), np.array([lat])
    if area.clip is not None and min(disc_km2, _area_m2(area.geometry) / 1e6) < RESOLUTION_KM2:
        rp = area.geometry.representative_point()
        return np.array([rp.x]), np.array([rp.y])
    # draw from the smaller of the two shapes, test against both
    from_box = area.clip is not None and _box_area_km2(area.clip) < disc_km2

    def draw(m: int):
        lon, lat = _box_candidates(area.clip, m, rng) if from_box else _disc_candidates(disc, m, rng)
        ok = disc.contains(lon, lat)
        if area.clip is not None:
            ok &= _in_clip(area.clip, lon, lat)
        return lon, lat, ok

    # geodesic tests cost ~1 us a point: a quarter of the polygon budget
    lon, lat = _keep_until(draw, n, _MAX_CANDIDATES // 4)
    if lon.size == 0:
        rp = area.geometry.representative_point()
        lon, lat = np.array([rp.x]), np.array([rp.y])
    return lon, lat


def _keep_until(draw, count: int, budget: int) -> tuple[np.ndarray, np.ndarray]:
    """Draw candidate batches until ``count`` are kept (in draw order).

    At most ``budget`` candidates in at most ``_MAX_ROUNDS`` rounds; returns
    the points kept so far if the budget runs out (possibly none).
    """
    kept_lon, kept_lat = [], []
    got = 0
    drawn = 0
    m = min(budget, max(256, 4 * count))
    for _ in range(_MAX_ROUNDS):
        lon, lat, ok = draw(m)
        drawn += m
        kept_lon.append(lon[ok])
        kept_lat.append(lat[ok])
        got += int(ok.sum())
        if got >= count or drawn >= budget:
            break
        rate = max(got / drawn, 1e-6)
        m = int(min(budget - drawn, max(256, 1.2 * (count - got) / rate)))
    return np.concatenate(kept_lon)[:count], np.concatenate(kept_lat)[:count]


# --------------------------------------------------------------------------
# Site-level helpers (duck-typed on lobeplan.site.Site / Goal: geo does not
# import the site module)


@functools.lru_cache(maxsize=256)
def _cached_area(text: str, lon: float, lat: float, base_dir: str,
                 clip: tuple[float, float, float, float] | None) -> GoalArea:
    return resolve(text, Station("", lat, lon, ""), base_dir, clip)


@functools.lru_cache(maxsize=256)
def _cached_points(text: str, lon: float, lat: float, base_dir: str,
                   clip: tuple[float, float, float, float] | None, n: int, seed: int):
    lons, lats = sample_points(_cached_area(text, lon, lat, base_dir, clip), n, seed)
    lons.flags.writeable = False
    lats.flags.writeable = False
    return lons, lats


def region_area(site, text: str, clip=None, key: str = "") -> GoalArea:
    """Resolve a region string of a site; errors become ``SiteError`` at ``key``."""
    from ..errors import SiteError

    try:
        return _cached_area(text, site.station.lon_deg, site.station.lat_deg, site.base_dir, clip)
    except RegionError as exc:
        raise SiteError(site.file, key, str(exc)) from None


def region_points(site, text: str, clip=None, key: str = "") -> tuple[np.ndarray, np.ndarray]:
    """Area-uniform sample points of a region (``site.propagation.points_per_goal``)."""
    from ..errors import SiteError

    try:
        return _cached_points(text, site.station.lon_deg, site.station.lat_deg, site.base_dir, clip,
                              site.propagation.points_per_goal, site.propagation.seed)
    except RegionError as exc:
        raise SiteError(site.file, key, str(exc)) from None


def goal_area(site, goal) -> GoalArea:
    return region_area(site, goal.region, goal.clip, f"{goal.key}.region")


def goal_points(site, goal) -> tuple[np.ndarray, np.ndarray]:
    """Sample points (lons_deg, lats_deg) of a goal's region, clip applied."""
    return region_points(site, goal.region, goal.clip, f"{goal.key}.region")
