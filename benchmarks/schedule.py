"""Benchmark: the demo's 12 months x 24 h x every band and goal, climatology.

Targets (issue 12): the whole-year plan and its schedule in under 15 s on
two cores, and no more than 4 times one month's plan; peak memory under
1 GB. Each case runs in a fresh process (imports included, as a user's run
is), timed from the start of the work to its end; prints JSON.

    .venv/bin/python benchmarks/schedule.py
"""
import json
import subprocess
import sys

CASE = r"""
import json, resource, sys, time
t0 = time.perf_counter(); c0 = time.process_time()
from dataclasses import replace
from lobeplan.site import load
from lobeplan.plan.planner import make_plan
from lobeplan.plan.schedule import make_schedule
from importlib.resources import files
site = load(files("lobeplan.data") / "demo" / "site.toml")
months = tuple(range(1, 13)) if sys.argv[1] == "year" else ()
site = replace(site, propagation=replace(site.propagation, months=months))
t1 = time.perf_counter()
plan = make_plan(site)
t2 = time.perf_counter()
rows = make_schedule(site, plan).rows if sys.argv[1] == "year" else ()
t3 = time.perf_counter()
print(json.dumps({"wall_s": round(t3 - t0, 3), "cpu_s": round(time.process_time() - c0, 3),
                  "plan_s": round(t2 - t1, 3), "schedule_s": round(t3 - t2, 3), "rows": len(rows),
                  "goal_bands": len(plan.goal_bands),
                  "peak_rss_mb": round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0, 1)}))
"""


def _run(which: str) -> dict:
    out = subprocess.run([sys.executable, "-c", CASE, which], check=True, capture_output=True, text=True)
    return json.loads(out.stdout.strip().splitlines()[-1])


def main() -> None:
    month = _run("month")
    year = _run("year")
    ratio = year["wall_s"] / month["wall_s"]
    print(json.dumps({
        "one_month_plan": month,
        "twelve_months_plan_and_schedule": year,
        "ratio_to_one_month": round(ratio, 2),
        "targets": {"wall_s": 15.0, "ratio": 4.0, "peak_rss_mb": 1024.0},
        "ok": year["wall_s"] < 15.0 and ratio <= 4.0 and year["peak_rss_mb"] < 1024.0,
        "peak_rss_mb": year["peak_rss_mb"],
    }))


if __name__ == "__main__":
    main()
