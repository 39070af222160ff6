"""The models' likelihoods and forecasts against statsmodels, scipy and textbook formulas."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats

from bayesgrowth.data.periods import PeriodAxis
from bayesgrowth.models import general, linear, local_trend
from bayesgrowth.models.spec import ModelSpec, season_index


def _draws(n=1, **values):
    return {k: np.full(n, float(v)) for k, v in values.items()}


def test_ar1_likelihood_matches_statsmodels_exact_arma_likelihood(rng):
    # Source: statsmodels ARIMA(order=(1,0,0), trend="n").loglike, the exact Gaussian AR(1)
    # likelihood by the Kalman filter with the stationary start; our pointwise terms are the
    # conditional densities p(e_t | e_{t-1}) plus the stationary first term, so they must sum to it.
    arima = pytest.importorskip("statsmodels.tsa.arima.model")
    t = np.arange(30)
    phi, sigma, log_a, b = 0.7, 0.05, 3.0, 0.04
    e = np.zeros(t.size)
    e[0] = rng.normal(0, sigma / math.sqrt(1 - phi**2))
    for i in range(1, t.size):
        e[i] = phi * e[i - 1] + rng.normal(0, sigma)
    log_y = log_a + b * t + e
    spec = ModelSpec(errors="ar1")
    ll = general.log_likelihood(
        spec, _draws(log_a=log_a, log1p_g=b, sigma=sigma, phi=phi), t, np.exp(log_y), 0
    )
    ours = ll.sum() + log_y.sum()  # undo the Jacobian 1/R: the log-scale density
    ref = arima.ARIMA(e, order=(1, 0, 0), trend="n").loglike(np.array([phi, sigma**2]))
    assert ours == pytest.approx(ref, rel=1e-9)


def test_student_t_likelihood_matches_scipy(rng):
    # Source: scipy.stats.t.logpdf.
    t = np.arange(12)
    resid = rng.standard_t(4, size=t.size) * 0.1
    d = _draws(log_a=1.0, log1p_g=0.02, sigma=0.1, nu=4.0)
    y = np.exp(1.0 + 0.02 * t + resid)
    ll = general.log_likelihood(ModelSpec(noise="student-t"), d, t, y, 0)[0]
    ref = stats.t.logpdf(resid, df=4.0, scale=0.1) - np.log(y)
    np.testing.assert_allclose(ll, ref, rtol=1e-10)


def test_ar1_forecast_variance_follows_the_textbook_formula():
    # Source: h-step forecast error variance of an AR(1), sigma^2 (1 - phi^(2h)) / (1 - phi^2),
    # and its mean phi^h e_T (e.g. Hamilton 1994, Time Series Analysis, sec. 4.2).
    n = 200_000
    phi, sigma = 0.8, 0.1
    d = _draws(n, log_a=0.0, log1p_g=0.0, sigma=sigma, phi=phi)
    rng = np.random.default_rng(5)
    e_last = 0.3
    sims, curve = general.simulate_log(
        ModelSpec(errors="ar1"), d, np.arange(10), np.r_[np.zeros(9), e_last],
        np.arange(10, 14), 0, rng,
    )
    h = np.arange(1, 5)
    var = sigma**2 * (1 - phi ** (2 * h)) / (1 - phi**2)
    assert np.all(np.abs(sims.mean(axis=0) - phi**h * e_last) <= 4 * np.sqrt(var / n))
    # sample variance: relative sd sqrt(2 / n) = 0.3%; allow 4 of them
    np.testing.assert_allclose(sims.var(axis=0), var, rtol=4 * math.sqrt(2 / n))
    np.testing.assert_allclose(curve, 0.0)


def _ucm(y, sigma, s_l, s_g, log_a, g0):
    """statsmodels' local linear trend with a known start equal to our model's."""
    sm = pytest.importorskip("statsmodels.api")
    mod = sm.tsa.UnobservedComponents(y, level="local linear trend")
    # our growth_j (into period j) is statsmodels' beta_{j-1}; beta_0 = g0 + s_g u_1
    mod.ssm.initialize_known(np.array([log_a, g0]), np.diag([0.0, s_g**2]))
    mod.ssm.loglikelihood_burn = 0  # a known start: every observation counts
    return mod, np.array([sigma**2, s_l**2, s_g**2])


@pytest.mark.parametrize("s_l", [0.0, 0.03])
def test_local_trend_likelihood_matches_statsmodels_kalman_filter(rng, s_l):
    # Source: statsmodels UnobservedComponents("local linear trend").loglike, a Kalman filter:
    # the closed-form multivariate normal must give the same likelihood, and its pointwise terms
    # the same one-step prediction-error densities (statsmodels llf_obs).
    n = 25
    sigma, s_g, log_a, g0 = 0.04, 0.01, 5.0, 0.05
    growth = g0 + s_g * np.cumsum(rng.standard_normal(n))
    level = log_a + np.r_[0.0, np.cumsum(growth[1:] + s_l * rng.standard_normal(n - 1))]
    y = level + sigma * rng.standard_normal(n)
    mod, params = _ucm(y, sigma, s_l, s_g, log_a, g0)
    ref_obs = mod.loglikeobs(params)
    d = _draws(log_a=log_a, log1p_g=g0, sigma=sigma, sigma_level=s_l, sigma_growth=s_g)
    ours = local_trend.log_likelihood(ModelSpec(model="local-trend"), d, np.arange(n), y[None], 0)
    np.testing.assert_allclose(ours[0], ref_obs, rtol=1e-6, atol=1e-8)


def test_local_trend_forecast_matches_statsmodels(rng):
    # Source: statsmodels UnobservedComponents get_forecast: predicted mean and variance of the
    # next 4 log values given the data and the parameters. Ours are Monte Carlo draws from the
    # conditional normal; tolerances are 5 Monte Carlo standard errors.
    n, s = 20, 40_000
    sigma, s_l, s_g, log_a, g0 = 0.03, 0.02, 0.008, 2.0, 0.06
    growth = g0 + s_g * np.cumsum(rng.standard_normal(n))
    level = log_a + np.r_[0.0, np.cumsum(growth[1:] + s_l * rng.standard_normal(n - 1))]
    y = level + sigma * rng.standard_normal(n)
    mod, params = _ucm(y, sigma, s_l, s_g, log_a, g0)
    fc = mod.smooth(params).get_forecast(4)
    mean, var = np.asarray(fc.predicted_mean), np.asarray(fc.var_pred_mean)
    d = _draws(s, log_a=log_a, log1p_g=g0, sigma=sigma, sigma_level=s_l, sigma_growth=s_g)
    _, values, _ = local_trend.conditional_draws(
        ModelSpec(model="local-trend"), d, np.arange(n), np.broadcast_to(y, (s, n)),
        np.arange(n, n + 4), 0, np.random.default_rng(3),
    )
    assert np.all(np.abs(values.mean(axis=0) - mean) <= 5 * np.sqrt(var / s))
    np.testing.assert_allclose(values.var(axis=0), var, rtol=5 * math.sqrt(2 / s))


def _lt_series(y):
    import pandas as pd

    from bayesgrowth.data.series import read_series

    labels = [f"{2015 + i // 4}Q{i % 4 + 1}" for i in range(len(y))]
    return read_series(pd.DataFrame({"period": labels, "value": np.exp(y)}), name="simulated")


def test_local_trend_marginal_likelihood_matches_statsmodels_with_a_random_start(rng):
    # Source: statsmodels UnobservedComponents("local linear trend") whose start is known only
    # in distribution. Our start (log a, b) ~ N(mu0, diag(v0)) becomes statsmodels' state 0:
    # level_0 = log a, beta_0 = b + s_g u_1 ~ N(mu_b, v_b + s_g^2). Its Kalman-filter likelihood
    # must equal the PyMC model's potential, where log a and b are integrated out in closed form.
    from bayesgrowth.models.general import build_pymc_model
    from bayesgrowth.priors import LocalTrendPrior, Priors

    n, sigma, s_g = 18, 0.04, 0.012
    y = 4.0 + 0.05 * np.arange(n) + np.cumsum(s_g * rng.standard_normal(n)).cumsum() \
        + sigma * rng.standard_normal(n)
    series = _lt_series(y)
    spec = ModelSpec(model="local-trend")
    # the local trend without level shocks (statsmodels' level variance 0 below)
    pr = Priors(local_trend=LocalTrendPrior(level_shock_pct=0)).resolve(series)
    model = build_pymc_model(spec, pr, series.t, series.log_values, axis=series.axis)
    point = {"sigma_log__": math.log(sigma), "sigma_growth_log__": math.log(s_g)}
    (pot,) = model.replace_rvs_by_values([model.potentials[0]])
    ours = float(model.compile_fn(pot)(point))
    sm = pytest.importorskip("statsmodels.api")
    mod = sm.tsa.UnobservedComponents(y, level="local linear trend")
    mod.ssm.initialize_known(np.array([pr.log_a_mu, pr.log1p_g_mu]),
                             np.diag([pr.log_a_sd**2, pr.log1p_g_sd**2 + s_g**2]))
    mod.ssm.loglikelihood_burn = 0
    ref = mod.loglike(np.array([sigma**2, 0.0, s_g**2]))
    assert ours == pytest.approx(ref, rel=1e-8)

    # and the starting level drawn afterwards has statsmodels' smoothed mean and variance of
    # state 0 (Monte Carlo: 5 standard errors on the mean, 5 on the variance)
    s = 40_000
    d = local_trend.draw_linear(spec, pr, _draws(s, sigma=sigma, sigma_level=0.0,
                                                 sigma_growth=s_g),
                                series.t, series.log_values, series.axis,
                                np.random.default_rng(5))
    sm_res = mod.smooth(np.array([sigma**2, 0.0, s_g**2]))
    m0, v0 = sm_res.smoothed_state[0, 0], sm_res.smoothed_state_cov[0, 0, 0]
    assert abs(d["log_a"].mean() - m0) <= 5 * math.sqrt(v0 / s)
    assert d["log_a"].var() == pytest.approx(v0, rel=5 * math.sqrt(2 / s))


def test_local_trend_design_reproduces_the_mean_path_and_seasons(rng):
    # Textbook identities: X beta equals the mean path of mean_paths for mean-reverting drift,
    # and the seasonal basis Q is orthonormal with columns summing to zero (Q'1 = 0, Q'Q = I), so
    # Q eta with eta ~ N(0, s^2 I) has ZeroSumNormal's covariance s^2 (I - 11'/m).
    spec = ModelSpec(model="local-trend", drift="mean-reverting")
    idx = np.array([0, 1, 2, 4, 7])
    rho = np.array([0.3, 0.85])
    beta = np.array([2.0, 0.08, 0.02])
    x = local_trend.design(spec, idx, rho)
    d = {"log_a": np.full(2, beta[0]), "log1p_g": np.full(2, beta[1]),
         "long_run": np.full(2, beta[2]), "rho": rho}
    level, _ = local_trend.mean_paths(d, 8, mean_reverting=True)
    np.testing.assert_allclose(x @ beta, level[:, idx], rtol=1e-12)
    for m in (4, 12):
        q = linear.season_basis(m)
        np.testing.assert_allclose(q.T @ np.ones(m), 0.0, atol=1e-12)
        np.testing.assert_allclose(q.T @ q, np.eye(m - 1), atol=1e-12)
        np.testing.assert_allclose(q @ q.T, np.eye(m) - 1.0 / m, atol=1e-12)


def test_season_index_follows_the_calendar():
    q = PeriodAxis(style="quarter", step=1, origin=2021 * 4 + 2)  # 2021Q3
    m, idx = season_index(q, np.arange(6))
    assert m == 4 and idx.tolist() == [2, 3, 0, 1, 2, 3]
    mon = PeriodAxis(style="month", step=1, origin=2020 * 12 + 10)  # 2020-11
    m, idx = season_index(mon, np.arange(3))
    assert m == 12 and idx.tolist() == [10, 11, 0]
    with pytest.raises(ValueError, match="quarterly or monthly"):
        season_index(PeriodAxis(style="year", step=1, origin=2000), np.arange(3))


def test_spec_names_and_refusals():
    assert ModelSpec(model="local_trend").model == "local-trend"
    with pytest.raises(ValueError, match="model must be one of"):
        ModelSpec(model="cubic")
    with pytest.raises(ValueError, match="errors must be one of"):
        ModelSpec(errors="ma1")
    with pytest.raises(ValueError, match="needs normal noise"):
        ModelSpec(model="local-trend", noise="student-t")
    assert ModelSpec(model="logistic", errors="ar1").parameters() == (
        "log_a", "log_k", "half_life", "sigma", "phi"
    )
