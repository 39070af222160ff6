"""NUTS fits of the bending curves and error options: recovery, robustness, seasons, GDP.

Slow and seeded. Few distinct model graphs are sampled, each with short chains: a
first fit of a new graph pays a one-off C compile.
"""

from __future__ import annotations

import math
import warnings

import numpy as np
import pandas as pd
import pytest
from scipy import stats

from bayesgrowth.data.series import read_series
from bayesgrowth.inference import fit_series
from bayesgrowth.models import general
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.priors import LocalTrendPrior, Priors

#: The local trend of the NUTS sampler-health measurements: no level shocks, growth drift
#: about 1 point per period (the priors before the exact engine's real-data defaults).
NO_LEVEL_SHOCKS = Priors(local_trend=LocalTrendPrior(level_shock_pct=0, growth_drift_pts=1.0))

pytestmark = pytest.mark.slow

SHORT = {"draws": 300, "tune": 400, "chains": 2}


def _quarterly(values, start_year=2015):
    labels = [f"{start_year + i // 4}Q{i % 4 + 1}" for i in range(len(values))]
    return read_series(pd.DataFrame({"period": labels, "value": values}), name="simulated")


def _fit(series, **kw):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # short chains: ESS warnings expected; checked below
        kw = {"engine": "nuts", "model": "exponential", "drift": "random-walk",
              "seasonal": False, **kw}
        return fit_series(series, seed=kw.pop("seed", 1), **SHORT, **kw)


TRUTH = {
    "logistic": {"log_a": math.log(100.0), "log_k": math.log(1500.0), "half_life": 4.0},
    "gompertz": {"log_a": math.log(100.0), "log_k": math.log(1500.0), "half_life": 6.0},
    "damped": {"log_a": math.log(100.0), "log1p_g": 0.15, "half_life": 6.0, "long_run": 0.0},
}
N_DATASETS = 8


@pytest.mark.parametrize("curve", list(TRUTH))
def test_curve_parameters_recovered_with_near_nominal_coverage(curve):
    # Each dataset: 20 quarters simulated from the curve with 4% normal noise. The 80% intervals
    # of the three parameters over 8 datasets (24 intervals) should cover the truth about 19.2
    # times. Bounds: the 0.5% and 99.5% binomial(24, 0.8) quantiles (scipy), a check that both
    # too-narrow and too-wide intervals would fail. The parameters of one dataset are not
    # independent, so the bounds are approximate; the weak priors make coverage near nominal.
    spec = ModelSpec(model=curve)
    truth = TRUTH[curve]
    t = np.arange(20)
    rng = np.random.default_rng(11)
    mean = general.log_trend(spec, {k: np.array([v]) for k, v in truth.items()}, t, 0)[0]
    names = [k for k in truth if k != "long_run"]
    covered, errors, divergences = 0, [], 0
    for i in range(N_DATASETS):
        y = np.exp(mean + 0.04 * rng.standard_normal(t.size))
        fit = _fit(_quarterly(y), model=curve, seed=100 + i)
        divergences += fit.diagnostics.divergences
        flat = fit.flat()
        for k in names:
            lo, hi = np.quantile(flat[k], [0.1, 0.9])
            covered += int(lo <= truth[k] <= hi)
        errors.append(np.median(flat["log_a"]) - truth["log_a"])
    lo_n, hi_n = stats.binom.ppf([0.005, 0.995], 3 * N_DATASETS, 0.8)
    assert lo_n <= covered <= hi_n, f"{curve}: {covered} of {3 * N_DATASETS} intervals covered"
    assert abs(np.mean(errors)) < 0.03  # initial level within 3% on average
    assert divergences <= 2, f"{curve}: {divergences} divergences over {N_DATASETS} fits"


def test_student_t_noise_resists_an_outlier_quarter():
    # 16 quarters growing 5% a quarter with 2% noise; the last-but-two quarter is doubled (a
    # one-off booking). Thresholds (our choice, stated): Student-t keeps the growth within 0.5
    # points of the truth; normal noise is pulled at least twice as far.
    rng = np.random.default_rng(7)
    t = np.arange(16)
    y = np.exp(math.log(500) + math.log(1.05) * t + 0.02 * rng.standard_normal(t.size))
    y[13] *= 2.0
    s = _quarterly(y)
    g_t = np.median(_fit(s, noise="student-t").derived()["growth_per_period"])
    g_n = np.median(_fit(s).derived()["growth_per_period"])
    assert abs(g_t - 0.05) < 0.005, g_t
    assert abs(g_n - 0.05) > 2 * abs(g_t - 0.05), (g_n, g_t)


def test_seasonal_factors_recovered_on_quarterly_data():
    # 24 quarters, 3% growth, factors exp(+8%, -5%, -6%, +3%) on the log scale (sum zero), 2%
    # noise: each posterior median within 0.02 of the truth, each 90% interval covering it.
    truth = np.array([0.08, -0.05, -0.06, 0.03])
    rng = np.random.default_rng(3)
    t = np.arange(24)
    y = np.exp(math.log(800) + 0.03 * t + truth[t % 4] + 0.02 * rng.standard_normal(t.size))
    fit = _fit(_quarterly(y, start_year=2016), seasonal=True)
    season = fit.flat()["season"]
    np.testing.assert_allclose(np.median(season, axis=0), truth, atol=0.02)
    lo, hi = np.quantile(season, [0.05, 0.95], axis=0)
    assert np.all((lo <= truth) & (truth <= hi))
    assert fit.diagnostics.divergences == 0


def _gdp_series():
    macro = pytest.importorskip("statsmodels.datasets.macrodata")
    d = macro.load_pandas().data.tail(60)  # US real GDP, FRED via statsmodels (public domain)
    labels = [f"{int(y)}Q{int(q)}" for y, q in zip(d["year"], d["quarter"], strict=True)]
    return read_series(pd.DataFrame({"period": labels, "value": d["realgdp"].to_numpy()}),
                       name="US real GDP")


def test_persistent_errors_move_gdp_coverage_toward_nominal():
    # US real GDP (statsmodels macrodata, source FRED), last 60 quarters; rolling origins every 4
    # quarters from 20 training quarters, forecasts 1-4 quarters ahead: 40 outcomes per method.
    # Measured (seed 3): independent errors 42.5% inside the nominal 80% band, AR(1) errors
    # 62.5%, local trend (random-walk growth) 77.5%; no divergences. Tests (margins our choice,
    # well inside what was measured, and wider than the 6-point binomial sd of 40 outcomes):
    # AR(1) errors beat
    # independent errors by at least 10 points, the local trend by at least 20; independent
    # errors stay below 60% (bands too narrow, as the issue measured: 44%); no divergent
    # transitions at any origin.
    from bayesgrowth.backtest.runner import backtest

    s = _gdp_series()
    common = dict(horizon=4, min_train=20, stride=4, levels=(80,), seed=3, n_draws=500)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        indep = backtest(s, methods=("exact",), **common)
        ar1 = backtest(s, methods=("nuts",), model_options={"errors": "ar1", **SHORT},
                       **common)
        # the local trend as measured then: no level shocks (the sampler's ridge between
        # level shocks and noise is slow under NUTS; the exact engine has no such cost)
        lt = backtest(s, methods=("nuts",), model_options={"model": "local-trend", **SHORT},
                      priors=NO_LEVEL_SHOCKS, **common)

    def cov(r):
        row = r.scores[r.scores["step"] == "all"].iloc[0]
        assert row["n"] == 40
        return float(row["coverage_80"])

    c_ind, c_ar1, c_lt = cov(indep), cov(ar1), cov(lt)
    assert c_ind < 0.6, c_ind
    assert c_ar1 >= c_ind + 0.10, (c_ind, c_ar1)
    assert c_lt >= c_ind + 0.20, (c_ind, c_lt)
    for r in (ar1, lt):
        assert int(r.diagnostics["divergences"].sum()) == 0, r.diagnostics


@pytest.mark.parametrize("curve", ["exponential", "damped", "logistic", "gompertz", "local-trend"])
def test_every_curve_with_ar1_errors_samples_the_demo_cleanly(curve):
    # The hardest case of benchmarks/health.py: AR(1) errors, whose persistence made a funnel with
    # the starting level until that level was integrated out (21 and 18 divergent transitions for
    # the logistic and Gompertz curves on the demo before). Package defaults (4 x 1000 draws),
    # seed 1; thresholds of Vehtari et al. (2021) as the package applies them.
    from bayesgrowth.data import load_demo

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        fit = fit_series(load_demo(), model=curve, errors="ar1", seed=1,
                         priors=NO_LEVEL_SHOCKS, engine="nuts", drift="random-walk", seasonal=False)
    d = fit.diagnostics
    assert d.divergences == 0, d
    assert d.max_rhat <= 1.01 and d.min_ess_bulk >= 400, d
