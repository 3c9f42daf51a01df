"""The two panels beside the map: elevation cuts against the needs, and the
score against baseline bearing.

- Elevation panel, one row per band: the elevation cut of each switch state
  of the mapped option through its own beam (the true bearing of its peak at
  the band's key takeoff angle), with each goal's takeoff-angle need
  (percent of its sampled point-hours per degree of elevation, so a goal
  that is seldom open stays low) shaded behind, so one sees whether the
  lobe sits where the needs are.
- Orientation panel: a polar plot of the score (mean advantage over one
  vertical, dB) against the baseline bearing for every spacing option, the
  bearings the lot allows shaded, each option's best bearing marked.
"""
from __future__ import annotations

import math
from pathlib import Path

import numpy as np

from ..fileio import atomic_savefig
from ..grid import ELEVATION_DEG
from .azimap import INK, STATE_COLOURS
from ..antenna.pattern import lobe_bearings_deg
from .fonts import drawable, setup as _font_setup
from .scene import chosen_option, key_takeoff_deg, true_bearing_row

__all__ = ["elevation_figure", "orientation_figure", "draw_elevation_panel", "draw_orientation_panel",
           "NEED_COLOURS", "OPTION_COLOURS"]

NEED_COLOURS = ("#d9a441", "#7fa7c9", "#c58fb0", "#8fbf8a", "#d48a6a", "#a0a0cc", "#c9c36a", "#9cc7c0")
OPTION_COLOURS = ("#1f4e79", "#c0522f", "#4f7f2f", "#7b4f9d", "#b8860b", "#1d7f86")
ALLOWED = "#cfe3c8"


def _pyplot():
    import matplotlib

    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot as plt

    _font_setup()
    return plt


def elevation_figure(site, plan):
    """One row per band; gids ``cut:<band>:<state>`` and ``need:<band>:<goal>``."""
    plt = _pyplot()
    op, theta, _ = chosen_option(plan)
    bands = [b.name for b in site.bands]
    fig, axes = plt.subplots(len(bands), 1, figsize=(10.0, 0.6 + 2.5 * len(bands)), squeeze=False)
    widest = 1
    for ax, band in zip(axes[:, 0], bands):
        takeoff = key_takeoff_deg(plan.goal_bands, band)
        need_ax = ax.twinx()
        need_ax.set_zorder(0)
        ax.set_zorder(1)
        ax.patch.set_visible(False)
        top_share = 0.0
        k = 0
        seen = set()
        for gb in plan.goal_bands:
            if gb.band_name != band:
                continue
            marg = gb.needs.weights.sum(axis=1)
            s = float(marg.sum())
            if s <= 0:
                continue
            # the weights sum to the open fraction: a goal that is seldom open
            # shows a low histogram, not a tall one
            share = 100.0 * marg
            # a default name is the whole region string (a file: path can be long): keep the legend beside the panel
            name = gb.goal_name if len(gb.goal_name) <= 40 else gb.goal_name[:39] + "\u2026"
            label = name + (" (long path)" if gb.path == "long" else "")
            if label in seen:
                continue
            seen.add(label)
            col = NEED_COLOURS[k % len(NEED_COLOURS)]
            open_text = "<1" if s < 0.005 else f"{100 * s:.0f}"
            if s < site.propagation.closed_share:  # listed as closed, as on the map
                need_ax.plot([], [], color="none", label=f"{label}: closed ({open_text}% open)")
                k += 1
                continue
            need_ax.fill_between(ELEVATION_DEG, share, step="mid", color=col, alpha=0.45, linewidth=0,
                                 label=f"need: {label} ({open_text}% open)", gid=f"need:{band}:{label}")
            top_share = max(top_share, float(share.max()))
            k += 1
        need_ax.set_ylim(0.0, max(top_share * 1.15, 1.0))
        need_ax.set_ylabel("need, % of point-hours per degree", fontsize=7.5, color="#6b5a2e")
        need_ax.tick_params(labelsize=7, colors="#6b5a2e")

        peak = -np.inf
        for i, s_name in enumerate(op.state_names):
            g = op.patterns[(band, s_name)].gain_dbi
            el = int(round(takeoff)) if takeoff is not None else int(np.unravel_index(np.argmax(g), g.shape)[0])
            res = op.patterns[(band, s_name)]
            how = "" if getattr(res, "kind", "forced") != "as-built" else f", as built ({res.design_band} network)"
            if op.foreground:  # the blended grid is already over true bearings
                from ..plan.planner import true_gain_dbi

                tg = true_gain_dbi(op, band, s_name, theta)
                every = lobe_bearings_deg(tg[el])   # ties broken the same way on every machine
                bearing = int(round(every[0][0])) % 360 if every else int(np.argmax(tg[el]))
                cut = tg[:, bearing]
            else:
                row = true_bearing_row(g, el, theta)
                every = lobe_bearings_deg(row)
                bearing = int(round(every[0][0])) % 360 if every else int(np.argmax(row))
                frame_az = (bearing - theta) % 360.0
                cut = np.array([np.interp(frame_az, np.arange(360.0), g[e], period=360.0)
                                for e in range(ELEVATION_DEG.size)])
            peak = max(peak, float(cut.max()))
            ax.plot(ELEVATION_DEG, cut, color=STATE_COLOURS[i % len(STATE_COLOURS)], linewidth=1.6,
                    label=f"{s_name} toward {bearing}°{how}", gid=f"cut:{band}:{s_name}")
        ax.set_ylim(peak - 25.0, peak + 3.0)
        ax.set_xlim(0.0, 90.0)
        if takeoff is not None:
            ax.axvline(takeoff, color=INK, linewidth=0.8, linestyle=(0, (4, 3)))
            ax.text(takeoff + 0.8, peak + 2.2, f"key takeoff {takeoff:.0f}°", fontsize=7, va="top", color=INK)
        ax.set_ylabel("gain, dBi", fontsize=8)
        ax.tick_params(labelsize=7)
        ax.grid(True, color="#d8d8d8", linewidth=0.5)
        where = "one vertical, no baseline" if op.layout == "single" else f"baseline along {theta:.1f}°"
        ax.set_title(f"{band}: {op.option}, {where}", fontsize=9, loc="left", color=INK)
        h1, l1 = ax.get_legend_handles_labels()
        h2, l2 = need_ax.get_legend_handles_labels()
        # many goals: more legend columns (about 16 entries fit beside a row), and a wider page for them
        ncol = max(1, math.ceil(len(l1 + l2) / 16))
        widest = max(ncol, widest)
        ax.legend(h1 + h2, [drawable(t) for t in l1 + l2], fontsize=6.8, loc="upper left", bbox_to_anchor=(1.08, 1.0),
                  frameon=False, ncol=ncol)
    axes[-1, 0].set_xlabel("elevation (takeoff angle), degrees", fontsize=8)
    from .scene import propagation_text

    fig.suptitle(drawable(f"{site.station.name}: elevation cuts through each state's beam, with the goals' needs\n"
                          f"{propagation_text(site)}"), fontsize=10, color=INK)
    fig.set_figwidth(10.0 + 2.6 * (widest - 1))
    fig.tight_layout(rect=(0, 0, 1, 0.98))
    return fig


def _allowed_spans(allowed_deg) -> list[tuple[float, float]]:
    spans = []
    for lo, hi in allowed_deg:
        span = (hi - lo) % 360.0
        if span == 0.0 and hi != lo:
            span = 360.0
        spans.append((float(lo), float(lo) + span))
    return spans


def orientation_figure(site, plan):
    """Score against baseline bearing; gids ``score:<option>`` and ``allowed:<i>``."""
    plt = _pyplot()
    fig = plt.figure(figsize=(6.4, 6.8))
    ax = fig.add_axes([0.11, 0.15, 0.78, 0.70], projection="polar")
    ax.set_theta_zero_location("N")
    ax.set_theta_direction(-1)
    finite = [op.score_db[np.isfinite(op.score_db)] for op in plan.options if op.layout != "single"]
    values = np.concatenate(finite) if finite else np.array([0.0])
    if values.size == 0:
        values = np.array([0.0])
    lo = float(np.floor(values.min() - 0.5))
    hi = float(np.ceil(values.max() + 0.5))
    if hi - lo < 2.0:
        hi = lo + 2.0
    ax.set_rlim(lo, hi)
    for i, (a, b) in enumerate(_allowed_spans(site.orientation.allowed_deg)):
        t = np.radians(np.linspace(a, b, max(2, int(b - a) + 1)))
        ax.fill_between(t, lo, hi, color=ALLOWED, alpha=0.7, linewidth=0, zorder=0, gid=f"allowed:{i}",
                        label="the lot allows" if i == 0 else None)
    for i, op in enumerate(plan.options):
        if op.layout == "single":   # one vertical has no bearing to sweep
            continue
        col = OPTION_COLOURS[i % len(OPTION_COLOURS)]
        sp = "" if op.spacing_m is None else f", {op.spacing_m:.2f} m"
        if op.best_orientation_deg is not None:
            sp += f": best {op.best_orientation_deg:.0f}°, {op.best_score_db:+.2f} dB"
        if op.orientation_deg.size == 1:
            ax.plot(np.radians(op.orientation_deg), op.score_db, marker="o", color=col, linestyle="none",
                    label=f"{op.option}{sp}", gid=f"score:{op.option}")
        else:
            t = np.radians(np.append(op.orientation_deg, op.orientation_deg[0] + 360.0))
            r = np.append(op.score_db, op.score_db[0])
            ax.plot(t, r, color=col, linewidth=1.6, label=f"{op.option}{sp}", gid=f"score:{op.option}")
        if op.best_orientation_deg is not None:
            ax.plot([np.radians(op.best_orientation_deg)], [op.best_score_db], marker="*", markersize=11,
                    color=col, markeredgecolor="white", zorder=5)
    ax.set_thetagrids(range(0, 360, 30), [f"{d}°" for d in range(0, 360, 30)], fontsize=7.5)
    ax.tick_params(axis="y", labelsize=7)
    ax.set_rlabel_position(100)
    ax.grid(True, color="#cfcfcf", linewidth=0.5)
    fig.text(0.5, 0.955, drawable(f"{site.station.name}: score against baseline bearing"), ha="center", fontsize=10.5,
             color=INK, fontweight="bold")
    fig.text(0.5, 0.925, "radius: mean advantage over one vertical, dB (weighted over the goals); "
             "\u2605 best allowed bearing", ha="center", fontsize=7.5, color=INK)
    from .scene import propagation_text

    fig.text(0.5, 0.90, propagation_text(site), ha="center", fontsize=7.5, color=INK)
    ax.legend(loc="upper center", bbox_to_anchor=(0.5, -0.06), ncol=1, fontsize=7.5, frameon=False)
    return fig


def _save(fig, path, dpi: int) -> Path:
    plt = _pyplot()
    try:
        suffix = Path(path).suffix.lower()
        if suffix == ".png":
            from .azimap import save_png_palette

            return save_png_palette(fig, path, dpi)
        meta = {"Software": "lobeplan"} if suffix == ".png" else {"Creator": "lobeplan"}
        if suffix == ".pdf":
            meta["CreationDate"] = None
        if suffix == ".svg":
            meta["Date"] = None
        return atomic_savefig(fig, path, dpi=dpi, metadata=meta)
    finally:
        plt.close(fig)


def draw_elevation_panel(site, plan, path: str | Path, dpi: int = 150) -> Path:
    return _save(elevation_figure(site, plan), path, dpi)


def draw_orientation_panel(site, plan, path: str | Path, dpi: int = 150) -> Path:
    return _save(orientation_figure(site, plan), path, dpi)
