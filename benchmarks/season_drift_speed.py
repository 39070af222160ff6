"""Speed of drifting seasonal factors on the exact engine: whole fits and the filter alone.

Prints, best of several back-to-back repeats after a warm-up (compile caches as they are):

- a fit of the default model (exact engine) of an invented 40-point quarterly and 120-point
  monthly series, with fixed seasonal factors and with ``seasonal="drifting"``;
- the compiled filter with the seasonal deviation's state alone
  (:func:`bayesgrowth.inference.kalman_season.gram_filter_season`) on a fixed grid of
  nodes, per series, in seconds and in nanoseconds per node and observation.

Run: ``python benchmarks/season_drift_speed.py`` (a few minutes: the monthly series' drifting
fit is the slow part). The machine's speed varies
from hour to hour: compare figures measured back to back only.
"""

from __future__ import annotations

import json
import time

import numpy as np

from bayesgrowth.data.periods import PeriodAxis
from bayesgrowth.data.series import GrowthSeries


def invented(m: int, n: int) -> GrowthSeries:
    """An invented series: growth that slows, a seasonal pattern that drifts, noise."""
    rng = np.random.default_rng(100 + m)
    j = np.arange(n)
    pattern = 0.08 * np.sin(2 * np.pi * (np.arange(m) + 0.5) / m)
    drift = 1 + np.cumsum(rng.normal(0, 0.03, n))
    log_y = 7 + 0.06 * j * 4 / m - 0.0006 * (j * 4 / m) ** 2 + pattern[j % m] * drift
    log_y += rng.normal(0, 0.02, n)
    style, origin = ("quarter", 2016 * 4) if m == 4 else ("month", 2016 * 12)
    return GrowthSeries(values=np.exp(log_y), t=j, axis=PeriodAxis(style, 1, origin),
                        name=f"invented-{m}-{n}")


def best_of(run, repeats: int) -> float:
    """Best wall seconds of ``repeats`` calls of ``run`` after one warm-up call."""
    run()
    best = float("inf")
    for _ in range(repeats):
        t0 = time.perf_counter()
        run()
        best = min(best, time.perf_counter() - t0)
    return best


def fit_seconds(series: GrowthSeries, seasonal, repeats: int) -> float:
    """Best seconds of one fit of the default model (exact engine) with ``seasonal``."""
    from bayesgrowth.model import GrowthModel

    return best_of(lambda: GrowthModel(seed=1, seasonal=seasonal).fit(series), repeats)


def kernel_seconds(m: int, n: int, nodes: int, repeats: int) -> float:
    """Best seconds of the drifting-season filter on ``nodes`` fixed nodes."""
    from bayesgrowth.inference.kalman_season import gram_filter_season
    from bayesgrowth.models.linear import season_basis

    rng = np.random.default_rng(5)
    j = np.arange(n)
    y = 7 + 0.02 * j + rng.normal(0, 0.05, n)
    season = season_basis(m)[j % m]
    rho = np.where(np.arange(nodes) % 2 == 0, 1.0, rng.uniform(0.6, 0.99, nodes))
    scales = [np.exp(rng.uniform(-7, -2, nodes)) for _ in range(4)]
    return best_of(lambda: gram_filter_season(y, season, j, rho, *scales, m, True), repeats)


def main(repeats: int = 3, nodes: int = 4096) -> None:
    """Print the timings as JSON (filter alone: best of ``2 * repeats + 1``)."""
    out = {}
    for m, n in ((4, 40), (12, 120)):
        series = invented(m, n)
        name = "quarterly 40" if m == 4 else "monthly 120"
        out[f"{name}: fit, fixed seasons (s)"] = round(fit_seconds(series, True, repeats), 3)
        out[f"{name}: fit, drifting seasons (s)"] = round(
            fit_seconds(series, "drifting", repeats), 3)
        sec = kernel_seconds(m, n, nodes, 2 * repeats + 1)
        out[f"{name}: filter alone, {nodes} nodes (s)"] = round(sec, 4)
        out[f"{name}: filter alone (ns per node and observation)"] = round(
            1e9 * sec / (nodes * n), 1)
    print(json.dumps(out, indent=2))


if __name__ == "__main__":
    main()
