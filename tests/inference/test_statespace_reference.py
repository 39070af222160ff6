"""The exact state-space engine against statsmodels' Kalman filter and smoother.

Reference: statsmodels.tsa.statespace (Durbin & Koopman 2012 filter and smoother), fed the
same model written out as full state-space matrices: the state holds the level, the growth,
the long-run growth and the seasonal coordinates, the initial state is the coefficients'
normal prior ("known" initialisation), and the observation design varies with the season.
"""

import numpy as np
import pytest

sm = pytest.importorskip("statsmodels.api")

from bayesgrowth.inference import statespace as ss  # noqa: E402
from bayesgrowth.inference import statespace_nodes as nodes  # noqa: E402
from bayesgrowth.models import linear  # noqa: E402


def _full_model(y, ctx, rho, s_level, s_growth, sigma):
    """statsmodels MLEModel of the same local trend, coefficients in the initial state."""
    n = y.size
    p = ctx.mu0.size
    has_c = ctx.long_run
    k = p  # state: level, growth, [c], seasons (level_0 = log a, growth_0 = b)
    mod = sm.tsa.statespace.MLEModel(y, k_states=k, k_posdef=2)
    design = np.zeros((1, k, n))
    design[0, 0, :] = 1.0
    if ctx.n_seasons:
        design[0, p - (ctx.n_seasons - 1):, :] = ctx.season.T
    mod["design"] = design
    t = np.eye(k)
    t[0, 1] = rho
    t[1, 1] = rho
    if has_c:
        t[0, 2] = 1 - rho
        t[1, 2] = 1 - rho
    mod["transition"] = t
    sel = np.zeros((k, 2))
    sel[0, 0] = sel[0, 1] = 1.0  # level gets the level shock and the growth shock
    sel[1, 1] = 1.0
    mod["selection"] = sel
    mod["state_cov"] = np.diag([s_level**2, s_growth**2])
    mod["obs_cov"] = np.array([[sigma**2]])
    mod.ssm.initialize_known(ctx.mu0.copy(), np.diag(ctx.var0))
    return mod


def _context(n=24, seasons=4, long_run=True, missing=(7, 15), rng=None):
    rng = rng or np.random.default_rng(0)
    j = np.array([i for i in range(n) if i not in missing])
    y = 6.0 + 0.05 * j + rng.normal(0, 0.05, j.size).cumsum() * 0.5
    season = linear.season_basis(seasons)[j % seasons] if seasons else None
    mu0 = [6.0, 0.03] + ([0.01] if long_run else []) + [0.0] * (seasons - 1 if seasons else 0)
    var0 = [0.4**2, 0.2**2] + ([0.02**2] if long_run else []) + [0.1**2] * (
        seasons - 1 if seasons else 0)
    ctx = nodes.Context(idx=j, y=y, season=season, mu0=np.array(mu0), var0=np.array(var0),
                      long_run=long_run, n_seasons=seasons)
    return ctx, j, y


THETAS = [  # rho, sigma_level, sigma_growth, sigma
    (1.0, 0.03, 0.005, 0.02),
    (0.85, 0.0, 0.01, 0.05),
    (0.95, 0.05, 0.002, 0.001),
]


@pytest.mark.parametrize("seasons,long_run", [(0, False), (4, True), (12, True)])
def test_marginal_likelihood_matches_statsmodels(seasons, long_run):
    ctx, j, y = _context(n=30, seasons=seasons, long_run=long_run)
    rho, sl, sg, sig = (np.array(c) for c in zip(*THETAS, strict=True))
    ev = nodes.evaluate(ctx, {"rho": rho, "sigma_level": sl, "sigma_growth": sg, "sigma": sig})
    for i, theta in enumerate(THETAS):
        full = np.full(j[-1] + 1, np.nan)
        full[j] = y
        ctx_full = nodes.Context(idx=j, y=y, season=None if not seasons else
                               linear.season_basis(seasons)[np.arange(j[-1] + 1) % seasons],
                               mu0=ctx.mu0, var0=ctx.var0, long_run=long_run,
                               n_seasons=seasons)
        mod = _full_model(full, ctx_full, *theta)
        # statsmodels' loglike with missing rows (NaN) skips them, as the filter here does
        ref = mod.ssm.loglike()
        assert ev["loglik"][i] == pytest.approx(ref, rel=1e-8, abs=1e-8)


def test_coefficients_and_latest_state_match_smoother_and_filter():
    ctx, j, y = _context(n=28, seasons=4, long_run=True)
    theta = THETAS[0]
    rho, sl, sg, sig = (np.array([c]) for c in theta)
    ev = nodes.evaluate(ctx, {"rho": rho, "sigma_level": sl, "sigma_growth": sg, "sigma": sig})
    full = np.full(j[-1] + 1, np.nan)
    full[j] = y
    ctx_full = nodes.Context(idx=j, y=y, season=linear.season_basis(4)[np.arange(j[-1] + 1) % 4],
                           mu0=ctx.mu0, var0=ctx.var0, long_run=True, n_seasons=4)
    res = _full_model(full, ctx_full, *theta).ssm.smooth()
    # the initial state is the coefficient vector: its smoothed moments are the posterior's
    # (the smoother's state 0 is the state after the first observation's time step)
    np.testing.assert_allclose(ev["beta_mean"][0], res.smoothed_state[:, 0], rtol=1e-7,
                               atol=1e-9)
    np.testing.assert_allclose(ev["beta_cov"][0], res.smoothed_state_cov[:, :, 0], rtol=1e-6,
                               atol=1e-12)


def test_forecast_moments_match_statsmodels():
    ctx, j, y = _context(n=26, seasons=4, long_run=True, missing=(5,))
    theta = THETAS[1]
    h = 6
    # future periods appended as missing values: the filter's one-step forecasts of them are
    # the h-step forecasts (statsmodels' forecasts and forecasts_error_cov)
    full = np.full(j[-1] + 1 + h, np.nan)
    full[j] = y
    season_all = linear.season_basis(4)[np.arange(full.size) % 4]
    ctx_full = nodes.Context(idx=j, y=y, season=season_all, mu0=ctx.mu0, var0=ctx.var0,
                           long_run=True, n_seasons=4)
    ref = _full_model(full, ctx_full, *theta).ssm.filter()
    rho, sl, sg, sig = (np.array([c]) for c in theta)
    ev = nodes.evaluate(ctx, {"rho": rho, "sigma_level": sl, "sigma_growth": sg, "sigma": sig})
    post = ss.StateSpacePosterior(
        ctx, None, None, 0,
        {**ev, "rho": rho, "sigma_level": sl, "sigma_growth": sg, "sigma": sig,
         "half_life": np.log(0.5) / np.log(rho)},
        np.array([1.0]), {"fading": 1.0}, 0.0, 1)
    post._season_rows = lambda t: season_all[np.asarray(t)]
    pred = post.predictive(np.arange(j[-1] + 1, j[-1] + 1 + h))
    np.testing.assert_allclose(pred["mean"][0], ref.forecasts[0, -h:], rtol=1e-9)
    np.testing.assert_allclose(np.diag(pred["value_cov"][0]), ref.forecasts_error_cov[0, 0, -h:],
                               rtol=1e-8)
    marg = post.predictive(np.arange(j[-1] + 1, j[-1] + 1 + h), joint=False)
    np.testing.assert_allclose(marg["value_var"][0], np.diag(pred["value_cov"][0]), rtol=1e-12)


def test_compiled_statistics_equal_the_plain_filter():
    # the compiled kernel reduces the plain augmented filter (itself checked against
    # statsmodels above) to V' F^-1 V, sum log F and the last state
    from bayesgrowth.inference.kalman import augmented_filter, gram_filter

    ctx, j, y = _context(n=30, seasons=4, long_run=True)
    rho, sl, sg, sig = (np.array(c) for c in zip(*THETAS, strict=True))
    gram, logf, state, state_cov = gram_filter(y, ctx.season, j, rho, sl, sg, sig, True)
    x = nodes.design(ctx, rho, j, ctx.season)
    data = np.concatenate([np.broadcast_to(y, (3, y.size))[..., None], x], axis=-1)
    res = augmented_filter(data, j, rho, sl, sg, sig)
    v, f = res.innovations, res.variance
    np.testing.assert_allclose(gram, np.einsum("gni,gnj->gij", v / f[..., None], v),
                               rtol=1e-10, atol=1e-12)
    np.testing.assert_allclose(logf, np.log(f).sum(axis=1), rtol=1e-12)
    np.testing.assert_allclose(state, res.state, rtol=1e-10, atol=1e-12)
    np.testing.assert_allclose(state_cov, res.state_cov, rtol=1e-10, atol=1e-14)
    # the compiled integration over beta equals the numpy one (matrix determinant lemma and
    # Woodbury's identity, checked against statsmodels' likelihood above)
    from bayesgrowth.inference.kalman import integrate_compiled

    ctx.mu0[:] = np.linspace(-0.5, 0.5, ctx.mu0.size)
    for fixed_start in (False, True):  # a zero prior sd holds a coefficient fixed
        ctx.var0[0] = 0.0 if fixed_start else 0.4**2
        compiled = integrate_compiled(gram, logf, y.size, ctx.mu0, ctx.var0)
        # rounding only: with sigma = 0.001 the statistics reach 1/sigma^2 = 1e6 and the
        # quadratic form cancels about six digits, so agreement to ~1e-16 * 1e6 * 10
        for mine, plain in zip(compiled, nodes.integrate(gram, logf, y.size, ctx), strict=True):
            np.testing.assert_allclose(mine, plain, rtol=1e-8, atol=1e-9)


def test_one_step_forecasts_over_the_history_match_statsmodels():
    # given theta and beta, the one-step-ahead forecasts of the observed log values and their
    # variances are statsmodels' filter forecasts with the initial state known to be beta
    ctx, j, y = _context(n=24, seasons=4, long_run=True, missing=())
    theta = THETAS[0]
    rho, sl, sg, sig = (np.array([c]) for c in theta)
    ev = nodes.evaluate(ctx, {"rho": rho, "sigma_level": sl, "sigma_growth": sg, "sigma": sig})
    post = ss.StateSpacePosterior(
        ctx, None, None, 0,
        {**ev, "rho": rho, "sigma_level": sl, "sigma_growth": sg, "sigma": sig,
         "half_life": np.array([np.inf])},
        np.array([1.0]), {"drifting": 1.0}, 0.0, 1)
    beta = ctx.mu0 + np.sqrt(ctx.var0) * np.linspace(-1, 1, ctx.mu0.size)
    err, var = post.one_step(np.array([0]), beta[None, :])
    mod = _full_model(y, ctx, *theta)
    mod.ssm.initialize_known(beta, np.zeros((beta.size, beta.size)))
    ref = mod.ssm.filter()
    np.testing.assert_allclose(y - err[0], ref.forecasts[0], rtol=1e-9)
    np.testing.assert_allclose(var[0], ref.forecasts_error_cov[0, 0], rtol=1e-9)
