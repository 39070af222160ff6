"""The exact engine of the exponential curve with AR(1) errors (a grid over sigma and phi).

References: statsmodels' SARIMAX (exact Gaussian likelihood of a regression with AR(1)
errors, Kalman filter with the stationary start), scipy.stats.multivariate_normal (the
coefficients integrated out by hand: covariance ``K + X V0 X'``), scipy.integrate over a
dense grid built from dense covariances, and the NUTS engine on the same model.
"""

import math

import numpy as np
import pytest
from ar1_simulation import simulated_ar1
from scipy import integrate, stats
from scipy.special import expit

import bayesgrowth as bg
from bayesgrowth.cli import main
from bayesgrowth.inference.ar1_grid import ar1_posterior
from bayesgrowth.inference.run import fit_series
from bayesgrowth.models import ar1_products, linear
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.priors import InitialValuePrior, Priors

SPEC = ModelSpec(model="exponential", errors="ar1")


def _pieces(series, priors):
    t = series.t.astype(float)
    _, x, mu0, var0 = linear.curve_pieces(SPEC, priors, t - priors.t_ref, {})
    return x, mu0, var0, np.concatenate([[1.0], np.diff(t)])


def _dense_cov(t, sigma, phi):
    """The AR(1) covariance ``sigma^2 phi^|t_i - t_j| / (1 - phi^2)``, written out densely."""
    gap = np.abs(t[:, None] - t[None, :]).astype(float)
    return sigma**2 / (1 - phi**2) * phi**gap


@pytest.mark.parametrize("gaps", [False, True])
def test_likelihood_at_fixed_coefficients_matches_statsmodels_sarimax(gaps):
    # Reference: statsmodels SARIMAX(y, exog=X, order=(1, 0, 0)), the exact Gaussian log
    # likelihood of a regression with AR(1) errors (stationary start); missing periods are
    # NaN, which its Kalman filter skips.
    sm = pytest.importorskip("statsmodels.api")
    t = np.array([0, 1, 2, 4, 5, 6, 7, 9, 10, 11, 12, 13, 14, 15]) if gaps else np.arange(14)
    series = simulated_ar1(0, t=t)
    priors = Priors().resolve(series)
    x, _, _, lag = _pieces(series, priors)
    beta = np.array([6.2, 0.031])
    full = np.arange(t.max() + 1)
    y_full = np.full(full.size, np.nan)
    y_full[t] = series.log_values
    x_full = linear.curve_pieces(SPEC, priors, (full - priors.t_ref).astype(float), {})[1]
    model = sm.tsa.SARIMAX(y_full, exog=x_full, order=(1, 0, 0), trend="n")
    for sigma, phi in [(0.05, 0.6), (0.02, 0.95), (0.1, 0.05), (0.03, 0.999)]:
        ref = model.loglike(np.array([*beta, phi, sigma**2]))
        ours = linear.marginal_loglik(SPEC, series.log_values, np.ones(t.size), x, beta,
                                      np.zeros(2), lag, np.array([sigma]), np.array([phi]),
                                      xp=np)
        assert ours[0] == pytest.approx(ref, abs=1e-8, rel=1e-10)


@pytest.mark.parametrize("fixed_initial", [False, True])
def test_likelihood_with_coefficients_integrated_matches_scipy_multivariate_normal(
        fixed_initial):
    # Reference: scipy.stats.multivariate_normal with mean X mu0 and covariance K + X V0 X'
    # (beta ~ N(mu0, V0) integrated out by hand; a fixed level has variance 0).
    t = np.array([0, 1, 2, 3, 5, 6, 7, 8, 9, 11, 12])
    series = simulated_ar1(0, t=t, seed=8)
    given = Priors(initial=InitialValuePrior(give_or_take_pct=0)) if fixed_initial else Priors()
    priors = given.resolve(series)
    assert priors.fixed_initial == fixed_initial
    x, mu0, var0, lag = _pieces(series, priors)
    sigma = np.array([0.05, 0.02, 0.2])
    phi = np.array([0.6, 0.97, 0.1])
    ours = linear.marginal_loglik(SPEC, series.log_values, np.ones(t.size), x, mu0, var0, lag,
                                  sigma, phi, xp=np)
    for i in range(sigma.size):
        cov = _dense_cov(t, sigma[i], phi[i]) + x @ np.diag(var0) @ x.T
        ref = stats.multivariate_normal(x @ mu0, cov).logpdf(series.log_values)
        assert ours[i] == pytest.approx(ref, abs=1e-8, rel=1e-10)


def test_switched_off_rows_drop_out_of_the_numpy_likelihood():
    # Hand check (the definition of the 0/1 weights): trailing rows with weight 0 give the
    # likelihood of the rows before them.
    series = simulated_ar1(14, seed=4)
    priors = Priors().resolve(series)
    x, mu0, var0, lag = _pieces(series, priors)
    w = np.r_[np.ones(10), np.zeros(4)]
    sigma, phi = np.array([0.04, 0.08]), np.array([0.5, 0.9])
    part = linear.marginal_loglik(SPEC, series.log_values, w, x, mu0, var0, lag, sigma, phi,
                                  xp=np)
    short = linear.marginal_loglik(SPEC, series.log_values[:10], np.ones(10), x[:10], mu0, var0,
                                   lag[:10], sigma, phi, xp=np)
    np.testing.assert_allclose(part, short, rtol=1e-12)


def _brute_force_moments(series, priors):
    """Posterior moments of b, sigma and phi from dense covariances and scipy.integrate.

    Independent of the engine's algebra: the marginal density is the dense Gaussian
    ``N(X mu0, K + X V0 X')`` (Cholesky of the full covariance), the conditional mean of
    ``b`` the textbook ``mu0 + V0 X' C^-1 (y - X mu0)``, and the integral runs over
    ``(log sigma, logit phi)`` (coordinates the engine does not use) with Simpson's rule.
    """
    t = series.t.astype(float)
    x, mu0, var0, _ = _pieces(series, priors)
    y = series.log_values
    u = np.linspace(math.log(0.004), math.log(0.8), 241)
    v = np.linspace(-24.0, 24.0, 321)
    U, V = np.meshgrid(u, v, indexing="ij")
    sigma, phi = np.exp(U.ravel()), expit(V.ravel())
    gap = np.abs(t[:, None] - t[None, :])
    cov = (sigma**2 / (1 - phi**2))[:, None, None] * phi[:, None, None] ** gap
    cov = cov + x @ np.diag(var0) @ x.T
    chol = np.linalg.cholesky(cov)
    r = y - x @ mu0
    z = np.linalg.solve(chol, np.broadcast_to(r, (sigma.size, r.size))[..., None])[..., 0]
    loglik = (-0.5 * (z**2).sum(-1) - np.log(np.diagonal(chol, axis1=1, axis2=2)).sum(-1)
              - 0.5 * y.size * math.log(2 * math.pi))
    alpha = np.linalg.solve(chol.transpose(0, 2, 1), z[..., None])[..., 0]  # C^-1 r
    b_mean = mu0[1] + var0[1] * alpha @ x[:, 1]
    logp = (loglik + stats.halfnorm.logpdf(sigma, scale=priors.sigma_scale) + U.ravel()
            + stats.beta.logpdf(phi, priors.phi_alpha, priors.phi_beta)
            + np.log(phi) + np.log1p(-phi))  # Jacobians of log sigma and logit phi
    dens = np.exp(logp - logp.max()).reshape(U.shape)

    def integral(g):
        return integrate.simpson(integrate.simpson(g.reshape(U.shape) * dens, x=v), x=u)

    z0 = integral(np.ones(sigma.size))
    out = {"b": integral(b_mean) / z0, "sigma": integral(sigma) / z0,
           "phi": integral(phi) / z0}
    out["sd_sigma"] = math.sqrt(integral(sigma**2) / z0 - out["sigma"] ** 2)
    out["sd_phi"] = math.sqrt(integral(phi**2) / z0 - out["phi"] ** 2)
    return out


def test_grid_posterior_matches_brute_force_integration():
    # Reference: _brute_force_moments (dense covariances, scipy.integrate.simpson).
    series = simulated_ar1(12, seed=5)
    priors = Priors().resolve(series)
    ref = _brute_force_moments(series, priors)
    post = ar1_posterior(series, priors, SPEC)
    w, sigma, phi = post.weight, post.sigma, post.phi
    # b's mean given each node (the engine's normal conditional, M^-1 W'z), averaged by weight
    x, mu0, var0, lag = _pieces(series, priors)
    stats = ar1_products.gap_statistics(np.column_stack([series.log_values - x @ mu0, x]), lag)
    _, gram = ar1_products.whitened_gram(stats, sigma, phi)
    m = gram[:, 1:, 1:] + np.diag(1 / var0)
    b_mean = mu0[1] + np.linalg.solve(m, gram[:, 1:, :1])[:, 1, 0]
    # The grid's midpoint rule in atanh phi has an edge at phi = 0 (the prior is flat there),
    # so it converges like h^2: measured here at the default 96 x 96 nodes, relative: b 3e-5,
    # sigma 4e-5 (sd 3e-5), phi 2.1e-4 (sd 3.3e-4); the tolerances allow about four times.
    assert w @ b_mean == pytest.approx(ref["b"], rel=1e-4)
    assert w @ sigma == pytest.approx(ref["sigma"], rel=2e-4)
    assert w @ phi == pytest.approx(ref["phi"], rel=1e-3)
    assert math.sqrt(w @ sigma**2 - (w @ sigma) ** 2) == pytest.approx(ref["sd_sigma"], rel=2e-4)
    assert math.sqrt(w @ phi**2 - (w @ phi) ** 2) == pytest.approx(ref["sd_phi"], rel=1.5e-3)


def test_draws_follow_the_grid_and_keep_a_fixed_level():
    series = simulated_ar1(16, seed=2)
    priors = Priors().resolve(series)
    post = ar1_posterior(series, priors, SPEC)
    fit = fit_series(series, engine="exact", model="exponential", errors="ar1", seed=4)
    assert fit.engine == "exact" and fit.spec == SPEC and fit.diagnostics.ok
    flat = fit.flat()
    assert set(flat) == {"log_a", "log1p_g", "sigma", "phi"}
    for name, nodes in (("sigma", post.sigma), ("phi", post.phi)):
        mean, sd = post.weight @ nodes, math.sqrt(post.weight @ nodes**2
                                                  - (post.weight @ nodes) ** 2)
        # Monte Carlo error of a mean of 4,000 independent draws: sd / sqrt(4000); 4 se
        assert abs(flat[name].mean() - mean) < 4 * sd / math.sqrt(flat[name].size), name
    again = fit_series(series, engine="exact", model="exponential", errors="ar1", seed=4)
    np.testing.assert_array_equal(again.flat()["log1p_g"], flat["log1p_g"])
    fixed = fit_series(series, engine="exact", model="exponential", errors="ar1", seed=4,
                       priors=Priors(initial=InitialValuePrior(give_or_take_pct=0)))
    assert np.all(fixed.flat()["log_a"] == fixed.priors.log_a_mu)
    fc = bg.forecast(fit, 4)
    assert fc.draws.shape == (4000, 4) and np.all(fc.draws > 0)


@pytest.mark.slow
def test_exact_engine_agrees_with_nuts_on_the_same_model():
    # Reference: the NUTS engine on the same model and priors (PyMC; the coefficients are
    # integrated out there by the same formula, but sigma and phi are sampled).
    series = simulated_ar1(16, seed=7)
    opts = {"model": "exponential", "errors": "ar1"}
    exact = fit_series(series, engine="exact", seed=5, **opts)
    nuts = fit_series(series, engine="nuts", seed=5, draws=1000, chains=2, **opts)
    assert nuts.diagnostics.ok
    ess = nuts.diagnostics.min_ess_bulk
    for name in ("log1p_g", "sigma", "phi"):
        a, b = exact.flat()[name], nuts.flat()[name]
        # Monte Carlo error of each mean: sd / sqrt(independent draws), NUTS by its ESS; 4 se
        se = math.sqrt(a.var() / a.size + b.var() / ess)
        assert abs(a.mean() - b.mean()) < 4 * se, name
        # sd: relative se of a sample sd about 1 / sqrt(2 ESS); 4 se
        assert abs(a.std() / b.std() - 1) < 4 / math.sqrt(2 * ess), name
    fe, fn = bg.forecast(exact, 4), bg.forecast(nuts, 4)
    for q in (0.1, 0.5, 0.9):
        a = np.quantile(np.log(fe.draws[:, -1]), q)
        b = np.quantile(np.log(fn.draws[:, -1]), q)
        sd = np.log(fe.draws[:, -1]).std()
        # a quantile's Monte Carlo sd is about 1.7 sd / sqrt(ESS) at the 10% and 90% levels
        assert abs(a - b) < 4 * 1.7 * sd / math.sqrt(ess), q


def test_command_line_fits_it_exactly_and_refuses_what_it_does_not_cover(tmp_path, capsys):
    csv = tmp_path / "s.csv"
    series = simulated_ar1(16, seed=1)
    csv.write_text("period,value\n" + "".join(
        f"{2015 + i // 4}Q{i % 4 + 1},{v:.4f}\n" for i, v in enumerate(series.values)))
    out = tmp_path / "out"
    argv = ["forecast", str(csv), "-H", "4", "--model", "exponential", "--errors", "ar1",
            "--quiet"]
    assert main([*argv, "--out", str(out)]) == 0  # the exact engine is the default
    assert '"engine": "exact"' in (out / "summary.json").read_text()
    capsys.readouterr()
    for extra in ([], ["--seasonal", "yes"]):  # Student-t noise stays with NUTS, seasons or not
        bad = tmp_path / "bad"
        assert main([*argv, *extra, "--noise-dist", "student-t", "--engine", "exact",
                     "--out", str(bad)]) == 2
        err = capsys.readouterr().err.strip()
        assert len(err.splitlines()) == 1 and "use nuts instead of exact" in err
        assert "independent or AR(1) errors, with or without seasonal factors" in err
        assert not bad.exists()
