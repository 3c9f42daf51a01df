"""Benchmark: the orientation sweep, FFT way against the direct way.

Scores the demo site's whole case (every option, state, goal and band, at
every whole-degree bearing) both ways in one run. The direct way
is a fair baseline: one vectorised numpy pass over the whole (elevation,
azimuth) grid per bearing, not a Python loop over cells. Prints
{"orientations", "fft_s", "direct_s", "speedup", "max_abs_diff_db",
"plan_wall_s"}. Targets (issue 5): agreement to 1e-6 dB, speedup >= 20,
whole demo plan (geometry model) under 5 s.
"""
import argparse
import json
import subprocess
import sys
import tempfile
import time
from dataclasses import replace
from pathlib import Path

import numpy as np

from lobeplan.antenna.pattern import array_pattern, vertical_gain_dbi
from lobeplan.plan.planner import needs_for_site, orientations, prepare_needs, score_option
from lobeplan.site import load

DEMO = Path(__file__).resolve().parent.parent / "data" / "demo" / "site.toml"



def _peak_rss_mb() -> float:
    """Peak resident memory of this process (Linux reports ru_maxrss in KiB)."""
    import resource

    return round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0, 1)

def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--json", action="store_true")
    ap.parse_args()
    site = load(DEMO)
    site = replace(site, propagation=replace(site.propagation, model="geometry"))
    goal_bands, _ = needs_for_site(site)
    bands = {gb.band_name: gb.freq_hz for gb in goal_bands}
    ref = {b: vertical_gain_dbi(site.array, f) for b, f in bands.items()}
    prepared = prepare_needs(goal_bands, ref)
    thetas = orientations(1.0)
    option_patterns = [(o, {(b, s.name): array_pattern(site.array, o, s, f) for b, f in bands.items()
                            for s in o.states}) for o in site.array.options]
    timing = {}
    results = {}
    for method in ("fft", "direct"):
        best = np.inf
        for _ in range(3 if method == "fft" else 1):
            t0 = time.perf_counter()
            results[method] = [score_option(o, pats, goal_bands, prepared, thetas, 1.0, method)[0]
                               for o, pats in option_patterns]
            best = min(best, time.perf_counter() - t0)
        timing[method] = best
    diff = max(float(np.nanmax(np.abs(a - b))) for a, b in zip(results["fft"], results["direct"]))
    with tempfile.TemporaryDirectory() as tmpdir:
        tmp = Path(tmpdir) / "site.toml"
        tmp.write_text(DEMO.read_text().replace('model = "climatology"', 'model = "geometry"'))
        t0 = time.perf_counter()
        subprocess.run([sys.executable, "-m", "lobeplan", "plan", str(tmp), "--json"], check=True,
                       capture_output=True)
        plan_wall = time.perf_counter() - t0
    print(json.dumps({"peak_rss_mb": _peak_rss_mb(), "orientations": int(thetas.size), "fft_s": round(timing["fft"], 4),
                      "direct_s": round(timing["direct"], 4),
                      "speedup": round(timing["direct"] / timing["fft"], 1),
                      "max_abs_diff_db": diff, "plan_wall_s": round(plan_wall, 3)}))


if __name__ == "__main__":
    main()
