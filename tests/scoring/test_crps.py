import numpy as np
import properscoring
import pytest
import scoringrules
from scipy import integrate, stats

from bayesgrowth.scoring.crps import crps_ensemble, crps_normal, crps_point, crps_t
from bayesgrowth.scoring.draws import draws_from_log_t


def _crps_by_integral(cdf, sf, y):
    # Definition CRPS(F, y) = ∫ (F(x) - 1{x >= y})^2 dx (Matheson & Winkler 1976,
    # Management Sci. 22:1087-1096; Gneiting & Raftery 2007, JASA 102:359-378, eq. 20),
    # split at y, using the survival function for the right part.
    left, _ = integrate.quad(lambda x: cdf(x) ** 2, -np.inf, y, epsabs=1e-13, epsrel=1e-12)
    right, _ = integrate.quad(lambda x: sf(x) ** 2, y, np.inf, epsabs=1e-13, epsrel=1e-12)
    return left + right


# --- ensemble -------------------------------------------------------------------------


def test_ensemble_hand_value_plain_not_fair():
    # Hand value: {1, 2, 4}, y = 2.5: E|X-y| = 7/6, 0.5 E|X-X'| = 2/3, CRPS = 0.5
    # (energy form, Gneiting & Raftery 2007). The fair estimator (Ferro 2013, QJRMS
    # 140:1917-1923) would give 1/6.
    assert crps_ensemble(2.5, [1.0, 2.0, 4.0]) == pytest.approx(0.5, rel=1e-14)
    assert crps_ensemble(2.5, [4.0, 1.0, 2.0]) == pytest.approx(0.5, rel=1e-14)


def test_ensemble_hand_value_ecdf_integral():
    # Same hand value via the ECDF integral (Hersbach 2000, Wea. Forecasting 15:559-570):
    # 1/9 + 2/9 + 1/6 = 0.5, here evaluated with scipy quad on the step ECDF.
    members = np.array([1.0, 2.0, 4.0])

    def ecdf(x):
        return np.mean(members <= x)

    def esf(x):
        return 1.0 - ecdf(x)

    total = 0.0
    for a, b, f in [(1, 2, ecdf), (2, 2.5, ecdf), (2.5, 4, esf)]:
        total += integrate.quad(lambda x, f=f: f(x) ** 2, a, b, points=[2.0])[0]
    assert total == pytest.approx(0.5, rel=1e-12)
    assert crps_ensemble(2.5, members) == pytest.approx(total, rel=1e-12)


def test_ensemble_matches_libraries_random():
    rng = np.random.default_rng(20240601)
    y = rng.normal(size=(4, 7))
    draws = rng.standard_t(4, size=(4, 7, 50)) * 1.5 + 0.3
    ours = crps_ensemble(y, draws)
    assert ours.shape == (4, 7)
    # properscoring 0.1 (plain ECDF estimator, members on last axis)
    np.testing.assert_allclose(ours, properscoring.crps_ensemble(y, draws), rtol=1e-10)
    # scoringrules 0.10 with the energy ("nrg") estimator pinned
    np.testing.assert_allclose(
        ours, scoringrules.crps_ensemble(y, draws, estimator="nrg"), rtol=1e-10
    )


def test_ensemble_matches_pairwise_energy_form():
    # Direct O(m^2) energy form E|X-y| - 0.5 E|X-X'| (Gneiting & Raftery 2007, eq. 21).
    rng = np.random.default_rng(7)
    draws = rng.lognormal(3.0, 0.4, size=(3, 101))
    y = np.array([15.0, 20.0, 40.0])
    pair = np.abs(draws[:, :, None] - draws[:, None, :]).mean(axis=(1, 2))
    direct = np.abs(draws - y[:, None]).mean(axis=1) - 0.5 * pair
    np.testing.assert_allclose(crps_ensemble(y, draws), direct, rtol=1e-12)


def test_ensemble_broadcasts_scalar_outcome_and_propagates_nan():
    draws = np.array([[1.0, 2.0, 4.0], [1.0, np.nan, 4.0]])
    out = crps_ensemble(2.5, draws)
    assert out[0] == pytest.approx(0.5)
    assert np.isnan(out[1])
    assert np.isnan(crps_ensemble(np.nan, [1.0, 2.0]))


def test_ensemble_single_member_is_absolute_error():
    # A one-member ensemble is a point forecast: CRPS = |x - y| (Gneiting & Raftery 2007).
    assert crps_ensemble(3.0, [5.5]) == pytest.approx(2.5)
    assert crps_point(3.0, 5.5) == pytest.approx(2.5)


def test_ensemble_rejects_empty_or_scalar_draws():
    with pytest.raises(ValueError, match="members"):
        crps_ensemble(1.0, np.empty((2, 0)))
    with pytest.raises(ValueError, match="last axis"):
        crps_ensemble(1.0, 3.0)


# --- closed forms ---------------------------------------------------------------------


def test_normal_hand_value():
    # CRPS(N(0,1), 0) = 2 phi(0) - 1/sqrt(pi) = (sqrt 2 - 1)/sqrt(pi)
    # (Gneiting, Raftery, Westveld & Goldman 2005, MWR 133:1098-1118).
    assert crps_normal(0.0, 0.0, 1.0) == pytest.approx(0.23369497725510913, rel=1e-15)
    assert crps_normal(0.0, 0.0, 1.0) == pytest.approx((np.sqrt(2) - 1) / np.sqrt(np.pi))


def test_normal_matches_scoringrules_and_integral():
    rng = np.random.default_rng(11)
    y, mu = rng.normal(size=6), rng.normal(size=6)
    sigma = rng.uniform(0.2, 3.0, size=6)
    ours = crps_normal(y, mu, sigma)
    np.testing.assert_allclose(ours, scoringrules.crps_normal(y, mu, sigma), rtol=1e-12)
    np.testing.assert_allclose(ours, properscoring.crps_gaussian(y, mu, sigma), rtol=1e-12)
    for i in range(6):
        dist = stats.norm(mu[i], sigma[i])
        assert ours[i] == pytest.approx(_crps_by_integral(dist.cdf, dist.sf, y[i]), rel=1e-9)


@pytest.mark.parametrize(
    ("y", "loc", "scale", "df"),
    [(0.0, 0.0, 1.0, 3.0), (1.7, 0.2, 0.5, 1.5), (-2.0, 1.0, 2.0, 5.0), (4.0, 4.1, 0.05, 30.0)],
)
def test_t_matches_scoringrules_and_integral(y, loc, scale, df):
    ours = crps_t(y, loc, scale, df)
    # scoringrules 0.10 argument order is (obs, df, location, scale)
    assert ours == pytest.approx(float(scoringrules.crps_t(y, df, loc, scale)), rel=1e-10)
    dist = stats.t(df, loc, scale)
    assert ours == pytest.approx(_crps_by_integral(dist.cdf, dist.sf, y), rel=1e-8)


def test_t_vectorised_and_limits():
    y = np.array([0.5, -1.0, 2.0])
    out = crps_t(y, 0.0, 1.0, np.array([4.0, np.inf, 0.8]))
    assert out[0] == pytest.approx(float(scoringrules.crps_t(0.5, 4.0)), rel=1e-10)
    assert out[1] == pytest.approx(float(crps_normal(-1.0, 0.0, 1.0)), rel=1e-14)
    assert np.isinf(out[2])  # no finite mean for df <= 1, so no finite CRPS
    # large df approaches the normal (the t tends to the normal as df -> infinity)
    assert crps_t(0.3, 0.0, 1.0, 1e7) == pytest.approx(crps_normal(0.3, 0.0, 1.0), rel=1e-6)


def test_zero_scale_is_point_forecast():
    assert crps_normal(3.0, 1.0, 0.0) == pytest.approx(2.0)
    assert crps_t(3.0, 1.0, 0.0, 4.0) == pytest.approx(2.0)


def test_closed_forms_reject_bad_parameters():
    with pytest.raises(ValueError, match="scale"):
        crps_normal(0.0, 0.0, -1.0)
    with pytest.raises(ValueError, match="scale"):
        crps_t(0.0, 0.0, -1.0, 3.0)
    with pytest.raises(ValueError, match="df"):
        crps_t(0.0, 0.0, 1.0, 0.0)


# --- draws from a log-t ---------------------------------------------------------------


def test_quantile_draws_normal_reference_value():
    # Reference note (datasets-and-scoring.md): a quantile ensemble of N(0,1) with
    # m = 20000 at y = 0 gives CRPS 0.2336949795 (plain estimator). With df = inf and
    # loc = 0, scale = 1 the log of the draws is exactly that ensemble.
    draws = draws_from_log_t(0.0, 1.0, np.inf, 20000)
    assert crps_ensemble(0.0, np.log(draws)) == pytest.approx(0.2336949795, abs=1e-10)


def test_quantile_draws_are_t_quantiles():
    draws = draws_from_log_t([1.0, 2.0], [0.1, 0.3], 5.0, 9)
    assert draws.shape == (2, 9)
    u = (np.arange(9) + 0.5) / 9
    # scipy.stats.t.ppf with scipy's own loc/scale, then exp
    np.testing.assert_allclose(draws[1], np.exp(stats.t.ppf(u, 5.0, loc=2.0, scale=0.3)))
    assert draws[0, 4] == pytest.approx(np.exp(1.0))  # middle quantile = median = e^loc


def test_quantile_draws_log_scale_crps_converges_to_closed_form():
    # On the log scale the draws are a quantile ensemble of the t; its plain CRPS should
    # approach the closed form (Jordan, Krüger & Lerch 2019, JSS 90(12)) as m grows.
    # Observed relative error at m = 4000 is at most 2.6e-7; the bound 1e-6 leaves a
    # margin of about 4, and the error must shrink from m = 1000 to m = 4000.
    y = np.array([0.9, 1.2, 1.5])
    exact = crps_t(y, 1.1, 0.2, 5.0)
    err = {
        m: np.abs(crps_ensemble(y, np.log(draws_from_log_t(1.1, 0.2, 5.0, m))) / exact - 1)
        for m in (1000, 4000)
    }
    assert np.all(err[4000] < 1e-6)
    assert np.all(err[4000] < err[1000])


def test_random_draws_follow_the_t():
    rng = np.random.default_rng(5)
    draws = draws_from_log_t(0.5, 0.2, 4.0, 5000, rng=rng)
    z = (np.log(draws) - 0.5) / 0.2
    # Seeded KS test against scipy's t(4); a wrong distribution (e.g. normal) gives
    # p < 1e-6 at this size, a right one p ~ Uniform(0, 1).
    assert stats.kstest(z, stats.t(4).cdf).pvalue > 0.01
    normal = draws_from_log_t(0.0, 1.0, np.inf, 5000, rng=np.random.default_rng(6))
    assert stats.kstest(np.log(normal), "norm").pvalue > 0.01


def test_draws_reject_bad_n():
    for n in (0, 2.5, True):
        with pytest.raises(ValueError, match="n"):
            draws_from_log_t(0.0, 1.0, 3.0, n)
