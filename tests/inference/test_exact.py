"""The exact engine against direct numerical integration and against simulation."""

import numpy as np
import pandas as pd
import pytest
from scipy import integrate, stats

from bayesgrowth.data import read_series
from bayesgrowth.inference import exact_posterior, fit_series
from bayesgrowth.priors import GrowthPrior, InitialValuePrior, NoisePrior, Priors


def _series(values, start="2022Q1"):
    year, q = int(start[:4]), int(start[-1]) - 1
    labels = [f"{year + (q + i) // 4}Q{(q + i) % 4 + 1}" for i in range(len(values))]
    return read_series(pd.DataFrame({"period": labels, "value": values}))


SHORT = _series([100.0, 112.0, 119.0, 140.0, 151.0, 171.0])


TWELVE = _series([100.0, 109.0, 121.0, 126.0, 140.0, 151.0, 168.0, 175.0, 197.0, 205.0,
                  229.0, 247.0])


def _rss(series, priors, log_a, b):
    """Residual sum of squares of log values on a grid, from sufficient statistics."""
    dt = (series.t - priors.t_ref).astype(float)
    ly = series.log_values
    n, st, stt = ly.size, dt.sum(), dt @ dt
    sy, sty, syy = ly.sum(), dt @ ly, ly @ ly
    return (syy - 2 * log_a * sy - 2 * b * sty + n * log_a**2 + 2 * log_a * b * st
            + b**2 * stt)


def test_exact_engine_matches_scipy_grid_integration():
    # Reference: the unnormalised posterior prior x likelihood written out with
    # scipy.stats and integrated on a dense 3-D grid with scipy.integrate.simpson
    # (sigma on a log grid), independent of the engine's Gaussian algebra.
    series = TWELVE
    priors = Priors().resolve(series)
    post = exact_posterior(series, priors)
    m, sd = post.beta_mean(), np.sqrt(np.diag(post.beta_cov()))
    la = np.linspace(m[0] - 14 * sd[0], m[0] + 14 * sd[0], 241)
    b = np.linspace(m[1] - 14 * sd[1], m[1] + 14 * sd[1], 241)
    u = np.linspace(np.log(post.sigma_quantile(1e-12)), np.log(post.sigma_quantile(1 - 1e-12)),
                    401)
    LA, B, U = np.meshgrid(la, b, u, indexing="ij")
    S = np.exp(U)
    logp = (
        stats.norm.logpdf(LA, priors.log_a_mu, priors.log_a_sd)
        + stats.norm.logpdf(B, priors.log1p_g_mu, priors.log1p_g_sd)
        + stats.halfnorm.logpdf(S, scale=priors.sigma_scale)
        - series.n * np.log(S) - _rss(series, priors, LA, B) / (2 * S**2)
        + U  # d sigma = sigma du
    )
    dens = np.exp(logp - logp.max())

    def integral(g):
        return integrate.simpson(integrate.simpson(integrate.simpson(g * dens, x=u), x=b), x=la)

    z = integral(1.0)
    assert integral(LA) / z == pytest.approx(m[0], rel=1e-7)
    assert integral(B) / z == pytest.approx(m[1], rel=1e-5)
    assert integral(S) / z == pytest.approx(post.sigma_moment(1), rel=1e-5)
    assert np.sqrt(integral((B - m[1]) ** 2) / z) == pytest.approx(sd[1], rel=1e-5)


def test_fixed_initial_value_matches_scipy_grid_integration():
    series = TWELVE
    priors = Priors(initial=InitialValuePrior(give_or_take_pct=0)).resolve(series)
    assert priors.fixed_initial
    post = exact_posterior(series, priors)
    m, sd = post.beta_mean()[0], np.sqrt(post.beta_cov()[0, 0])
    b = np.linspace(m - 14 * sd, m + 14 * sd, 801)
    u = np.linspace(np.log(post.sigma_quantile(1e-12)), np.log(post.sigma_quantile(1 - 1e-12)),
                    801)
    B, U = np.meshgrid(b, u, indexing="ij")
    S = np.exp(U)
    logp = (
        stats.norm.logpdf(B, priors.log1p_g_mu, priors.log1p_g_sd)
        + stats.halfnorm.logpdf(S, scale=priors.sigma_scale)
        - series.n * np.log(S) - _rss(series, priors, priors.log_a_mu, B) / (2 * S**2) + U
    )
    dens = np.exp(logp - logp.max())
    z = integrate.simpson(integrate.simpson(dens, x=u), x=b)
    mb = integrate.simpson(integrate.simpson(B * dens, x=u), x=b) / z
    assert m == pytest.approx(mb, rel=1e-7)
    fit = fit_series(series, engine="exact", priors=Priors(initial=InitialValuePrior(0)), seed=1,
                     model="exponential")
    assert np.all(fit.derived()["initial_value"] == pytest.approx(100.0))


def test_same_seed_same_draws_and_different_seed_differs():
    a = fit_series(SHORT, engine="exact", seed=5, model="exponential").flat()["log1p_g"]
    b = fit_series(SHORT, engine="exact", seed=5, model="exponential").flat()["log1p_g"]
    c = fit_series(SHORT, engine="exact", seed=6, model="exponential").flat()["log1p_g"]
    np.testing.assert_array_equal(a, b)
    assert not np.array_equal(a, c)


def test_reference_period_moves_the_initial_value():
    fit = fit_series(SHORT, engine="exact", seed=1, priors=Priors(reference_period="2023Q2"),
                     model="exponential")
    assert fit.priors.t_ref == 5
    assert np.median(fit.derived()["initial_value"]) == pytest.approx(171, rel=0.05)


@pytest.mark.slow
def test_interval_coverage_of_true_growth_and_future_value():
    # Parameter recovery: simulate from known parameters, check the exact 80%
    # and 95% intervals cover the truth at close to nominal rates. With N
    # datasets the coverage's binomial sd is sqrt(p(1-p)/N); allow 3 sd
    # (p = 0.8, N = 600: 0.049). The priors are weak, so coverage is near but not
    # exactly nominal (the anchor prior is centred on a noisy observation).
    rng = np.random.default_rng(11)
    n_sets, n_obs, h = 600, 12, 4
    log_a, b, sigma = np.log(800.0), np.log1p(0.06), 0.06
    priors = Priors(growth=GrowthPrior(0, 30), noise=NoisePrior(30))
    hits = {("g", 80): 0, ("g", 95): 0, ("y", 80): 0, ("y", 95): 0}
    t = np.arange(n_obs + h)
    for _ in range(n_sets):
        ly = log_a + b * t + rng.normal(scale=sigma, size=t.size)
        s = _series(np.exp(ly[:n_obs]))
        post = exact_posterior(s, priors.resolve(s))
        c_g = np.array([0.0, 1.0])
        c_y = np.array([1.0, n_obs - 1 + h])
        for level in (80, 95):
            lo_q, hi_q = (1 - level / 100) / 2, 1 - (1 - level / 100) / 2
            g_lo, g_hi = post.linear_quantile(c_g, lo_q), post.linear_quantile(c_g, hi_q)
            hits[("g", level)] += g_lo <= b <= g_hi
            y_lo = post.linear_quantile(c_y, lo_q, noise=True)
            y_hi = post.linear_quantile(c_y, hi_q, noise=True)
            hits[("y", level)] += y_lo <= ly[n_obs - 1 + h] <= y_hi
    for (what, level), k in hits.items():
        p = level / 100
        tol = 3 * np.sqrt(p * (1 - p) / n_sets)
        assert abs(k / n_sets - p) <= tol, (what, level, k / n_sets)


@pytest.mark.parametrize("model", ["exponential", "local-trend"])
def test_too_few_exact_draws_are_named_as_such_not_as_a_sampler_failure(model):
    import warnings

    from bayesgrowth.inference import SamplingWarning

    # Independent draws have no chains to disagree; only their number can fall short (the
    # 400 effective draws of Vehtari et al. 2021, the threshold the NUTS checks use).
    few = fit_series(TWELVE, engine="exact", model=model, seed=1, draws=10, chains=4,
                     drift="random-walk", seasonal=False)
    assert not few.diagnostics.ok
    assert few.diagnostics.problems == (
        "only 40 independent draws of the exact posterior (numbers read from the draws need "
        "at least 400)",)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        few.diagnostics.warn_if_failed()
    text = str(caught[0].message)
    assert caught[0].category is SamplingWarning
    assert "more draws" in text and "exact engine" not in text and "target_accept" not in text
    enough = fit_series(TWELVE, engine="exact", model=model, seed=1, draws=100, chains=4,
                        drift="random-walk", seasonal=False)
    assert enough.diagnostics.ok and enough.diagnostics.problems == ()
