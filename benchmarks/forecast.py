"""Forecast speed and memory on the demo series.

Prints, for each engine: wall time of a CLI ``forecast`` in a new process (cold
imports; PyTensor's compile cache as it is on this machine), the same forecast
warm from Python (imports and compiled code already loaded), and the peak
resident memory of the CLI process.

Run: ``python benchmarks/forecast.py``. Goals (from the project's issue): exact
CLI under 1.5 s and 150 MB; NUTS CLI no slower than a bare PyMC script of the
same model (measured by the issue author at 9.4 s and 350 MB, 4 chains x 1000 draws).
"""

from __future__ import annotations

import json
import subprocess
import sys
import tempfile
import time

CHILD = r"""
import resource, sys
from bayesgrowth.cli import main
rc = main(sys.argv[1:])
print("MAXRSS_KB", resource.getrusage(resource.RUSAGE_SELF).ru_maxrss, file=sys.stderr)
sys.exit(rc)
"""


def cli_run(engine: str) -> tuple[float, float]:
    """Seconds and peak MB of one CLI forecast of the demo series in a new process."""
    from bayesgrowth.data.demo import demo_path

    with tempfile.TemporaryDirectory() as out:
        t0 = time.perf_counter()
        proc = subprocess.run(
            [sys.executable, "-c", CHILD, "forecast", str(demo_path()), "--horizon", "8",
             "--out", out, "--engine", engine, "--quiet"],
            capture_output=True, text=True, check=True,
        )
        seconds = time.perf_counter() - t0
    kb = next(int(line.split()[1]) for line in proc.stderr.splitlines()
              if line.startswith("MAXRSS_KB"))
    return seconds, kb / 1024


def warm_run(engine: str, repeats: int = 3) -> float:
    """Best-of seconds for fit + forecast + table from Python, after one warm-up."""
    import bayesgrowth as bg

    series = bg.load_demo()
    _ = bg.GrowthModel(engine=engine, seed=1).fit(series).forecast(8).table  # warm-up
    best = float("inf")
    for _ in range(repeats):
        t0 = time.perf_counter()
        _ = bg.GrowthModel(engine=engine, seed=1).fit(series).forecast(8).table
        best = min(best, time.perf_counter() - t0)
    return best


def main() -> None:
    results = {}
    for engine in ("exact", "nuts"):
        cli_run(engine)  # fill PyTensor's compile cache, as a user's second run would find it
        seconds, mb = min((cli_run(engine) for _ in range(3)), key=lambda r: r[0])
        results[engine] = {"cli_seconds": round(seconds, 2), "cli_peak_mb": round(mb),
                           "warm_python_seconds": round(warm_run(engine), 3)}
    print(json.dumps(results, indent=2))


if __name__ == "__main__":
    main()
