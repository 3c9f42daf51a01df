"""The radial table as a figure: gain change toward the beam against radial count."""
from __future__ import annotations

import math
from pathlib import Path

from ..fileio import atomic_savefig

__all__ = ["draw_radial_table"]

_LENGTH_COLOURS = ("#b5651d", "#3f7f5f", "#2a4d8f", "#7a3f8f")
INK = "#23272b"


def draw_radial_table(bands: list[dict], path: str | Path) -> Path:
    """One panel per band and option of ``feed`` JSON: gain change and loss against count.

    Parameters
    ----------
    bands : list of dict
        The ``bands`` entries of the feed verb's result (with ``radial_table``).
    path : path-like

    Returns
    -------
    Path
    """
    import matplotlib

    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot as plt

    n = len(bands)
    cols = min(n, 2)
    rows = math.ceil(n / cols)
    fig, axes = plt.subplots(rows, cols, figsize=(5.2 * cols, 3.6 * rows), squeeze=False)
    for ax in axes.flat[n:]:
        ax.set_visible(False)
    for ax, b in zip(axes.flat, bands):
        ref = b["radial_table_reference"]
        lengths = sorted({r["length_wavelengths"] for r in b["radial_table"]})
        for i, x in enumerate(lengths):
            col = sorted((r for r in b["radial_table"] if r["length_wavelengths"] == x), key=lambda r: r["count"])
            counts = [r["count"] for r in col]
            ax.plot(counts, [r["gain_change_db"] for r in col], marker="o", markersize=3.5, linewidth=1.5,
                    color=_LENGTH_COLOURS[i % len(_LENGTH_COLOURS)], label=f"{x:g} wavelength long",
                    gid=f"length:{x:g}")
            # the longest radials' line lies on top, the shortest at the bottom: label above, below
            # and beside so that close lines do not print over each other
            above, below = i == len(lengths) - 1, i == 0
            offset, ha = ((0, 5), "center") if above else ((0, -10), "center") if below else ((7, -3), "left")
            for j, r in enumerate(col[1::2]):
                last = j == len(col[1::2]) - 1 and not (above or below)   # beside the last point: off the axes
                ax.annotate(f"{r['loss_ohm']:.0f} ohm", (r["count"], r["gain_change_db"]),
                            xytext=(0, -10) if last else offset, textcoords="offset points", fontsize=6,
                            ha="center" if last else ha,
                            color=_LENGTH_COLOURS[i % len(_LENGTH_COLOURS)])
        ax.axhline(0.0, color=INK, linewidth=0.8, linestyle=(0, (4, 3)))
        ax.set_xscale("log")
        ax.set_xticks(sorted({r["count"] for r in b["radial_table"]}))
        ax.set_xticklabels([str(c) for c in sorted({r["count"] for r in b["radial_table"]})], fontsize=7)
        ax.minorticks_off()
        ax.tick_params(labelsize=7)
        ax.grid(True, color="#dddddd", linewidth=0.5)
        ax.set_xlabel("buried radials per element", fontsize=8)
        ax.set_ylabel("gain change toward the beam, dB", fontsize=8)
        source = "from its radials" if b["ground_loss_source"] == "radials" else "as given"
        copper = max((r.get("copper_loss_ohm", 0.0) for r in b["radial_table"]), default=0.0)
        ax.set_title(f"{b['band']}, {b['option']}: state '{ref['state']}'\n0 dB = this site "
                     f"({ref['site_loss_ohm']:.1f} ohm per base, {source})\nthe wires' copper is at most "
                     f"{copper:.2f} ohm of any label", fontsize=8, loc="left", color=INK)
        ax.legend(fontsize=6.5, loc="best", frameon=False)
    fig.suptitle("What more copper buys: gain toward the beam against radial count and length "
                 "(labels: loss resistance per base)", fontsize=9, color=INK)
    fig.tight_layout(rect=(0, 0, 1, 0.95))
    try:
        return atomic_savefig(fig, path, dpi=110)
    finally:
        plt.close(fig)
