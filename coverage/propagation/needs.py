"""Takeoff-angle needs of a goal region on a band: the weights the planner scores.

Two steps, so that the heavy part is done once per goal:

1. :func:`prepare_goal` (band-independent): control points of every sampled
   path and, for the climatology model, the ionosphere there at every hour.
2. :func:`band_needs` (per band, cheap): which modes are open at the
   frequency, with what probability, and at what takeoff angle; binned on
   the angular grid of :mod:`lobeplan.grid`.

Models
------
geometry (the default)
    Fixed reflection heights; the lowest-order F2 mode that meets the
    minimum elevation carries all the weight; every hour is open. No
    ionosphere is consulted.
climatology
    Monthly-median foF2, hmF2, M(3000)F2 and foE (PyIRI) and the IGRF
    gyrofrequency at the ITU-R P.533 control points, month by month, each
    month with its own solar input. For each path and hour the candidate
    modes are F2 from the lowest order (ceil(D / d_max), P.1240's reference
    hop, raised until the takeoff angle meets the minimum elevation) and
    two orders more, and E on every path with the fewest hops meeting the
    minimum elevation and one more. A mode's probability is:

    - F2: P(day's MUF > f), the MUF being the lowest over the control
      points of P.1240's basic MUF (:func:`.muf.p1240_f2_muf`, with the
      fH/2 (1 - d/d_max) term), the day-to-day spread by day or night and
      magnetic latitude (:func:`.muf.f2_decile_factors`), times P(the E
      layer does not screen it): the E-layer MUF for the F2 ray's own
      obliquity at the E height, foE sec i (highest over the control
      points). At night a weak E layer lets the steeper low-band rays
      through and reflects the flatter ones, which are E modes;
    - E: P(day's E MUF > f), the E MUF foE sec i at the E height;
    - zero if the mode's absorption (George and Bradley's form, per hop,
      at every frequency, the index averaged over the reflection points of
      the hops) exceeds ``absorption_limit_db``.

    The modes of one path and hour rise and fall with the same ionosphere,
    so they are taken as fully correlated: the path is open with the
    probability of its likeliest mode, and that weight is shared among the
    modes in proportion to their own probabilities times their relative
    strength: their absorption, and ``extra_hop_loss_db`` for each ground
    reflection beyond the path's fewest (a few dB per reflection over land,
    common practice). A mode 10 dB weaker than another counts a tenth as
    much.

References
----------
ITU-R P.533 (control points, mode set, absorption floor); ITU-R P.1240
(basic MUF, reference hop, decile ratios); Davies (1990) ch. 6 (secant law with curvature);
George and Bradley (1974) (absorption); Forsythe et al. (2023) (PyIRI).
See :mod:`.hops`, :mod:`.muf` and :mod:`.climatology` for the details.
"""
from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

import numpy as np

from ..grid import N_AZIMUTH, N_ELEVATION
from . import climatology as clim
from .hops import EARTH_RADIUS_KM, elevation_deg, incidence_secant, min_hops, path_modes
from .model import PropagationSettings, hour_ranges_text
from .muf import (ABSORPTION_HEIGHT_KM, E_DECILE_FACTORS, absorption_db, absorption_index,
                  control_point_distances_km, control_points, f2_decile_factors, open_probability,
                  p1240_dmax_km, p1240_f2_muf, secant_law_muf)

__all__ = ["GoalGeometry", "ModeTable", "ModeShare", "Needs", "prepare_goal", "band_needs",
           "prepare_goal_months", "MIN_PROBABILITY", "OPEN_HOUR_FRACTION"]

MIN_PROBABILITY = 1e-3
"""Mode probabilities below this count as closed: the normal tail of the
day-to-day spread would otherwise leave every band faintly open."""

OPEN_HOUR_FRACTION = 0.5
"""An hour is listed as open when at least this share of the goal's points
is open on it (probability-weighted)."""

MODELS = ("geometry", "climatology")
PATHS = ("short", "long")
# guard rails on the map hmF2 used as a mirror height (km); the maps stay
# well inside (about 230..450 km), this only keeps the geometry defined
_HMF2_LIMITS_KM = (150.0, 600.0)

Progress = Callable[[int, int], None]


def _frozen(a, dtype=float) -> np.ndarray:
    out = np.array(a, dtype=dtype)
    out.flags.writeable = False
    return out


@dataclass(frozen=True, slots=True)
class GoalGeometry:
    """Band-independent part of a goal's needs (see :func:`prepare_goal`).

    Attributes
    ----------
    model : str
        "geometry" or "climatology".
    path : str
        "short" or "long".
    station_lon_deg, station_lat_deg : float
    lons_deg, lats_deg, bearing_deg, distance_km : ndarray, shape (n_points,)
        The sampled goal points and their paths (bearing at the station,
        ground distance along the path in use).
    hours_utc : tuple of int
        The UT hours evaluated (each at its middle, h + 0.5).
    control_lons_deg, control_lats_deg : ndarray, shape (n_points, 2)
        ITU-R P.533 control points of each path.
    ionosphere : climatology.Ionosphere or None
        For the climatology model: arrays of shape (n_hours, n_points, 2),
        the last axis the two control points.
    hop_zenith_deg : ndarray or None
        For the climatology model, shape (n_hours, n_points, k): solar
        zenith angle at the reflection point of each hop of the
        lowest-order F2 mode at the nominal height (NaN past a path's own
        hop count), for the absorption estimate.
    solar : climatology.SolarInput or None
    year, month : int
    modes : ModeTable
        Candidate modes with their MUFs, band-independent.
    """

    model: str
    path: str
    station_lon_deg: float
    station_lat_deg: float
    lons_deg: np.ndarray
    lats_deg: np.ndarray
    bearing_deg: np.ndarray
    distance_km: np.ndarray
    hours_utc: tuple[int, ...]
    control_lons_deg: np.ndarray
    control_lats_deg: np.ndarray
    ionosphere: clim.Ionosphere | None
    hop_zenith_deg: np.ndarray | None
    solar: clim.SolarInput | None
    year: int
    month: int
    modes: "ModeTable"


@dataclass(frozen=True, slots=True)
class ModeShare:
    """One propagation mode's part of a goal's needs.

    ``share`` is the mode's part of the open weight (the shares sum to 1);
    ``elevation_deg`` its weighted median takeoff angle over the goal's
    points and hours.
    """

    layer: str
    hops: int
    share: float
    elevation_deg: float


@dataclass(frozen=True, slots=True)
class Needs:
    """Takeoff-angle needs of one goal on one band.

    Attributes
    ----------
    weights : ndarray, shape (91, 360)
        Over (elevation 0..90 deg, true azimuth 0..359 deg) at 1 deg, the
        grid of :mod:`lobeplan.grid`; the sum is ``open_fraction``. Each
        (point, hour) contributes its open probability divided by
        n_points x n_hours, shared among its open modes; azimuth bin =
        round(bearing) % 360, elevation bin = round(takeoff angle).
    open_fraction : float
        Share of sampled points x hours with an open mode (0..1).
    elevation_p10, elevation_median, elevation_p90 : float or None
        Weighted deciles and median of the takeoff angle (deg); None when
        the band is never open.
    modes : tuple of ModeShare
        Largest share first.
    open_hours_utc : tuple of int
        Hours with at least ``OPEN_HOUR_FRACTION`` of the goal open.
    hours_utc : tuple of int
        The hours evaluated.
    hour_open_fraction : tuple of float
        Open fraction of each hour of ``hours_utc`` (averaged over the
        months).
    model : str
    freq_hz : float
    caveats : tuple of str
        Plain sentences on what the figures do not include.
    months : tuple of int
        The months modelled, in the order of the slots below.
    open_share_by_slot : ndarray, shape (n_months, n_hours)
        Open share of the goal's points in each month and hour.
    slot, cell, slot_weight : ndarray, shape (n_entries,)
        The same needs, sparse, per (month, hour): entry k puts
        ``slot_weight[k]`` on grid cell ``cell[k]`` (elevation bin x 360 +
        azimuth bin) in slot ``slot[k]`` (month index x n_hours + hour
        index). One slot's weights sum to its open share, so ``weights``
        is their sum over the slots divided by the number of slots. At
        most points x modes entries per slot: no dense grid per hour.
    """

    weights: np.ndarray
    open_fraction: float
    elevation_p10: float | None
    elevation_median: float | None
    elevation_p90: float | None
    modes: tuple[ModeShare, ...]
    open_hours_utc: tuple[int, ...]
    hours_utc: tuple[int, ...]
    hour_open_fraction: tuple[float, ...]
    model: str
    freq_hz: float
    caveats: tuple[str, ...]
    months: tuple[int, ...] = ()
    open_share_by_slot: np.ndarray | None = None
    slot: np.ndarray | None = None
    cell: np.ndarray | None = None
    slot_weight: np.ndarray | None = None


def _check(settings: PropagationSettings, path: str) -> None:
    if settings.model not in MODELS:
        raise ValueError(f"propagation.model: expected one of {', '.join(MODELS)}, not {settings.model!r}")
    if path not in PATHS:
        raise ValueError(f"path: expected 'short' or 'long', not {path!r}")
    if settings.model == "climatology":
        lo, hi = clim.YEAR_RANGE
        if not lo <= settings.year <= hi:
            raise ValueError(f"propagation.year: {settings.year} is outside {lo}..{hi}, "
                             "the range of PyIRI's magnetic field model")
        if not 1 <= settings.month <= 12:
            raise ValueError(f"propagation.month: {settings.month} is not 1..12")


def prepare_goal(settings: PropagationSettings, station_lon_deg: float, station_lat_deg: float,
                 lons_deg, lats_deg, bearing_deg, distance_km, path: str,
                 progress: Progress | None = None) -> GoalGeometry:
    """Control points and (for climatology) the ionosphere of a goal's paths.

    Done once per goal and reused for every band.

    Parameters
    ----------
    settings : PropagationSettings
    station_lon_deg, station_lat_deg : float
        The station (deg).
    lons_deg, lats_deg : array_like, shape (n_points,)
        Sampled goal points (deg).
    bearing_deg, distance_km : array_like, shape (n_points,)
        Bearing at the station and ground distance of each path, for the
        path in use (the long path: bearing + 180, 2 pi R - short distance).
    path : {"short", "long"}
    progress : callable(done, total), optional
        Called as the work advances (for a progress bar at the edge).

    Returns
    -------
    GoalGeometry

    Raises
    ------
    ValueError
        On an unknown model or path, a year outside PyIRI's range, arrays of
        different shapes, or a climatology without solar input.

    References
    ----------
    ITU-R P.533 (control points); Forsythe et al. (2023) (PyIRI).
    """
    return _prepare(settings, (int(settings.month),), station_lon_deg, station_lat_deg, lons_deg, lats_deg,
                    bearing_deg, distance_km, path, progress)[0]


def _prepare(settings: PropagationSettings, months: tuple[int, ...], station_lon_deg: float,
             station_lat_deg: float, lons_deg, lats_deg, bearing_deg, distance_km, path: str,
             progress: Progress | None) -> tuple[GoalGeometry, ...]:
    _check(settings, path)
    lons = np.asarray(lons_deg, dtype=float).ravel()
    lats = np.asarray(lats_deg, dtype=float).ravel()
    bearing = np.asarray(bearing_deg, dtype=float).ravel()
    dist = np.asarray(distance_km, dtype=float).ravel()
    if not lons.size == lats.size == bearing.size == dist.size:
        raise ValueError("prepare_goal: lons_deg, lats_deg, bearing_deg and distance_km differ in length")
    clim_model = settings.model == "climatology"
    total = 2 + len(months) if clim_model else 1
    if progress is not None:
        progress(0, total)

    # control-point positions use the nominal F2 height: P.533 places them
    # by the lowest-order hop before any ionosphere is known
    n0 = min_hops(dist, settings.f2_height_km, settings.min_elevation_deg)
    hop_km = dist / n0
    along = control_point_distances_km(dist, hop_km)
    cp_lon, cp_lat = control_points(station_lon_deg, station_lat_deg, bearing, along)
    if progress is not None:
        progress(1, total)

    hours = tuple(settings.hours)
    common = dict(model=settings.model, path=path,
                  station_lon_deg=float(station_lon_deg), station_lat_deg=float(station_lat_deg),
                  lons_deg=_frozen(lons), lats_deg=_frozen(lats), bearing_deg=_frozen(bearing),
                  distance_km=_frozen(dist), hours_utc=hours,
                  control_lons_deg=_frozen(cp_lon), control_lats_deg=_frozen(cp_lat), year=int(settings.year))
    if not clim_model:
        table = _geometry_table(dist, len(hours), settings)
        return tuple(GoalGeometry(**common, ionosphere=None, hop_zenith_deg=None, solar=None, month=int(m),
                                  modes=table) for m in months)

    per_month = [settings.for_month(m) for m in months]
    solars = [clim.solar_input(s.solar_flux, s.sunspot_number) for s in per_month]
    ut = np.asarray(hours, dtype=float) + 0.5
    raws = clim.ionosphere_months(settings.year, months, ut, cp_lon.ravel(), cp_lat.ravel(),
                                  [s.flux_sfu for s in solars], settings.fof2_maps)
    if progress is not None:
        progress(2, total)
    # the absorption estimate looks at every hop, not only the two control
    # points (beyond 4000 km those are the first and last hop midpoints, so
    # the sets agree there)
    k = int(n0.max()) if n0.size else 1
    valid = np.arange(k)[None, :] < n0[:, None]
    along_hops = np.where(valid, (np.arange(k)[None, :] + 0.5) * hop_km[:, None], 0.0)
    hop_lon, hop_lat = control_points(station_lon_deg, station_lat_deg, bearing, along_hops)
    shape = (len(hours), lons.size, 2)
    out = []
    for i, (m, solar, raw) in enumerate(zip(months, solars, raws)):
        iono = clim.Ionosphere(
            hours_utc=_frozen(ut),
            fof2_mhz=_frozen(raw.fof2_mhz.reshape(shape)),
            hmf2_km=_frozen(raw.hmf2_km.reshape(shape)),
            m3000f2=_frozen(raw.m3000f2.reshape(shape)),
            foe_mhz=_frozen(raw.foe_mhz.reshape(shape)),
            solar_zenith_deg=_frozen(raw.solar_zenith_deg.reshape(shape)),
            gyrofrequency_mhz=_frozen(raw.gyrofrequency_mhz.reshape(shape)),
            dip_latitude_deg=_frozen(raw.dip_latitude_deg.reshape(shape)),
        )
        chi = clim.solar_zenith_deg(settings.year, m, ut, hop_lon.ravel(), hop_lat.ravel())
        chi = chi.reshape(len(hours), lons.size, k)
        hop_zenith = _frozen(np.where(valid[None, :, :], chi, np.nan))
        table = _climatology_table(dist, iono, hop_zenith, solar.sunspot_number, per_month[i])
        out.append(GoalGeometry(**common, ionosphere=iono, hop_zenith_deg=hop_zenith, solar=solar,
                                month=int(m), modes=table))
        if progress is not None:
            progress(3 + i, total)
    return tuple(out)


def _sorted_quantiles(v: np.ndarray, w: np.ndarray, qs) -> list[float]:
    """Weighted quantiles of values already sorted ascending (midpoint rule)."""
    cum = np.cumsum(w) - 0.5 * w
    return [float(np.interp(q, cum / w.sum(), v)) for q in qs]


@dataclass(frozen=True, slots=True)
class ModeTable:
    """Band-independent candidate modes of every path and hour.

    Attributes
    ----------
    layer : tuple of str, length n_modes
    hops : ndarray of int, shape (n_hours, n_points, n_modes)
        0 where the mode does not exist.
    elevation_deg : ndarray, shape (n_hours, n_points, n_modes)
    muf_mhz : ndarray or None, shape (n_hours, n_points, n_modes)
        Monthly-median MUF of the mode (lowest over the control points);
        None for the geometry model.
    screen_muf_mhz : ndarray or None, same shape
        E-layer MUF for an F2 mode's own ray (highest over the control
        points); 0 for E modes; None for the geometry model.
    absorption_index : ndarray or None, shape (n_hours, n_points, 1)
        George-Bradley index averaged over the hops' reflection points.
    decile_lower, decile_upper : ndarray or None, shape (n_hours, n_points, n_modes)
        Day-to-day decile ratios of each mode's MUF.
    gyrofrequency_mhz : ndarray or None, shape (n_hours, n_points, 1)
        Gyrofrequency at absorption heights over the path (MHz).
    """

    layer: tuple[str, ...]
    hops: np.ndarray
    elevation_deg: np.ndarray
    muf_mhz: np.ndarray | None
    screen_muf_mhz: np.ndarray | None
    absorption_index: np.ndarray | None
    decile_lower: np.ndarray | None = None
    decile_upper: np.ndarray | None = None
    gyrofrequency_mhz: np.ndarray | None = None


def _geometry_table(distance_km: np.ndarray, n_hours: int, settings: PropagationSettings) -> ModeTable:
    modes = path_modes(distance_km, settings.f2_height_km, settings.e_height_km,
                       settings.min_elevation_deg, extra_f2_hops=0, extra_e_hops=0)
    shape = (n_hours, distance_km.size, 1)
    return ModeTable(("F2",), _frozen(np.broadcast_to(modes.hops[None, :, :1], shape), int),
                     _frozen(np.broadcast_to(modes.elevation_deg[None, :, :1], shape)), None, None, None)


def _climatology_table(distance_km: np.ndarray, io: clim.Ionosphere, hop_zenith_deg: np.ndarray,
                       sunspot_number: float, settings: PropagationSettings) -> ModeTable:
    fo = io.fof2_mhz                                   # (T, N, 2)
    hr = np.clip(io.hmf2_km, *_HMF2_LIMITS_KM)         # (T, N, 2)
    foe = io.foe_mhz
    he = settings.e_height_km
    d = np.broadcast_to(distance_km[None, :], fo.shape[:2])
    h_mean = hr.mean(axis=-1)
    # F2: P.1240's reference hop sets the lowest order, ceil(D / d_max) with
    # the shorter d_max of the two control points; a mode that would leave
    # below the minimum elevation at the map's hmF2 is not launched, so the
    # order is raised until it meets it
    dmax = np.min(p1240_dmax_km(fo, foe, io.m3000f2), axis=-1)
    n_f2 = np.maximum(np.maximum(np.ceil(d / dmax - 1e-9), 1).astype(int),
                      min_hops(d, h_mean, settings.min_elevation_deg))
    # E: every path, with as many hops as it takes (night-time E hops carry
    # the low bands across oceans); the fewest meeting the minimum elevation
    n_e = min_hops(d, he, settings.min_elevation_deg)
    layers, hop_cols = [], []
    for k in range(3):
        layers.append("F2")
        hop_cols.append(n_f2 + k)
    for k in range(2):
        layers.append("E")
        hop_cols.append(n_e + k)
    hops = np.stack(hop_cols, axis=-1)                 # (T, N, M)
    el = np.empty(hops.shape)
    muf = np.empty(hops.shape)
    screen = np.zeros(hops.shape)
    lower, upper = f2_decile_factors(io.solar_zenith_deg, io.dip_latitude_deg)   # (T, N, 2)
    dec_lo = np.empty(hops.shape)
    dec_hi = np.empty(hops.shape)
    for j, layer in enumerate(layers):
        hop_km = d / hops[..., j]
        if layer == "F2":
            el[..., j] = elevation_deg(hop_km, h_mean)
            muf[..., j] = np.min(p1240_f2_muf(fo, foe, io.m3000f2, hop_km[..., None], io.gyrofrequency_mhz),
                                 axis=-1)
            # E screening: the E layer's MUF for this ray's own obliquity at
            # the E height, the highest over the control points
            screen[..., j] = np.max(foe * incidence_secant(el[..., j], he)[..., None], axis=-1)
            dec_lo[..., j] = lower.min(axis=-1)
            dec_hi[..., j] = upper.max(axis=-1)
        else:
            el[..., j] = elevation_deg(hop_km, he)
            muf[..., j] = np.min(secant_law_muf(foe, hop_km[..., None], he), axis=-1)
            dec_lo[..., j], dec_hi[..., j] = E_DECILE_FACTORS
    index = np.nanmean(absorption_index(hop_zenith_deg, sunspot_number), axis=-1)[..., None]
    # the gyrofrequency at the absorbing heights: the 300 km IGRF value
    # scaled by the dipole's r^-3 to 100 km
    r = EARTH_RADIUS_KM
    gyro_abs = (io.gyrofrequency_mhz.mean(axis=-1) * ((r + 300.0) / (r + ABSORPTION_HEIGHT_KM)) ** 3)[..., None]
    return ModeTable(tuple(layers), _frozen(hops, int), _frozen(el), _frozen(muf), _frozen(screen),
                     _frozen(index), _frozen(dec_lo), _frozen(dec_hi), _frozen(gyro_abs))


def _mode_probability(table: ModeTable, freq_mhz: float, settings: PropagationSettings
                      ) -> tuple[np.ndarray, np.ndarray]:
    """Open probability and loss (dB) of every mode, both (T, N, M)."""
    exists = table.hops > 0
    fewest = np.min(np.where(exists, table.hops, np.iinfo(np.int64).max), axis=-1, keepdims=True)
    # every ground reflection more than the path's fewest costs extra_hop_loss_db
    loss_db = settings.extra_hop_loss_db * np.where(exists, table.hops - fewest, 0)
    if table.muf_mhz is None:  # geometry: the lowest-order mode, always
        return np.ones(table.hops.shape), loss_db
    f2 = np.array([layer == "F2" for layer in table.layer])
    deciles = (table.decile_lower, table.decile_upper)
    p = open_probability(freq_mhz, table.muf_mhz, deciles)
    p[..., f2] *= 1.0 - open_probability(freq_mhz, table.screen_muf_mhz[..., f2], E_DECILE_FACTORS)
    absorption = absorption_db(freq_mhz, np.nan_to_num(table.elevation_deg), table.hops,
                               table.absorption_index, table.gyrofrequency_mhz)
    p = np.where(exists & (p >= MIN_PROBABILITY) & (absorption <= settings.absorption_limit_db), p, 0.0)
    return p, loss_db + absorption


def _month_text(geos: tuple[GoalGeometry, ...]) -> str:
    parts = []
    for g in geos:
        parts.append(f"{g.year}-{g.month:02d} F10.7 {g.solar.flux_sfu:.0f}")
    fluxes = {round(g.solar.flux_sfu) for g in geos}
    if len(fluxes) == 1:
        months = ", ".join(f"{g.year}-{g.month:02d}" for g in geos) if len(geos) < 12 else \
            f"all twelve months of {geos[0].year}"
        return f"{months} at F10.7 {geos[0].solar.flux_sfu:.0f} sfu"
    return "; ".join(parts) + " sfu"


def _caveats(geos: tuple[GoalGeometry, ...], settings: PropagationSettings) -> tuple[str, ...]:
    geo = geos[0]
    hours = hour_ranges_text(geo.hours_utc)
    if geo.model == "geometry":
        return (
            "No ionosphere was consulted: fixed reflection heights "
            f"(F2 {settings.f2_height_km:g} km, E {settings.e_height_km:g} km), the lowest-order F2 "
            f"mode meeting {settings.min_elevation_deg:g} deg carries all the weight, "
            f"and every hour counts as open (UT hours modelled: {hours}).",
        )
    out = [
        f"Monthly-median ionosphere from PyIRI ({settings.fof2_maps.upper()} foF2 maps) for "
        f"{_month_text(geos)}; UT hours modelled: {hours}. F2 MUF by ITU-R P.1240 (with its "
        "gyrofrequency term and reference hop), E MUF by the secant law; the day-to-day spread "
        "widens by night and at high magnetic latitude (decile ratios from memory).",
        "Absorption (George and Bradley's form, per hop, at every frequency) weights the modes and "
        f"closes a mode above {settings.absorption_limit_db:g} dB; each ground reflection beyond "
        f"the fewest costs {settings.extra_hop_loss_db:g} dB.",
        "Not modelled: noise and the lowest usable frequency it sets, transmitter power, sporadic E, "
        "the F1 layer, auroral and polar-cap absorption, E-F (M) and ducted modes, deviative "
        "absorption near reflection.",
    ]
    for s in {g.solar for g in geos if g.solar.clamped}:
        lo, hi = clim.SOLAR_FLUX_RANGE_SFU
        out.append(f"Solar input {s.requested_sfu:.0f} sfu was clamped to {s.flux_sfu:.0f} sfu: the maps "
                   f"are used only within {lo:.0f}..{hi:.0f} sfu (sunspot number 0..150).")
    return tuple(out)


def prepare_goal_months(settings: PropagationSettings, station_lon_deg: float, station_lat_deg: float,
                        lons_deg, lats_deg, bearing_deg, distance_km, path: str,
                        progress: Progress | None = None) -> tuple[GoalGeometry, ...]:
    """:func:`prepare_goal` for every month of ``settings.month_list``, each with its own solar input.

    Returns
    -------
    tuple of GoalGeometry
        One per month, in the order of ``settings.month_list``.
    """
    return _prepare(settings, settings.month_list, station_lon_deg, station_lat_deg, lons_deg, lats_deg,
                    bearing_deg, distance_km, path, progress)


def band_needs(goal_geometry: GoalGeometry | tuple[GoalGeometry, ...], freq_hz: float,
               settings: PropagationSettings) -> Needs:
    """Takeoff-angle needs of a prepared goal at one frequency.

    Parameters
    ----------
    goal_geometry : GoalGeometry or tuple of GoalGeometry
        From :func:`prepare_goal` (one month) or :func:`prepare_goal_months`
        (several: the needs are their average, each month's hours a slot).
    freq_hz : float
        Operating frequency (Hz).
    settings : PropagationSettings

    Returns
    -------
    Needs

    References
    ----------
    ITU-R P.533 (mode set, control points); ITU-R P.1240 (basic MUF,
    decile ratios); Davies (1990) (secant law); George and Bradley (1974)
    (absorption).
    """
    geos = (goal_geometry,) if isinstance(goal_geometry, GoalGeometry) else tuple(goal_geometry)
    geo = geos[0]
    for g in geos:
        if settings.model != g.model:
            raise ValueError(f"band_needs: the goal was prepared for the {g.model} model, "
                             f"not {settings.model}")
    layers = geo.modes.layer
    f_mhz = float(freq_hz) / 1e6
    parts = [_mode_probability(g.modes, f_mhz, settings) for g in geos]
    p = np.concatenate([pp for pp, _ in parts], axis=0)          # (S, N, M), S = months x hours
    loss_db = np.concatenate([ll for _, ll in parts], axis=0)
    hops = np.concatenate([g.modes.hops for g in geos], axis=0)
    el = np.concatenate([g.modes.elevation_deg for g in geos], axis=0)

    n_slots, n_points, n_modes = p.shape
    n_hours = len(geo.hours_utc)
    q = p.max(axis=-1)                                       # (S, N) open probability
    # Open modes share the weight by probability and by relative strength
    # (absorption and extra ground reflections), so a mode 10 dB weaker
    # than another carries a tenth of its part of the need.
    open_loss = np.where(p > 0, loss_db, np.inf)
    best = np.min(open_loss, axis=-1, keepdims=True)
    with np.errstate(invalid="ignore", over="ignore"):
        strength = np.where(p > 0, 10.0 ** (-(loss_db - np.where(np.isfinite(best), best, 0.0)) / 10.0), 0.0)
    ps = p * strength
    total_p = ps.sum(axis=-1)
    with np.errstate(invalid="ignore", divide="ignore"):
        share = np.where(total_p[..., None] > 0, ps / total_p[..., None], 0.0)
    w_slot = q[..., None] * share / max(n_points, 1)          # (S, N, M); one slot sums to its open share

    live = w_slot > 0
    el_bin = np.clip(np.rint(np.where(live, el, 0.0)), 0, N_ELEVATION - 1).astype(int)
    az_bin = np.broadcast_to((np.rint(geo.bearing_deg).astype(int) % N_AZIMUTH)[None, :, None], w_slot.shape)
    flat = (el_bin * N_AZIMUTH + az_bin)[live]
    wl_slot = w_slot[live]
    slot = np.broadcast_to(np.arange(n_slots)[:, None, None], w_slot.shape)[live]
    grid = np.bincount(flat, weights=wl_slot / max(n_slots, 1), minlength=N_ELEVATION * N_AZIMUTH)
    weights = _frozen(grid.reshape(N_ELEVATION, N_AZIMUTH))

    open_fraction = float(q.mean()) if q.size else 0.0
    by_slot = q.mean(axis=1) if n_points else np.zeros(n_slots)
    by_month_hour = by_slot.reshape(len(geos), n_hours)
    hour_fraction = by_month_hour.mean(axis=0)
    open_hours = tuple(h for h, fr in zip(geo.hours_utc, hour_fraction) if fr >= OPEN_HOUR_FRACTION)

    p10 = med = p90 = None
    mode_list: list[ModeShare] = []
    if live.any():
        # one sort of the takeoff angles serves every quantile: a subset of
        # a sorted array stays sorted
        order = np.argsort(el[live], kind="stable")
        el_l = el[live][order]
        wl = wl_slot[order]
        p10, med, p90 = _sorted_quantiles(el_l, wl, (0.1, 0.5, 0.9))
        layer_idx = np.broadcast_to(np.arange(n_modes), w_slot.shape)[live][order]
        layer_name = np.array(layers)[layer_idx]
        hop_l = hops[live][order]
        total = wl.sum()
        for layer in ("F2", "E"):
            for n in np.unique(hop_l[layer_name == layer]):
                sel = (layer_name == layer) & (hop_l == n)
                mode_list.append(ModeShare(layer, int(n), float(wl[sel].sum() / total),
                                           _sorted_quantiles(el_l[sel], wl[sel], (0.5,))[0]))
        mode_list.sort(key=lambda m: (-m.share, m.layer, m.hops))

    return Needs(
        weights=weights,
        open_fraction=open_fraction,
        elevation_p10=p10, elevation_median=med, elevation_p90=p90,
        modes=tuple(mode_list),
        open_hours_utc=open_hours,
        hours_utc=tuple(geo.hours_utc),
        hour_open_fraction=tuple(float(x) for x in hour_fraction),
        model=geo.model,
        freq_hz=float(freq_hz),
        caveats=_caveats(geos, settings),
        months=tuple(g.month for g in geos),
        open_share_by_slot=_frozen(by_month_hour),
        slot=_frozen(slot, np.int32),
        cell=_frozen(flat, np.int32),
        slot_weight=_frozen(wl_slot),
    )
