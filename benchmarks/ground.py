"""Benchmark: the ground system.

1. The radial table of one band (6 counts x 3 lengths, the demo's first
   option on its first band), from cold caches. Target < 1 s.
2. The demo plan (geometry model) with two foreground sectors against the
   same plan without them: whole ``lobeplan plan`` wall time (with imports
   and needs) and the planner alone (needs computed once, shared). Target:
   with sectors <= 1.5 x without.
3. Elevated radials, the whole array as wires: the demo's planner with four
   elevated radials of 10.5 m at 2.5 m instead of its buried ones (target:
   under 5 s, the demo plan's own; the buried planner's perfect-plane
   solve takes a tenth of a second, so a ratio to it says little and is
   printed for information), one four-square of 8 quarter-wave radials on
   40 m solved with its far field over the grid (target < 2 s), and the
   same with 32 radials, which the segment budget keeps tractable
   (target < 10 s).

Prints {"radial_table_s", "plan_wall_s", "plan_wall_foreground_s",
"plan_wall_ratio", "planner_s", "planner_foreground_s", "planner_ratio",
"planner_elevated_s", "elevated_ratio", "four_square_elevated_s", "four_square_32_elevated_s",
"peak_rss_mb"}.
"""
import argparse
import json
import subprocess
import sys
import tempfile
import time
from dataclasses import replace
from pathlib import Path

from lobeplan.antenna import elevated, foreground, mom, pattern, radials
from lobeplan.antenna.model import GROUND_CLASSES, ForegroundSector, Radials
from lobeplan.antenna.radial_table import radial_table
from lobeplan.plan.planner import make_plan, needs_for_site
from lobeplan.site import load

DEMO = Path(__file__).resolve().parent.parent / "data" / "demo" / "site.toml"
SECTORS = """
[[array.foreground]]
bearing_deg = [200, 300]
from_m = 150
ground = "sea"

[[array.foreground]]
bearing_deg = [20, 60]
from_m = 0
ground = "wet"
"""


def _peak_rss_mb() -> float:
    """Peak resident memory of this process (Linux reports ru_maxrss in KiB)."""
    import resource

    return round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0, 1)


def _with_sectors(text: str) -> str:
    # the sectors go with the other [array] sub-tables, before the first option
    i = text.index("[[array.option]]")
    return text[:i] + SECTORS.lstrip() + "\n" + text[i:]


def _plan_walls(texts: list[str], repeats: int = 3) -> list[float]:
    """Best wall time of ``lobeplan plan --json`` per site text, runs interleaved (a busy machine
    slows both alike)."""
    with tempfile.TemporaryDirectory() as tmpdir:
        paths = []
        for i, text in enumerate(texts):
            paths.append(Path(tmpdir) / f"site{i}.toml")
            paths[-1].write_text(text)
        best = [float("inf")] * len(texts)
        for _ in range(repeats):
            for i, tmp in enumerate(paths):
                t0 = time.perf_counter()
                subprocess.run([sys.executable, "-m", "lobeplan", "plan", str(tmp), "--json"], check=True,
                               capture_output=True)
                best[i] = min(best[i], time.perf_counter() - t0)
        return best


def _clear_caches() -> None:
    mom._solve_cached.cache_clear()
    radials._radial_loss.cache_clear()
    pattern._vertical_kernel.cache_clear()
    pattern._grid_vectors.cache_clear()
    for f in (elevated._solve_array, elevated.elevated_mesh, elevated.elevated_loss_ohm, elevated.solve_elevated):
        f.cache_clear()
    foreground._masks.cache_clear()  # the masks are part of the foreground's cost


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--json", action="store_true")
    ap.parse_args()
    site = load(DEMO)
    band = site.bands[0]
    _clear_caches()
    t0 = time.perf_counter()
    table = radial_table(site.array, site.array.options[0], band.freq_hz)
    table_s = time.perf_counter() - t0
    assert len(table.rows) == 18

    text = DEMO.read_text().replace('model = "climatology"', 'model = "geometry"')
    wall, wall_fg = _plan_walls([text, _with_sectors(text)])

    site = replace(site, propagation=replace(site.propagation, model="geometry"))
    sectors = (ForegroundSector(200.0, 300.0, 150.0, GROUND_CLASSES["sea"]),
               ForegroundSector(20.0, 60.0, 0.0, GROUND_CLASSES["wet"]))
    site_fg = replace(site, array=replace(site.array, foreground=sectors))
    goal_bands, _ = needs_for_site(site)
    timing = {"plain": float("inf"), "foreground": float("inf")}
    for _ in range(3):
        for name, s in (("plain", site), ("foreground", site_fg)):
            _clear_caches()
            t0 = time.perf_counter()
            make_plan(s, goal_bands)
            timing[name] = min(timing[name], time.perf_counter() - t0)
    site_el = replace(site, array=replace(site.array, radials=Radials(4, 10.5, None, 2.5, 2.0)))
    timing["elevated"] = float("inf")
    for _ in range(2):
        _clear_caches()
        t0 = time.perf_counter()
        make_plan(site_el, goal_bands)
        timing["elevated"] = min(timing["elevated"], time.perf_counter() - t0)
    _clear_caches()
    lam = mom.C0_M_S / 7.1e6
    square_times = {}
    for count in (8, 32):
        t0 = time.perf_counter()
        square = elevated.solve_elevated_array(10.3, 0.02, 2.5, count, 0.25 * lam, 1e-3,
                                               ((0, 0), (10.5, 0), (10.5, 10.5), (0, 10.5)), 7.1e6,
                                               GROUND_CLASSES["average"])
        pattern.gain_from_currents_dbi(square, GROUND_CLASSES["average"], [1, -1j, -1, -1j], 1.0)
        square_times[count] = time.perf_counter() - t0
    square_s, square32_s = square_times[8], square_times[32]
    print(json.dumps({"radial_table_s": round(table_s, 3), "plan_wall_s": round(wall, 3),
                      "plan_wall_foreground_s": round(wall_fg, 3), "plan_wall_ratio": round(wall_fg / wall, 3),
                      "planner_s": round(timing["plain"], 3), "planner_foreground_s": round(timing["foreground"], 3),
                      "planner_ratio": round(timing["foreground"] / timing["plain"], 3),
                      "planner_elevated_s": round(timing["elevated"], 3),
                      "elevated_ratio": round(timing["elevated"] / timing["plain"], 3),
                      "four_square_elevated_s": round(square_s, 3),
                      "four_square_32_elevated_s": round(square32_s, 3),
                      "peak_rss_mb": _peak_rss_mb()}))


if __name__ == "__main__":
    main()
