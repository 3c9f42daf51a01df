"""The ground plan: a top view of each option at its chosen bearing, north up.

One panel per option: the elements (numbered), the junction and the line
runs, the baseline, the bearings the lot allows (shaded wedges round the
array), each switch state's beam bearings (arrows, every lobe within 1 dB
on its design band) and a scale bar. Drawn from a staking plan
(:mod:`lobeplan.plan.stakes`); no physics here.
"""
from __future__ import annotations

import math
import textwrap
from pathlib import Path

import numpy as np

from ..safety import CAUTION_LINE

from .azimap import INK, STATE_COLOURS
from .panels import ALLOWED, _allowed_spans

__all__ = ["layout_figure", "draw_layout"]


def _nice(length_m: float) -> float:
    """A round scale-bar length about a quarter of the drawing."""
    target = max(length_m / 4.0, 0.5)
    p = 10.0 ** math.floor(math.log10(target))
    for m in (1.0, 2.0, 5.0, 10.0):
        if m * p >= target:
            return m * p
    return 10.0 * p


def layout_figure(stakes, allowed_deg, beams, title: str):
    """Figure of the staking plans.

    Parameters
    ----------
    stakes : sequence of StakingPlan
    allowed_deg : tuple of (from, to)
        The lot's allowed baseline bearings (empty: all).
    beams : sequence of dict
        Per plan: state name -> tuple of true beam bearings (deg).
    title : str
    """
    import matplotlib

    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot as plt

    n = max(len(stakes), 1)
    fig, axes = plt.subplots(1, n, figsize=(5.4 * n, 6.9), squeeze=False)
    for ax, sp, bm in zip(axes[0], stakes, beams):
        pts = np.array([[s.east_m, s.north_m] for s in sp.elements])
        jx, jy = sp.junction.east_m, sp.junction.north_m
        centre = pts.mean(axis=0)
        size = max(float(np.max(np.hypot(*(pts - centre).T))) if len(pts) > 1 else 0.0, 5.0)
        reach = 2.2 * size
        # allowed baselines: wedges of the bearings the lot allows (and their reverse)
        for i, (a, b) in enumerate(_allowed_spans(allowed_deg)):
            t = np.radians(np.linspace(a, b, max(2, int(b - a) + 1)))
            xs = np.concatenate([[centre[0]], centre[0] + reach * np.sin(t)])
            ys = np.concatenate([[centre[1]], centre[1] + reach * np.cos(t)])
            ax.fill(xs, ys, color=ALLOWED, alpha=0.6, linewidth=0, zorder=0, gid=f"allowed:{i}",
                    label="bearings the lot allows for the baseline" if i == 0 else None)
        if len(pts) > 1:
            th = math.radians(sp.orientation_deg)
            d = np.array([math.sin(th), math.cos(th)])
            ax.plot(*np.stack([centre - reach * d, centre + reach * d]).T, color=INK, linewidth=0.8,
                    linestyle=(0, (6, 3)), zorder=1, gid="baseline",
                    label=f"baseline along {sp.orientation_deg:.1f}°")
        for r in sp.runs if len(pts) > 1 else ():   # one vertical is fed at its base: no junction, no runs
            s = sp.elements[r.element - 1]
            ax.plot([jx, s.east_m], [jy, s.north_m], color="#8a6d3b", linewidth=1.4, zorder=2,
                    gid=f"run:{r.element}", label="line runs from the junction" if r.element == 1 else None)
        ax.plot(pts[:, 0], pts[:, 1], "o", color=INK, markersize=9, zorder=4, gid="elements")
        for s in sp.elements:
            ax.annotate(s.name, (s.east_m, s.north_m), xytext=(6, 6), textcoords="offset points", fontsize=10,
                        fontweight="bold", color=INK, zorder=5)
        if len(pts) > 1:   # one vertical is fed at its base: no junction
            ax.plot([jx], [jy], "s", color="#8a6d3b", markersize=7, zorder=4, gid="junction", label="junction")
        drawn: list[float] = []
        for k, (state, bearings) in enumerate(bm.items()):
            col = STATE_COLOURS[k % len(STATE_COLOURS)]
            for j, b in enumerate(bearings):
                t = math.radians(b)
                # a beam another state already shows on this bearing gets a shorter
                # arrow, so both stay visible
                tip = 2.0 - 0.22 * sum(abs((b - d + 180.0) % 360.0 - 180.0) < 3.0 for d in drawn)
                drawn.append(b)
                # outside the elements, so the line runs stay visible
                ax.annotate("", xy=(centre[0] + tip * size * math.sin(t), centre[1] + tip * size * math.cos(t)),
                            xytext=(centre[0] + 1.25 * size * math.sin(t), centre[1] + 1.25 * size * math.cos(t)),
                            arrowprops=dict(arrowstyle="-|>", color=col, linewidth=1.6), zorder=3 + 0.01 * k)
            ax.plot([], [], color=col, linewidth=1.6, label=f"{state}: beam " +
                    ("all round" if not bearings else "/".join(f"{b:.0f}°" for b in bearings)))
        # scale bar, bottom left
        bar = _nice(2 * reach)
        x0, y0 = centre[0] - reach * 0.95, centre[1] - reach * 0.95
        ax.plot([x0, x0 + bar], [y0, y0], color=INK, linewidth=3, solid_capstyle="butt", gid="scale-bar")
        ax.text(x0 + bar / 2, y0 + reach * 0.04, f"{bar:g} m", ha="center", va="bottom", fontsize=8, color=INK)
        # north arrow, top left
        ax.annotate("N", xy=(x0, centre[1] + reach * 0.95), xytext=(x0, centre[1] + reach * 0.7),
                    ha="center", fontsize=9, fontweight="bold", color=INK,
                    arrowprops=dict(arrowstyle="-|>", color=INK))
        ax.set_xlim(centre[0] - reach, centre[0] + reach)
        ax.set_ylim(centre[1] - reach, centre[1] + reach)
        ax.set_aspect("equal")
        ax.set_xlabel("east of element 1, m", fontsize=8)
        ax.set_ylabel("north of element 1, m", fontsize=8)
        ax.tick_params(labelsize=7)
        ax.grid(True, color="#e2e2e2", linewidth=0.5)
        ax.set_title(sp.option, fontsize=10, loc="left", color=INK)
        ax.legend(fontsize=6.8, loc="upper center", bbox_to_anchor=(0.5, -0.09), ncol=2, frameon=False)
    # about 12 characters of 10.5 pt bold per inch: wrap the title to the page it sits on
    lines = textwrap.wrap(title, max(30, int(12 * 5.4 * n)))
    fig.suptitle("\n".join(lines), fontsize=10.5, color=INK, fontweight="bold")
    rows = max((len(b) + 4 + 1) // 2 for b in beams) if beams else 3  # legend rows below each plan
    bottom = min(0.4, (0.45 + 0.17 * rows + 0.5) / fig.get_figheight())
    fig.tight_layout(rect=(0, bottom, 1, 1 - 0.28 * len(lines) / fig.get_figheight()))
    fig.text(0.01, 0.012, "Before digging or driving stakes, have buried services located; keep elements, radials "
             "and guys clear of power lines (nothing may reach one if it falls). " + CAUTION_LINE,
             fontsize=6.6, color="#6b3a1e", wrap=True)
    return fig


def draw_layout(stakes, allowed_deg, beams, title: str, path: str | Path, dpi: int = 150) -> Path:
    """Draw the staking plans and save atomically (the panels' PNG palette)."""
    from .panels import _save

    return _save(layout_figure(stakes, allowed_deg, beams, title), path, dpi)
