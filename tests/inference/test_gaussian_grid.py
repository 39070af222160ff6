"""The quadrature core against closed forms and certified values."""

import numpy as np
import pytest
from scipy import stats

from bayesgrowth.inference.gaussian_grid import linear_gaussian_posterior


def _nig_closed_form(X, y, m0, V0, a0, b0):
    # Normal-inverse-gamma posterior: shared/reference/conjugate-normal-regression.md
    # (Murphy 2012 §7.6.3; Gelman et al. BDA3 §14.8).
    P0 = np.linalg.inv(V0)
    Pn = P0 + X.T @ X
    Vn = np.linalg.inv(Pn)
    mn = Vn @ (P0 @ m0 + X.T @ y)
    an = a0 + y.size / 2
    r = y - X @ mn
    bn = b0 + 0.5 * (r @ r + (mn - m0) @ P0 @ (mn - m0))
    return mn, Vn, an, bn


def _inv_gamma_on_sigma(a0, b0):
    # Density of sigma when sigma^2 ~ InvGamma(a0, scale b0): p(sigma^2) * 2 sigma.
    return lambda s: stats.invgamma(a0, scale=b0).logpdf(s**2) + np.log(2 * s)


def test_hand_checkable_intercept_only_example():
    # Hand example of the reference note, verified there by 2-D quadrature:
    # mn = 2.3090909, E[sigma^2 | y] = 0.6643182, log p(y) = -6.773108.
    y = np.array([2.1, 1.7, 3.2, 2.8, 2.4])
    post = linear_gaussian_posterior(
        np.ones((5, 1)), y, np.array([1.0]), np.array([[0.5]]),
        _inv_gamma_on_sigma(2.5, 1.5), conditional=True,
    )
    assert post.beta_mean()[0] == pytest.approx(12.7 / 5.5, rel=1e-9)
    assert post.sigma_moment(2) == pytest.approx(0.6643182, abs=5e-7)
    assert post.log_norm == pytest.approx(-6.773108, abs=5e-6)


def test_random_regression_matches_nig_closed_form(rng):
    n, k = 12, 3
    X = np.column_stack([np.ones(n), rng.normal(size=(n, k - 1))])
    y = X @ np.array([1.0, -0.5, 2.0]) + rng.normal(scale=0.7, size=n)
    m0, V0, a0, b0 = np.zeros(k), np.diag([4.0, 2.0, 3.0]), 3.0, 2.0
    mn, Vn, an, bn = _nig_closed_form(X, y, m0, V0, a0, b0)
    post = linear_gaussian_posterior(
        X, y, m0, np.linalg.inv(V0), _inv_gamma_on_sigma(a0, b0), conditional=True
    )
    np.testing.assert_allclose(post.beta_mean(), mn, rtol=1e-9)
    # Cov[beta | y] = bn/(an-1) Vn (reference note, table of consequences).
    np.testing.assert_allclose(post.beta_cov(), bn / (an - 1) * Vn, rtol=1e-6)
    assert post.sigma_moment(2) == pytest.approx(bn / (an - 1), rel=1e-6)
    # Marginal t for one coefficient: equal-tailed 95% bounds.
    scale = np.sqrt(bn / an * Vn[1, 1])
    lo = stats.t(df=2 * an, loc=mn[1], scale=scale).ppf(0.025)
    assert post.linear_quantile(np.array([0.0, 1.0, 0.0]), 0.025) == pytest.approx(lo, rel=1e-6)
    # Evidence: y ~ t_{2 a0}(X m0, (b0/a0)(I + X V0 X')) (reference note).
    evidence = stats.multivariate_t(
        loc=X @ m0, shape=b0 / a0 * (np.eye(n) + X @ V0 @ X.T), df=2 * a0
    ).logpdf(y)
    assert post.log_norm == pytest.approx(evidence, abs=1e-6)
    # Predictive for a new row: t_{2an}(x'mn, (bn/an)(1 + x'Vn x)).
    x_new = np.array([1.0, 0.3, -1.2])
    pred = stats.t(df=2 * an, loc=x_new @ mn, scale=np.sqrt(bn / an * (1 + x_new @ Vn @ x_new)))
    for q in (0.05, 0.5, 0.95):
        assert post.linear_quantile(x_new, q, noise=True) == pytest.approx(pred.ppf(q), rel=1e-6)


def _read_norris(reference_dir):
    lines = (reference_dir / "nist" / "Norris.dat").read_text().splitlines()
    data = np.array([[float(v) for v in line.split()] for line in lines[60:] if line.strip()])
    return data[:, 1], data[:, 0]  # x, y


def test_flat_limit_reproduces_nist_norris_certified_values(reference_dir):
    # NIST StRD Norris.dat certified values (shared/reference/nist, printed in the file):
    b0, b1 = -0.262323073774029, 1.00211681802045
    sd0, sd1 = 0.232818234301152, 0.429796848199937e-03
    x, y = _read_norris(reference_dir)
    X = np.column_stack([np.ones_like(x), x])
    n, k = X.shape
    # Flat prior p(beta, sigma) ∝ 1/sigma: beta | y ~ t_{n-k}(OLS, s^2 (X'X)^-1)
    # (BDA3 §14.2), so the t scale is the classical standard error and the
    # posterior sd is larger by sqrt((n-k)/(n-k-2)).
    post = linear_gaussian_posterior(X, y, np.zeros(2), np.zeros((2, 2)), lambda s: -np.log(s))
    np.testing.assert_allclose(post.beta_mean(), [b0, b1], rtol=1e-9)
    factor = np.sqrt((n - k) / (n - k - 2))
    np.testing.assert_allclose(np.sqrt(np.diag(post.beta_cov())) / factor, [sd0, sd1], rtol=1e-6)


def test_flat_limit_matches_statsmodels_ols(rng):
    sm = pytest.importorskip("statsmodels.api")
    t = np.arange(15.0)
    y = np.log(200) + 0.07 * t + rng.normal(scale=0.05, size=t.size)
    X = sm.add_constant(t)
    ols = sm.OLS(y, X).fit()  # statsmodels OLS: the classical reference
    post = linear_gaussian_posterior(X, y, np.zeros(2), np.zeros((2, 2)), lambda s: -np.log(s))
    np.testing.assert_allclose(post.beta_mean(), ols.params, rtol=1e-10)
    dof = ols.df_resid
    np.testing.assert_allclose(
        np.sqrt(np.diag(post.beta_cov())), ols.bse * np.sqrt(dof / (dof - 2)), rtol=1e-6
    )
    # Equal-tailed 95% posterior interval = classical 95% confidence interval.
    lo = post.linear_quantile(np.array([0.0, 1.0]), 0.025)
    assert lo == pytest.approx(ols.conf_int(0.05)[1, 0], rel=1e-6)


def test_draws_reproduce_grid_moments(rng):
    t = np.arange(10.0)
    X = np.column_stack([np.ones_like(t), t])
    y = 3 + 0.1 * t + rng.normal(scale=0.1, size=t.size)
    post = linear_gaussian_posterior(
        X, y, np.zeros(2), np.diag([0.1, 1.0]), lambda s: -0.5 * (s / 0.3) ** 2
    )
    beta, sigma = post.sample(200_000, np.random.default_rng(3))
    sd = np.sqrt(np.diag(post.beta_cov()))
    # Monte Carlo error of a mean of 200k independent draws is sd/447: allow 5 of them.
    np.testing.assert_allclose(beta.mean(0), post.beta_mean(), atol=float(5 * sd.max() / 447))
    np.testing.assert_allclose(beta.std(0), sd, rtol=0.01)
    assert sigma.mean() == pytest.approx(post.sigma_moment(1), rel=0.005)
    assert np.quantile(sigma, 0.9) == pytest.approx(post.sigma_quantile(0.9), rel=0.01)


def test_draws_when_covariances_are_singular_to_rounding():
    # More coefficients than observations (three quarters; level, growth and three seasonal
    # coordinates): at the grid's tiny sigma the coefficients' covariance is singular to
    # rounding and Cholesky fails on it. The draws must still be N(mean, cov) given the cell:
    # their mean is the posterior mean (law of total expectation) within Monte Carlo error.
    from bayesgrowth.inference.gaussian_grid import _roots

    rng = np.random.default_rng(2)
    X = np.column_stack([np.ones(3), np.arange(3.0), rng.normal(size=(3, 3))])
    post = linear_gaussian_posterior(X, np.log([100.0, 110.0, 121.0]), np.zeros(5),
                                     np.diag([0.25, 4.0, 16.0, 16.0, 16.0]),
                                     lambda s: stats.halfnorm(scale=0.5).logpdf(s))
    with pytest.raises(np.linalg.LinAlgError):
        np.linalg.cholesky(post.cov + 1e-300 * np.eye(5))
    root = _roots(post.cov)
    # R R' is the covariance made exactly symmetric: the inverse of a precision matrix this
    # ill-conditioned is symmetric only to its rounding noise
    sym = 0.5 * (post.cov + np.swapaxes(post.cov, 1, 2))
    scale = np.abs(post.cov).max()
    assert np.abs(post.cov - sym).max() < 1e-6 * scale
    np.testing.assert_allclose(root @ np.swapaxes(root, 1, 2), sym, rtol=0, atol=1e-12 * scale)
    beta, _ = post.sample(40_000, np.random.default_rng(3))
    se = np.sqrt(np.diag(post.beta_cov()) / beta.shape[0])
    assert np.all(np.abs(beta.mean(axis=0) - post.beta_mean()) < 4 * se)


def test_no_more_observations_than_coefficients_weighs_sigma_by_the_marginal_density():
    # Three observations, five coefficients: the data can be fitted exactly, and the weight of
    # each sigma must still be the density of the log values, N(X m0, sigma^2 I + X V0 X')
    # (scipy.stats.multivariate_normal), times the prior, down to the grid's smallest sigma.
    from bayesgrowth.inference.gaussian_grid import _dual_form, _log_marginal_dual

    rng = np.random.default_rng(2)
    X = np.column_stack([np.ones(3), np.arange(3.0), rng.normal(size=(3, 3))])
    y, m0 = np.log([100.0, 110.0, 121.0]), np.array([4.0, 0.1, 0.0, 0.0, 0.0])
    P0 = np.diag([0.25, 4.0, 16.0, 16.0, 16.0])
    prior = stats.halfnorm(scale=0.5).logpdf
    sigma = np.array([1e-6, 1e-3, 0.05, 1.0])
    mine = _log_marginal_dual(np.log(sigma), _dual_form(X, y, m0, P0, False), prior)
    V0 = np.linalg.inv(P0)
    ref = [prior(s) + stats.multivariate_normal(X @ m0, s**2 * np.eye(3) + X @ V0 @ X.T).logpdf(y)
           for s in sigma]
    np.testing.assert_allclose(mine, ref, rtol=1e-10)
    post = linear_gaussian_posterior(X, y, m0, P0, prior)
    # the likelihood is flat as sigma -> 0, so the posterior there follows the prior:
    # nowhere near all of its mass at the grid's floor
    assert post.weight[post.sigma < 1e-4].sum() < 1e-3
