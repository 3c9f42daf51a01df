"""What every verb says about the ground system: the loss per base, its source, the foreground."""
from __future__ import annotations

import numpy as np

from ..antenna.radials import ground_loss

__all__ = ["ground_summary", "ground_line"]


def ground_summary(site) -> dict:
    """JSON-ready: the soil, where the loss comes from, the loss per band and option, the foreground."""
    spec = site.array
    r = spec.radials
    loss = {}
    source = "given"
    for band in site.bands:
        for option in spec.options:
            g = ground_loss(spec, option, band.freq_hz)
            source = g.source
            loss.setdefault(band.name, {})[option.name] = round(float(np.mean(g.ohm)), 3)
    return {
        "ground": spec.ground.name,
        "ground_loss_source": source,
        "ground_loss_ohm": loss,
        "radials": None if r is None else {"count": r.count, "length_m": r.length_m, "depth_m": r.depth_m,
                                           "height_m": r.height_m, "wire_diameter_mm": r.wire_diameter_mm},
        "foreground": [{"bearing_deg": [f.from_deg, f.to_deg], "from_m": f.from_m, "ground": f.ground.name}
                       for f in spec.foreground],
    }


def ground_line(summary: dict) -> str:
    """One line for the text outputs."""
    r = summary["radials"]
    if summary["ground_loss_source"] == "radials":
        where = f"{r['depth_m']:g} m deep" if r["height_m"] is None else f"elevated {r['height_m']:g} m"
        how = f"from the radials ({r['count']} x {r['length_m']:g} m, {where})"
    else:
        how = "as given (ground_loss_ohm)" if r is None else "as given (ground_loss_ohm overrides the radials)"
    bands = list(summary["ground_loss_ohm"])
    options = list(summary["ground_loss_ohm"][bands[0]]) if bands else []
    values = "; ".join(f"{o} " + ", ".join(f"{summary['ground_loss_ohm'][b][o]:.1f}" for b in bands)
                       for o in options)
    text = (f"Ground: {summary['ground']}; loss per base {how}, referred to the base current, on "
            f"{', '.join(bands)}: {values} ohm")
    for f in summary["foreground"]:
        text += (f"; foreground {f['ground']} from {f['from_m']:g} m toward "
                 f"{f['bearing_deg'][0]:g}-{f['bearing_deg'][1]:g} deg")
    return text + "."
