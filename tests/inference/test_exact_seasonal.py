"""The exact engines of the exponential curve with seasonal factors integrated out.

References: scipy.stats.multivariate_normal (every coefficient integrated out by hand:
covariance ``K + X V0 X'``, with ``K`` the independent or AR(1) error covariance), the
textbook normal conditional ``mu0 + V0 X' C^-1 (y - X mu0)`` (Bishop 2006, *Pattern
Recognition and Machine Learning*, eq. 2.116 for a linear-Gaussian model), and the NUTS
engine on the same model (PyMC, seasonal factors sampled from their ``ZeroSumNormal``).
"""

import math

import numpy as np
import pytest
from ar1_simulation import simulated_ar1
from scipy import stats

import bayesgrowth as bg
from bayesgrowth.cli import main
from bayesgrowth.data.periods import PeriodAxis
from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.inference.gaussian_grid import _log_post
from bayesgrowth.inference.run import fit_series
from bayesgrowth.models import linear
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.priors import InitialValuePrior, Priors

QUARTERS = PeriodAxis(style="quarter", step=1, origin=2016 * 4)
MONTHS = PeriodAxis(style="month", step=1, origin=2016 * 12)
TRUTH = np.array([0.08, -0.05, -0.06, 0.03])  # log seasonal factors, summing to zero


def _simulated(n, errors="independent", sigma=0.04, phi=0.5, seed=3, t=None, axis=QUARTERS):
    """``log 500 + 0.03 t + season + e_t`` with known parameters (AR(1) or independent e).

    The curve and errors come from the AR(1) tests' simulation (``phi = 0`` makes the
    errors independent); the seasonal factors :data:`TRUTH` are added on the log scale.
    """
    base = simulated_ar1(n, phi=phi if errors == "ar1" else 0.0, sigma=sigma, seed=seed, t=t)
    m = 4 if axis is QUARTERS else 12
    season = np.resize(TRUTH, m) - np.resize(TRUTH, m).mean()
    values = base.values * np.exp(season[base.t % m])
    return GrowthSeries(values=values, t=base.t, axis=axis, name="simulated")


def _dense_error_cov(t, sigma, phi):
    """``sigma^2 phi^|t_i - t_j| / (1 - phi^2)``, written out (``phi = 0``: ``sigma^2 I``)."""
    gap = np.abs(t[:, None] - t[None, :]).astype(float)
    return sigma**2 / (1 - phi**2) * np.where(gap == 0, 1.0, phi**gap)


def _pieces(spec, series, priors):
    t = series.t.astype(float)
    _, x, mu0, var0 = linear.curve_pieces(spec, priors, t - priors.t_ref, {})
    return linear.with_season_columns(spec, priors, x, series.axis, t)


@pytest.mark.parametrize("errors", ["independent", "ar1"])
@pytest.mark.parametrize("fixed_initial", [False, True])
@pytest.mark.parametrize("axis", [QUARTERS, MONTHS], ids=["quarterly", "monthly"])
def test_likelihood_with_seasons_integrated_matches_scipy_multivariate_normal(
        errors, fixed_initial, axis):
    # Reference: scipy.stats.multivariate_normal with mean X mu0 and covariance K + X V0 X',
    # X = [1, dt, D Q] (the seasonal coordinates' prior N(0, s^2) integrated out by hand; a
    # fixed level has variance 0, so it adds nothing to the covariance).
    t = np.array([0, 1, 2, 3, 5, 6, 7, 8, 9, 11, 12, 13, 14, 15, 17, 18, 19, 20, 21, 22])
    series = _simulated(0, errors, t=t, seed=8, axis=axis)
    given = Priors(initial=InitialValuePrior(give_or_take_pct=0)) if fixed_initial else Priors()
    priors = given.resolve(series)
    spec = ModelSpec(errors=errors, seasonal=True)
    x, mu0, var0, m = _pieces(spec, series, priors)
    assert x.shape == (t.size, 2 + m - 1) and m == (4 if axis is QUARTERS else 12)
    lag = np.concatenate([[1.0], np.diff(t.astype(float))])
    sigma = np.array([0.05, 0.02, 0.2])
    phi = np.array([0.6, 0.97, 0.1]) if errors == "ar1" else np.zeros(3)
    ours = linear.marginal_loglik(spec, series.log_values, np.ones(t.size), x, mu0, var0, lag,
                                  sigma, phi if errors == "ar1" else None, xp=np)
    for i in range(sigma.size):
        cov = _dense_error_cov(t, sigma[i], phi[i]) + x @ np.diag(var0) @ x.T
        ref = stats.multivariate_normal(x @ mu0, cov).logpdf(series.log_values)
        assert ours[i] == pytest.approx(ref, abs=1e-8, rel=1e-10)
        if errors == "independent":  # the 1-D engine's own formula at this sigma, flat p(sigma)
            free = var0 > 0
            xf, r = x[:, free], series.log_values - x[:, ~free] @ mu0[~free]
            lp, _, _ = _log_post(np.log(sigma[i : i + 1]), xf.T @ xf, xf.T @ r, float(r @ r),
                                 t.size, mu0[free], np.diag(1 / var0[free]),
                                 lambda s: 0.0 * s, False)
            assert lp[0] == pytest.approx(ref, abs=1e-8, rel=1e-10)


@pytest.mark.parametrize("errors", ["independent", "ar1"])
def test_conditional_draws_follow_the_textbook_normal_conditional(errors):
    # Reference: beta | sigma, phi, y ~ N(mu0 + V0 X' C^-1 (y - X mu0), V0 - V0 X' C^-1 X V0),
    # C = K + X V0 X' (Bishop 2006, eqs. 2.115-2.116), from dense covariances.
    series = _simulated(14, errors, seed=6)
    priors = Priors().resolve(series)
    spec = ModelSpec(errors=errors, seasonal=True)
    x, mu0, var0, m = _pieces(spec, series, priors)
    sigma, phi = 0.05, (0.7 if errors == "ar1" else 0.0)
    n = 40_000
    draws = {"sigma": np.full(n, sigma), "phi": np.full(n, phi)}
    out = linear.draw_curve_coefficients(spec, priors, draws, series.t, series.log_values,
                                         series.axis, np.random.default_rng(2), seasons=True)
    v0 = np.diag(var0)
    c = _dense_error_cov(series.t, sigma, phi) + x @ v0 @ x.T
    gain = v0 @ x.T @ np.linalg.inv(c)
    mean = mu0 + gain @ (series.log_values - x @ mu0)
    cov = v0 - gain @ x @ v0
    q = linear.season_basis(m)
    # the season's mean and covariance follow from its coordinates: Q eta
    s_mean, s_cov = q @ mean[2:], q @ cov[2:, 2:] @ q.T
    got = {"log_a": (out["log_a"], mean[0], cov[0, 0]), "log1p_g": (out["log1p_g"], mean[1],
                                                                    cov[1, 1])}
    for j in range(m):
        got[f"season[{j}]"] = (out["season"][:, j], s_mean[j], s_cov[j, j])
    for name, (d, mu, var) in got.items():
        # Monte Carlo error of a mean of n independent draws: sd / sqrt(n); 4 se. The
        # variance of a normal sample: relative se sqrt(2 / n); 4 se.
        assert abs(d.mean() - mu) < 4 * math.sqrt(var / n), name
        assert abs(d.var() / var - 1) < 4 * math.sqrt(2 / n), name
    np.testing.assert_allclose(out["season"].sum(axis=1), 0.0, atol=1e-12)


@pytest.mark.parametrize("errors", ["independent", "ar1"])
def test_fit_draws_have_the_nuts_shapes_and_feed_the_forecast(errors):
    series = _simulated(20, errors, seed=2)
    fit = fit_series(series, engine="exact", seasonal=True, errors=errors, seed=4,
                     model="exponential")
    assert fit.engine == "exact" and fit.spec == ModelSpec(errors=errors, seasonal=True)
    assert fit.diagnostics.ok
    assert fit.posterior["season"].shape == (4, 1000, 4)
    expected = {"log_a", "log1p_g", "sigma", "season"} | ({"phi"} if errors == "ar1" else set())
    assert set(fit.posterior) == expected
    again = fit_series(series, engine="exact", seasonal=True, errors=errors, seed=4,
                       model="exponential")
    np.testing.assert_array_equal(again.posterior["season"], fit.posterior["season"])
    assert fit.log_likelihood().shape == (4, 1000, series.n)
    fc = bg.forecast(fit, 8)
    assert fc.draws.shape == (4000, 8) and np.all(fc.draws > 0)
    # the seasonal pattern carries into the forecast: Q1 above Q3 in the median path
    # (truth: +8% against -6% on the log scale, 0.14 apart; 20 points with 4% noise)
    med = np.log(np.median(fc.draws, axis=0))
    quarter = (series.future_t(8) + QUARTERS.origin) % 4
    assert med[quarter == 0].mean() - med[quarter == 2].mean() > 0.05


@pytest.mark.slow
@pytest.mark.parametrize("errors", ["independent", "ar1"])
def test_exact_engine_agrees_with_nuts_on_the_same_seasonal_model(errors):
    # Reference: the NUTS engine on the same model and priors (PyMC; the seasonal factors
    # sampled from ZeroSumNormal(seasonal_scale), level and growth integrated out, sigma and
    # phi sampled).
    series = _simulated(16, errors, seed=7)
    opts = {"model": "exponential", "errors": errors, "seasonal": True}
    exact = fit_series(series, engine="exact", seed=5, **opts)
    nuts = fit_series(series, engine="nuts", seed=5, draws=1000, chains=2, **opts)
    assert nuts.diagnostics.ok
    ess = nuts.diagnostics.min_ess_bulk
    a_all, b_all = exact.flat(), nuts.flat()
    pairs = {name: (a_all[name], b_all[name]) for name in ("log1p_g", "sigma")}
    for j in range(4):
        pairs[f"season[{j}]"] = (a_all["season"][:, j], b_all["season"][:, j])
    for name, (a, b) in pairs.items():
        # Monte Carlo error of each mean: sd / sqrt(independent draws), NUTS by its ESS; 4 se
        se = math.sqrt(a.var() / a.size + b.var() / ess)
        assert abs(a.mean() - b.mean()) < 4 * se, name
        # sd: relative se of a sample sd about 1 / sqrt(2 ESS); 4 se
        assert abs(a.std() / b.std() - 1) < 4 / math.sqrt(2 * ess), name


def _csv(tmp_path, errors):
    csv = tmp_path / "s.csv"
    series = _simulated(20, errors, seed=1)
    csv.write_text("period,value\n" + "".join(
        f"{2016 + i // 4}Q{i % 4 + 1},{v:.4f}\n" for i, v in enumerate(series.values)))
    return csv


@pytest.mark.parametrize("errors", ["independent", "ar1"])
def test_command_line_fits_seasonal_curve_exactly(tmp_path, errors):
    out = tmp_path / "out"
    argv = ["forecast", str(_csv(tmp_path, errors)), "-H", "8", "--model", "exponential",
            "--seasonal", "yes", "--errors", errors, "--quiet"]
    assert main([*argv, "--engine", "exact", "--out", str(out)]) == 0
    summary = (out / "summary.json").read_text()
    assert '"engine": "exact"' in summary and '"seasonal": true' in summary.lower()
    assert (out / "forecast.csv").exists()
