"""Timing of one wall map of the demo site (PNG at the default 200 dpi, and PDF).

Prints JSON timings in seconds. Not a timed test: run it by hand,
``python benchmarks/map.py``. The plan is made first and not timed (it is
the planner's cost). "first" is the first map of a process: it includes
importing cartopy and projecting the countries for the station; "next" is
a later map of the same station (another band), which reuses that
projection. Budget: 4 s for one map.
"""
from __future__ import annotations

import json
import tempfile
import time
from importlib import resources
from pathlib import Path



def _peak_rss_mb() -> float:
    """Peak resident memory of this process (Linux reports ru_maxrss in KiB)."""
    import resource

    return round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0, 1)

def main() -> dict:
    from lobeplan.report.plan import run_plan
    from lobeplan.site import load

    site = load(Path(str(resources.files("lobeplan.data").joinpath("demo/site.toml"))))
    plan = run_plan(site, True)
    out = {}
    with tempfile.TemporaryDirectory() as tmp:
        t0 = time.perf_counter()
        from lobeplan.render.azimap import draw_map
        from lobeplan.render.scene import band_scene

        first = draw_map(band_scene(site, plan, site.bands[0].name), Path(tmp) / "first.png", "2026-01-01")
        t1 = time.perf_counter()
        nxt = draw_map(band_scene(site, plan, site.bands[-1].name), Path(tmp) / "next.png", "2026-01-01")
        t2 = time.perf_counter()
        pdf = draw_map(band_scene(site, plan, site.bands[-1].name), Path(tmp) / "next.pdf", "2026-01-01")
        t3 = time.perf_counter()
        out["png_first_s"] = round(t1 - t0, 2)
        out["png_next_s"] = round(t2 - t1, 2)
        out["pdf_next_s"] = round(t3 - t2, 2)
        out["png_kb"] = round(first.stat().st_size / 1024)
        out["png_next_kb"] = round(nxt.stat().st_size / 1024)
        out["pdf_kb"] = round(pdf.stat().st_size / 1024)
    out["budget_s"] = 4.0
    return out


if __name__ == "__main__":
    print(json.dumps({**main(), "peak_rss_mb": _peak_rss_mb()}, indent=2))
