import numpy as np
import pytest
import scoringrules
from scipy import integrate, stats

from bayesgrowth.scoring.draws import draws_from_log_t
from bayesgrowth.scoring.logscore import kde_bandwidth, log_score, log_score_log_t, log_score_t

LOC, SCALE, DF = np.log(100.0), 0.1, 5.0
Y = np.array([80.0, 95.0, 100.0, 110.0, 130.0])


def test_log_t_closed_form_matches_scipy_with_jacobian():
    # scipy.stats.t with its own loc/scale gives the density of log Y; the density of Y
    # is that times 1/y (change of variables), so -log f_Y(y) = -logpdf(log y) + log y.
    expected = -stats.t(DF, LOC, SCALE).logpdf(np.log(Y)) + np.log(Y)
    np.testing.assert_allclose(log_score_log_t(Y, LOC, SCALE, DF), expected, rtol=1e-13)


def test_log_t_with_infinite_df_is_lognormal():
    # scipy.stats.lognorm(s=sigma, scale=exp(mu)) is the log-normal density of Y.
    expected = -stats.lognorm(s=SCALE, scale=np.exp(LOC)).logpdf(Y)
    np.testing.assert_allclose(log_score_log_t(Y, LOC, SCALE, np.inf), expected, rtol=1e-12)


def test_log_t_density_integrates_to_one():
    total, _ = integrate.quad(
        lambda y: np.exp(-log_score_log_t(y, LOC, SCALE, DF)), 1e-9, np.inf, points=None,
        limit=200,
    )
    assert total == pytest.approx(1.0, abs=1e-8)


def test_t_closed_form_matches_scoringrules():
    rng = np.random.default_rng(3)
    y, loc = rng.normal(size=5), rng.normal(size=5)
    scale, df = rng.uniform(0.3, 2.0, size=5), rng.uniform(1.5, 20.0, size=5)
    # scoringrules 0.10 logs_t(obs, df, location, scale) = -log density
    np.testing.assert_allclose(
        log_score_t(y, loc, scale, df), scoringrules.logs_t(y, df, loc, scale), rtol=1e-12
    )


def test_non_positive_outcome_gets_infinite_score():
    assert np.isinf(log_score_log_t(0.0, LOC, SCALE, DF))
    draws = draws_from_log_t(LOC, SCALE, DF, 200)
    assert np.isinf(log_score(-3.0, draws))


def test_kde_matches_scipy_gaussian_kde_on_log_scale():
    # scipy.stats.gaussian_kde with kernel sd = factor * std(ddof=1); choosing the factor
    # so the kernel sd equals our bandwidth gives the same estimator of the log-Y density.
    rng = np.random.default_rng(17)
    draws = rng.lognormal(4.0, 0.3, size=800)
    h = kde_bandwidth(np.log(draws))
    kde = stats.gaussian_kde(np.log(draws), bw_method=h / np.std(np.log(draws), ddof=1))
    expected = -kde.logpdf(np.log(Y / 100 * 55)) + np.log(Y / 100 * 55)
    np.testing.assert_allclose(log_score(Y / 100 * 55, draws), expected, rtol=1e-10)


def test_bandwidth_is_silverman_rule():
    # Silverman (1986) eq. 3.31: 0.9 min(sd, IQR/1.34) m^(-1/5); for the quantile sample
    # of N(0, 1) with m = 10000, sd ~ 1 and IQR/1.34 = 1.3490/1.34 > sd, so h ~ 0.9 m^-0.2.
    sample = stats.norm.ppf((np.arange(10000) + 0.5) / 10000)
    expected = 0.9 * min(np.std(sample, ddof=1), stats.iqr(sample) / 1.34) * 10000 ** -0.2
    assert kde_bandwidth(sample) == pytest.approx(expected, rel=1e-12)
    assert kde_bandwidth(sample) == pytest.approx(0.9 * 10000 ** -0.2, rel=1e-3)


def test_kde_close_to_closed_form_with_known_smoothing_bias():
    # With quantile-spaced draws the KDE equals the t density convolved with the Gaussian
    # kernel; to second order (standard KDE bias, Silverman 1986 sec. 3.3.1)
    #   log(f * phi_h) - log f = (h^2 / 2) (g'' + g'^2),  g = log f.
    # The remainder is O((h/scale)^4) = O(3e-4) here; observed at most 1.9e-4. The
    # leading term itself reaches 0.017, so the check is sharp.
    draws = draws_from_log_t(LOC, SCALE, DF, 20000)
    h = kde_bandwidth(np.log(draws))
    z = (np.log(Y) - LOC) / SCALE
    g1 = -(DF + 1) * z / (SCALE * (DF + z * z))
    g2 = -(DF + 1) * (DF - z * z) / (SCALE**2 * (DF + z * z) ** 2)
    predicted = -(h * h / 2) * (g2 + g1 * g1)
    diff = log_score(Y, draws) - log_score_log_t(Y, LOC, SCALE, DF)
    np.testing.assert_allclose(diff, predicted, atol=1e-3)
    assert np.max(np.abs(diff)) > 1e-2  # the bias is real, so the check above has teeth


def test_kde_equals_exact_convolution():
    # The quantile-spaced KDE is a midpoint-rule integral of phi_h(log y - x) f_t(x);
    # compare with scipy quad of that integral (observed agreement ~1e-14).
    draws = draws_from_log_t(LOC, SCALE, DF, 20000)
    h = kde_bandwidth(np.log(draws))
    for y in Y:
        ly = np.log(y)
        dens, _ = integrate.quad(
            lambda x, ly=ly: stats.norm.pdf(ly - x, scale=h) * stats.t.pdf(x, DF, LOC, SCALE),
            ly - 12 * h,
            ly + 12 * h,
            epsrel=1e-12,
        )
        assert log_score(y, draws) == pytest.approx(-np.log(dens) + ly, abs=1e-9)


def test_kde_vectorised_over_leading_axes():
    draws = draws_from_log_t(np.array([[LOC], [LOC + 0.5]]), SCALE, DF, 500)
    assert draws.shape == (2, 1, 500)
    out = log_score(np.array([[100.0], [160.0]]), draws)
    assert out.shape == (2, 1)
    assert out[0, 0] == pytest.approx(log_score(100.0, draws[0, 0]))
    assert out[1, 0] == pytest.approx(log_score(160.0, draws[1, 0]))


def test_kde_rejects_non_positive_draws_and_degenerate_gives_inf():
    with pytest.raises(ValueError, match="positive draws"):
        log_score(1.0, [1.0, 0.0, 2.0])
    assert np.isinf(log_score(2.0, [2.0, 2.0, 2.0]))
