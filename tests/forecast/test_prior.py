"""Prior predictive draws against the closed form of the exponential priors.

At the reference period the model says ``log R = log a + e`` with
``log a ~ Normal(mu_a, s_a)`` and ``e ~ Normal(0, sigma)``, ``sigma ~
HalfNormal(s)``: given sigma a Normal(mu_a, sqrt(s_a^2 + sigma^2)), so the prior
predictive is that normal mixed over the half-normal. At ``dt`` periods from
it the growth adds ``dt * log(1+g)``: Normal(mu_a + mu_b dt, sqrt(s_a^2 + s_b^2
dt^2 + sigma^2)) given sigma. The mixture CDF is integrated with
scipy.integrate.quad_vec; scipy.stats.kstest compares the draws with it.
"""

import numpy as np
import pytest
from scipy import integrate, stats

from bayesgrowth.forecast.prior import prior_predictive
from bayesgrowth.plots.models import plot_prior_predictive
from bayesgrowth.priors import GrowthPrior, InitialValuePrior, NoisePrior, Priors
from bayesgrowth.select import registered_models


def mixture_cdf(x, mean, var_fixed, sigma_scale):
    """CDF of Normal(mean, sqrt(var_fixed + sigma^2)) mixed over sigma ~ HalfNormal(scale)."""
    x = np.asarray(x, dtype=float)

    def integrand(s):
        return (stats.norm.cdf(x, mean, np.sqrt(var_fixed + s**2))
                * stats.halfnorm.pdf(s, scale=sigma_scale))

    value, _ = integrate.quad_vec(integrand, 0, np.inf, epsabs=1e-10)
    return value


def _check_column(log_draws, mean, var_fixed, sigma_scale):
    n = log_draws.size
    # Kolmogorov-Smirnov test against the closed form (scipy.stats.kstest).
    res = stats.kstest(log_draws, lambda x: mixture_cdf(x, mean, var_fixed, sigma_scale))
    assert res.pvalue > 1e-3
    # And the quantiles: the closed-form CDF at the sample q-quantile is q within
    # 4 binomial standard deviations.
    for q in (0.025, 0.1, 0.5, 0.9, 0.975):
        x_q = np.quantile(log_draws, q)
        assert abs(mixture_cdf(x_q, mean, var_fixed, sigma_scale) - q) < 4 * np.sqrt(
            q * (1 - q) / n)


@pytest.mark.parametrize("priors", [
    Priors(),
    Priors(initial=InitialValuePrior(20), growth=GrowthPrior(5, 10), noise=NoisePrior(10)),
    Priors(initial=InitialValuePrior(0)),  # a fixed initial value: s_a = 0
])
def test_prior_predictive_at_the_reference_period_is_the_closed_form(demo, priors):
    pp = prior_predictive(demo, 6, priors=priors, model="exponential", draws=4000, seed=3)
    assert pp.sampler == "numpy"
    r = priors.resolve(demo)
    _check_column(np.log(pp.value_draws(r.t_ref)), r.log_a_mu, r.log_a_sd**2, r.sigma_scale)


def test_prior_predictive_at_the_horizon_adds_the_growth_prior(demo):
    priors = Priors(growth=GrowthPrior(3, 5))
    pp = prior_predictive(demo, 6, priors=priors, model="exponential", draws=4000, seed=4)
    r = priors.resolve(demo)
    dt = demo.t_last + 6 - r.t_ref
    _check_column(np.log(pp.draws[:, -1]), r.log_a_mu + r.log1p_g_mu * dt,
                  r.log_a_sd**2 + (r.log1p_g_sd * dt) ** 2, r.sigma_scale)


def test_the_check_can_fail(demo):
    # The closed form of other priors is rejected by the same check.
    pp = prior_predictive(demo, 0, model="exponential", draws=4000, seed=5)
    r = Priors().resolve(demo)
    with pytest.raises(AssertionError):
        _check_column(np.log(pp.value_draws(r.t_ref)), r.log_a_mu, r.log_a_sd**2,
                      1.5 * r.sigma_scale)


def test_table_covers_history_and_horizon_with_forecast_band_columns(demo):
    pp = prior_predictive(demo, 5, draws=500, seed=1, levels=(80, 95))
    tab = pp.table
    assert len(tab) == demo.n + 5
    assert tab["period"].tolist()[:demo.n] == demo.labels
    assert tab["part"].tolist() == ["history"] * demo.n + ["forecast"] * 5
    assert tab["observed"].iloc[:demo.n].tolist() == demo.values.tolist()
    assert tab["observed"].iloc[demo.n:].isna().all()
    for col in ("mean", "median", "lower_80", "upper_95", "curve_median", "curve_lower_95"):
        assert col in tab
    assert (tab["lower_95"] <= tab["lower_80"]).all() and (tab["upper_80"] <= tab["upper_95"]).all()


def test_coverage_tells_priors_that_miss_the_data(demo):
    assert prior_predictive(demo, 0, draws=2000, seed=2).coverage(95) == 1.0
    # "Shrinking 40% a quarter, give or take 1 point" cannot produce a growing series.
    wrong = Priors(growth=GrowthPrior(-40, 1), initial=InitialValuePrior(0))
    assert prior_predictive(demo, 0, priors=wrong, draws=2000, seed=2).coverage(95) < 0.2


def test_same_seed_same_draws_and_bad_arguments(demo):
    a = prior_predictive(demo, 2, draws=300, seed=9)
    b = prior_predictive(demo, 2, draws=300, seed=9)
    np.testing.assert_array_equal(a.draws, b.draws)
    with pytest.raises(ValueError, match="horizon"):
        prior_predictive(demo, -1)
    with pytest.raises(ValueError, match="draws"):
        prior_predictive(demo, 2, draws=0)
    with pytest.raises(ValueError, match="sampler"):
        prior_predictive(demo, 2, sampler="magic")
    if "logistic" in registered_models():
        with pytest.raises(ValueError, match="only the plain exponential"):
            prior_predictive(demo, 2, model="logistic", sampler="numpy")
    with pytest.raises(ValueError, match="not one of the bands"):
        a.coverage(99)


def test_prior_predictive_plot(demo):
    pp = prior_predictive(demo, 8, draws=1000, seed=1)
    ax = plot_prior_predictive(pp)
    assert ax.get_yscale() == "log"
    lo, hi = ax.get_ylim()
    assert lo < demo.values.min() and hi > demo.values.max()
    assert "priors imply" in ax.get_title()


@pytest.mark.slow
@pytest.mark.parametrize("model", ["exponential", "damped", "logistic", "gompertz",
                                   "local-trend"])
def test_pymc_prior_draws_match_the_closed_form_at_the_reference_period(demo, model):
    # Every curve passes through a at the reference period, so with independent
    # normal errors its prior predictive there is the same closed-form mixture;
    # this checks the draws of pymc.sample_prior_predictive on each model graph.
    if model not in registered_models():
        pytest.skip(f"model {model!r} is not registered yet")
    pp = prior_predictive(demo, 3, model=model, seasonal=False, draws=4000, seed=6,
                          sampler="pymc")
    assert pp.sampler == "pymc"
    r = Priors().resolve(demo)
    _check_column(np.log(pp.value_draws(r.t_ref)), r.log_a_mu, r.log_a_sd**2, r.sigma_scale)
    if model in ("logistic", "gompertz"):
        # The ceiling's prior: log K ~ Normal(log_k_mu, log_k_sd) (scipy.stats.kstest).
        res = stats.kstest(pp.parameters["log_k"], stats.norm(r.log_k_mu, r.log_k_sd).cdf)
        assert res.pvalue > 1e-3


@pytest.mark.parametrize("drift", ["mean-reverting", "random-walk"])
def test_numpy_local_trend_prior_draws_follow_the_stated_priors(demo, drift):
    # The local trend's NumPy sampler (the default model's) against scipy.stats: each
    # scale's family (half-normal noise, Gamma(2) with the stated mean for the level
    # shocks and growth drift, log-normal half-life) by scipy.stats.kstest, and the
    # closed-form prior predictive at the reference period as for the PyMC sampler.
    pp = prior_predictive(demo, 3, model="local-trend", drift=drift, seasonal=False, draws=4000,
                          seed=11)
    assert pp.sampler == "numpy"
    r = Priors().resolve(demo)
    p = pp.parameters
    checks = {
        "sigma": stats.halfnorm(scale=r.sigma_scale),
        "sigma_level": stats.gamma(2.0, scale=r.level_shock_scale / 2.0),
        "sigma_growth": stats.gamma(2.0, scale=r.growth_drift_scale / 2.0),
    }
    if drift == "mean-reverting":
        checks["half_life"] = stats.lognorm(r.log_h_sd, scale=np.exp(r.log_h_mu))
        np.testing.assert_allclose(p["rho"], 0.5 ** (1.0 / p["half_life"]))
    else:
        assert "rho" not in p and "half_life" not in p
    for name, dist in checks.items():
        assert stats.kstest(p[name], dist.cdf).pvalue > 1e-3, name
    _check_column(np.log(pp.value_draws(r.t_ref)), r.log_a_mu, r.log_a_sd**2, r.sigma_scale)


@pytest.mark.slow
def test_numpy_local_trend_prior_matches_pymc_prior_sampler(demo):
    # The same prior by PyMC's sampler (pymc.sample_prior_predictive on the model the
    # NUTS engine fits): two-sample Kolmogorov-Smirnov tests (scipy.stats.ks_2samp) on
    # the scales and on the log value at the end of the horizon, seasons included.
    kw = {"model": "local-trend", "drift": "mean-reverting", "seasonal": True,
          "draws": 4000}
    a = prior_predictive(demo, 4, seed=2, sampler="numpy", **kw)
    b = prior_predictive(demo, 4, seed=3, sampler="pymc", **kw)
    assert (a.sampler, b.sampler) == ("numpy", "pymc")
    for name in ("sigma", "sigma_level", "sigma_growth", "rho", "log1p_g", "long_run"):
        assert stats.ks_2samp(a.parameters[name], b.parameters[name]).pvalue > 1e-3, name
    last = a.periods[-1]
    res = stats.ks_2samp(np.log(a.value_draws(last)), np.log(b.value_draws(last)))
    assert res.pvalue > 1e-3
