"""Benchmark: `lobeplan paths` on the demo site, wall time including imports.

Target (issue 2): under 2 s. Prints JSON.
"""
import json
import subprocess
import sys
import time
from pathlib import Path

DEMO = Path(__file__).resolve().parent.parent / "data" / "demo" / "site.toml"


def main() -> None:
    runs = []
    for _ in range(3):
        t0 = time.perf_counter()
        subprocess.run([sys.executable, "-m", "lobeplan", "paths", str(DEMO), "--json"],
                       check=True, capture_output=True)
        runs.append(time.perf_counter() - t0)
    print(json.dumps({"paths_wall_s": {"best": round(min(runs), 3), "runs": [round(r, 3) for r in runs]},
                      "target_s": 2.0, "ok": min(runs) < 2.0}))


if __name__ == "__main__":
    main()
