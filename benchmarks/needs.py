"""Benchmark: climatology needs for 10 goals x 500 points x 24 hours, one month.

Target (issue 4): under 10 s on the project machine, PyIRI import included.
The goals are invented bearing/distance sectors around an invented station
(pyproj gives their paths, as the geo layer would), half of them long path
or multi-hop, and five bands are evaluated per goal. Prints JSON.
"""
import json
import time

import numpy as np



def _peak_rss_mb() -> float:
    """Peak resident memory of this process (Linux reports ru_maxrss in KiB)."""
    import resource

    return round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0, 1)

def main() -> None:
    t0 = time.perf_counter()
    from pyproj import Geod

    from lobeplan.propagation.model import PropagationSettings
    from lobeplan.propagation.needs import band_needs, prepare_goal

    geod = Geod(ellps="WGS84")
    station = (-93.0, 45.0)
    settings = PropagationSettings(model="climatology", month=12, year=2026, solar_flux=120.0,
                                   hours_utc=((0, 24),), points_per_goal=500)
    rng = np.random.default_rng(7)
    sectors = [(40, 5000, 9000), (80, 6000, 8000), (120, 2000, 6000), (160, 4000, 9000),
               (200, 6000, 14000), (240, 8000, 12000), (280, 9000, 16000), (320, 300, 3000),
               (0, 1000, 5000), (300, 12000, 19000)]
    bands_hz = (3.6e6, 7.1e6, 10.12e6, 14.1e6, 28.4e6)
    n = settings.points_per_goal
    t_prepare = t_bands = 0.0
    open_fractions = []
    import_done = None
    for i, (bearing, d0, d1) in enumerate(sectors):
        b = rng.uniform(bearing - 15, bearing + 15, n)
        d = rng.uniform(d0, d1, n)
        lon0, lat0 = np.full(n, station[0]), np.full(n, station[1])
        lons, lats, _ = geod.fwd(lon0, lat0, b, d * 1e3)
        az, _, dist = geod.inv(lon0, lat0, lons, lats)
        az, dist = np.mod(az, 360.0), dist / 1e3
        path = "short"
        if i % 3 == 2:  # every third goal on the long path
            path, az, dist = "long", np.mod(az + 180.0, 360.0), 2 * np.pi * 6371.0 - dist
        t1 = time.perf_counter()
        geo = prepare_goal(settings, *station, lons, lats, az, dist, path)
        t2 = time.perf_counter()
        if import_done is None:
            import_done = t2 - t1
        for f in bands_hz:
            open_fractions.append(round(band_needs(geo, f, settings).open_fraction, 3))
        t3 = time.perf_counter()
        t_prepare += t2 - t1
        t_bands += t3 - t2
    total = time.perf_counter() - t0
    print(json.dumps({"peak_rss_mb": _peak_rss_mb(),
        "goals": len(sectors), "points_per_goal": n, "hours": 24, "bands": len(bands_hz),
        "prepare_goal_s": round(t_prepare, 3),
        "first_prepare_goal_s_incl_pyiri_import": round(import_done, 3),
        "band_needs_s": round(t_bands, 3),
        "total_s": round(total, 3), "target_s": 10.0, "ok": total < 10.0,
        "open_fractions": open_fractions,
    }))


if __name__ == "__main__":
    main()
