"""What a band's map shows, as plain data: lobes, goals, avoid regions, titles.

The maps (:mod:`.azimap`) and the GeoJSON export (:mod:`.geojson`) draw the
same scene, so the numbers on paper and in a GIS agree. Nothing here is
physics: it selects from the plan (the best-ranked option and bearing),
rotates the array-frame patterns onto true bearings and scales them for
drawing.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..grid import AZIMUTH_DEG, ELEVATION_DEG, to_true_bearing

__all__ = ["Lobe", "GoalShade", "AvoidShade", "ForegroundShade", "BandScene", "band_scene", "chosen_option",
           "propagation_text", "key_takeoff_deg", "lobe_rows", "true_bearing_row", "lobe_radius_km", "slug", "kind_label",
           "where_text"]


@dataclass(frozen=True)
class Lobe:
    """One switch state's azimuth pattern at the band's key takeoff angle.

    ``gain_dbi`` and ``radius_km`` have shape (360,), over true bearings
    0..359 deg; the radius is ``peak_km`` at the band's peak and 0 at
    ``floor_db`` below it.
    """

    state: str
    gain_dbi: np.ndarray
    radius_km: np.ndarray
    peak_gain_dbi: float
    peak_bearing_deg: float
    kind: str = "forced"
    design_band: str | None = None
    lobes_deg: tuple[float, ...] = ()   # every lobe within 1 dB of the peak, strongest first


@dataclass(frozen=True)
class GoalShade:
    """A goal region on one band: its polygons and how well the plan serves it.

    ``rows`` holds (path, state, advantage_db or None, open_fraction) for
    each path of the region served on this band; ``advantage_db`` is the
    best of them (None when the band never opens to it).
    """

    name: str
    region: str
    geometry: object          # shapely MultiPolygon, lon/lat degrees
    rows: tuple[tuple[str, str, float | None, float], ...]
    advantage_db: float | None


@dataclass(frozen=True)
class AvoidShade:
    region: str
    geometry: object
    for_goals: tuple[str, ...]


@dataclass(frozen=True)
class ForegroundShade:
    """A foreground sector: true bearings clockwise from ``from_deg`` to ``to_deg``,
    ground ``ground`` beginning ``from_m`` from the array."""

    from_deg: float
    to_deg: float
    from_m: float
    ground: str


@dataclass(frozen=True)
class BandScene:
    band: str
    station_name: str
    locator: str
    lon_deg: float
    lat_deg: float
    option: str
    layout: str
    spacing_m: float | None
    orientation_deg: float
    score_db: float | None
    model: str
    takeoff_deg: float
    takeoff_from_needs: bool
    lobes: tuple[Lobe, ...]
    goals: tuple[GoalShade, ...]
    avoid: tuple[AvoidShade, ...]
    lobe_peak_km: float
    lobe_floor_db: float
    ring_step_km: float
    propagation_text: str = ""
    closed_share: float = 0.0
    foreground: tuple[ForegroundShade, ...] = ()

    @property
    def lobe_top_dbi(self) -> float:
        return max(lobe.peak_gain_dbi for lobe in self.lobes)


def kind_label(kind: str, design_band: str | None = None) -> str:
    """How a state's currents are made on a band, in words (one wording everywhere)."""
    if kind == "as-built":
        return f"as built from the {design_band} network"
    if kind == "fed":
        return "its own lines"
    return "forced"


def where_text(layout: str, orientation_deg: float) -> str:
    """How an option stands: its baseline bearing, or that one vertical has none."""
    return "one vertical, no baseline" if layout == "single" else f"baseline along {orientation_deg:.1f}\u00b0"


def slug(band_name: str) -> str:
    """A file-name fragment of a band name: "40 m" -> "40m"."""
    out = "".join(c if c.isalnum() or c in "-." else "" for c in band_name.replace(" ", ""))
    return out or "band"


def chosen_option(plan):
    """(option plan, baseline bearing, ranked entry or None) that the maps show.

    The best-ranked entry when there is one; otherwise the first option at
    its own best bearing (or 0 deg), so that a map can still be drawn.
    """
    if plan.ranking:
        entry = plan.ranking[0]
        op = next(o for o in plan.options if o.option == entry.option)
        return op, float(entry.orientation_deg), entry
    op = plan.options[0]
    theta = op.best_orientation_deg if op.best_orientation_deg is not None else float(op.orientation_deg[0])
    return op, float(theta), None


def key_takeoff_deg(goal_bands, band_name: str) -> float | None:
    """Median takeoff angle of everything the band must reach (deg).

    The needs of every goal on the band are pooled with the weights the
    score gives them (goal weight times need weights), and the weighted
    median of the elevation marginal is taken. None when nothing is open.
    """
    total = np.zeros(ELEVATION_DEG.size)
    for gb in goal_bands:
        if gb.band_name == band_name:
            total += gb.weight * gb.needs.weights.sum(axis=1)
    s = float(total.sum())
    if s <= 0.0:
        return None
    cdf = np.cumsum(total) / s
    return float(ELEVATION_DEG[int(np.searchsorted(cdf, 0.5))])


def true_bearing_row(gain_frame: np.ndarray, elevation_deg: float, orientation_deg: float) -> np.ndarray:
    """One elevation row of an array-frame pattern, over true bearings 0..359."""
    return to_true_bearing(np.asarray(gain_frame, dtype=float)[int(round(elevation_deg))], orientation_deg)


def lobe_radius_km(gain_dbi: np.ndarray, top_dbi: float, floor_db: float, peak_km: float) -> np.ndarray:
    """Drawing radius: ``peak_km`` at ``top_dbi``, falling linearly in dB to 0 at the floor."""
    above = np.clip(np.asarray(gain_dbi, dtype=float) - (top_dbi - floor_db), 0.0, floor_db)
    return above / floor_db * peak_km


def _geometry_key(goal) -> tuple:
    return (goal.region, goal.clip)


def band_scene(site, plan, band_name: str) -> BandScene:
    """Everything the map of one band shows (no dates, no files)."""
    from ..geo.regions import goal_area, region_area

    op, theta, entry = chosen_option(plan)
    takeoff, from_needs, rows_g = lobe_rows(plan, op, band_name, theta)
    top = max(float(r.max()) for r in rows_g)
    from ..antenna.pattern import lobe_bearings_deg

    lobes = []
    for s, r in zip(op.state_names, rows_g):
        res = op.patterns[(band_name, s)]
        every = lobe_bearings_deg(r)
        # the peak bearing is the first lobe's (ties broken the same on every machine)
        peak_bearing = every[0][0] if every else float(AZIMUTH_DEG[int(np.argmax(r))])
        lobes.append(Lobe(s, r, lobe_radius_km(r, top, site.map.lobe_floor_db, site.map.lobe_peak_km),
                          float(r.max()), float(peak_bearing), getattr(res, "kind", "forced"),
                          getattr(res, "design_band", None), tuple(b for b, _ in every)))
    lobes = tuple(lobes)

    if entry is not None:
        goal_rows = entry.goals
    else:
        from ..plan.planner import goal_rows as _rows

        idx = int(np.argmin(np.abs((op.orientation_deg - theta + 180.0) % 360.0 - 180.0)))
        goal_rows = _rows(op, plan.goal_bands, idx, plan.reference_gain_dbi)

    grouped: dict[tuple, dict] = {}
    for gb, row in zip(plan.goal_bands, goal_rows):
        if gb.band_name != band_name:
            continue
        goal = site.goals[gb.goal_index]
        k = _geometry_key(goal)
        g = grouped.setdefault(k, {"goal": goal, "rows": []})
        g["rows"].append((row.path, row.state, row.advantage_db, float(row.open_fraction)))
    goals = []
    share_min = float(site.propagation.closed_share)
    for g in grouped.values():
        # a goal open on fewer than closed_share of its point-hours is drawn
        # and listed as closed, not shaded as served
        g["rows"] = [r if r[3] >= share_min else (r[0], r[1], None, r[3]) for r in g["rows"]]
        advs = [r[2] for r in g["rows"] if r[2] is not None]
        goals.append(GoalShade(g["goal"].name, g["goal"].region, goal_area(site, g["goal"]).geometry,
                               tuple(g["rows"]), max(advs) if advs else None))

    avoid: dict[str, list[str]] = {}
    for goal in site.goals:
        if goal.name in {g.name for g in goals}:
            for a in goal.avoid:
                avoid.setdefault(a, []).append(goal.name)
    avoids = tuple(AvoidShade(a, region_area(site, a).geometry, tuple(dict.fromkeys(names)))
                   for a, names in avoid.items())

    st = site.station
    return BandScene(
        band=band_name, station_name=st.name, locator=st.locator, lon_deg=float(st.lon_deg),
        lat_deg=float(st.lat_deg), option=op.option, layout=op.layout, spacing_m=op.spacing_m,
        orientation_deg=theta, score_db=None if entry is None else float(entry.score_db),
        model=site.propagation.model, takeoff_deg=float(takeoff), takeoff_from_needs=from_needs,
        lobes=lobes, goals=tuple(goals), avoid=avoids, lobe_peak_km=float(site.map.lobe_peak_km),
        lobe_floor_db=float(site.map.lobe_floor_db), ring_step_km=float(site.map.ring_step_km),
        propagation_text=propagation_text(site), closed_share=float(site.propagation.closed_share),
        foreground=tuple(ForegroundShade(f.from_deg, f.to_deg, f.from_m, f.ground.name)
                         for f in site.array.foreground))


_MONTH_NAMES = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")


def _hours_text(hours: tuple[int, ...]) -> str:
    from ..propagation.model import hour_ranges_text

    text = hour_ranges_text(hours)
    return "all UT hours" if text == "all day" else f"UT {text}"


def propagation_text(site) -> str:
    """What the needs were computed for, in one line: model, month(s), solar input, hours."""
    prop = site.propagation
    hours = _hours_text(prop.hours)
    if prop.model != "climatology":
        return f"propagation model: {prop.model} (no ionosphere), {hours}"
    months = prop.month_list
    when = (f"all months {prop.year}" if len(months) == 12
            else ", ".join(_MONTH_NAMES[m - 1] for m in months) + f" {prop.year}")
    per = [prop.for_month(m) for m in months]
    flux = [p.solar_flux for p in per if p.solar_flux is not None]
    spots = [p.sunspot_number for p in per if p.sunspot_number is not None]
    values, name = (flux, "F10.7") if flux else (spots, "R12")
    solar = f"{name} {min(values):g}" if min(values) == max(values) else f"{name} {min(values):g}-{max(values):g}"
    return f"propagation model: climatology, {when}, {solar}, {hours}"


def lobe_rows(plan, op, band_name: str, theta_deg: float) -> tuple[float, bool, list[np.ndarray]]:
    """(takeoff_deg, from_needs, rows): every state's gain over true bearings at
    the band's key takeoff angle, the foreground blended, as the maps and the
    plan page draw the lobes.

    With nothing open on the band the takeoff angle is where the first state
    peaks (``from_needs`` False).
    """
    takeoff = key_takeoff_deg(plan.goal_bands, band_name)
    from_needs = takeoff is not None
    if takeoff is None:
        first = op.patterns[(band_name, op.state_names[0])].gain_dbi
        takeoff = float(ELEVATION_DEG[np.unravel_index(int(np.argmax(first)), first.shape)[0]])
    return takeoff, from_needs, [_state_row(op, band_name, s, takeoff, theta_deg) for s in op.state_names]


def _state_row(op, band_name: str, state: str, takeoff_deg: float, theta_deg: float) -> np.ndarray:
    """A state's gain over true bearings at the takeoff angle, the foreground blended."""
    if op.foreground:
        from ..plan.planner import true_gain_dbi

        return true_gain_dbi(op, band_name, state, theta_deg)[int(round(takeoff_deg))]
    return true_bearing_row(op.patterns[(band_name, state)].gain_dbi, takeoff_deg, theta_deg)
