"""What every verb says about the ground system: the loss per base, its source, the foreground."""
from __future__ import annotations

import numpy as np

from ..antenna.radials import ground_loss

__all__ = ["ground_summary", "ground_line", "radials_json", "foreground_json", "system_text"]


def radials_json(spec) -> dict | None:
    """The site's radial system, JSON-ready (None without one)."""
    r = spec.radials
    if r is None:
        return None
    return {"count": r.count, "length_m": r.length_m, "depth_m": r.depth_m, "height_m": r.height_m,
            "wire_diameter_mm": r.wire_diameter_mm,
            "neighbours": ("radials cut where they meet and bonded along the midline" if r.buried
                           else "each element's radials solved alone")}


def foreground_json(spec) -> list[dict]:
    """The site's foreground sectors, JSON-ready (empty without)."""
    return [{"bearing_deg": [f.from_deg, f.to_deg], "from_m": f.from_m, "ground": f.ground.name}
            for f in spec.foreground]


def system_text(rad: dict | None) -> str:
    """"32 x 10 m, 0.05 m deep" for a radials_json entry."""
    if rad is None:
        return "ground_loss_ohm"
    where = f"{rad['depth_m']:g} m deep" if rad["height_m"] is None else f"elevated {rad['height_m']:g} m"
    return f"{rad['count']} x {rad['length_m']:g} m, {where}"


def ground_summary(site) -> dict:
    """JSON-ready: the soil, where the loss comes from, the loss per band and option, the foreground."""
    spec = site.array
    loss = {}
    copper = {}
    source = "given"
    for band in site.bands:
        for option in spec.options:
            g = ground_loss(spec, option, band.freq_hz)
            source = g.source
            loss.setdefault(band.name, {})[option.name] = round(float(np.mean(g.ohm)), 3)
            copper.setdefault(band.name, {})[option.name] = (None if g.copper_ohm is None
                                                             else round(float(np.mean(g.copper_ohm)), 4))
    return {
        "ground": spec.ground.name,
        "ground_loss_source": source,
        # neither radials nor ground_loss_ohm in the site: the loss is the default
        "ground_loss_default": spec.ground_loss_ohm is None and spec.radials is None,
        "ground_loss_ohm": loss,
        "ground_loss_copper_ohm": copper,   # the buried radials' copper part of it; null: not computed
        "radials": radials_json(spec),
        "foreground": foreground_json(spec),
    }


def ground_line(summary: dict) -> str:
    """One line for the text outputs."""
    r = summary["radials"]
    if summary["ground_loss_source"] == "radials":
        how = f"from the radials ({system_text(r)})"
    else:
        how = ("the default (no [array.radials], no ground_loss_ohm)" if summary.get("ground_loss_default")
               else "as given (ground_loss_ohm)" if r is None else "as given (ground_loss_ohm overrides the radials)")
    bands = list(summary["ground_loss_ohm"])
    options = list(summary["ground_loss_ohm"][bands[0]]) if bands else []
    values = "; ".join(f"{o} " + ", ".join(f"{summary['ground_loss_ohm'][b][o]:.1f}" for b in bands)
                       for o in options)
    text = (f"Ground: {summary['ground']}; loss per base {how}, referred to the base current, on "
            f"{', '.join(bands)}: {values} ohm")
    if r is not None and r.get("height_m") is not None:
        text += ("; the elevated radials are copper wires in the element model, so they set the base "
                 "impedances, the coupling and the patterns")
    for f in summary["foreground"]:
        text += (f"; foreground {f['ground']} from {f['from_m']:g} m toward "
                 f"{f['bearing_deg'][0]:g}-{f['bearing_deg'][1]:g} deg")
    return text + "."
