import numpy as np
import pytest
import scoringrules
from statsmodels.stats.proportion import proportion_confint

from bayesgrowth.scoring.intervals import (
    abs_pct_error,
    coverage,
    coverage_counts,
    coverage_interval,
    interval_score,
)


def test_interval_score_hand_value():
    # Gneiting & Raftery 2007, JASA 102:359-378, sec. 6.2:
    # (3 - 1) + (2 / 0.2)(5 - 3) = 22.
    assert interval_score(5.0, 1.0, 3.0, 0.2) == pytest.approx(22.0)
    # below the band: (3 - 1) + 10 (1 - 0) = 12; inside: width only.
    np.testing.assert_allclose(interval_score([0.0, 2.0], 1.0, 3.0, 0.2), [12.0, 2.0])


def test_interval_score_matches_scoringrules():
    rng = np.random.default_rng(23)
    y = rng.normal(size=200)
    centre = rng.normal(scale=0.5, size=200)
    half = rng.uniform(0.1, 2.0, size=200)
    for alpha in (0.05, 0.2, 0.5):
        np.testing.assert_allclose(
            interval_score(y, centre - half, centre + half, alpha),
            scoringrules.interval_score(y, centre - half, centre + half, alpha),
            rtol=1e-12,
        )


def test_interval_score_rejects_bad_alpha():
    for alpha in (0.0, 1.0, 80):
        with pytest.raises(ValueError, match="alpha"):
            interval_score(1.0, 0.0, 2.0, alpha)


def test_abs_pct_error_in_percent():
    # Hand values: |200 - 190| / 200 = 5%; |50 - 60| / 50 = 20%.
    np.testing.assert_allclose(abs_pct_error([200.0, 50.0], [190.0, 60.0]), [5.0, 20.0])
    assert np.isinf(abs_pct_error(0.0, 1.0))


def test_coverage_counts_limits_inside_and_nan_left_out():
    y = np.array([1.0, 2.0, 3.0, 4.0, np.nan, 2.5])
    lo = np.array([1.0, 2.5, 0.0, 0.0, 0.0, np.nan])
    hi = np.array([2.0, 3.0, 3.0, 3.9, 9.0, 3.0])
    # inside: y=1 on the lower limit, y=3 on the upper limit; outside: 2.0 and 4.0;
    # NaN outcome and NaN limit are not counted.
    assert coverage_counts(y, lo, hi) == (2, 4)
    assert coverage(y, lo, hi) == pytest.approx(0.5)
    assert np.isnan(coverage([np.nan], [0.0], [1.0]))


@pytest.mark.parametrize(("k", "n"), [(0, 12), (3, 12), (40, 50), (50, 50), (412, 520)])
@pytest.mark.parametrize("level", [0.95, 0.9])
def test_coverage_interval_matches_statsmodels(k, n, level):
    # statsmodels proportion_confint: method "beta" is Clopper-Pearson (Clopper & Pearson
    # 1934, Biometrika 26:404-413), "wilson" the Wilson score interval (Wilson 1927,
    # JASA 22:209-212).
    cp = proportion_confint(k, n, alpha=1 - level, method="beta")
    np.testing.assert_allclose(coverage_interval(k, n, level), cp, rtol=1e-10, atol=1e-14)
    wilson = proportion_confint(k, n, alpha=1 - level, method="wilson")
    np.testing.assert_allclose(
        coverage_interval(k, n, level, method="wilson"), wilson, rtol=1e-10, atol=1e-14
    )


def test_coverage_interval_contains_estimate_and_validates():
    low, high = coverage_interval(8, 10)
    assert low < 0.8 < high
    with pytest.raises(ValueError, match="k <= n"):
        coverage_interval(11, 10)
    with pytest.raises(ValueError, match="level"):
        coverage_interval(1, 10, level=95)
    with pytest.raises(ValueError, match="method"):
        coverage_interval(1, 10, method="normal")
