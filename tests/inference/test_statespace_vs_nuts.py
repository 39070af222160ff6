"""The exact state-space engine against NUTS on the same model, and calibration on its prior.

Both checks are statistical and slow: seeded, marked ``slow``.
"""

import math

import numpy as np
import pytest

import bayesgrowth as bg
from bayesgrowth.inference.run import fit_series


@pytest.mark.slow
def test_exact_engine_agrees_with_nuts_on_the_local_trend():
    from bayesgrowth.priors import LocalTrendPrior, Priors

    # the model without level shocks: with them NUTS crawls along the ridge between level
    # shocks and noise (minutes per fit), which the exact engine does not have to walk
    series = bg.load_demo().head(14)
    opts = {"model": "local-trend", "drift": "random-walk", "seasonal": False,
            "priors": Priors(local_trend=LocalTrendPrior(level_shock_pct=0,
                                                         growth_drift_pts=1.0))}
    exact = fit_series(series, engine="exact", seed=5, **opts)
    nuts = fit_series(series, engine="nuts", seed=5, draws=1000, chains=2, **opts)
    assert nuts.diagnostics.ok
    ess = nuts.diagnostics.min_ess_bulk
    fe, fn = bg.forecast(exact, 4), bg.forecast(nuts, 4)
    for name in ("sigma", "sigma_growth", "log1p_g"):
        a, b = exact.flat()[name], nuts.flat()[name]
        # Monte Carlo error of each mean: sd / sqrt(independent draws); NUTS by its ESS
        se = math.sqrt(a.var() / a.size + b.var() / ess)
        assert abs(a.mean() - b.mean()) < 4 * se + 0.02 * a.std(), name
    for q in (0.1, 0.5, 0.9):
        a = np.quantile(np.log(fe.draws[:, -1]), q)
        b = np.quantile(np.log(fn.draws[:, -1]), q)
        sd = np.log(fe.draws[:, -1]).std()
        assert abs(a - b) < 0.08 * sd + 4 * sd / math.sqrt(ess), q


@pytest.mark.slow
@pytest.mark.filterwarnings("ignore:sampling diagnostics failed")
def test_simulation_based_calibration_of_the_exact_engine():
    # Talts, Betancourt, Simpson, Vehtari & Gelman (2018), "Validating Bayesian inference
    # algorithms with simulation-based calibration": draw parameters from the prior, data
    # from the model, and the rank of the true value among posterior draws is uniform.
    from bayesgrowth.data.periods import PeriodAxis
    from bayesgrowth.data.series import GrowthSeries
    from bayesgrowth.inference.theta import theta_dims
    from bayesgrowth.priors import Priors

    rng = np.random.default_rng(2018)
    axis = PeriodAxis(style="year", step=1, origin=2000)
    n_rep, n_obs, n_draws = 120, 12, 99
    ranks = {"sigma_growth": [], "log1p_g": []}
    for _ in range(n_rep):
        probe = GrowthSeries(values=np.ones(n_obs), t=np.arange(n_obs), axis=axis)
        pr = Priors().resolve(probe)
        dims = {d.name: d.dist for d in theta_dims(pr, False)}
        theta = [float(dims[k].ppf(rng.uniform())) for k in ("sigma", "sigma_level",
                                                              "sigma_growth")]
        log_a = math.log(1000.0)
        g0 = rng.normal(pr.log1p_g_mu, pr.log1p_g_sd)
        y = np.empty(n_obs)
        level, growth = log_a + rng.normal(0, pr.log_a_sd), g0
        for j in range(n_obs):
            if j:
                growth += theta[2] * rng.standard_normal()
                level += growth + theta[1] * rng.standard_normal()
            y[j] = level + theta[0] * rng.standard_normal()
        series = GrowthSeries(values=np.exp(y), t=np.arange(n_obs), axis=axis)
        # the prior on log a is centred on the first observation by default: state it
        from bayesgrowth.priors import InitialValuePrior

        priors = Priors(initial=InitialValuePrior(value=1000.0))
        fit = fit_series(series, engine="exact", model="local-trend", drift="random-walk",
                         priors=priors, seed=int(rng.integers(1 << 30)), draws=n_draws,
                         chains=1, seasonal=False)
        flat = fit.flat()
        ranks["sigma_growth"].append(int((flat["sigma_growth"] < theta[2]).sum()))
        ranks["log1p_g"].append(int((flat["log1p_g"] < g0).sum()))
    for name, r in ranks.items():
        counts = np.bincount(np.asarray(r) // 20, minlength=5)  # 5 bins of 20 ranks
        # chi-square test of uniform ranks, 4 degrees of freedom; 0.001 level
        expected = n_rep / 5
        chi2 = float(((counts - expected) ** 2 / expected).sum())
        assert chi2 < 18.47, (name, counts)
