"""Size and time to interactive of the demo's plan page (plan.html) in headless Chromium.

Prints JSON. Not a timed test: run it by hand, ``python benchmarks/page.py``
(needs Debian's chromium and chromium-driver and the ``test`` extra). The plan
is made first and not timed. "script_ms" is the page's own script, from its
first line to the last control drawn (the page records it on <html> as
``data-ready-ms``); "interactive_ms" is the browser's navigation timing up to
the end of the load event, when every control answers. Each is the median
of five loads from file://. Budgets: under 3 MB, interactive in under 1 s.
"""
from __future__ import annotations

import json
import shutil
import statistics
import sys
import tempfile
import time
from importlib import resources
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent.parent / "tests"))


def _peak_rss_mb() -> float:
    """Peak resident memory of this process (Linux reports ru_maxrss in KiB)."""
    import resource

    return round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0, 1)


def main() -> dict:
    from browser import set_viewport, start_chromium

    from lobeplan.render.page import write_page
    from lobeplan.report.plan import build_from_plan, run_plan
    from lobeplan.site import load

    site = load(Path(str(resources.files("lobeplan.data").joinpath("demo/site.toml"))))
    plan = run_plan(site, True)
    result = build_from_plan(site, plan)
    out = {}
    with tempfile.TemporaryDirectory() as tmp:
        t0 = time.perf_counter()
        page = write_page(site, plan, result, Path(tmp) / "plan.html")
        out["write_s"] = round(time.perf_counter() - t0, 2)
        out["page_mb"] = round(page.stat().st_size / 1e6, 3)
        drv, profile = start_chromium()
        try:
            set_viewport(drv, 1280, 800)
            script, interactive = [], []
            for _ in range(5):
                drv.get(page.as_uri())
                script.append(float(drv.find_element("css selector", "html").get_attribute("data-ready-ms")))
                interactive.append(drv.execute_script(
                    "var n = performance.getEntriesByType('navigation')[0]; return n.loadEventEnd - n.startTime"))
        finally:
            drv.quit()
            shutil.rmtree(profile, ignore_errors=True)
    out["script_ms"] = round(statistics.median(script), 1)
    out["interactive_ms"] = round(statistics.median(interactive), 1)
    out["budget_mb"] = 3.0
    out["budget_ms"] = 1000.0
    return out


if __name__ == "__main__":
    print(json.dumps({**main(), "peak_rss_mb": _peak_rss_mb()}, indent=2))
