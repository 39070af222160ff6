"""Pooled posteriors written down directly, for tests of what comes after the fit.

Importable from every test folder: ``tests/`` is on the path of the suite (its conftest).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

from bayesgrowth.data.series import GrowthSeries, read_series
from bayesgrowth.inference.diagnostics import Diagnostics
from bayesgrowth.inference.pooled import PooledFit
from bayesgrowth.models.hierarchical import GroupPrior
from bayesgrowth.priors import Priors


def written_pooled_fit(series: dict, seed: int = 4) -> PooledFit:
    """A pooled posterior around 5% growth per period, 2 chains x 150 draws, no sampling."""
    rng = np.random.default_rng(seed)
    shape = (2, 150, len(series))
    first = np.array([s.values[0] for s in series.values()])
    posterior = {
        "log_a": np.log(first) + 0.02 * rng.standard_normal(shape),
        "log1p_g": np.log1p(0.05) + 0.005 * rng.standard_normal(shape),
        "sigma": 0.05 + 0.005 * rng.random(shape),
        "mu_growth": np.log1p(0.05) + 0.01 * rng.standard_normal(shape[:2]),
        "tau_growth": 0.02 + 0.01 * rng.random(shape[:2]),
    }
    return PooledFit(series=series, priors={n: Priors().resolve(s) for n, s in series.items()},
                     group=GroupPrior(), errors="independent", seed=seed, posterior=posterior,
                     diagnostics=Diagnostics.from_values(1.0, 1000, 1000, 0, "NUTS (test)"),
                     settings={})


def series_of(name: str, labels: list[str], start: float) -> GrowthSeries:
    """An invented series growing 5% a period from ``start``."""
    frame = pd.DataFrame({"period": labels, "value": start * 1.05 ** np.arange(len(labels))})
    return read_series(frame, name=name)


def quarters(first_year: int, n: int) -> list[str]:
    """``n`` quarter labels from the first quarter of ``first_year``."""
    return [f"{first_year + i // 4}Q{i % 4 + 1}" for i in range(n)]
