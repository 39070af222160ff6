"""Drifting seasonal factors of the local trend, against statsmodels and across engines.

References: statsmodels' ``UnobservedComponents`` (a local level with a fixed slope and a
stochastic dummy seasonal, Harvey 1989 / Durbin & Koopman 2012 sec. 3.2) and its general
``MLEModel`` (the same Kalman filter of Durbin & Koopman 2012), fed the same model with the
coefficients' normal prior as the known initial state.
"""

import math

import numpy as np
import pandas as pd
import pytest
from scipy import stats

sm = pytest.importorskip("statsmodels.api")

from bayesgrowth.inference import statespace as ss  # noqa: E402
from bayesgrowth.inference import statespace_nodes as nodes  # noqa: E402
from bayesgrowth.inference.kalman_season import (  # noqa: E402
    gram_filter_season,
    season_filter,
)
from bayesgrowth.models import linear, local_trend  # noqa: E402
from bayesgrowth.models.spec import ModelSpec  # noqa: E402


def _context(n=30, m=4, long_run=True, missing=(7, 15), seed=0, drift=True):
    rng = np.random.default_rng(seed)
    j = np.array([i for i in range(n) if i not in missing])
    pattern = np.array([0.1, -0.05, 0.2, -0.25, 0.05, 0, 0, 0.1, -0.1, 0.02, -0.02, -0.05])[:m]
    y = 6.0 + 0.04 * j + pattern[j % m] + rng.normal(0, 0.03, j.size).cumsum() * 0.5
    mu0 = [6.0, 0.03] + ([0.01] if long_run else []) + [0.0] * (m - 1)
    var0 = [0.4**2, 0.2**2] + ([0.02**2] if long_run else []) + [0.2**2] * (m - 1)
    ctx = nodes.Context(idx=j, y=y, season=linear.season_basis(m)[j % m], mu0=np.array(mu0),
                        var0=np.array(var0), long_run=long_run, n_seasons=m, season_drift=drift)
    return ctx, j, y


def _uc_loglik(ctx, j, y, s_level, s_season, sigma):
    """statsmodels UnobservedComponents with the initial state known (the coefficients' prior).

    A local level with a fixed slope ('local linear deterministic trend') and a stochastic
    dummy seasonal: our model with no growth drift. Its state is (level, slope, gamma_t, ...,
    gamma_{t-m+2}); gamma starts at the fixed factors, which are linear in the seasonal
    coordinates, so its initial covariance is ``L V L'``.
    """
    m = ctx.n_seasons
    full = np.full(j[-1] + 1, np.nan)
    full[j] = y
    mod = sm.tsa.UnobservedComponents(full, level="local linear deterministic trend",
                                      seasonal=m, stochastic_seasonal=True)
    mod.update([sigma**2, s_level**2, s_season**2])
    lags = linear.season_basis(m)[(-np.arange(m - 1)) % m]  # seasons 0, -1, .., -(m - 2)
    mean = np.concatenate([ctx.mu0[:2], lags @ ctx.mu0[2:]])
    cov = np.zeros((m + 1, m + 1))
    cov[0, 0], cov[1, 1] = ctx.var0[0], ctx.var0[1]
    cov[2:, 2:] = lags @ np.diag(ctx.var0[2:]) @ lags.T
    mod.ssm.initialize_known(mean, cov)
    mod.ssm.loglikelihood_burn = 0  # UC skips its diffuse states' first periods; none here
    return mod.ssm.loglike()


@pytest.mark.parametrize("m", [4, 12])
def test_loglik_matches_statsmodels_unobserved_components(m):
    # our model with sigma_growth = 0 and rho = 1 is UnobservedComponents' local level with a
    # fixed slope plus a stochastic dummy seasonal (statsmodels 0.14, Harvey 1989 ch. 2)
    ctx, j, y = _context(n=40, m=m, long_run=False)
    thetas = [(0.03, 0.01, 0.02), (0.0, 0.04, 0.05), (0.05, 0.002, 0.001)]
    sl, ss_, sig = (np.array(c) for c in zip(*thetas, strict=True))
    params = {"rho": np.ones(3), "sigma_level": sl, "sigma_growth": np.zeros(3),
              "sigma": sig, "sigma_season": ss_}
    ev = nodes.evaluate(ctx, params)
    for i, theta in enumerate(thetas):
        assert ev["loglik"][i] == pytest.approx(_uc_loglik(ctx, j, y, *theta), rel=1e-8,
                                                abs=1e-8)


def _full_model(endog, ctx, rho, s_level, s_growth, sigma, s_season, season_rows):
    """statsmodels MLEModel: level, growth, [c], seasonal coordinates, seasonal deviations."""
    m, p, n = ctx.n_seasons, ctx.mu0.size, endog.size
    k = p + m - 1
    mod = sm.tsa.statespace.MLEModel(endog, k_states=k, k_posdef=3)
    design = np.zeros((1, k, n))
    design[0, 0, :] = 1.0
    design[0, p - (m - 1):p, :] = season_rows.T
    design[0, p, :] = 1.0  # the current seasonal deviation
    mod["design"] = design
    t = np.eye(k)
    t[0, 1] = t[1, 1] = rho
    if ctx.long_run:
        t[0, 2] = t[1, 2] = 1 - rho
    t[p:, p:] = 0.0
    t[p, p:] = -1.0  # s_j = -(s_{j-1} + ... + s_{j-m+1}) + omega_j
    for i in range(1, m - 1):
        t[p + i, p + i - 1] = 1.0
    mod["transition"] = t
    sel = np.zeros((k, 3))
    sel[0, 0] = sel[0, 1] = sel[1, 1] = sel[p, 2] = 1.0
    mod["selection"] = sel
    mod["state_cov"] = np.diag([s_level**2, s_growth**2, s_season**2])
    mod["obs_cov"] = np.array([[sigma**2]])
    var = np.zeros(k)
    var[:p] = ctx.var0
    mod.ssm.initialize_known(np.concatenate([ctx.mu0, np.zeros(m - 1)]), np.diag(var))
    return mod


THETAS = [  # rho, sigma_level, sigma_growth, sigma, sigma_season
    (1.0, 0.03, 0.005, 0.02, 0.01),
    (0.85, 0.0, 0.01, 0.05, 0.03),
    (0.95, 0.05, 0.002, 0.001, 0.002),
]


def _params(thetas):
    rho, sl, sg, sig, sss = (np.array(c) for c in zip(*thetas, strict=True))
    return {"rho": rho, "sigma_level": sl, "sigma_growth": sg, "sigma": sig,
            "sigma_season": sss}


@pytest.mark.parametrize("m", [4, 12])
def test_loglik_matches_the_full_state_space_model_in_statsmodels(m):
    ctx, j, y = _context(n=36, m=m)
    ev = nodes.evaluate(ctx, _params(THETAS))
    full = np.full(j[-1] + 1, np.nan)
    full[j] = y  # statsmodels skips the missing rows (NaN), as the filter here does
    rows = linear.season_basis(m)[np.arange(full.size) % m]
    for i, theta in enumerate(THETAS):
        ref = _full_model(full, ctx, *theta, rows).ssm.loglike()
        assert ev["loglik"][i] == pytest.approx(ref, rel=1e-8, abs=1e-8)


def _assert_compiled_equals_plain(ctx, j, y, p, m, long_run):
    """The compiled kernel's reductions equal the plain filter's, node by node."""
    args = (p["rho"], p["sigma_level"], p["sigma_growth"], p["sigma"], p["sigma_season"], m)
    gram, logf, state, state_cov = gram_filter_season(y, ctx.season, j, *args, long_run)
    x = nodes.design(ctx, p["rho"], j, ctx.season)
    data = np.concatenate([np.broadcast_to(y, (x.shape[0], y.size))[..., None], x], axis=-1)
    res = season_filter(data, j, *args)
    v, f = res.innovations, res.variance
    plain = (np.einsum("gni,gnj->gij", v / f[..., None], v), np.log(f).sum(axis=1),
             res.state, res.state_cov)
    for mine, ref, atol in zip((gram, logf, state, state_cov), plain,
                               (1e-12, 0.0, 1e-12, 1e-14), strict=True):
        np.testing.assert_allclose(mine, ref, rtol=1e-10, atol=atol)


def test_compiled_filter_equals_the_plain_one():
    # the compiled kernel reduces the plain filter (checked against statsmodels above)
    for m, long_run in ((4, True), (12, False)):
        ctx, j, y = _context(n=40, m=m, long_run=long_run)
        _assert_compiled_equals_plain(ctx, j, y, _params(THETAS), m, long_run)


@pytest.mark.parametrize(("m", "long_run"), [(12, True), (12, False), (2, True), (3, False)])
def test_compiled_filter_equals_the_plain_one_across_blocks_and_gaps(m, long_run):
    # the compiled kernel keeps the seasonal deviations in a ring and updates one triangle of
    # the covariance; the plain filter (checked against statsmodels above) runs the dense
    # dummy-seasonal transition. Monthly data with a run of gaps, random-walk (rho = 1) and
    # fading growth, zero scales, and more nodes than one compiled block (256)
    ctx, j, y = _context(n=75, m=m, long_run=long_run, missing=(4, 5, 6, 20, 41, 60), seed=3)
    rng = np.random.default_rng(8)
    g = 300
    rho = np.where(np.arange(g) % 2 == 0, 1.0, rng.uniform(0.5, 0.99, g))
    sl, sg, sig, sss = (np.exp(rng.uniform(-4.5, -2.0, g)) for _ in range(4))
    sl[:4], sg[4:8], sss[8:12] = 0.0, 0.0, 0.0
    p = {"rho": rho, "sigma_level": sl, "sigma_growth": sg, "sigma": sig, "sigma_season": sss}
    _assert_compiled_equals_plain(ctx, j, y, p, m, long_run)


def test_no_seasonal_drift_is_the_fixed_seasons_model():
    ctx, j, y = _context(n=30, m=4)
    fixed = nodes.Context(**{**ctx.__dict__, "season_drift": False})
    p = _params(THETAS)
    base = nodes.evaluate(fixed, {k: v for k, v in p.items() if k != "sigma_season"})
    zero = nodes.evaluate(ctx, {**p, "sigma_season": np.zeros(3)})
    np.testing.assert_allclose(zero["loglik"], base["loglik"], rtol=1e-12)
    np.testing.assert_allclose(zero["beta_mean"], base["beta_mean"], rtol=1e-9, atol=1e-12)
    # and continuously: a tiny drift moves the likelihood by a tiny amount
    tiny = nodes.evaluate(ctx, {**p, "sigma_season": np.full(3, 1e-7)})
    np.testing.assert_allclose(tiny["loglik"], base["loglik"], rtol=1e-8)


def _posterior(ctx, theta, season_all):
    p = {k: v[:1] for k, v in _params([theta]).items()}
    ev = nodes.evaluate(ctx, p)
    with np.errstate(divide="ignore"):
        half_life = np.where(p["rho"] < 1, np.log(0.5) / np.log(p["rho"]), np.inf)
    post = ss.StateSpacePosterior(
        ctx, None, None, 0, {**ev, **p, "half_life": half_life},
        np.array([1.0]), {"fading": 1.0}, 0.0, 1)
    post._season_rows = lambda t: season_all[np.asarray(t)]
    return post


@pytest.mark.parametrize("theta", THETAS[:2])
def test_forecast_moments_match_statsmodels(theta):
    # future periods appended as missing values: statsmodels' one-step forecasts of them are
    # the h-step forecasts, beta and the seasonal deviations integrated out alike
    m, h = 4, 7
    ctx, j, y = _context(n=26, m=m, missing=(5,))
    full = np.full(j[-1] + 1 + h, np.nan)
    full[j] = y
    season_all = linear.season_basis(m)[np.arange(full.size) % m]
    ref = _full_model(full, ctx, *theta, season_all).ssm.filter()
    post = _posterior(ctx, theta, season_all)
    t_future = np.arange(j[-1] + 1, j[-1] + 1 + h)
    pred = post.predictive(t_future)
    np.testing.assert_allclose(pred["mean"][0], ref.forecasts[0, -h:], rtol=1e-9)
    np.testing.assert_allclose(np.diag(pred["value_cov"][0]), ref.forecasts_error_cov[0, 0, -h:],
                               rtol=1e-8)
    marg = post.predictive(t_future, joint=False)
    np.testing.assert_allclose(marg["value_var"][0], np.diag(pred["value_cov"][0]), rtol=1e-12)


def test_simulated_paths_have_the_predictive_moments():
    # running the state forward draw by draw (beta drawn from its normal posterior) must
    # reproduce the closed-form joint predictive: means within 4 Monte Carlo standard errors,
    # variances within 4 standard errors of a sample variance (sd * sqrt(2 / n), normal data)
    m, h, n = 4, 6, 40_000
    ctx, j, y = _context(n=26, m=m, missing=())
    season_all = linear.season_basis(m)[np.arange(j[-1] + 1 + h) % m]
    post = _posterior(ctx, THETAS[0], season_all)
    t_future = np.arange(j[-1] + 1, j[-1] + 1 + h)
    pred = post.predictive(t_future)
    rng = np.random.default_rng(11)
    beta = rng.multivariate_normal(post.beta_mean[0], post.beta_cov[0], size=n)
    _, value = post.simulate(t_future, np.zeros(n, dtype=int), beta, rng)
    sd = np.sqrt(np.diag(pred["value_cov"][0]))
    assert np.all(np.abs(value.mean(0) - pred["mean"][0]) < 4 * sd / math.sqrt(n))
    assert np.all(np.abs(value.std(0) ** 2 - sd**2) < 4 * sd**2 * math.sqrt(2 / n))


def test_nuts_likelihood_equals_the_filter():
    # the NUTS engine's Gaussian process (states integrated out as a covariance) and the
    # exact engine's filter compute the same marginal density of the log values
    m = 4
    ctx, j, y = _context(n=22, m=m, long_run=False, missing=(3,))
    spec = ModelSpec(model="local-trend", seasonal=True, season_drift=True)
    p = _params([THETAS[0]])
    draws = {k: p[k] for k in ("sigma", "sigma_level", "sigma_growth", "sigma_season")}
    k = local_trend._level_cov(draws, spec, int(j[-1]) + 1, j, j, m)[0]
    k = k + p["sigma"][0] ** 2 * np.eye(j.size)
    x = local_trend.design(spec, j, None, ctx.season)
    cov = k + (x * ctx.var0) @ x.T
    ref = stats.multivariate_normal(x @ ctx.mu0, cov).logpdf(y)  # scipy's normal density
    assert nodes.evaluate(ctx, p)["loglik"][0] == pytest.approx(ref, rel=1e-9)


def test_drifting_seasons_refused_outside_the_local_trend():
    with pytest.raises(ValueError, match="local-trend"):
        ModelSpec(model="exponential", seasonal="drifting")
    with pytest.raises(ValueError, match="without seasons"):
        ModelSpec(model="local-trend", season_drift=True)
    spec = ModelSpec(model="local-trend", seasonal="drifting")
    assert spec.seasonal and spec.season_drift and "sigma_season" in spec.parameters()
    assert "drifting seasonal factors" in spec.label()


def test_a_model_spec_dict_refits_the_same_model():
    # refits (backtests, recalibration) pass ModelSpec.to_dict() back to fit_series
    from bayesgrowth.data.demo import load_demo
    from bayesgrowth.inference import fit_series
    from bayesgrowth.inference.refit import SPEC_OPTIONS

    for spec in (ModelSpec(errors="ar1"),
                 ModelSpec(model="local-trend", seasonal="drifting", drift="mean-reverting")):
        assert set(spec.to_dict()) == set(SPEC_OPTIONS)
        fit = fit_series(load_demo(), engine="exact", seed=1, draws=400, chains=1,
                         **spec.to_dict())
        assert fit.spec == spec


@pytest.mark.slow
def test_exact_engine_agrees_with_nuts_on_drifting_seasons():
    import bayesgrowth as bg
    from bayesgrowth.inference.run import fit_series
    from bayesgrowth.priors import LocalTrendPrior, Priors

    # 16 invented quarters whose seasonal pattern drifts; no level shocks (with them NUTS
    # crawls along the ridge between level shocks and noise, see test_statespace_vs_nuts)
    rng = np.random.default_rng(7)
    pattern = np.array([0.12, -0.04, 0.08, -0.16])
    j = np.arange(16)
    drift = np.cumsum(rng.normal(0, 0.02, 16))
    y = np.log(500.0) + 0.03 * j + pattern[j % 4] * (1 + 0.5 * j / 16) + 0.5 * drift * (
        j % 4 == 0) + rng.normal(0, 0.02, 16)
    labels = [f"{2015 + i // 4}Q{i % 4 + 1}" for i in j]
    series = bg.read_series(pd.DataFrame({"period": labels, "value": np.exp(y)}))
    opts = {"model": "local-trend", "drift": "random-walk", "seasonal": "drifting",
            "priors": Priors(local_trend=LocalTrendPrior(level_shock_pct=0,
                                                         growth_drift_pts=1.0))}
    exact = fit_series(series, engine="exact", seed=3, **opts)
    # target_accept 0.95: at the default 0.9 two transitions diverged near sigma_season = 0
    nuts = fit_series(series, engine="nuts", seed=3, draws=1000, chains=2, target_accept=0.95,
                      **opts)
    assert nuts.diagnostics.ok
    ess = nuts.diagnostics.min_ess_bulk
    for name in ("sigma", "sigma_season", "log1p_g"):
        a, b = exact.flat()[name], nuts.flat()[name]
        # Monte Carlo error of each mean: sd / sqrt(independent draws); NUTS by its ESS
        se = math.sqrt(a.var() / a.size + b.var() / ess)
        assert abs(a.mean() - b.mean()) < 4 * se + 0.02 * a.std(), name
    fe, fn = bg.forecast(exact, 6), bg.forecast(nuts, 6)
    for step in (0, 5):
        le, ln = np.log(fe.draws[:, step]), np.log(fn.draws[:, step])
        sd = le.std()
        for q in (0.1, 0.5, 0.9):
            # the same tolerance as the local trend's check without seasons: grid error up
            # to 8% of an sd, plus 4 Monte Carlo standard errors of NUTS' quantile
            assert abs(np.quantile(le, q) - np.quantile(ln, q)) < (
                0.08 * sd + 4 * sd / math.sqrt(ess)), (step, q)


@pytest.mark.parametrize("m", [4, 12])
def test_shock_loadings_follow_the_seasonal_recursion(m):
    # the recursion s_j = -(s_{j-1} + ... + s_{j-m+1}) + omega_j run by hand for one unit
    # shock gives the loadings both engines use (the NUTS covariance, the band sources)
    from bayesgrowth.forecast.band_sources import shock_variance
    from bayesgrowth.models.season_drift import season_coefficients

    n = 3 * m + 2
    response = np.zeros(n)
    s = [0.0] * (m - 1)
    for j in range(n):
        s = [-sum(s) + (1.0 if j == 0 else 0.0), *s[:-1]]
        response[j] = s[0]
    d = season_coefficients(m, n + 1)
    for k in range(1, n + 1):  # the shock at period k, seen from every later period
        np.testing.assert_array_equal(d[k:, k - 1], response[: n + 1 - k])
    steps = np.arange(1, n + 1)
    zero = {"rho": np.ones(1), "sigma_level": np.zeros(1), "sigma_growth": np.zeros(1)}
    got = shock_variance({**zero, "sigma_season": np.array([0.1])}, steps, m)[0]
    np.testing.assert_allclose(got, 0.01 * np.cumsum(response**2))
