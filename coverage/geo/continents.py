"""Which continent each polygon part of the country table lies on.

The rules (run once, offline, by ``tools/make_countries.py``; the labels
are shipped beside the polygons, because the search below over some 4,000
parts takes seconds, not the milliseconds a run may spend):

1. Russia is split at 60 deg E (a meridian close to the Urals, chosen for
   being simple to state and check): every part, and the piece of every
   part, from 0 to 60 deg E is Europe, the rest Asia. This is done when the
   table is loaded, not here.
2. A part that lies south of 60 deg S (the Antarctic Treaty area) is
   Antarctica; no part north of it is.
3. A part whose representative point (a point inside it) lies within
   2000 km of the coast of its country's largest part (its home part) keeps
   its country's Natural Earth label.
4. Every other part -- and every part of a country labelled "Seven seas
   (open ocean)" -- takes the label of the nearest labelled land among the
   home parts of every country (of any label, its own included) and the
   already labelled parts of its own country, nearest first. A chain of
   islands so follows its own mainland (the Aleutians stay with Alaska, so
   North America), and a far part goes where it lies: the French overseas
   regions to their own continents, the Indonesian half of New Guinea and
   Easter Island to Oceania. Hawaii stays North America: the nearest
   placed land is the home part of the U.S. Minor Outlying Islands, which
   Natural Earth labels North America.

Distances in rule 4 are between boundary points on the sphere (mean
radius), coasts thinned to about 2 km: enough to order land masses
hundreds of km apart.
"""
from __future__ import annotations

import heapq

import numpy as np
import shapely
from scipy.spatial import cKDTree
from shapely.geometry import Polygon

__all__ = ["CONTINENT_LABELS", "FAR_FROM_HOME_KM", "ANTARCTIC_LAT_DEG", "assign_part_continents"]

CONTINENT_LABELS = ("Africa", "Antarctica", "Asia", "Europe", "North America", "Oceania", "South America")
FAR_FROM_HOME_KM = 2000.0
ANTARCTIC_LAT_DEG = -60.0
_R_KM = 6371.0088


def _unit(lon_deg: np.ndarray, lat_deg: np.ndarray) -> np.ndarray:
    lon, lat = np.radians(lon_deg), np.radians(lat_deg)
    return np.column_stack([np.cos(lat) * np.cos(lon), np.cos(lat) * np.sin(lon), np.sin(lat)])


def _chord_to_km(chord: np.ndarray) -> np.ndarray:
    return 2.0 * _R_KM * np.arcsin(np.clip(np.asarray(chord) / 2.0, 0.0, 1.0))


def _boundary_points(part: Polygon, most: int = 400) -> np.ndarray:
    ring = np.asarray(part.exterior.simplify(0.02).coords)
    if len(ring) > most:
        ring = ring[np.linspace(0, len(ring) - 1, most).astype(int)]
    return _unit(ring[:, 0], ring[:, 1])


def _geodesic_area(part: Polygon) -> float:
    dense = shapely.segmentize(part, 0.5)
    x, y = np.asarray(dense.exterior.coords).T
    return abs(float(np.sum(np.radians(np.diff(x)) * (np.sin(np.radians(y[1:])) + np.sin(np.radians(y[:-1]))) / 2)))


def assign_part_continents(geoms, labels, codes) -> list[list[str]]:
    """Continent of every polygon part of every country (rules in the module docstring).

    Parameters
    ----------
    geoms : sequence of shapely (Multi)Polygon, one per country
    labels : sequence of str, Natural Earth ``CONTINENT`` per country
    codes : sequence of str, ``ADM0_A3`` per country

    Returns
    -------
    list of list of str
        One label per part, in the order of ``shapely.get_parts``; Russia
        ("RUS") gets empty labels: it is split by longitude when loaded.
    """
    parts = [[p for p in shapely.get_parts(g) if isinstance(p, Polygon)] for g in geoms]
    out: list[list[str]] = [[""] * len(p) for p in parts]
    home = [int(np.argmax([_geodesic_area(p) for p in ps])) if ps else -1 for ps in parts]
    points = {(c, k): _boundary_points(p) for c, ps in enumerate(parts) for k, p in enumerate(ps)}
    south = {(c, k): p.representative_point().y < ANTARCTIC_LAT_DEG
             for c, ps in enumerate(parts) for k, p in enumerate(ps)}

    anchors: dict[tuple[int, int], str] = {}   # labelled parts usable as "land that is placed"
    todo: list[tuple[int, int]] = []
    for c, ps in enumerate(parts):
        if codes[c] == "RUS":
            # the mainland's two halves are each home land of their label;
            # Russia's parts are labelled by longitude when loaded
            anchors[(c, home[c])] = "split"
            continue
        for k in range(len(ps)):
            if south[(c, k)]:
                out[c][k] = "Antarctica"
                anchors[(c, k)] = "Antarctica"
            elif labels[c] in CONTINENT_LABELS and k == home[c]:
                out[c][k] = labels[c]
                anchors[(c, k)] = labels[c]
            elif labels[c] in CONTINENT_LABELS:
                rp = ps[k].representative_point()
                d = _chord_to_km(cKDTree(points[(c, home[c])]).query(_unit(np.array([rp.x]), np.array([rp.y])))[0]).min()
                if d <= FAR_FROM_HOME_KM:
                    out[c][k] = labels[c]
                    anchors[(c, k)] = labels[c]
                else:
                    todo.append((c, k))
            else:
                todo.append((c, k))

    # Russia's mainland as two home anchors, by longitude
    def russia_points(c: int, k: int) -> list[tuple[np.ndarray, str]]:
        ring = np.asarray(parts[c][k].exterior.simplify(0.02).coords)
        west = (ring[:, 0] >= 0.0) & (ring[:, 0] < 60.0)
        return [(_unit(ring[m, 0], ring[m, 1]), lab) for m, lab in ((west, "Europe"), (~west, "Asia")) if m.any()]

    def home_trees():
        pts, labs = [], []
        for (c, k), lab in anchors.items():
            if k != home[c] or lab == "Antarctica":
                continue
            for xyz, lab2 in (russia_points(c, k) if lab == "split" else [(points[(c, k)], lab)]):
                pts.append(xyz)
                labs += [lab2] * len(xyz)
        return cKDTree(np.concatenate(pts)), np.array(labs)

    trees = {key: cKDTree(xyz) for key, xyz in points.items()}

    def dist(a: tuple[int, int], b: tuple[int, int]) -> float:
        return float(_chord_to_km(trees[b].query(points[a])[0]).min())

    tree, tree_labels = home_trees()
    own: dict[int, list[tuple[int, str]]] = {}
    for (c, k), lab in anchors.items():
        if k != home[c] and lab != "Antarctica":
            own.setdefault(c, []).append((k, lab))
    best: dict[tuple[int, int], tuple[float, str]] = {}
    for c, k in todo:
        chord, idx = tree.query(points[(c, k)])
        j = int(np.argmin(chord))
        best[(c, k)] = (float(_chord_to_km(chord[j])), str(tree_labels[idx[j]]))
        if own.get(c):
            xyz = np.concatenate([points[(c, k2)] for k2, _ in own[c]])
            labs = [lab for k2, lab in own[c] for _ in range(len(points[(c, k2)]))]
            chord, idx = cKDTree(xyz).query(points[(c, k)])
            j = int(np.argmin(chord))
            best[(c, k)] = min(best[(c, k)], (float(_chord_to_km(chord[j])), labs[idx[j]]))

    # nearest first (Dijkstra's order): a part is labelled only when no
    # pending part could still give it a nearer anchor
    heap = [(*best[key], *key) for key in todo]
    heapq.heapify(heap)
    pending = set(todo)
    while heap:
        d, lab, c, k = heapq.heappop(heap)
        if (c, k) not in pending or (d, lab) != best[(c, k)]:
            continue
        pending.discard((c, k))
        out[c][k] = lab
        anchors[(c, k)] = lab
        for key in pending:
            if key[0] == c or k == home[c]:
                d2 = dist(key, (c, k))
                if d2 < best[key][0]:
                    best[key] = (d2, lab)
                    heapq.heappush(heap, (d2, lab, *key))
    return out
