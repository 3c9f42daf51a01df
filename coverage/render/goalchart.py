"""The pattern figure of one band and one option: the goals against every state.

One figure holds, for all switch states of an option on one band:

- left, one shaded chart per state: gain over true bearing (x) and takeoff
  angle (y), with each goal drawn as a box over its bearings (the span the
  ``paths`` verb gives) and its needed takeoff angles (10th to 90th
  percentile of the ``needs`` verb), the state's advantage over one vertical
  toward that goal written in the box; a dotted line at the band's key
  takeoff angle; the takeoff axis runs from 0 to 45 deg, or higher in 15 deg
  steps when a goal needs higher angles;
- right, above: the gain at that key takeoff angle against true bearing,
  every state overlaid on one cartesian chart, the goals' bearing spans
  shaded behind;
- right, below: the takeoff-angle cut through each state's beam (its
  strongest bearing at the key takeoff angle), with the goals' needed
  takeoff ranges as bars along the top.

No polar axes: the job is "which goal does each state serve, and how
well", which reads off a bearing x takeoff chart with the goals on it.

Colours are the maps' "fieldbook" scheme (:mod:`.azimap`): states in its ink
colours, goal boxes edged from ember (worse than one vertical) through
lavender to spruce (better), shading from pale slate (30 dB under the band's
strongest) through dun to spruce. Receive options are shaded in directivity
over the sky mean (what they are scored by) instead of gain.

Everything is drawn from the JSON rows of ``lobeplan pattern``, so the
figure and the data agree. Artists carry gids: ``shade:<state>``,
``box:<state>:<goal>:<path>:<part>``, ``cut-az:<state>``, ``cut-el:<state>``.
"""
from __future__ import annotations

from pathlib import Path

import numpy as np

from ..fileio import atomic_savefig
from .azimap import ADVANTAGE_RANGE_DB, INK, STATE_COLOURS, _advantage_cmap, _halo
from .fonts import drawable, setup as _font_setup

__all__ = ["band_figure", "draw_band_figure", "goal_spans", "STATE_STYLES", "SHADE_RANGE_DB"]

SHADE_RANGE_DB = 30.0
"""The shading runs from the band's strongest value down this many dB."""

STATE_STYLES = ("solid", (0, (6, 2)), (0, (1.2, 1.6)), (0, (7, 2, 1.5, 2)), (0, (3, 1.5, 1, 1.5, 1, 1.5)),
                (0, (10, 3)), (0, (2, 3)), (0, (5, 1, 1, 1)))
"""Line styles of the states, in the order of the site file (with STATE_COLOURS)."""

# pale slate (the maps' sea) -> dun (their land) -> spruce (their best goals)
_SHADE_STOPS = ((0.0, "#eef2f4"), (0.25, "#dcd6c4"), (0.5, "#c9b98e"), (0.72, "#8fc0a5"), (0.88, "#3f8a72"),
                (1.0, "#15463f"))
_GRID = "#cfd4d8"
_BOX_TEXT = 6.6


def _pyplot():
    import matplotlib

    matplotlib.use("Agg", force=False)
    import matplotlib.pyplot as plt

    _font_setup()  # names in any script: fall back through the installed fonts
    return plt


def _shade_cmap():
    from matplotlib.colors import LinearSegmentedColormap

    return LinearSegmentedColormap.from_list("fieldbook-gain", list(_SHADE_STOPS))


def goal_spans(start_deg: float, end_deg: float) -> list[tuple[float, float]]:
    """A clockwise bearing arc as pieces on a 0..360 axis: [(lo, hi), ...].

    An arc over north (start > end) becomes two pieces; a full circle one.
    """
    a, b = float(start_deg) % 360.0, float(end_deg) % 360.0
    if np.isclose((end_deg - start_deg) % 360.0, 0.0) and end_deg != start_deg:
        return [(0.0, 360.0)]
    if b >= a:
        return [(a, max(b, a))]
    return [(a, 360.0), (0.0, b)]


def _free_spot(placed: list, x: float, y: float, n_chars: int, deg_per_px: tuple[float, float], dpi: float):
    """Where a two-line box label goes: above its box, raised past labels it would overlap.

    ``placed`` collects (x_lo, x_hi, y_lo, y_hi) of the labels so far, in
    data units; a label is about 0.62 em per character wide and 2.4 em tall.
    """
    em_px = _BOX_TEXT * dpi / 72.0
    half_w = 0.5 * 0.62 * em_px * max(n_chars, 7) * deg_per_px[0]
    height = 2.4 * em_px * deg_per_px[1]
    for lo, hi, ylo, yhi in sorted(placed, key=lambda p: p[2]):
        if x + half_w > lo and x - half_w < hi and y + height > ylo and y < yhi:
            y = yhi
    placed.append((x - half_w, x + half_w, y, y + height))
    return x, y


def _shown(row: dict) -> np.ndarray:
    """What the shaded chart shows: gain, or directivity for a receive option."""
    g = np.asarray(row["gain_dbi"], dtype=float)
    if row.get("use") == "receive":
        return g - row["sky_mean_gain_dbi"]
    return g


def _box_value(goal: dict, receive: bool) -> float | None:
    return goal["directivity_advantage_db"] if receive else goal["advantage_db"]


def _goal_label(goal: dict) -> str:
    return goal["goal"] + (" (long)" if goal["path"] == "long" else "")


FOREGROUND_COLOURS = ("#2f7fb8", "#b08a1f", "#4f8f4f", "#8a4f9a")


def _foreground_strip(ax, foreground, y_top: float) -> None:
    """Foreground sectors as a labelled strip along the bottom of a bearing x takeoff chart."""
    from matplotlib.patches import Rectangle

    h = 0.035 * y_top
    for i, f in enumerate(foreground):
        lo, hi = f["bearing_deg"]
        col = FOREGROUND_COLOURS[i % len(FOREGROUND_COLOURS)]
        for a, b in goal_spans(lo, hi if hi != lo else lo + 360.0):
            ax.add_patch(Rectangle((a, 0.0), b - a, h, facecolor=col, edgecolor="white", linewidth=0.6,
                                   alpha=0.85, zorder=4.2, gid=f"foreground:{i}"))
        spans = goal_spans(lo, hi)
        a, b = max(spans, key=lambda p: p[1] - p[0])
        ax.text(0.5 * (a + b), 1.15 * h, f"{f['ground']} from {f['from_m']:g} m", ha="center", va="bottom",
                fontsize=6.0, color=col, zorder=5, path_effects=_halo(), clip_on=True)


def _note(receive: bool, n_foreground: int) -> str:
    """The definitions under the charts, wrapped to the 13 in page.

    200 characters of 6.8 pt fit a line with room to spare.
    """
    import textwrap

    what = ("advantage in directivity (over the sky mean) over one vertical" if receive
            else "advantage over one vertical")
    parts = [f"Boxes: each goal's bearings (great-circle span) and needed takeoff angles (10th-90th "
             f"percentile), with that state's {what} toward it, edge -6 (ember) to +6 dB (spruce). "
             f"Contours at 3 dB (solid) and 10 dB (dashed) under each state's peak.",
             "Dotted: the band's key takeoff angle, the median of every goal's needed takeoff angles on the band "
             "(weighted as the plan weighs them); the takeoff cut follows each state's strongest bearing there."]
    if n_foreground:
        parts.append("Strip along the bottom: foreground sectors (ground beyond the array by true bearing, from "
                     "the distance given); the gains blend the grounds each ray's first Fresnel zone falls on.")
    return "\n".join(line for p in parts for line in textwrap.wrap(p, 200))


def band_figure(rows: list[dict], station_name: str = "", foreground=()):
    """The figure of one band and one option (not saved).

    Parameters
    ----------
    rows : list of dict
        The ``patterns`` rows of ``lobeplan pattern`` for one band and one
        option, one per state, in the site file's order.
    station_name : str
    foreground : sequence of dict
        The ``foreground`` sectors of the pattern result, drawn as a strip
        along the bottom of every chart.

    Returns
    -------
    matplotlib.figure.Figure
    """
    from matplotlib.colors import Normalize
    from matplotlib.gridspec import GridSpec
    from matplotlib.patches import Rectangle

    plt = _pyplot()
    n = len(rows)
    first = rows[0]
    receive = first.get("use") == "receive"
    unit = "dB over the sky mean" if receive else "dBi"
    shown = [_shown(r) for r in rows]
    top = float(np.ceil(max(float(s.max()) for s in shown)))
    norm = Normalize(top - SHADE_RANGE_DB, top)
    cmap = _shade_cmap()
    adv_cmap = _advantage_cmap()
    adv_norm = Normalize(-ADVANTAGE_RANGE_DB, ADVANTAGE_RANGE_DB)
    takeoff = first["key_takeoff_deg"]
    takeoff_el = first["key_takeoff_deg"] if takeoff is not None else first["peak_elevation_deg"]

    note = _note(receive, len(foreground))
    # each line of the note under the charts takes about 0.13 in (6.8 pt at 1.4 line spacing)
    extra_in = 0.13 * max(0, note.count("\n") + 1 - 2)
    fig = plt.figure(figsize=(13.0, max(5.8, 2.35 * n + 1.5) + extra_in))
    gs = GridSpec(2 * n, 4, figure=fig, width_ratios=(1.45, 0.03, 0.11, 1.05), left=0.06, right=0.97,
                  top=1.0 - 0.85 / fig.get_figheight(), bottom=(0.95 + extra_in) / fig.get_figheight(),
                  hspace=1.1 if n > 1 else 0.5, wspace=0.08)
    needed = [g["elevation_deg"]["p90"] for g in first["goals"] if g["elevation_deg"]["p90"] is not None]
    # room for the highest box and its label, in 15 deg steps; the full sky only if the needs go there
    y_top = float(min(90.0, max(45.0, 15.0 * np.ceil((max(needed, default=30.0) + 12.0) / 15.0))))
    mesh = None
    for i, (row, s) in enumerate(zip(rows, shown)):
        ax = fig.add_subplot(gs[2 * i:2 * i + 2, 0])
        mesh = ax.imshow(s, origin="lower", extent=(-0.5, 359.5, -0.5, 90.5), aspect="auto", cmap=cmap,
                         norm=norm, interpolation="nearest", gid=f"shade:{row['state']}")
        peak = float(s.max())
        ax.contour(np.arange(360.0), np.arange(91.0), s, levels=[peak - 10.0, peak - 3.0], colors=INK,
                   linewidths=(0.4, 0.8), linestyles=((0, (2, 2)), "solid"))
        if takeoff is not None:
            ax.axhline(takeoff, color=INK, linewidth=0.7, linestyle=(0, (1, 2)))
        box = ax.get_position()  # figure fraction: degrees per pixel of this chart, for label spacing
        deg_per_px = (360.0 / (box.width * fig.get_figwidth() * fig.dpi),
                      y_top / (box.height * fig.get_figheight() * fig.dpi))
        placed: list[tuple[float, float, float, float]] = []
        for goal in row["goals"]:
            el = goal["elevation_deg"]
            if el["p10"] is None or el["p90"] is None:
                continue
            value = _box_value(goal, receive)
            edge = INK if value is None else adv_cmap(adv_norm(value))
            pieces = goal_spans(goal["bearing_deg"]["start"], goal["bearing_deg"]["end"])
            widest = max(range(len(pieces)), key=lambda k: pieces[k][1] - pieces[k][0])
            for k, (lo, hi) in enumerate(pieces):
                ax.add_patch(Rectangle((lo, el["p10"]), hi - lo, el["p90"] - el["p10"], facecolor="none",
                                       edgecolor=edge, linewidth=1.8, zorder=4,
                                       gid=f"box:{row['state']}:{goal['goal']}:{goal['path']}:{k + 1}"))
                ax.add_patch(Rectangle((lo, el["p10"]), hi - lo, el["p90"] - el["p10"], facecolor="none",
                                       edgecolor=INK, linewidth=0.4, zorder=4.1))
            lo, hi = pieces[widest]
            text = _goal_label(goal) + ("\nclosed" if value is None else f"\n{value:+.1f} dB")
            x, y = _free_spot(placed, 0.5 * (lo + hi), el["p90"] + 1.0, len(_goal_label(goal)), deg_per_px,
                              fig.dpi)
            if y > el["p90"] + 1.0:  # raised past another label: a leader down to its box
                ax.plot([x, x], [el["p90"], y], color=INK, linewidth=0.5, zorder=4.5)
            ax.text(x, y, drawable(text), ha="center", va="bottom", fontsize=_BOX_TEXT,
                    color=INK, zorder=5, path_effects=_halo(), clip_on=True)
        _foreground_strip(ax, foreground, y_top)
        ax.set_xlim(0.0, 360.0)
        ax.set_ylim(0.0, y_top)
        ax.set_xticks(range(0, 361, 45))
        ax.set_xticklabels(["0 N", "45", "90 E", "135", "180 S", "225", "270 W", "315", "360"], fontsize=7)
        ax.set_yticks(range(0, int(y_top) + 1, 15))
        ax.tick_params(labelsize=7)
        ax.set_ylabel("takeoff angle, °", fontsize=7.5)
        ax.set_title(drawable(f"{row['state']}: peak {row['peak_gain_dbi']:.1f} dBi toward {row['peak_azimuth_deg']:.0f}° "
                     f"at {row['peak_elevation_deg']:.0f}°"), fontsize=8.5, loc="left", color=INK)
        if i == n - 1:
            ax.set_xlabel("true bearing, ° (clockwise from north)", fontsize=7.5)
    cax = fig.add_subplot(gs[:, 1])
    bar = fig.colorbar(mesh, cax=cax)
    bar.set_label(unit, fontsize=7.5)
    bar.ax.tick_params(labelsize=7)

    ax_az = fig.add_subplot(gs[0:n, 3])
    ax_el = fig.add_subplot(gs[n:2 * n, 3])
    seen = set()
    for goal in first["goals"]:
        label = _goal_label(goal)
        if label in seen:
            continue
        seen.add(label)
        for lo, hi in goal_spans(goal["bearing_deg"]["start"], goal["bearing_deg"]["end"]):
            ax_az.axvspan(lo, hi, color="#e4dcf2", alpha=0.55, linewidth=0, zorder=0)
        mid = goal["bearing_deg"]["median"]
        ax_az.text(mid, 0.985, drawable(label), transform=ax_az.get_xaxis_transform(), rotation=90, ha="center",
                   va="top", fontsize=6.2, color="#4a3f66", zorder=1)
    peak = -np.inf
    for i, (row, s) in enumerate(zip(rows, shown)):
        colour = STATE_COLOURS[i % len(STATE_COLOURS)]
        style = STATE_STYLES[i % len(STATE_STYLES)]
        el_i = int(round(takeoff_el))
        az_row = s[el_i]
        ax_az.plot(np.arange(361.0), np.append(az_row, az_row[0]), color=colour, linestyle=style, linewidth=1.5,
                   label=row["state"], gid=f"cut-az:{row['state']}")
        # the JSON grid is rounded to 0.01 dB, which flattens a broad beam's top:
        # follow the state's strongest lobe (found on the unrounded pattern)
        beam = (int(round(row["lobes"][0]["bearing_deg"])) % 360 if row.get("lobes")
                else int(np.argmax(az_row)))
        ax_el.plot(np.arange(91.0), s[:, beam], color=colour, linestyle=style, linewidth=1.5,
                   label=f"{row['state']} toward {beam}°", gid=f"cut-el:{row['state']}")
        peak = max(peak, float(s.max()))
    ax_az.set_xlim(0.0, 360.0)
    ax_az.set_xticks(range(0, 361, 45))
    ax_az.set_ylim(peak - SHADE_RANGE_DB, peak + 3.0)
    at = "key takeoff" if takeoff is not None else "peak takeoff"
    ax_az.set_title(f"at the {at} angle, {takeoff_el:.0f}°, every state", fontsize=8.5, loc="left", color=INK)
    ax_az.set_xlabel("true bearing, °", fontsize=7.5)
    ax_az.set_ylabel(unit, fontsize=7.5)
    ax_az.legend(fontsize=6.8, loc="lower right", frameon=False, ncol=2)

    bars = [(g, _goal_label(g)) for g in first["goals"] if g["elevation_deg"]["p10"] is not None]
    uniq = list({label: g for g, label in bars}.items())
    # the bars take the top of the chart, one line each, above the curves
    line = 0.05
    share = min(0.45, line * (len(uniq) + 0.5))
    lo_db, hi_db = peak - SHADE_RANGE_DB, peak + 3.0
    along_top = ax_el.get_xaxis_transform()
    for k, (label, g) in enumerate(uniq):
        y = 1.0 - line * (k + 0.8)
        ax_el.plot([g["elevation_deg"]["p10"], g["elevation_deg"]["p90"]], [y, y], color="#7b6aa6",
                   linewidth=2.2, solid_capstyle="butt", transform=along_top)
        ax_el.text(g["elevation_deg"]["p90"] + 0.8, y, drawable(label), fontsize=6.0, va="center", color="#4a3f66",
                   transform=along_top)
    if takeoff is not None:
        ax_el.axvline(takeoff, color=INK, linewidth=0.7, linestyle=(0, (1, 2)))
    ax_el.set_xlim(0.0, 90.0)
    ax_el.set_ylim(lo_db, hi_db + (hi_db - lo_db) * share / (1.0 - share))
    ax_el.set_title("takeoff-angle cut through each beam; bars: goals' needed angles", fontsize=8.5,
                    loc="left", color=INK)
    ax_el.set_xlabel("takeoff angle, °", fontsize=7.5)
    ax_el.set_ylabel(unit, fontsize=7.5)
    ax_el.legend(fontsize=6.8, loc="lower center", frameon=False, ncol=2)
    for ax in (ax_az, ax_el):
        ax.grid(True, color=_GRID, linewidth=0.5)
        ax.tick_params(labelsize=7)

    where = {"plan": "the plan's best bearing", "site": "from the site file",
             "none": "no goal is open"}.get(first.get("orientation_from"), "")
    head = f"{station_name}: " if station_name else ""
    along = ("one vertical, no baseline" if len(first.get("element_currents", ())) == 1
             else f"baseline along {first['orientation_deg']:.1f}° ({where})")
    fig.suptitle(drawable(f"{head}{first['band']}, {first['option']}, {along}"
                          + ("; receive option" if receive else "")), fontsize=10.5, color=INK, x=0.06,
                 ha="left")
    fig.text(0.06, 0.012, note, fontsize=6.8, color=INK, va="bottom", linespacing=1.4)
    return fig


def draw_band_figure(rows: list[dict], path: str | Path, station_name: str = "", dpi: int = 110,
                     foreground=()) -> Path:
    """Draw :func:`band_figure` and save it atomically (format from the suffix)."""
    plt = _pyplot()
    fig = band_figure(rows, station_name, foreground)
    try:
        return atomic_savefig(fig, path, dpi=dpi)
    finally:
        plt.close(fig)
