"""Benchmark: resolve and sample regions of every size, tiny to half the globe.

Target (issue 16): each region resolves and samples 500 points in under
0.5 s (the shipped continents are built once per process and timed apart).
Prints JSON with the timings and the peak resident memory.
"""
import json
import resource
import time

from lobeplan.geo import regions as R
from lobeplan.geo.station import Station

STATION = Station("", 48.0, 11.0, "")
CASES = [
    ("circle:48,11,0.01", None), ("circle:48,11,0.1", None), ("circle:48,11,1.5", None),
    ("sector:0,10,0,0.001", None), ("sector:10,11,19000,19000.002", None),
    ("circle:0,0,1000", (0.0, 0.0, 0.0001, 0.0001)), ("circle:0,0,1000", (8.9, -0.01, 9.5, 0.01)),
    ("circle:-47,14,50", None), ("circle:89.9,0,3000", None), ("circle:10,10,19999", None),
    ("sector:0,359,0,20038", None), ("sector:350,10,100,15000", None),
    ("country:FRA", (2.0, 46.0, 2.01, 46.01)), ("country:RUS", None),
]


def main() -> None:
    t0 = time.perf_counter()
    R.continent_geometry("Europe")
    build_s = time.perf_counter() - t0
    rows = []
    for text, clip in CASES:
        runs = []
        for _ in range(3):  # best of three: the machine may be busy
            t0 = time.perf_counter()
            area = R.resolve(text, STATION, clip=clip)
            lons, _ = R.sample_points(area, 500)
            runs.append(time.perf_counter() - t0)
        rows.append({"region": text, "clip": clip, "points": int(lons.size), "seconds": round(min(runs), 4)})
    worst = max(r["seconds"] for r in rows)
    print(json.dumps({"continents_build_s": round(build_s, 3), "regions": rows, "worst_s": worst,
                      "target_s": 0.5, "ok": worst < 0.5,
                      "peak_rss_mb": round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024, 1)},
                     indent=1))


if __name__ == "__main__":
    main()
