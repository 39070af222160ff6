"""LOO chooses the curve that generated the data (slow: NUTS fits of several curves).

Simulated series, invented: a logistic curve observed well past its inflection,
and plain exponential growth. Expected behaviour, from the definition of
elpd_loo (Vehtari, Gelman & Gabry 2017): a curve that cannot bend loses clearly
on saturating data; on exponential data a curve with a ceiling can mimic the
exponential (a far ceiling), so the exponential must not be rejected.
"""

import math

import numpy as np
import pandas as pd
import pytest

from bayesgrowth.data import read_series
from bayesgrowth.select import compare_models, fit_models, registered_models

pytestmark = pytest.mark.slow

CURVES = ("exponential", "logistic", "gompertz")
SETTINGS = {"draws": 300, "tune": 300, "chains": 2}


def _need_curves():
    missing = [c for c in CURVES if c not in registered_models()]
    if missing:
        pytest.skip(f"curve(s) {', '.join(missing)} not registered yet in bayesgrowth.models")


def _quarterly(log_values):
    labels = [f"{2019 + i // 4}Q{i % 4 + 1}" for i in range(len(log_values))]
    return read_series(pd.DataFrame({"period": labels, "value": np.exp(log_values)}))


def _logistic_series(seed):
    # K = 1000, a = 50, the odds (K - R)/R halve every 2 quarters: inflection near
    # t = 8.5, so 24 quarters end at 99% of the ceiling. Noise 3%.
    rng = np.random.default_rng(seed)
    t = np.arange(24)
    k, a, lam = 1000.0, 50.0, math.log(2) / 2
    log_r = np.log(k) - np.log1p((k - a) / a * np.exp(-lam * t))
    return _quarterly(log_r + rng.normal(0, 0.03, t.size))


def _exponential_series(seed):
    rng = np.random.default_rng(seed)
    t = np.arange(16)
    return _quarterly(np.log(100.0) + np.log(1.06) * t + rng.normal(0, 0.03, t.size))


def test_loo_prefers_a_ceiling_on_saturating_data():
    _need_curves()
    wins = 0
    for seed in (1, 2, 3):
        comp = compare_models(fit_models(_logistic_series(seed), CURVES, engine="auto",
                                         seed=seed, **SETTINGS))
        tab = comp.table.set_index("model")
        best = comp.best
        gap = tab.loc["exponential", "elpd_diff"] / tab.loc["exponential", "dse"]
        if best in ("logistic", "gompertz") and gap > 2:
            wins += 1
        assert comp.weights["exponential"] < 0.5
    assert wins >= 2


def test_loo_does_not_reject_the_exponential_on_exponential_data():
    _need_curves()
    for seed in (4, 5):
        comp = compare_models(fit_models(_exponential_series(seed), CURVES, engine="auto",
                                         seed=seed, **SETTINGS))
        row = comp.table.set_index("model").loc["exponential"]
        # Not distinguishable from the best: within 2 standard errors of the
        # difference (a rule of thumb from common practice).
        assert row["elpd_diff"] <= 2 * row["dse"] + 1e-9
