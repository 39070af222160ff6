import numpy as np
import pytest
from scipy import stats

from bayesgrowth.scoring.draws import draws_from_log_t
from bayesgrowth.scoring.pit import pit, pit_histogram, pit_log_t, pit_t, pit_uniformity


def test_pit_hand_values_with_ties():
    draws = [1.0, 2.0, 2.0, 3.0]
    # one draw below 2, two tied (count half each): (1 + 1) / 4 = 0.5
    assert pit(2.0, draws) == pytest.approx(0.5)
    assert pit(0.0, draws) == 0.0
    assert pit(5.0, draws) == 1.0
    assert pit(2.5, draws) == pytest.approx(0.75)
    assert np.isnan(pit(np.nan, draws))


def test_pit_uniform_when_outcomes_come_from_the_forecast():
    rng = np.random.default_rng(2024)
    n, m = 2000, 400
    draws = rng.normal(size=(n, m))
    y = rng.normal(size=n)
    values = pit(y, draws)
    assert values.shape == (n,)
    # Under calibration PIT ~ Uniform(0, 1) (Dawid 1984, JRSS A 147:278-292), up to the
    # 1/m discreteness. Mean within 4 standard errors (sd of U(0,1) is 1/sqrt(12)):
    # a correct implementation fails this for about 6 seeds in 100 000.
    assert abs(values.mean() - 0.5) < 4 / np.sqrt(12 * n)
    # KS p-value: Uniform(0, 1) under calibration; 0.001 would be crossed by chance once
    # in a thousand seeds.
    assert pit_uniformity(values) > 1e-3


def test_pit_detects_mis_scaled_forecast():
    # Outcomes twice as spread as the forecast: U-shaped PIT, KS rejects strongly.
    rng = np.random.default_rng(99)
    draws = rng.normal(size=(500, 400))
    y = 2.0 * rng.normal(size=500)
    values = pit(y, draws)
    assert pit_uniformity(values) < 1e-6
    counts = pit_histogram(values, bins=10)
    # Calibrated: 100 expected in the two end bins together. Here each end bin holds
    # P(2Z < -1.2816) = Phi(-0.6408) = 0.26 of the outcomes, about 260 together.
    assert counts[0] + counts[-1] > 200


def test_pit_uniformity_matches_exact_ks_distribution():
    # KS statistic D = max(i/n - u_(i), u_(i) - (i-1)/n) (Kolmogorov 1933) and its exact
    # null distribution scipy.stats.kstwo (Simard & L'Ecuyer 2011, JSS 39(11)).
    rng = np.random.default_rng(4)
    u = np.sort(rng.beta(1.3, 1.0, size=60))
    i = np.arange(1, 61)
    d = max(np.max(i / 60 - u), np.max(u - (i - 1) / 60))
    assert pit_uniformity(np.append(u, np.nan)) == pytest.approx(stats.kstwo.sf(d, 60), rel=1e-6)
    assert np.isnan(pit_uniformity([np.nan]))


def test_pit_t_and_log_t_match_scipy():
    y = np.array([-1.0, 0.2, 3.0])
    np.testing.assert_allclose(
        pit_t(y, 0.5, 2.0, 4.0), stats.t(4.0, loc=0.5, scale=2.0).cdf(y), rtol=1e-13
    )
    rev = np.array([90.0, 100.0, 125.0])
    np.testing.assert_allclose(
        pit_log_t(rev, np.log(100.0), 0.1, 6.0),
        stats.t(6.0, loc=np.log(100.0), scale=0.1).cdf(np.log(rev)),
        rtol=1e-13,
    )
    assert pit_log_t(100.0, np.log(100.0), 0.1, 6.0) == pytest.approx(0.5)
    assert pit_log_t(0.0, 1.0, 0.1, 6.0) == 0.0


def test_pit_from_quantile_draws_agrees_with_closed_form():
    # n quantile-spaced draws put the PIT within 1/n of the exact CDF value.
    rev = np.array([90.0, 100.0, 125.0])
    draws = draws_from_log_t(np.log(100.0), 0.1, 6.0, 1000)
    exact = pit_log_t(rev, np.log(100.0), 0.1, 6.0)
    assert np.all(np.abs(pit(rev, draws) - exact) <= 1 / 1000)


def test_histogram_counts_and_validation():
    counts = pit_histogram([0.0, 0.05, 0.1, 0.55, 0.95, 1.0, np.nan], bins=10)
    # edges 0, 0.1, ..., 1; 0.1 opens the second bin, 1.0 falls in the last bin
    assert counts.tolist() == [2, 1, 0, 0, 0, 1, 0, 0, 0, 2]
    with pytest.raises(ValueError, match=r"\[0, 1\]"):
        pit_histogram([1.2])
    with pytest.raises(ValueError, match="bins"):
        pit_histogram([0.5], bins=0)
