"""Timing of one array pattern (4 elements, one band, one state, 1 x 1 deg grid),
and of one band's pattern figure.

Prints JSON timings in milliseconds. Not a timed test: run it by hand,
``python benchmarks/pattern.py``. "cold" includes the moment-method solve
(a fresh frequency every call, so the cache never hits); "warm" reuses it.
The figure is the demo's 40 m figure of its four-state option (geometry
model, so the needs do not dominate); its first drawing includes importing
matplotlib. Budgets: 50 ms per solve, 2 s per figure.
"""
from __future__ import annotations

import json
import statistics
import time

from lobeplan.antenna.layout import layout_positions_m
from lobeplan.antenna.model import GROUND_CLASSES, ArrayOption, ArraySpec, Feed, State
from lobeplan.antenna.pattern import array_pattern



def _peak_rss_mb() -> float:
    """Peak resident memory of this process (Linux reports ru_maxrss in KiB)."""
    import resource

    return round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0, 1)

def main(repeats: int = 30) -> dict:
    forced = State("diagonal", phase_deg=(0.0, -90.0, -180.0, -90.0))
    fed = State("lines", line_m=(5.0, 12.1, 19.0, 12.1))
    option = ArrayOption("square", "square", 10.5, layout_positions_m("square", 10.5), (forced, fed))
    spec = ArraySpec(10.4, 0.02, GROUND_CLASSES["average"], 2.0, Feed(), (option,))
    array_pattern(spec, option, forced, 7.0e6)  # first call: imports, caches of constants
    out = {}
    for label, state in (("forced", forced), ("fed", fed)):
        cold, warm = [], []
        for i in range(repeats):
            f = 7.1e6 + 7.0 * i + (0.5 if state is fed else 0.0)
            t0 = time.perf_counter()
            array_pattern(spec, option, state, f)
            t1 = time.perf_counter()
            array_pattern(spec, option, state, f)
            t2 = time.perf_counter()
            cold.append((t1 - t0) * 1e3)
            warm.append((t2 - t1) * 1e3)
        out[f"{label}_cold_ms_median"] = round(statistics.median(cold), 2)
        out[f"{label}_cold_ms_max"] = round(max(cold), 2)
        out[f"{label}_warm_ms_median"] = round(statistics.median(warm), 2)
    out["budget_ms"] = 50.0
    return out


def figure(repeats: int = 3) -> dict:
    """One band's figure of ``lobeplan pattern`` on the demo site, PNG to a temporary folder."""
    import tempfile
    from pathlib import Path
    from types import SimpleNamespace

    from lobeplan.report import pattern as pattern_verb
    from lobeplan.site import loads

    demo = Path(__file__).resolve().parent.parent / "data" / "demo" / "site.toml"
    text = demo.read_text().replace('model = "climatology"', 'model = "geometry"')
    site = loads(text, file=str(demo), base_dir=str(demo.parent))
    rows = pattern_verb.build(site, SimpleNamespace(band="40 m", state=None, json=True))["patterns"]
    block = [r for r in rows if r["option"] == rows[0]["option"]]
    times, cpu = [], []
    with tempfile.TemporaryDirectory() as tmp:
        t0, c0 = time.perf_counter(), time.process_time()
        from lobeplan.render.goalchart import draw_band_figure

        for i in range(repeats):
            draw_band_figure(block, Path(tmp) / f"f{i}.png", site.station.name)
            t1, c1 = time.perf_counter(), time.process_time()
            times.append(t1 - t0)
            cpu.append(c1 - c0)
            t0, c0 = t1, c1
    # CPU time beside wall time: on a shared machine the wall clock also
    # counts other processes' turns
    return {"figure_states": len(block), "figure_first_s": round(times[0], 3),
            "figure_s_median": round(statistics.median(times[1:] or times), 3),
            "figure_cpu_s_median": round(statistics.median(cpu[1:] or cpu), 3), "figure_budget_s": 2.0}


if __name__ == "__main__":
    print(json.dumps({**main(), **figure(), "peak_rss_mb": _peak_rss_mb()}, indent=2))
