"""Timing of the network design: every state of a four-square on three bands.

Designs each state's network (the symmetric states share one design) on
each of three bands, solves it at the band centre and edges and runs the
cut-tolerance search. Prints JSON; not a timed test. Target: < 2 s.
"""
from __future__ import annotations

import json
import time

from lobeplan.antenna.asbuilt import check_network
from lobeplan.antenna.layout import layout_positions_m
from lobeplan.antenna.model import GROUND_CLASSES, ArrayOption, ArraySpec, Feed, State

BANDS_HZ = ((7.0e6, 7.1e6, 7.3e6), (10.1e6, 10.12e6, 10.15e6), (14.0e6, 14.1e6, 14.35e6))
PHASES = ((0, -90, -180, -90), (-90, 0, -90, -180), (-180, -90, 0, -90), (-90, -180, -90, 0))


def _peak_rss_mb() -> float:
    import resource

    return round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0, 1)


def main() -> dict:

    t0 = time.perf_counter()
    n_states = 0
    for edges in BANDS_HZ:
        states = tuple(State(f"dir {k}", phase_deg=tuple(float(p) for p in ph), amplitude=(1.0,) * 4,
                             design_band="b", design_freq_hz=edges[1]) for k, ph in enumerate(PHASES))
        option = ArrayOption("four-square", "square", 10.5, layout_positions_m("square", 10.5), states)
        spec = ArraySpec(10.3, 0.02, GROUND_CLASSES["average"], 2.0, Feed(75.0, 0.66, 2.2), (option,))
        for s in states:
            check_network(spec, option, s, edges, 1500.0)
            n_states += 1
    wall = time.perf_counter() - t0
    return {"states": n_states, "bands": len(BANDS_HZ), "design_and_tolerance_s": round(wall, 3),
            "budget_s": 2.0}


if __name__ == "__main__":
    print(json.dumps({**main(), "peak_rss_mb": _peak_rss_mb()}, indent=2))
