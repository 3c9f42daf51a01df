"""Which switch state when: the plan hour by hour and month by month.

For each spacing option at its best bearing (the array as it will be
built), each band and each (month, UT hour) slot, every state is scored as
the plan scores it (DESIGN.md, Score) but with that slot's needs only:

    V_gs(slot) = advantage of state s over one vertical for goal g in the slot
                 (minus the avoid term, as in the plan)
    score_s(slot) = sum(w_g o_g V_gs) / sum(w_g o_g) over the goals open on at
                    least ``closed_share`` of their points in the slot

The best state and the runner-up, with how much the runner-up loses, make
one row. The slot's needs are the sparse per-slot entries of
:class:`lobeplan.propagation.needs.Needs` (at most points x modes per slot):
a gather of the rotated gain at those cells and one ``bincount`` per state
and goal, no dense grid per hour.

The site and plan arguments are duck-typed on :class:`lobeplan.site.Site`
and :class:`lobeplan.plan.planner.Plan`.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..grid import N_AZIMUTH
from .planner import avoid_credit_cap_db, true_gain_dbi
from .sweep import GAIN_FLOOR_DBI, floored

__all__ = ["GoalSlot", "ScheduleRow", "GoalTrack", "Schedule", "make_schedule"]


@dataclass(frozen=True, slots=True)
class GoalSlot:
    """One goal in one slot under the slot's chosen state."""

    name: str
    path: str
    open_share: float
    advantage_db: float


@dataclass(frozen=True, slots=True)
class ScheduleRow:
    """The state to use on one band in one month and UT hour (``state`` None: nothing open)."""

    option: str
    orientation_deg: float
    band: str
    month: int
    hour_utc: int
    state: str | None
    score_db: float | None
    goals: tuple[GoalSlot, ...]
    runner_up_state: str | None
    runner_up_loss_db: float | None


@dataclass(frozen=True)
class GoalTrack:
    """One goal on one band, slot by slot, under its own best state (for the switch card).

    Arrays have shape (n_months, n_hours); ``state`` is -1 where the goal is
    open on fewer than ``closed_share`` of its points.
    """

    option: str
    goal: str
    path: str
    band: str
    open_share: np.ndarray
    state: np.ndarray
    advantage_db: np.ndarray


@dataclass(frozen=True)
class Schedule:
    months: tuple[int, ...]
    hours_utc: tuple[int, ...]
    closed_share: float
    rows: tuple[ScheduleRow, ...]
    tracks: tuple[GoalTrack, ...]
    state_names: dict          # option -> tuple of state names


def _slot_sums(needs, gain_flat: np.ndarray, ref_flat: np.ndarray, n_slots: int):
    """Per slot: sum of weights, of weights x gain, of weights x reference gain."""
    w = needs.slot_weight
    sw = np.bincount(needs.slot, weights=w, minlength=n_slots)
    swg = np.bincount(needs.slot, weights=w * gain_flat[needs.cell], minlength=n_slots)
    swr = np.bincount(needs.slot, weights=w * ref_flat[needs.cell], minlength=n_slots)
    return sw, swg, swr


def _advantage(needs, gain_flat, ref_flat, n_slots):
    sw, swg, swr = _slot_sums(needs, gain_flat, ref_flat, n_slots)
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(sw > 0, (swg - swr) / sw, np.nan)


def make_schedule(site, plan) -> Schedule:
    """The schedule of every option at its best allowed bearing.

    Parameters
    ----------
    site : Site
    plan : Plan
        From :func:`lobeplan.plan.planner.make_plan` (its goal-bands carry
        the sparse per-slot needs).

    Returns
    -------
    Schedule
        Rows ordered by option (as in the site), band (as in the site),
        month (as listed) and hour.

    References
    ----------
    DESIGN.md, Score; the needs of :mod:`lobeplan.propagation.needs`.
    """
    prop = site.propagation
    share_min = float(prop.closed_share)
    gbs = plan.goal_bands
    months = gbs[0].needs.months if gbs else prop.month_list
    hours = gbs[0].needs.hours_utc if gbs else prop.hours
    n_slots = len(months) * len(hours)
    rows: list[ScheduleRow] = []
    tracks: list[GoalTrack] = []
    names: dict = {}
    options = {o.name: o for o in site.array.options}
    band_order = [b.name for b in site.bands]
    for op in plan.options:
        names[op.option] = op.state_names
        if op.best_orientation_deg is None:
            continue
        theta = float(op.best_orientation_deg)
        cap = avoid_credit_cap_db(options[op.option].n_elements)
        for band in band_order:
            members = [gb for gb in gbs if gb.band_name == band]
            if not members:
                continue
            ref = floored(plan.reference_gain_dbi[band])
            ref_flat = np.repeat(ref, N_AZIMUTH)
            if op.foreground:  # the vertical at the same site sees the same foreground, by true bearing
                ref_flat = sum(m * floored(r)[:, None] for m, r in
                               zip(op.foreground["masks"][band], op.foreground["ref"][band])).ravel()
            open_share = np.array([gb.needs.open_share_by_slot.ravel() for gb in members])   # (G, S)
            counted = open_share >= max(share_min, 1e-12)
            goal_w = np.array([gb.weight for gb in members])[:, None] * open_share * counted
            values = np.full((len(op.state_names), len(members), n_slots), np.nan)
            advs = np.full_like(values, np.nan)
            for si, s_name in enumerate(op.state_names):
                gain = true_gain_dbi(op, band, s_name, theta, GAIN_FLOOR_DBI).ravel()  # foreground blended
                for gi, gb in enumerate(members):
                    adv = _advantage(gb.needs, gain, ref_flat, n_slots)
                    v = adv
                    if gb.avoid_needs is not None and gb.avoid_weight > 0 and gb.avoid_needs.slot is not None:
                        av = _advantage(gb.avoid_needs, gain, ref_flat, n_slots)
                        v = np.where(np.isfinite(av), adv - gb.avoid_weight * np.maximum(av, -cap), adv)
                    values[si, gi] = v
                    advs[si, gi] = adv
            total_w = goal_w.sum(axis=0)                                                  # (S,)
            with np.errstate(invalid="ignore", divide="ignore"):
                score = np.where(total_w > 0, np.nansum(values * goal_w[None], axis=1) / total_w, np.nan)
            order = np.argsort(-np.nan_to_num(score, nan=-np.inf), axis=0, kind="stable")   # (n_states, S)
            for gi, gb in enumerate(members):
                own = np.nan_to_num(values[:, gi], nan=-np.inf)
                best_own = np.where(counted[gi], np.argmax(own, axis=0), -1)
                adv_own = np.where(counted[gi], np.take_along_axis(advs[:, gi], np.maximum(best_own, 0)[None], 0)[0],
                                   np.nan)
                tracks.append(GoalTrack(op.option, gb.goal_name, gb.path, band,
                                        open_share[gi].reshape(len(months), len(hours)),
                                        best_own.reshape(len(months), len(hours)),
                                        adv_own.reshape(len(months), len(hours))))
            for k in range(n_slots):
                mi, hi = divmod(k, len(hours))
                if not total_w[k] > 0:
                    rows.append(ScheduleRow(op.option, theta, band, months[mi], hours[hi], None, None, (),
                                            None, None))
                    continue
                b = int(order[0, k])
                goals = tuple(GoalSlot(gb.goal_name, gb.path, float(open_share[gi, k]), float(advs[b, gi, k]))
                              for gi, gb in enumerate(members) if counted[gi, k])
                ru_state = ru_loss = None
                if len(op.state_names) > 1:
                    r = int(order[1, k])
                    ru_state = op.state_names[r]
                    ru_loss = float(score[b, k] - score[r, k])
                rows.append(ScheduleRow(op.option, theta, band, months[mi], hours[hi], op.state_names[b],
                                        float(score[b, k]), goals, ru_state, ru_loss))
    return Schedule(tuple(months), tuple(hours), share_min, tuple(rows), tuple(tracks), names)
