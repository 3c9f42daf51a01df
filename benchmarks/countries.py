"""Benchmark: resolving a country and sampling 500 points, after the first.

Target (issue 13): under 50 ms per country once the table is loaded (the
first call loads the shipped 1:10m table). Each country is timed on its
first resolve, so no cache of ours helps; the big, many-island ones are in
the list on purpose. Also reports the load time and `data/` size. Prints JSON.
"""
import json
import resource
import time
from importlib import resources
from pathlib import Path

from lobeplan.geo import regions as R
from lobeplan.geo.station import Station

COUNTRIES = ("CAN", "USA", "RUS", "IDN", "NOR", "CHL", "GRL", "AUS", "PHL", "JPN", "GBR", "FRA",
             "MLT", "FJI", "KIR", "MDV", "BHS", "PYF", "SYC", "TON")


def _peak_rss_mb() -> float:
    """Peak resident memory of this process (Linux reports ru_maxrss in KiB)."""
    return round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0, 1)


def main() -> dict:
    st = Station("", 45.0, -93.0, "")
    t0 = time.perf_counter()
    R.sample_points(R.resolve("country:DEU", st), 500)
    first = time.perf_counter() - t0
    times = {}
    for code in COUNTRIES:
        t = time.perf_counter()
        R.sample_points(R.resolve(f"country:{code}", st), 500)
        times[code] = round((time.perf_counter() - t) * 1000.0, 1)
    t = time.perf_counter()
    R.sample_points(R.resolve("continent:Europe", st), 500)
    europe = time.perf_counter() - t
    folder = Path(str(resources.files("lobeplan.data")))
    size = sum(p.stat().st_size for p in folder.rglob("*") if p.is_file())
    worst = max(times.values())
    return {"first_call_s": round(first, 3), "country_500_points_ms": times, "worst_ms": worst,
            "continent_europe_500_points_ms": round(europe * 1000.0, 1),
            "data_mb": round(size / 1e6, 2), "target_ms": 50.0, "ok": worst < 50.0 and size < 15e6}


if __name__ == "__main__":
    print(json.dumps({**main(), "peak_rss_mb": _peak_rss_mb()}, indent=2))
