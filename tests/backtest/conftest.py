"""Fixtures of the backtest tests: simulated series and US real GDP from statsmodels."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from bayesgrowth.data import read_series


def _simulated_series(rng: np.random.Generator, n: int, *, rho: float = 0.0):
    """Exponential growth with normal log noise (AR(1) with coefficient ``rho``), quarterly.

    The noise has the same marginal sd whatever ``rho``, drawn with the growth rate
    and the level from ``rng``.
    """
    g = rng.uniform(0.0, 0.08)
    sigma = rng.uniform(0.02, 0.12)
    e = np.empty(n)
    e[0] = rng.normal(0, sigma)
    innov = sigma * np.sqrt(1 - rho**2)
    for i in range(1, n):
        e[i] = rho * e[i - 1] + rng.normal(0, innov)
    t = np.arange(n)
    values = 1000.0 * np.exp(np.log1p(g) * t + e)
    periods = [f"{2000 + i // 4}Q{i % 4 + 1}" for i in t]
    return read_series(pd.DataFrame({"period": periods, "value": values}), name="simulated")


@pytest.fixture(scope="session")
def gdp_series():
    """US real GDP, last 60 quarters (1994Q4-2009Q3).

    Source: statsmodels.datasets.macrodata (FRED, St. Louis Fed; public domain).
    """
    macro = pytest.importorskip("statsmodels.datasets.macrodata").load_pandas().data
    periods = [f"{int(y)}Q{int(q)}" for y, q in zip(macro["year"], macro["quarter"], strict=True)]
    frame = pd.DataFrame({"period": periods, "value": macro["realgdp"]}).tail(60)
    return read_series(frame, name="US real GDP")


@pytest.fixture(scope="session")
def simulate():
    """The simulator of growth series, ``simulate(rng, n, rho=0.0)``."""
    return _simulated_series
