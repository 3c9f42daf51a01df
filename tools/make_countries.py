"""Build data/countries_10m.zip from the Natural Earth 1:10m admin-0 shapefile.

Run once, offline, by a developer (see data/README.md for where the
shapefile comes from):

    .venv/bin/python tools/make_countries.py SHAPEFILE.shp

What it does, and why:

- reads the attribute table as UTF-8 (the shapefile ships no .cpg file, and
  a reader that falls back on Latin-1 turns "Côte d'Ivoire" into mojibake);
- keeps a few attributes (names, codes, Natural Earth's continent label);
- simplifies each polygon part with many vertices to ``TOLERANCE_DEG``
  (about 300 m; far below a map pixel or a sampling point's meaning), and
  keeps a part unsimplified where simplifying would lose or break it, so
  that every island survives;
- assigns every polygon part a continent by where it lies (see
  ``lobeplan.geo.regions``: the rules are applied here once, because the
  nearest-home search over some 10,000 parts takes minutes, not
  milliseconds) and stores the labels, one per part in part order, in the
  column ``PART_CONTINENTS`` (``;``-separated). Russia is split at run time.
"""
from __future__ import annotations

import sys
from pathlib import Path

import geopandas as gpd
import numpy as np
import shapely
from shapely.geometry import MultiPolygon, Polygon

TOLERANCE_DEG = 0.003      # about 330 m in latitude
MANY_VERTICES = 60         # parts with fewer vertices are small islands: kept as they are
KEEP = ["NAME", "NAME_LONG", "ADMIN", "ADM0_A3", "ISO_A3_EH", "SOVEREIGNT", "TYPE", "CONTINENT"]
OUT = Path(__file__).resolve().parent.parent / "data" / "countries_10m.zip"


def _parts(geom) -> list[Polygon]:
    if isinstance(geom, Polygon):
        return [geom]
    return [g for g in geom.geoms if isinstance(g, Polygon) and not g.is_empty]


def _simplify(part: Polygon) -> Polygon:
    if len(part.exterior.coords) < MANY_VERTICES:
        return part
    out = part.simplify(TOLERANCE_DEG, preserve_topology=True)
    if not isinstance(out, Polygon) or out.is_empty or not out.is_valid or out.area < 0.5 * part.area:
        return part
    return out


def main(shp: str) -> None:
    sys.path.insert(0, str(Path(__file__).resolve().parent.parent))
    frame = gpd.read_file(shp, encoding="utf-8")
    frame = frame[KEEP + ["geometry"]].copy()
    geoms = []
    for geom in frame.geometry:
        parts = [_simplify(p) for p in _parts(shapely.make_valid(geom))]
        # 1e-5 deg (about 1 m) grid: shorter numbers, no island lost
        parts = [shapely.set_precision(p, 1e-5) for p in parts]
        parts = [q for p in parts for q in _parts(p) if not q.is_empty] if parts else parts
        geoms.append(MultiPolygon(parts))
    frame["geometry"] = geoms
    from lobeplan.geo.continents import assign_part_continents

    labels = assign_part_continents(list(frame.geometry), list(frame["CONTINENT"]), list(frame["ADM0_A3"]))
    frame["PART_CONTINENTS"] = [";".join(row) for row in labels]
    frame = frame.sort_values("ADM0_A3").reset_index(drop=True)
    # WKB of every feature back to back, with offsets, and one text array
    # per attribute: numpy reads this in milliseconds and without pickle
    # (a GeoPackage needs GDAL, whose import alone costs most of a second)
    wkb = [shapely.to_wkb(g) for g in frame.geometry]
    offsets = np.cumsum([0] + [len(b) for b in wkb])
    columns = {c: np.array([str(v) for v in frame[c]]) for c in KEEP + ["PART_CONTINENTS"]}
    # each continent as one valid (Multi)Polygon: the parts of neighbouring
    # countries touch along borders, so they are merged here once (some
    # seconds; too slow for every run)
    from lobeplan.geo.regions import CONTINENTS

    europe = shapely.box(0.0, -90.0, 60.0, 90.0)  # Russia split at 60 deg E
    pieces: dict[str, list] = {c: [] for c in CONTINENTS}
    for code, geom, labs in zip(frame["ADM0_A3"], frame.geometry, frame["PART_CONTINENTS"]):
        if code == "RUS":
            pieces["Europe"].append(geom.intersection(europe))
            pieces["Asia"].append(geom.difference(europe))
            continue
        for part, lab in zip(shapely.get_parts(geom), labs.split(";")):
            pieces[lab].append(part)
    merged = [shapely.make_valid(shapely.union_all(pieces[c])) for c in CONTINENTS]
    cwkb = [shapely.to_wkb(g) for g in merged]
    # a NumPy .npz archive is a zip of arrays; written through a file object so
    # that numpy keeps the .zip name instead of appending .npz
    with open(OUT, "wb") as fh:
        np.savez_compressed(fh, wkb=np.frombuffer(b"".join(wkb), dtype=np.uint8), offsets=offsets,
                            continent_wkb=np.frombuffer(b"".join(cwkb), dtype=np.uint8),
                            continent_offsets=np.cumsum([0] + [len(b) for b in cwkb]),
                            continent_names=np.array(CONTINENTS), **columns)
    print(f"{len(frame)} features, {sum(len(g.geoms) for g in frame.geometry)} parts, "
          f"{OUT.stat().st_size / 1e6:.1f} MB -> {OUT}")


if __name__ == "__main__":
    main(sys.argv[1])
