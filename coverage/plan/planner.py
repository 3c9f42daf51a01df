"""The plan: every orientation, spacing option and switch state against the goals.

Score (DESIGN.md): for goal g on band b, state s and baseline bearing theta,

    mean_gain = sum(W G) / sum(W),  G floored at -30 dBi
    advantage = mean_gain(state) - mean_gain(one vertical, same needs)
    value     = advantage - avoid_weight * advantage over the avoid regions'
                own needs on band b (pooled), same state; the credit for keeping
                them below one vertical is capped at 10 log10(N elements) dB
    V_gb      = the best value over the option's states (switchable array)
    score     = sum(w_g o_gb V_gb) / sum(w_g o_gb)

with W the need weights of the goal on the band (sum = open fraction o_gb)
and w_g the goal weight. The score is thus a mean advantage in dB over one
vertical. All bearings come from one circular cross-correlation per
(goal, band, state) (see :mod:`lobeplan.plan.sweep`).

An option with ``use = "receive"`` is scored the same way with directivity
over the sky mean (:mod:`lobeplan.antenna.receive`) in place of gain, for
the array and for the reference vertical alike.

Foreground (``[[array.foreground]]``): ground that depends on true bearing
cannot rotate with the array, so it enters through the need weights. With
per-class masks M_k (true bearing, elevation; they sum to 1) and the array's
pattern G_k computed once per ground class k, the score sums one correlation
per class, sum_k correlate(W M_k, G_k) (see :mod:`lobeplan.plan.sweep`); the
reference vertical is blended the same way (it stands at the same site). A
receive option takes each class's directivity over its own sky mean.

The site argument is duck-typed on :class:`lobeplan.site.Site`.
"""
from __future__ import annotations

from dataclasses import dataclass, field
from typing import Callable

import numpy as np

from ..antenna.foreground import class_gains_dbi, foreground_masks, ground_classes
from ..antenna.pattern import array_pattern, vertical_gain_dbi
from ..antenna.receive import directivity_dbi
from ..geo.paths import goal_paths
from ..geo.regions import region_points
from ..grid import N_AZIMUTH
from ..propagation.needs import Needs, band_needs, prepare_goal_months
from .sweep import GAIN_FLOOR_DBI, correlate, floored, orientations, spectrum, weighted_quantile

__all__ = ["avoid_credit_cap_db", "GoalBand", "OptionPlan", "Plan", "RankEntry", "GoalRow", "make_plan", "needs_for_site",
           "in_allowed", "distinct_maxima", "score_option", "prepare_needs", "symmetry_order", "goal_rows",
           "receive_reference", "as_directivity", "windows_within", "site_foreground", "option_foreground",
           "true_gain_dbi"]

DISTINCT_DEG = 10.0  # ranking: maxima at least this far apart
WINDOW_DB = 1.0      # orientation sensitivity: bearings within this of the best


def avoid_credit_cap_db(n_elements: int) -> float:
    """Most credit for keeping an avoid region below one vertical: 10 log10 N dB.

    N elements add at most about 10 log10 N dB toward a goal, so a deep null
    toward an avoid region (the -30 dBi floor lies some 35 dB under a
    vertical) never pays more than serving the goals; a penalty for beaming
    at an avoid region is not capped.
    """
    return 10.0 * np.log10(max(int(n_elements), 1))


@dataclass(frozen=True, slots=True)
class GoalBand:
    """One goal on one band, with its needs (and the pooled avoid needs)."""

    goal_index: int
    goal_name: str
    path: str
    band_name: str
    freq_hz: float
    weight: float
    needs: Needs
    avoid_needs: Needs | None
    avoid_weight: float


@dataclass(frozen=True, slots=True)
class GoalRow:
    """How one goal on one band is served at one bearing."""

    goal: str
    path: str
    band: str
    state: str
    mean_gain_dbi: float | None
    p10_gain_dbi: float | None
    advantage_db: float | None
    value_db: float | None
    open_fraction: float
    avoid_advantage_db: float | None
    reference_gain_dbi: float | None
    kind: str = ""                  # how the state's currents are made on this band
    design_band: str | None = None  # as-built: the band its network is designed on


@dataclass(frozen=True, slots=True)
class RankEntry:
    option: str
    layout: str
    spacing_m: float | None
    orientation_deg: float
    score_db: float
    goals: tuple[GoalRow, ...]


@dataclass(frozen=True)
class OptionPlan:
    """Sweep result of one spacing option."""

    option: str
    layout: str
    spacing_m: float | None
    orientation_deg: np.ndarray        # (n_theta,)
    score_db: np.ndarray               # (n_theta,), NaN where nothing is open
    allowed: np.ndarray                # (n_theta,) bool
    best_orientation_deg: float | None
    best_score_db: float | None
    window_deg: tuple[float, float] | None   # bearings within 1 dB of the best (clockwise)
    values_db: np.ndarray              # (n_goalband, n_theta) best value per goal-band
    best_state: np.ndarray             # (n_goalband, n_theta) index of that state
    state_names: tuple[str, ...]
    patterns: dict = field(repr=False, default_factory=dict)   # (band, state) -> ArrayResult
    # receive options (issue 14) are scored by directivity over the sky mean
    # (``patterns`` still hold gain, for the maps); the reference is then one
    # vertical's directivity
    use: str = "transmit"
    reference_db: dict | None = field(repr=False, default=None)   # band -> (91,), receive only
    # with [[array.foreground]]: "masks" band -> (n_class, 91, 360) over true bearings,
    # "gains" (band, state) -> (n_class, 91, 360) in the array frame (directivity for a
    # receive option) and "ref" band -> (n_class, 91) for the vertical; empty without
    foreground: dict = field(repr=False, default_factory=dict)


@dataclass(frozen=True)
class Plan:
    goal_bands: tuple[GoalBand, ...]
    options: tuple[OptionPlan, ...]
    ranking: tuple[RankEntry, ...]
    reference_gain_dbi: dict        # band name -> (91,) single-vertical gain
    caveats: tuple[str, ...]


def in_allowed(thetas_deg: np.ndarray, allowed: tuple[tuple[float, float], ...]) -> np.ndarray:
    """Bearings inside any allowed (from, to) clockwise range; all when none given."""
    thetas = np.asarray(thetas_deg, dtype=float)
    if not allowed:
        return np.ones(thetas.shape, dtype=bool)
    ok = np.zeros(thetas.shape, dtype=bool)
    for lo, hi in allowed:
        span = (hi - lo) % 360.0
        if span == 0.0 and hi != lo:
            span = 360.0
        ok |= np.mod(thetas - lo, 360.0) <= span + 1e-9
    return ok


def needs_for_site(site, progress: Callable[[int, int], None] | None = None
                   ) -> tuple[tuple[GoalBand, ...], tuple[str, ...]]:
    """Need weights for every (goal, band) of the site, avoid regions pooled."""
    prop = site.propagation
    geometries: dict[tuple, object] = {}
    wanted = {(g.region, g.clip, g.path) for g in site.goals}
    wanted |= {(a, None, g.path) for g in site.goals for a in g.avoid}
    n_total = len(wanted)
    # a region's prepared months are big (every month's ionosphere at every
    # point and hour): drop them after the last goal that uses them
    last_use = {}
    for gi, g in enumerate(site.goals):
        for k in [(g.region, g.clip, g.path)] + [(a, None, g.path) for a in g.avoid]:
            last_use[k] = gi
    built = [0]

    def geometry(text: str, clip, key: str, path: str):
        k = (text, clip, path)
        if k not in geometries:
            lons, lats = region_points(site, text, clip, key)
            bearing, dist = goal_paths(site.station, lons, lats, path)
            base = built[0]
            built[0] += 1

            def inner(done: int, total: int, base=base) -> None:
                progress(base + (done / total if total else 1.0), n_total)

            geometries[k] = prepare_goal_months(prop, site.station.lon_deg, site.station.lat_deg, lons, lats,
                                                bearing, dist, path,
                                                progress=inner if progress is not None else None)
        return geometries[k]

    out = []
    caveats: dict[str, None] = {}
    for gi, goal in enumerate(site.goals):
        geo = geometry(goal.region, goal.clip, f"{goal.key}.region", goal.path)
        avoid_geos = [geometry(a, None, f"{goal.key}.avoid[{j + 1}]", goal.path)
                      for j, a in enumerate(goal.avoid)]
        for band in site.goal_bands(goal):
            needs = band_needs(geo, band.freq_hz, prop)
            for c in needs.caveats:
                caveats[c] = None
            avoid = None
            if avoid_geos:
                parts = [band_needs(g, band.freq_hz, prop) for g in avoid_geos]
                avoid = _pool(parts)
            out.append(GoalBand(gi, goal.name, goal.path, band.name, band.freq_hz, goal.weight, needs,
                                avoid, goal.avoid_weight))
        for k in [k for k, last in last_use.items() if last == gi]:
            geometries.pop(k, None)
    return tuple(out), tuple(caveats)


def _pool(parts: list[Needs]) -> Needs:
    """Several regions' needs as one: weights averaged, so the sum stays a fraction."""
    if len(parts) == 1:
        return parts[0]
    from dataclasses import replace

    w = sum(p.weights for p in parts) / len(parts)
    # the sparse per-slot entries pool the same way: all entries, each weight
    # divided by the number of regions
    sparse = {}
    if all(p.slot is not None for p in parts):
        sparse = dict(slot=np.concatenate([p.slot for p in parts]),
                      cell=np.concatenate([p.cell for p in parts]),
                      slot_weight=np.concatenate([p.slot_weight for p in parts]) / len(parts),
                      open_share_by_slot=sum(p.open_share_by_slot for p in parts) / len(parts))
    return replace(parts[0], weights=w, open_fraction=float(w.sum()), **sparse)


def _ref_mean(weights: np.ndarray, ref_gain_dbi: np.ndarray) -> float:
    return float(np.sum(weights * floored(ref_gain_dbi)[:, None]) / np.sum(weights))


def make_plan(site, goal_bands: tuple[GoalBand, ...] | None = None,
              progress: Callable[[int, int], None] | None = None) -> Plan:
    """Plan every option of the site over every allowed bearing."""
    caveats: tuple[str, ...] = ()
    if goal_bands is None:
        goal_bands, caveats = needs_for_site(site, progress)
    spec = site.array
    orient = site.orientation
    fixed = orient.fixed_deg is not None
    thetas = np.array([orient.fixed_deg]) if fixed else orientations(orient.step_deg)
    allowed = in_allowed(thetas, orient.allowed_deg)
    bands = {gb.band_name: gb.freq_hz for gb in goal_bands}
    ref = {name: vertical_gain_dbi(spec, f) for name, f in bands.items()}

    fg = site_foreground(spec, bands)
    prepared = prepare_needs(goal_bands, ref, fg)  # shared by every option

    option_plans = []
    receive_ref: list = []  # [(reference directivity, prepared needs)], made once if any option receives
    for option in spec.options:
        patterns = {(band_name, s.name): array_pattern(spec, option, s, f)
                    for band_name, f in bands.items() for s in option.states}
        o_thetas, o_allowed, method = thetas, allowed, ("direct" if fixed else "fft")
        if option.n_elements == 1:
            # one vertical has no baseline: a single bearing, whatever the lot allows
            o_thetas, o_allowed, method = np.array([0.0]), np.array([True]), "direct"
        option_prepared, option_ref, scored = prepared, None, patterns
        opt_fg = option_foreground(spec, option, patterns, fg)
        if option.receive:
            if not receive_ref:
                rx = receive_reference(ref)
                rx_fg = _foreground_directivity(fg)
                receive_ref.append((rx, prepare_needs(goal_bands, rx, rx_fg), rx_fg))
            option_ref, option_prepared, rx_fg = receive_ref[0]
            scored = as_directivity(patterns)
            opt_fg = _foreground_directivity(opt_fg, rx_fg)
        values, best_state = score_option(option, scored, goal_bands, option_prepared, o_thetas, orient.step_deg,
                                          method, opt_fg)
        weights = np.array([gb.weight * pre["open"] for gb, pre in zip(goal_bands, option_prepared)])
        open_rows = np.isfinite(values[:, 0]) & (weights > 0)
        if open_rows.any():
            score = (weights[open_rows, None] * values[open_rows]).sum(axis=0) / weights[open_rows].sum()
        else:
            score = np.full(o_thetas.size, np.nan)
        best_theta, best_score, window = _best(o_thetas, score, o_allowed)
        if option.n_elements == 1:
            window = None
        option_plans.append(OptionPlan(option.name, option.layout, option.spacing_m, o_thetas, score,
                                       o_allowed, best_theta, best_score, window, values, best_state,
                                       tuple(s.name for s in option.states), patterns, option.use, option_ref,
                                       opt_fg))
    ranking = _ranking(site, goal_bands, option_plans, ref)
    return Plan(tuple(goal_bands), tuple(option_plans), ranking, ref, caveats)


# --- receive options (issue 14) ---------------------------------------------
# On receive the sky's noise sets the signal-to-noise ratio, so a receive
# option is scored by its directivity over the sky mean (the solid-angle mean
# gain over the upper hemisphere) against one vertical's directivity, not by
# gain: a short lossy receiving array is then judged by what it hears, not by
# the power it would radiate.

def receive_reference(ref: dict) -> dict:
    """One vertical's directivity over the sky mean per band, (91,) dB each."""
    return {band: directivity_dbi(g) for band, g in ref.items()}


def as_directivity(patterns: dict) -> dict:
    """The option's patterns with ``gain_dbi`` replaced by directivity over the sky mean."""
    from dataclasses import replace

    out = {}
    for k, r in patterns.items():
        d = directivity_dbi(r.gain_dbi)
        d.flags.writeable = False
        out[k] = replace(r, gain_dbi=d)
    return out


def site_foreground(spec, bands: dict) -> dict:
    """Masks and reference-vertical gains per class for every band; {} without a foreground.

    ``bands`` maps band name -> frequency (Hz). Returns {"masks": band ->
    (n_class, 91, 360), "ref": band -> (n_class, 91)}.
    """
    if not spec.foreground:
        return {}
    classes = ground_classes(spec)
    return {"masks": {b: foreground_masks(spec, f) for b, f in bands.items()},
            "ref": {b: np.stack([vertical_gain_dbi(spec, f, g) for g in classes]) for b, f in bands.items()}}


def option_foreground(spec, option, patterns: dict, site_fg: dict) -> dict:
    """The option's patterns once per ground class, with the site's masks; {} without."""
    if not site_fg:
        return {}
    return {"masks": site_fg["masks"], "ref": site_fg["ref"],
            "gains": {k: class_gains_dbi(spec, option, r) for k, r in patterns.items()}}


def true_gain_dbi(plan_option: OptionPlan, band_name: str, state_name: str, theta_deg: float,
                  floor_dbi: float | None = None) -> np.ndarray:
    """A state's gain over true bearings for baseline bearing theta, foreground blended.

    Parameters
    ----------
    plan_option : OptionPlan
    band_name, state_name : str
    theta_deg : float
    floor_dbi : float, optional
        Floor applied to every class before blending (the score's -30 dBi;
        None: the pattern's own floor).

    Returns
    -------
    ndarray, shape (91, 360)
        dBi over true bearings: sum_k M_k G_k(a - theta) with a foreground,
        else the pattern turned by theta (the score's Fourier shift).
    """
    key = (band_name, state_name)
    fg = plan_option.foreground
    gains = fg["gains"][key] if fg else plan_option.patterns[key].gain_dbi[None]
    if floor_dbi is not None:
        gains = np.maximum(gains, floor_dbi)
    if not fg:
        return _rotate(gains[0], theta_deg)
    return sum(m * _rotate(g, theta_deg) for m, g in zip(fg["masks"][band_name], gains))


def _ref_mean_fg(weights: np.ndarray, masks: np.ndarray, ref_k: np.ndarray) -> float:
    """Mean of the reference vertical under the weights, blended per class."""
    return float(sum(np.sum(weights * m * floored(g)[:, None]) for m, g in zip(masks, ref_k)) / np.sum(weights))


def _foreground_directivity(fg: dict, converted: dict | None = None) -> dict:
    """A foreground for a receive option: every class's gain as directivity over its sky mean.

    ``converted`` is the site's foreground already converted (its reference is reused).
    """
    if not fg:
        return {}
    ref = converted["ref"] if converted else {b: np.stack([directivity_dbi(g) for g in r])
                                              for b, r in fg["ref"].items()}
    out = {"masks": fg["masks"], "ref": ref}
    if "gains" in fg:
        out["gains"] = {k: np.stack([directivity_dbi(g) for g in gk]) for k, gk in fg["gains"].items()}
    return out


def prepare_needs(goal_bands, ref: dict, foreground: dict | None = None) -> list[dict]:
    """Per goal-band pieces every option shares: sums, spectra, reference means.

    With a foreground (:func:`site_foreground`), ``spec`` is the spectrum of
    W M_k for every ground class k stacked along the rows (n_class * 91, 181)
    and ``weights`` stays W.
    """
    prepared = []
    for gb in goal_bands:
        entry = {}
        masks = foreground["masks"][gb.band_name] if foreground else None
        for tag, needs in (("", gb.needs), ("avoid_", gb.avoid_needs)):
            w = needs.weights if needs is not None else None
            w_sum = float(w.sum()) if w is not None else 0.0
            entry[tag + "weights"] = w
            entry[tag + "open"] = w_sum
            if masks is None:
                entry[tag + "spec"] = spectrum(w) if w_sum > 0 else None
                entry[tag + "ref"] = _ref_mean(w, ref[gb.band_name]) if w_sum > 0 else None
            else:
                # the classes stacked along the rows: one correlation sums them all
                entry[tag + "spec"] = spectrum(np.concatenate(w[None] * masks)) if w_sum > 0 else None
                entry[tag + "ref"] = (_ref_mean_fg(w, masks, foreground["ref"][gb.band_name])
                                      if w_sum > 0 else None)
        entry["masks"] = masks
        prepared.append(entry)
    return prepared


def _advantage(weights, w_spec, w_sum, ref_mean, gain_floored, gain_spec, thetas, step_deg, method, masks=None):
    """Mean-gain advantage over one vertical at every bearing in ``thetas``.

    ``fft``: the circular cross-correlation (all bearings at once).
    ``direct``: one vectorised pass over the whole grid per bearing; used for
    a fixed bearing and as the benchmark's baseline.
    With ``masks`` (n_class, 91, 360), ``gain_floored`` is (n_class, 91, 360)
    and ``w_spec``/``gain_spec`` hold the classes stacked along the rows, so
    that one correlation gives sum_k correlate(W M_k, G_k).
    """
    if method == "fft":  # with a foreground both spectra hold the classes stacked along the rows
        return correlate(w_spec, gain_spec, step_deg) / w_sum - ref_mean
    if masks is None:
        return np.array([float(np.sum(weights * _rotate(gain_floored, t))) for t in thetas]) / w_sum - ref_mean
    total = [sum(float(np.sum(weights * m * _rotate(g, t))) for m, g in zip(masks, gain_floored)) for t in thetas]
    return np.array(total) / w_sum - ref_mean


def score_option(option, patterns, goal_bands, prepared, thetas, step_deg, method="fft", foreground=None):
    """Best value over the option's states for every goal-band and bearing.

    ``foreground`` is :func:`option_foreground` (``prepared`` must then come
    from :func:`prepare_needs` with the site's foreground).

    Returns
    -------
    values_db : ndarray, shape (n_goalband, n_theta), NaN where never open
    best_state : ndarray of int, same shape
    """
    credit_cap = avoid_credit_cap_db(option.n_elements)
    if foreground:
        floored_gain = {k: floored(g) for k, g in foreground["gains"].items()}
        gain_specs = ({k: spectrum(g.reshape(-1, g.shape[-1])) for k, g in floored_gain.items()}
                      if method == "fft" else {})
    else:
        floored_gain = {k: floored(r.gain_dbi) for k, r in patterns.items()}
        gain_specs = {k: spectrum(g) for k, g in floored_gain.items()} if method == "fft" else {}
    values = np.full((len(goal_bands), thetas.size), np.nan)
    best_state = np.zeros((len(goal_bands), thetas.size), dtype=int)
    for i, (gb, pre) in enumerate(zip(goal_bands, prepared)):
        if pre["open"] <= 0:
            continue
        per_state = []
        for s in option.states:
            key = (gb.band_name, s.name)
            g, gs = floored_gain[key], gain_specs.get(key)
            masks = pre.get("masks") if foreground else None
            v = _advantage(pre["weights"], pre["spec"], pre["open"], pre["ref"], g, gs, thetas, step_deg,
                           method, masks)
            if pre["avoid_open"] > 0 and gb.avoid_weight > 0:
                av = _advantage(pre["avoid_weights"], pre["avoid_spec"], pre["avoid_open"], pre["avoid_ref"],
                                g, gs, thetas, step_deg, method, masks)
                v = v - gb.avoid_weight * np.maximum(av, -credit_cap)
            per_state.append(v)
        stack = np.vstack(per_state)
        best_state[i] = np.argmax(stack, axis=0)
        values[i] = np.max(stack, axis=0)
    return values, best_state


def _rotate(gain_frame: np.ndarray, theta_deg: float) -> np.ndarray:
    """Array-frame gain as a function of true bearing for baseline bearing theta.

    Whole degrees roll exactly; a fractional bearing shifts by the Fourier
    shift theorem, the same trigonometric interpolation the sweep uses.
    """
    if abs(theta_deg - round(theta_deg)) < 1e-9:
        return np.roll(gain_frame, int(round(theta_deg)) % N_AZIMUTH, axis=1)
    k = np.arange(N_AZIMUTH // 2 + 1)
    phase = np.exp(-2j * np.pi * k * theta_deg / N_AZIMUTH)
    spec0 = np.fft.rfft(gain_frame, axis=1)
    spec = spec0 * phase
    if N_AZIMUTH % 2 == 0:  # the Nyquist term shifts as cos(pi theta), as in the sweep
        spec[:, -1] = spec0[:, -1].real * np.cos(np.pi * theta_deg)
    return np.fft.irfft(spec, n=N_AZIMUTH, axis=1)


def _best(thetas, score, allowed):
    ok = allowed & np.isfinite(score)
    if not ok.any():
        return None, None, None
    masked = np.where(ok, score, -np.inf)
    i = int(np.argmax(masked))
    best = float(score[i])
    if thetas.size == 1:
        return float(thetas[i]), best, (float(thetas[i]), float(thetas[i]))
    good = ok & (score >= best - WINDOW_DB)
    n = thetas.size
    lo = i
    while good[(lo - 1) % n] and (lo - 1) % n != i:
        lo = (lo - 1) % n
    hi = i
    while good[(hi + 1) % n] and (hi + 1) % n != lo:
        hi = (hi + 1) % n
    return float(thetas[i]), best, (float(thetas[lo]), float(thetas[hi]))


def windows_within(thetas: np.ndarray, score: np.ndarray, allowed: np.ndarray,
                   db: float = WINDOW_DB) -> tuple[list[tuple[float, float]], bool]:
    """Every run of allowed bearings within ``db`` of the best score.

    Returns ``(runs, every)``: runs as (first, last) bearing, clockwise, the
    run holding the best first and then clockwise from it; ``every`` is True
    when every allowed bearing is within ``db`` (a flat score, or one fixed
    bearing). A symmetric layout gives one run per copy of its best bearing;
    each is listed.
    """
    ok = allowed & np.isfinite(score)
    if not ok.any():
        return [], False
    best_i = int(np.argmax(np.where(ok, score, -np.inf)))
    good = ok & (score >= score[best_i] - db)
    n = thetas.size
    every = bool((good == ok).all())
    if good.all():
        return [(float(thetas[0]), float(thetas[-1]))], True
    start = int(np.flatnonzero(~good)[0])  # walk the circle from a bearing outside every run
    runs: list[tuple[int, int]] = []
    k = 0
    while k < n:
        i = (start + k) % n
        if not good[i]:
            k += 1
            continue
        first = i
        while k + 1 < n and good[(start + k + 1) % n]:
            k += 1
        runs.append((first, (start + k) % n))
        k += 1
    # the run holding the best bearing first, then clockwise
    lead = next(j for j, (a, b) in enumerate(runs) if (best_i - a) % n <= (b - a) % n)
    runs = runs[lead:] + runs[:lead]
    return [(float(thetas[a]), float(thetas[b])) for a, b in runs], every


def symmetry_order(positions_m) -> int:
    """Largest m such that turning the layout by 360/m deg about its centre
    gives the same ground plan (1: none; 2: pair, line; 4: square)."""
    pts = np.asarray(positions_m, dtype=float)
    if pts.shape[0] < 2:
        return 1
    centre = pts.mean(axis=0)
    rel = pts - centre
    scale = max(float(np.max(np.hypot(*rel.T))), 1e-9)
    for m in range(min(pts.shape[0], 12), 1, -1):
        a = 2 * np.pi / m
        turned = rel @ np.array([[np.cos(a), np.sin(a)], [-np.sin(a), np.cos(a)]])
        if all(np.min(np.hypot(*(rel - q).T)) < 1e-6 * scale for q in turned):
            return m
    return 1


def distinct_maxima(thetas: np.ndarray, score: np.ndarray, allowed: np.ndarray,
                    apart_deg: float = DISTINCT_DEG, symmetry: int = 1) -> list[int]:
    """Indices of local maxima (allowed bearings), best first, at least ``apart_deg`` apart.

    With a layout of rotational ``symmetry`` m (see :func:`symmetry_order`),
    bearings theta and theta + k 360/m are the same ground plan with the
    elements numbered another way round, so they count as near too.
    """
    n = thetas.size
    ok = allowed & np.isfinite(score)
    if not ok.any():
        return []
    s = np.where(ok, score, -np.inf)
    if n == 1:
        return [0]
    period = 360.0 / max(int(symmetry), 1)
    is_peak = ok & (s >= np.roll(s, 1)) & (s >= np.roll(s, -1))
    cand = np.flatnonzero(is_peak)
    cand = cand[np.argsort(-s[cand], kind="stable")]
    picked: list[int] = []
    for c in cand:
        d = np.abs((thetas[c] - thetas[picked] + period / 2) % period - period / 2) if picked else np.array([])
        if not np.any(d < apart_deg):
            picked.append(int(c))
    return picked


def goal_rows(plan_option: OptionPlan, goal_bands, theta_index: int, ref: dict) -> tuple[GoalRow, ...]:
    if plan_option.reference_db is not None:  # a receive option: directivity against the vertical's
        ref = plan_option.reference_db
    rows = []
    theta = float(plan_option.orientation_deg[theta_index])
    for i, gb in enumerate(goal_bands):
        w = gb.needs.weights
        open_f = float(w.sum())
        if open_f <= 0 or not np.isfinite(plan_option.values_db[i, theta_index]):
            rows.append(GoalRow(gb.goal_name, gb.path, gb.band_name, "", None, None, None, None, open_f,
                                None, None))
            continue
        s_idx = int(plan_option.best_state[i, theta_index])
        s_name = plan_option.state_names[s_idx]
        fg = plan_option.foreground
        if fg:  # blended per ground class (directivity already, for a receive option)
            g = true_gain_dbi(plan_option, gb.band_name, s_name, theta, GAIN_FLOOR_DBI)
        else:
            g = plan_option.patterns[(gb.band_name, s_name)].gain_dbi
            if plan_option.reference_db is not None:  # receive: directivity, as it was scored
                g = directivity_dbi(g)
            g = _rotate(floored(g), theta)

        def ref_of(weights, band=gb.band_name):
            if fg:
                return _ref_mean_fg(weights, fg["masks"][band], fg["ref"][band])
            return _ref_mean(weights, ref[band])

        mean = float(np.sum(w * g) / open_f)
        ref_mean = ref_of(w)
        p10 = weighted_quantile(g, w, 0.10)
        avoid_adv = None
        if gb.avoid_needs is not None and gb.avoid_needs.weights.sum() > 0:
            aw = gb.avoid_needs.weights
            avoid_adv = float(np.sum(aw * g) / aw.sum()) - ref_of(aw)
        res = plan_option.patterns[(gb.band_name, s_name)]
        rows.append(GoalRow(gb.goal_name, gb.path, gb.band_name, s_name, mean, p10, mean - ref_mean,
                            float(plan_option.values_db[i, theta_index]), open_f, avoid_adv, ref_mean,
                            getattr(res, "kind", "forced"), getattr(res, "design_band", None)))
    return tuple(rows)


def _ranking(site, goal_bands, option_plans, ref, top: int = 5) -> tuple[RankEntry, ...]:
    cands = []
    symmetry = {o.name: symmetry_order(o.positions_m) for o in site.array.options}
    for op in option_plans:
        for idx in distinct_maxima(op.orientation_deg, op.score_db, op.allowed,
                                   symmetry=symmetry[op.option]):
            cands.append((float(op.score_db[idx]), op, idx))
    cands.sort(key=lambda c: -c[0])
    out = []
    for score, op, idx in cands[:top]:
        out.append(RankEntry(op.option, op.layout, op.spacing_m, float(op.orientation_deg[idx]), score,
                             goal_rows(op, goal_bands, idx, ref)))
    return tuple(out)
