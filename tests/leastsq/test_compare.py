"""The comparison table, its spread and the Bayesian columns."""

from __future__ import annotations

import numpy as np
import pytest

from bayesgrowth.leastsq import compare_fits, fit_table, fit_variants, forecast_spread

T = np.arange(8.0)
Y = 1200.0 * 1.05**T * np.exp(np.random.default_rng(31).normal(0.0, 0.06, T.size))  # invented
BASE_COLUMNS = [
    "variant",
    "n_points",
    "initial_value",
    "growth_per_period",
    "value_at_horizon",
    "r_squared",
    "rmse",
]


def test_table_rows_and_columns():
    table = compare_fits(T, Y, 4)
    assert list(table.columns) == BASE_COLUMNS
    # 4 whole-series fits, 3 + 3 window fits (K = min(3, 8 - 3)), 8 leave-one-out fits.
    assert len(table) == 4 + 3 + 3 + 8
    assert table["variant"].is_unique
    assert table["variant"].iloc[:4].tolist() == [
        "log-linear",
        "revenue-scale",
        "log-linear, anchored",
        "revenue-scale, anchored",
    ]
    assert table.loc[table["variant"] == "log-linear, drop last 2", "n_points"].item() == 6
    fits = fit_variants(T, Y)
    np.testing.assert_allclose(table["value_at_horizon"], [f.forecast(4) for f in fits])
    assert table.attrs["t_target"] == T[-1] + 4


def test_exact_growth_has_no_spread():
    # Hand check: y = 100 * 1.1**t exactly, so every variant recovers g = 0.10 and forecasts
    # 100 * 1.1**(5 + 3) at t = 8.
    t = np.arange(6.0)
    table = compare_fits(t, 100.0 * 1.1**t, 3)
    np.testing.assert_allclose(table["growth_per_period"], 0.10, rtol=1e-10)
    np.testing.assert_allclose(table["value_at_horizon"], 100.0 * 1.1**8, rtol=1e-10)
    np.testing.assert_allclose(table.attrs["spread"]["max_over_min"], 1.0, rtol=1e-10)


def test_spread_in_attrs_and_function_agree():
    table = compare_fits(T, Y, 6, max_drop=2)
    spread = forecast_spread(table)
    assert table.attrs["spread"] == spread
    values = table["value_at_horizon"].to_numpy()
    assert spread["min"] == values.min() and spread["max"] == values.max()
    assert spread["max_over_min"] == pytest.approx(values.max() / values.min(), rel=1e-15)
    assert spread["max_over_min"] > 1.0
    lowest = table.loc[table["value_at_horizon"].idxmin(), "variant"]
    assert spread["lowest_variant"] == lowest
    plain = forecast_spread([2.0, 5.0, 4.0])
    assert plain == {"min": 2.0, "max": 5.0, "max_over_min": 2.5}


def test_bayesian_columns_and_prob_at_least():
    # Draws 0, 1, ..., 100: the median is 50 and the equal-tailed 50 % and 80 % intervals are
    # [25, 75] and [10, 90] exactly (linear-interpolation quantiles of an even grid).
    draws = np.arange(101.0)
    fits = fit_variants(T, Y)
    table = fit_table(fits, 3, predictive_draws=draws, levels=(50, 80))
    assert list(table.columns) == BASE_COLUMNS + [
        "bayes_median",
        "bayes_lower_50",
        "bayes_upper_50",
        "bayes_lower_80",
        "bayes_upper_80",
        "prob_at_least",
    ]
    assert (table["bayes_median"] == 50.0).all()
    assert (table[["bayes_lower_50", "bayes_upper_50"]].to_numpy() == [25.0, 75.0]).all()
    assert (table[["bayes_lower_80", "bayes_upper_80"]].to_numpy() == [10.0, 90.0]).all()
    # The forecasts are around 1200 * 1.05**10, above every draw: probability 0.
    assert (table["prob_at_least"] == 0.0).all()


def test_prob_at_least_counts_ties_and_order():
    fits = fit_variants(T, Y)
    forecasts = np.array([f.forecast(5) for f in fits])
    lo, hi = forecasts.min(), forecasts.max()
    # Ten draws: four at exactly the lowest forecast, three far below, three far above.
    draws = np.array([lo] * 4 + [lo / 10] * 3 + [hi * 10] * 3)
    table = compare_fits(T, Y, 5, predictive_draws=draws)
    at_lowest = table.loc[table["value_at_horizon"] == lo, "prob_at_least"]
    assert (at_lowest == 0.7).all()  # ties count as "at least"
    above_lowest = table.loc[table["value_at_horizon"] > lo, "prob_at_least"]
    assert (above_lowest == 0.3).all()
    assert {"bayes_lower_95", "bayes_upper_95"} <= set(table.columns)


def test_anchored_variants_skipped_when_reference_not_observed():
    table = compare_fits(T, Y, 2, t_ref=-1.0)
    assert not table["variant"].str.contains("anchored").any()
    assert len(table) == 2 + 3 + 3 + 8


@pytest.mark.parametrize("draws", [np.array([]), np.ones((3, 2)), np.array([1.0, np.nan])], ids=str)
def test_bad_draws_rejected(draws):
    with pytest.raises(ValueError, match="predictive_draws"):
        compare_fits(T, Y, 2, predictive_draws=draws)


def test_negative_horizon_rejected():
    with pytest.raises(ValueError, match="horizon"):
        compare_fits(T, Y, -1)
