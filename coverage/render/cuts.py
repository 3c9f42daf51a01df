"""Polar azimuth and elevation cuts of one pattern, as a PNG."""
from __future__ import annotations

from pathlib import Path

import numpy as np

from ..fileio import atomic_savefig

__all__ = ["draw_cuts"]

_RANGE_DB = 40.0
_SECTOR_COLOURS = ("#2f7fb8", "#c9a227", "#5a9e5a", "#a05aa0")


def draw_cuts(gain_dbi: np.ndarray, title: str, path: str | Path, foreground=()) -> Path:
    """Draw the azimuth cut at the peak elevation and the elevation cut
    through the peak bearing (front and back), and save them atomically.

    Parameters
    ----------
    gain_dbi : ndarray, shape (91, 360)
        Gain on the grid with azimuth as a true bearing.
    title : str
    path : path-like
        Output file; the format follows the suffix.
    foreground : sequence of dict
        Foreground sectors (``bearing_deg``, ``from_m``, ``ground``), shaded
        on the azimuth cut.
    """
    import matplotlib

    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot as plt

    g = np.asarray(gain_dbi, dtype=float)
    el, az = np.unravel_index(int(np.argmax(g)), g.shape)
    peak = float(g[el, az])
    inner = peak - _RANGE_DB

    fig = plt.figure(figsize=(9.0, 4.6))
    ax1 = fig.add_subplot(1, 2, 1, projection="polar")
    ax1.set_theta_zero_location("N")
    ax1.set_theta_direction(-1)
    theta = np.radians(np.append(np.arange(360), 0))
    row = np.append(g[el], g[el, 0])
    ax1.plot(theta, np.maximum(row, inner) - inner, color="tab:blue")
    ax1.set_title(f"azimuth at {el} deg elevation", fontsize=9)
    for i, f in enumerate(foreground):
        lo, hi = f["bearing_deg"]
        span = (hi - lo) % 360.0 or 360.0
        ax1.bar(np.radians(lo + span / 2), _RANGE_DB, width=np.radians(span), bottom=0.0,
                color=_SECTOR_COLOURS[i % len(_SECTOR_COLOURS)], alpha=0.18, linewidth=0,
                label=f"{f['ground']} from {f['from_m']:g} m", gid=f"foreground:{i}")
    if len(foreground):
        ax1.legend(fontsize=6.5, loc="lower left", bbox_to_anchor=(-0.12, -0.16), frameon=False)

    ax2 = fig.add_subplot(1, 2, 2, projection="polar")
    ax2.set_thetamin(0)
    ax2.set_thetamax(180)
    front = g[:, az]
    back = g[:, (az + 180) % 360]
    ang = np.concatenate([np.arange(91), 180 - np.arange(90, -1, -1)])
    cut = np.concatenate([front, back[::-1]])
    ax2.plot(np.radians(ang), np.maximum(cut, inner) - inner, color="tab:red")
    ax2.set_title(f"elevation toward {az} deg (left: {(az + 180) % 360} deg)", fontsize=9)

    for ax in (ax1, ax2):
        ticks = np.arange(0.0, _RANGE_DB + 0.1, 10.0)
        ax.set_rlim(0, _RANGE_DB)
        ax.set_rticks(ticks)
        ax.set_yticklabels([f"{inner + t:.0f}" for t in ticks], fontsize=7)
    fig.suptitle(f"{title}  (peak {peak:.1f} dBi; rings in dBi)", fontsize=10)
    try:
        return atomic_savefig(fig, path, dpi=100)
    finally:
        plt.close(fig)
