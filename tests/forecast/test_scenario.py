"""Scenario bands: the stated shift of every path, checked by its arithmetic.

Quantiles are equivariant under a shift: adding a constant c to every draw (or to
every component mean of a normal mixture) moves every quantile by exactly c (a
property of quantiles, any probability text). A -10% shock is a shift of log(0.9)
on the log scale, so it must move every later quantile by exactly log(0.9).
"""

import numpy as np
import pytest

from bayesgrowth.forecast.forecast import forecast
from bayesgrowth.forecast.scenario import Scenario, apply_scenario, scenario_shift
from bayesgrowth.inference import fit_series

QUANTILE_COLUMNS = ("median", "lower_50", "upper_50", "lower_80", "upper_80", "lower_95",
                    "upper_95", "curve_median", "curve_lower_95", "curve_upper_95")


@pytest.fixture(scope="module")
def local_trend_fc(demo):
    """The default model (exact mixture bands, seasonal factors)."""
    fit = fit_series(demo, engine="exact", seed=1, model="local-trend", seasonal=True,
                     drift="mean-reverting")
    assert fit.state_space is not None and fit.spec.seasonal
    return forecast(fit, 8)


@pytest.fixture(scope="module")
def exponential_fc(demo):
    """The exponential curve (bands from the draws, no seasons)."""
    return forecast(fit_series(demo, engine="exact", seed=1, model="exponential"), 8)


@pytest.mark.parametrize("which", ["local_trend_fc", "exponential_fc"])
def test_a_shock_moves_every_later_quantile_by_exactly_its_log(request, which):
    base = request.getfixturevalue(which)
    at = base.periods[3]
    shocked = apply_scenario(base, Scenario(shock_pct=-10, shock_at=at))
    for col in QUANTILE_COLUMNS:
        moved = np.log(shocked.table[col].to_numpy()) - np.log(base.table[col].to_numpy())
        np.testing.assert_allclose(moved[:3], 0.0, atol=1e-12, err_msg=col)
        np.testing.assert_allclose(moved[3:], np.log(0.9), atol=1e-12, err_msg=col)
    # Probabilities move with the paths: P(scenario >= 0.9 x) = P(base >= x).
    x = float(base.table["median"].iloc[-1])
    assert shocked.prob_exceeds(0.9 * x).iloc[-1] == pytest.approx(
        base.prob_exceeds(x).iloc[-1], abs=1e-9)


def test_growth_factor_one_changes_nothing(local_trend_fc):
    same = apply_scenario(local_trend_fc, Scenario(growth_factor=1.0))
    np.testing.assert_array_equal(same.draws, local_trend_fc.draws)
    assert same.table.equals(local_trend_fc.table)


def test_halved_growth_halves_each_step_of_the_median_path(exponential_fc):
    base = exponential_fc
    half = apply_scenario(base, Scenario(growth_factor=0.5, growth_from=base.periods[2]))
    b = np.log(base.table["median"].to_numpy())
    h = np.log(half.table["median"].to_numpy())
    np.testing.assert_allclose(h[:2], b[:2], atol=1e-12)
    np.testing.assert_allclose(np.diff(h)[1:], 0.5 * np.diff(b)[1:], atol=1e-12)


def test_stopped_growth_holds_the_median_at_the_last_observation(exponential_fc):
    base = exponential_fc
    flat = apply_scenario(base, Scenario(growth_factor=0.0))
    last = base.fit.series.values[-1]
    np.testing.assert_allclose(flat.table["median"].to_numpy(), last, rtol=1e-12)


def test_seasonal_growth_change_keeps_the_seasonal_swing(local_trend_fc):
    # With seasonal factors the growth that changes is the year-on-year growth, so the
    # shift is smooth: halving the period-on-period steps instead would also halve the
    # seasonal swing, making the shift's second differences half the median's.
    base = local_trend_fc
    shift = scenario_shift(base, Scenario(growth_factor=0.5))
    med = np.log(base.table["median"].to_numpy())
    swing = np.abs(np.diff(med, 2)).max()
    assert swing > 0.02  # the demo's quarters differ
    assert np.abs(np.diff(shift, 2)).max() < 0.25 * swing
    assert np.all(np.diff(shift) < 0)  # a growing series: halved growth only subtracts


def test_bad_scenarios_are_refused(local_trend_fc):
    with pytest.raises(ValueError, match="above -100"):
        Scenario(shock_pct=-100)
    with pytest.raises(ValueError, match="not a forecast period"):
        scenario_shift(local_trend_fc, Scenario(shock_pct=5, shock_at="1999Q1"))
