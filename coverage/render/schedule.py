"""The schedule figure (per band) and the switch card (one A4 page).

- Schedule figure: UT hour across, month down, each cell coloured by the
  switch state the schedule picks (blank where no goal is open), with
  sunrise and sunset at the station and at each goal's centre marked, so
  the grey-line hours on the low bands stand out.
- Switch card: goal by band, the state to use for that goal and the UT
  hours to use it, in type large enough to read from the operating chair.

Both show the best-ranked option at its bearing (the array as built).
"""
from __future__ import annotations

from pathlib import Path

import numpy as np

from ..safety import CAUTION_LINE

from ..propagation.model import hour_ranges_text
from .azimap import INK, STATE_COLOURS
from .panels import NEED_COLOURS, _pyplot, _save
from .scene import chosen_option, slug, where_text

__all__ = ["schedule_file_name", "schedule_figure", "switch_card_figure", "draw_schedule_figure",
           "draw_switch_card", "card_entries", "goal_centres", "A4_IN"]

A4_IN = (8.27, 11.69)
_MONTHS = ("Jan", "Feb", "Mar", "Apr", "May", "Jun", "Jul", "Aug", "Sep", "Oct", "Nov", "Dec")


def schedule_file_name(band_name: str) -> str:
    return f"schedule-{slug(band_name)}.png"


def goal_centres(site) -> dict:
    """Goal name -> (lon, lat) of the centre of its sampled points (mean direction on the sphere)."""
    from ..geo.regions import region_points

    out = {}
    for g in site.goals:
        if g.name in out:
            continue
        lons, lats = region_points(site, g.region, g.clip, f"{g.key}.region")
        lo, la = np.radians(lons), np.radians(lats)
        v = np.array([np.sum(np.cos(la) * np.cos(lo)), np.sum(np.cos(la) * np.sin(lo)), np.sum(np.sin(la))])
        out[g.name] = (float(np.degrees(np.arctan2(v[1], v[0]))), float(np.degrees(np.arctan2(v[2], np.hypot(v[0], v[1])))))
    return out


def _grid(schedule, option: str, band: str):
    """(n_months, n_hours) state index (-1 closed) of the schedule rows."""
    names = schedule.state_names[option]
    months, hours = list(schedule.months), list(schedule.hours_utc)
    grid = np.full((len(months), len(hours)), -1)
    for r in schedule.rows:
        if r.option == option and r.band == band and r.state is not None:
            grid[months.index(r.month), hours.index(r.hour_utc)] = names.index(r.state)
    return grid


def schedule_figure(site, plan, schedule, band: str):
    """Hour x month coloured by state; gids ``state:<name>``, ``sun:<place>:rise|set``."""
    from matplotlib.patches import Patch

    from ..geo.sun import sunrise_sunset_utc

    plt = _pyplot()
    op, theta, _ = chosen_option(plan)
    names = schedule.state_names[op.option]
    grid = _grid(schedule, op.option, band)
    months, hours = list(schedule.months), list(schedule.hours_utc)
    # margins in inches, so one month and twelve lay out alike
    h_in = 2.3 + 0.42 * max(len(months), 4)
    fig, ax = plt.subplots(figsize=(10.0, h_in))
    fig.subplots_adjust(left=0.08, right=0.72, top=1 - 0.95 / h_in, bottom=0.85 / h_in)
    for si, name in enumerate(names):
        ys, xs = np.nonzero(grid == si)
        for y, x in zip(ys, xs):
            ax.add_patch(plt.Rectangle((hours[x], y - 0.5), 1.0, 1.0, color=STATE_COLOURS[si % len(STATE_COLOURS)],
                                       gid=f"state:{name}", linewidth=0))
    ax.set_xlim(0, 24)
    ax.set_ylim(len(months) - 0.5, -0.5)
    ax.set_xticks(range(0, 25, 2))
    ax.set_xticks(range(0, 25), minor=True)
    ax.set_yticks(range(len(months)), [_MONTHS[m - 1] for m in months])
    ax.grid(True, which="minor", axis="x", color="#e3e3e3", linewidth=0.5)
    ax.set_axisbelow(True)
    ax.set_xlabel("UT hour")
    # sunrise and sunset: the station in black, each goal's centre in its colour
    places = [(site.station.name, site.station.lon_deg, site.station.lat_deg, INK, 8.0)]
    centres = goal_centres(site)
    on_band = [g.name for g in site.goals if band in {b.name for b in site.goal_bands(g)}]
    for i, name in enumerate(dict.fromkeys(on_band)):
        lon, lat = centres[name]
        places.append((name, lon, lat, NEED_COLOURS[i % len(NEED_COLOURS)], 6.5))
    handles = [Patch(color=STATE_COLOURS[i % len(STATE_COLOURS)], label=n) for i, n in enumerate(names)
               if (grid == i).any()]
    handles.append(Patch(facecolor="white", edgecolor="#bbbbbb", label="no goal open"))
    for name, lon, lat, col, size in places:
        rise = np.array([float(sunrise_sunset_utc(lon, lat, site.propagation.year, m, 15)[0]) for m in months])
        sets = np.array([float(sunrise_sunset_utc(lon, lat, site.propagation.year, m, 15)[1]) for m in months])
        y = np.arange(len(months))
        (h1,) = ax.plot(rise, y, linestyle="none", marker="^", markersize=size, markerfacecolor=col,
                        markeredgecolor="white", markeredgewidth=0.7, gid=f"sun:{name}:rise",
                        label=f"{name[:24]}: rise \u25b2 set \u25bc")
        ax.plot(sets, y, linestyle="none", marker="v", markersize=size, markerfacecolor=col,
                markeredgecolor="white", markeredgewidth=0.7, gid=f"sun:{name}:set")
        handles.append(h1)
    ax.legend(handles=handles, loc="upper left", bbox_to_anchor=(1.02, 1.0), fontsize=7.5, frameon=False)
    fig.text(0.08, 1 - 0.35 / h_in, f"{site.station.name}: {band}, switch state by UT hour and month", fontsize=11,
             fontweight="bold", color=INK)
    fig.text(0.08, 1 - 0.6 / h_in, f"{op.option}, {where_text(op.layout, theta)}; the state with the best score over "
             f"the goals open in each hour; blank: no goal open on {100 * schedule.closed_share:.0f} % of its points",
             fontsize=7.5, color=INK)
    fig.text(0.08, 0.15 / h_in, "Sunrise and sunset on the 15th of each month at the station and at each goal's "
             "centre (mean of its sampled points).", fontsize=7, color=INK)
    return fig


def card_entries(schedule, option: str) -> dict:
    """(goal label, band) -> list of (state, "hh-hh, ..." UT) for the switch card.

    An hour counts for a goal when it is open (at least ``closed_share`` of
    its points) in at least half the months modelled; its state is the one
    the goal's own best state is most often in those months.
    """
    from ..report.schedule import goal_label

    names = schedule.state_names[option]
    hours = list(schedule.hours_utc)
    out = {}
    for t in schedule.tracks:
        if t.option != option:
            continue
        per_state: dict[int, list[int]] = {}
        n_months = t.state.shape[0]
        for hi, h in enumerate(hours):
            col = t.state[:, hi]
            open_months = col[col >= 0]
            if open_months.size * 2 < n_months or open_months.size == 0:
                continue
            s = int(np.bincount(open_months).argmax())
            per_state.setdefault(s, []).append(h)
        entries = sorted(((names[s], hour_ranges_text(hs)) for s, hs in per_state.items()),
                         key=lambda e: -len(per_state[names.index(e[0])]))
        out[(goal_label(t.goal, t.path), t.band)] = entries
    return out


def switch_card_figure(site, plan, schedule, date_text: str):
    """One A4 page: goal x band -> state and UT hours; gids ``card:<goal>:<band>``."""
    plt = _pyplot()
    op, theta, _ = chosen_option(plan)
    entries = card_entries(schedule, op.option)
    bands = [b.name for b in site.bands if any(k[1] == b.name for k in entries)]
    goals = list(dict.fromkeys(k[0] for k in entries))
    fig = plt.figure(figsize=A4_IN)
    w, h = A4_IN
    left, right, top = 0.6 / w, 1 - 0.5 / w, 1 - 1.6 / h
    label_w = 2.0 / w
    col_w = (right - left - label_w) / max(len(bands), 1)
    row_h = min(1.05 / h, (top - 1.6 / h) / max(len(goals) + 1, 1))
    fig.patches.append(plt.Rectangle((0, 0), 1, 1, transform=fig.transFigure, facecolor="white", zorder=-1))
    fig.text(left, 1 - 0.6 / h, f"Switch card: {site.station.name}", fontsize=20, fontweight="bold", color=INK)
    months = ", ".join(_MONTHS[m - 1] for m in schedule.months) if len(schedule.months) < 12 else "all months"
    fig.text(left, 1 - 0.95 / h, f"{op.option}, {where_text(op.layout, theta)}   \u2022   {months}", fontsize=12,
             color=INK)
    fig.text(left, 1 - 1.15 / h, "Hours are UT. Each cell: the state that serves that goal best and when.\n"
             "closed: the band never opens to the goal; empty: the goal does not use the band.", fontsize=9.5,
             va="top", linespacing=1.3,
             color=INK)
    for j, band in enumerate(bands):
        x = left + label_w + j * col_w
        fig.text(x + col_w / 2, top - row_h / 2, band, fontsize=16, fontweight="bold", ha="center", va="center",
                 color=INK)
    for i, goal in enumerate(goals):
        y = top - (i + 1) * row_h
        fig.patches.append(plt.Rectangle((left, y - row_h), right - left, row_h, transform=fig.transFigure,
                                         facecolor="#f3f3f3" if i % 2 == 0 else "white", edgecolor="#c8c8c8",
                                         linewidth=0.6, zorder=0))
        fig.text(left + 0.08 / w, y - row_h / 2, goal.replace(" (long path)", "\n(long path)"), fontsize=13,
                 fontweight="bold", va="center", color=INK, linespacing=1.1)
        names = schedule.state_names[op.option]
        for j, band in enumerate(bands):
            x = left + label_w + j * col_w
            cell = entries.get((goal, band))
            if cell is None:
                continue
            if not cell:
                fig.text(x + 0.08 / w, y - row_h / 2, "closed", fontsize=11, va="center", color="#8a8a8a",
                         gid=f"card:{goal}:{band}")
                continue
            shown = cell[:3]
            size = 11 if len(shown) < 3 else 9
            step = (2.4 * size / 72.0) / h                  # two lines of text per entry
            y0 = y - row_h / 2 + (len(shown) - 1) * step / 2
            for k, (state, hrs) in enumerate(shown):
                fig.text(x + 0.08 / w, y0 - k * step, f"{state}\n  {hrs if hrs == 'all day' else hrs + ' UT'}", fontsize=size, va="center",
                         color=STATE_COLOURS[names.index(state) % len(STATE_COLOURS)],
                         gid=f"card:{goal}:{band}", linespacing=1.1)
    fig.text(left, 0.95 / h, "Open: the goal is open on at least "
             f"{100 * schedule.closed_share:.0f} % of its points in that hour in at least half the months "
             "modelled\n(monthly-median ionosphere). State: the one with the best mean gain over the goal's "
             "takeoff angles then, against one vertical.", fontsize=8, color=INK, va="top", linespacing=1.3)
    fig.text(left, 0.45 / h, f"lobeplan {date_text}. Stay clear of the elements when transmitting; "
             "disconnect and ground the feed lines before a storm.", fontsize=8, color=INK)
    fig.text(left, 0.28 / h, CAUTION_LINE, fontsize=7.2, color="#5b2a1a")
    return fig


def draw_schedule_figure(site, plan, schedule, band: str, path, dpi: int = 150) -> Path:
    return _save(schedule_figure(site, plan, schedule, band), path, dpi)


def draw_switch_card(site, plan, schedule, base_path, date_text: str, dpi: int = 150) -> list[Path]:
    base = Path(base_path)
    out = []
    for suffix in (".pdf", ".png"):
        out.append(_save(switch_card_figure(site, plan, schedule, date_text), base.with_suffix(suffix), dpi))
    return out
