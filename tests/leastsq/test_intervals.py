"""Classical log-linear intervals against statsmodels and the Student t formula."""

from __future__ import annotations

import numpy as np
import pytest
import statsmodels.api as sm
from scipy import stats

from bayesgrowth.leastsq import (
    fit_log_linear,
    fit_log_linear_anchored,
    fit_revenue_scale,
    log_linear_intervals,
    log_linear_predictive,
)

T = np.array([0.0, 1.0, 2.0, 4.0, 5.0, 6.0, 7.0, 9.0])  # gaps at 3 and 8
T_FUTURE = np.array([10.0, 11.0, 14.0])
LEVELS = (50, 80, 95)


def _series(seed: int) -> np.ndarray:
    # Invented values.
    rng = np.random.default_rng(seed)
    return 40.0 * 1.05**T * np.exp(rng.normal(0.0, 0.1, T.size))


@pytest.mark.parametrize("t_ref", [None, 5.0])
def test_intervals_match_statsmodels_get_prediction(t_ref):
    # Source: statsmodels OLS(...).get_prediction(exog).summary_frame(alpha): mean_ci_* is the
    # confidence interval of the mean and obs_ci_* the prediction interval, both on the log
    # scale. Double-precision agreement to rtol 1e-10 (common practice).
    y = _series(11)
    fit = fit_log_linear(T, y, t_ref=t_ref)
    ref_t = T[0] if t_ref is None else t_ref
    res = sm.OLS(np.log(y), sm.add_constant(T - ref_t)).fit()
    exog = sm.add_constant(T_FUTURE - ref_t, has_constant="add")
    table = log_linear_intervals(fit, T_FUTURE, levels=LEVELS)
    np.testing.assert_array_equal(table["t"], T_FUTURE)
    frame = res.get_prediction(exog).summary_frame(alpha=0.05)
    np.testing.assert_allclose(np.log(table["fitted"]), frame["mean"], rtol=1e-10)
    for level in LEVELS:
        frame = res.get_prediction(exog).summary_frame(alpha=1 - level / 100)
        for ours, theirs in [
            (f"confidence_lower_{level}", "mean_ci_lower"),
            (f"confidence_upper_{level}", "mean_ci_upper"),
            (f"prediction_lower_{level}", "obs_ci_lower"),
            (f"prediction_upper_{level}", "obs_ci_upper"),
        ]:
            np.testing.assert_allclose(np.log(table[ours]), frame[theirs], rtol=1e-10)


def test_predictive_distribution_matches_statsmodels():
    # Source: statsmodels summary_frame: the prediction standard error is
    # sqrt(mean_se**2 + scale) and the obs interval uses Student t with df_resid.
    y = _series(12)
    fit = fit_log_linear(T, y)
    res = sm.OLS(np.log(y), sm.add_constant(T - T[0])).fit()
    exog = sm.add_constant(T_FUTURE - T[0], has_constant="add")
    frame = res.get_prediction(exog).summary_frame(alpha=0.1)
    pred = log_linear_predictive(fit, T_FUTURE)
    assert list(pred.columns) == ["t", "loc", "scale", "df"]
    np.testing.assert_allclose(pred["loc"], frame["mean"], rtol=1e-10)
    np.testing.assert_allclose(
        pred["scale"], np.sqrt(frame["mean_se"] ** 2 + res.scale), rtol=1e-10
    )
    assert (pred["df"] == res.df_resid).all()
    upper = stats.t.ppf(0.95, pred["df"], loc=pred["loc"], scale=pred["scale"])
    np.testing.assert_allclose(upper, frame["obs_ci_upper"], rtol=1e-10)


def test_anchored_intervals_match_statsmodels_without_constant():
    # Source: statsmodels OLS without a constant of log(y / y_ref) on t - t_ref; its intervals
    # shifted by log(y_ref) are the anchored fit's intervals. rtol as in common practice.
    y = _series(13)
    fit = fit_log_linear_anchored(T, y)
    res = sm.OLS(np.log(y / y[0]), (T - T[0])[:, None]).fit()
    frame = res.get_prediction((T_FUTURE - T[0])[:, None]).summary_frame(alpha=0.2)
    table = log_linear_intervals(fit, T_FUTURE, levels=[80])
    shift = np.log(y[0])
    np.testing.assert_allclose(
        np.log(table["confidence_lower_80"]) - shift, frame["mean_ci_lower"], rtol=1e-10
    )
    np.testing.assert_allclose(
        np.log(table["prediction_upper_80"]) - shift, frame["obs_ci_upper"], rtol=1e-10
    )


def test_interval_ordering_and_width_growth():
    y = _series(14)
    table = log_linear_intervals(fit_log_linear(T, y), T_FUTURE, levels=LEVELS)
    for level in LEVELS:
        lo, hi = table[f"prediction_lower_{level}"], table[f"prediction_upper_{level}"]
        assert (table[f"confidence_lower_{level}"] > lo).all()
        assert (table[f"confidence_upper_{level}"] < hi).all()
        # The log-scale width grows with distance from the mean of t.
        assert np.all(np.diff(np.log(hi / lo)) > 0)
    assert (table["prediction_upper_95"] > table["prediction_upper_50"]).all()


def test_intervals_need_a_log_scale_fit():
    fit = fit_revenue_scale(T, _series(15))
    with pytest.raises(ValueError, match="log-linear fits only"):
        log_linear_intervals(fit, T_FUTURE)
    with pytest.raises(ValueError, match="log-linear fits only"):
        log_linear_predictive(fit, T_FUTURE)


def test_levels_must_be_percentages():
    with pytest.raises(ValueError, match="percentages"):
        log_linear_intervals(fit_log_linear(T, _series(16)), T_FUTURE, levels=[0.95, 100])
