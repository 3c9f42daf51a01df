"""`lobeplan regions [TEXT]`: the country and continent names that match, with areas.

With ``--site SITE.toml`` each match also gets its bearing and distance
range from the station (short path), from the site's own sampling
(``points_per_goal``, ``seed``).
"""
from __future__ import annotations

import re
from pathlib import Path

import numpy as np

from ..geo import regions as R
from ..geo.paths import bearing_arc, goal_paths

__all__ = ["add_arguments", "site_path", "build", "format_text", "match_rows"]


def add_arguments(p) -> None:
    p.add_argument("text", nargs="?", default="", metavar="TEXT",
                   help="part of a name, code or alias (e.g. 'island', 'FRA', 'England'); empty lists everything")
    p.add_argument("--site", metavar="SITE.toml", default=None,
                   help="also give each match's bearings and distances from this site's station")


def site_path(args) -> Path | None:
    return None if args.site is None else Path(args.site)


def _area_km2(geom) -> float:
    return R._area_m2(geom) / 1e6


def match_rows(text: str) -> tuple[list[dict], str]:
    """Rows for every country and continent matching ``text``, and the note of an alias match."""
    raw = re.sub(r"^(country|continent):", "", text.strip(), flags=re.IGNORECASE)
    key = R._norm(raw)
    table = R.countries()
    labels = R.part_continents()
    rows, note = [], ""
    for c in R.CONTINENTS:
        if not key or key in R._norm(c):
            rows.append({"region": f"continent:{c}", "kind": "continent", "name": c, "code": None,
                         "type": "continent", "continents": [c],
                         "area_km2": round(_area_km2(R.continent_geometry(c)))})
    alias_rows = {}
    if key:
        found = R.country_lookup(raw)
        if found is not None and found[1]:
            alias_rows[found[0]] = found[1]
        for alias, (code, alias_note) in R.ALIASES.items():
            if R._norm(alias).startswith(key):
                row = R.country_lookup(code)[0]
                alias_rows.setdefault(row, alias_note or f"also called {alias.title()}")
    for row in range(len(table)):
        names = [table[c][row] for c in ("NAME", "NAME_LONG", "ADMIN", "ADM0_A3", "ISO_A3_EH")]
        if key and row not in alias_rows and not any(key in R._norm(n) for n in names if n != "-99"):
            continue
        parts = labels[row]
        geom = table.geometry[row]
        rows.append({"region": f"country:{table['ADM0_A3'][row]}", "kind": "country", "name": str(table["NAME"][row]),
                     "code": str(table["ADM0_A3"][row]), "type": str(table["TYPE"][row]),
                     "continents": sorted(set(parts)), "area_km2": round(_area_km2(geom), 1),
                     "note": alias_rows.get(row, "")})
    if key and len(alias_rows) == 1 and len([r for r in rows if r["kind"] == "country"]) == 1:
        note = next(iter(alias_rows.values()))
    return rows, note


def build(site, args) -> dict:
    text = getattr(args, "text", "") or ""
    rows, note = match_rows(text)
    result: dict = {"search": text, "matches": rows}
    if not rows:
        result["suggestions"] = R.country_suggestions(text, 5)
    if note:
        result["note"] = note
    if site is not None:
        st = site.station
        result["station"] = {"lat_deg": round(st.lat_deg, 6), "lon_deg": round(st.lon_deg, 6),
                             "locator": st.locator}
        n, seed = site.propagation.points_per_goal, site.propagation.seed
        for row in rows:
            area = R.resolve(row["region"], st)
            lons, lats = R.sample_points(area, n, seed)
            bearing, dist = goal_paths(st, lons, lats, "short")
            start, end, median = bearing_arc(bearing)
            row["bearing_deg"] = {"start": round(start, 1), "end": round(end, 1), "median": round(median, 1)}
            row["distance_km"] = {"min": round(float(np.min(dist)), 1), "max": round(float(np.max(dist)), 1)}
    return result


def _table(header: list[str], body: list[list[str]], right: set[int]) -> list[str]:
    """Columns as wide as their widest cell: names are never cut."""
    widths = [max(len(r[i]) for r in [header, *body]) for i in range(len(header))]
    return ["  ".join(c.rjust(w) if i in right else c.ljust(w) for i, (c, w) in enumerate(zip(r, widths))).rstrip()
            for r in [header, *body]]


def _area_text(km2: float) -> str:
    return f"{km2:,.1f}" if km2 < 10 else f"{km2:,.0f}"


def format_text(result: dict) -> str:
    rows = result["matches"]
    search = result["search"]
    if not rows:
        lines = [f"No country or continent matches {search!r}."]
        if result.get("suggestions"):
            lines.append("Nearest names: " + ", ".join(result["suggestions"]) + ".")
        lines.append("Run `lobeplan regions` without a search to list every name.")
        return "\n".join(lines) + "\n"
    with_site = "station" in result
    header = ["region", "name", "type", "continent", "area km2"]
    if with_site:
        header += ["bearings deg", "distance km"]
    body = []
    for r in rows:
        cells = [r["region"], r["name"], r["type"], ", ".join(r["continents"]), _area_text(r["area_km2"])]
        if with_site:
            b, d = r["bearing_deg"], r["distance_km"]
            cells += [f"{b['start']:.1f} -> {b['end']:.1f}", f"{d['min']:,.0f} - {d['max']:,.0f}"]
        body.append(cells)
    title = f"Regions matching {search!r}" if search else "Every region"
    lines = [f"{title}: {len(rows)}", ""] + _table(header, body, {4, 5, 6})
    notes = [f"{r['region']}: {r['note']}" for r in rows if r.get("note")]
    if notes:
        lines += [""] + notes
    lines += ["", "Use the region column as a goal's `region` (or an `avoid`). Area: on the sphere, in km2."]
    if with_site:
        st = result["station"]
        lines.append(f"Bearings are true, clockwise from the first to the second, from {st['locator']}; "
                     "distances along the short great-circle path, over the site's sample points.")
    return "\n".join(lines) + "\n"
