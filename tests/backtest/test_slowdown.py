"""The slowdown warning: the model's first forecast step against the latest growth."""

from __future__ import annotations

import math
import warnings

import numpy as np
import pandas as pd
import pytest

from bayesgrowth.config import DEFAULT_MODEL
from bayesgrowth.data import read_series
from bayesgrowth.forecast import forecast
from bayesgrowth.forecast.misfit import misfit_lines, slowdown_check, slowdown_warning
from bayesgrowth.inference import fit_series

QUARTERS = [f"{2019 + i // 4}Q{i % 4 + 1}" for i in range(40)]


def _series(values, drop=(), name="s"):
    frame = pd.DataFrame({"period": QUARTERS[:len(values)], "value": values}).drop(index=list(drop))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # gaps
        return read_series(frame, name=name)


def _forecast(series, **options):
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return forecast(fit_series(series, engine="exact", seed=1, **options), 4)


def _slowing(seed: int):
    """15 quarters of 10% growth, then 7 of 1%, with 2% noise (an invented business)."""
    rng = np.random.default_rng(seed)
    g = np.r_[np.full(15, 0.10), np.full(7, 0.01)]
    return _series(1000 * np.exp(np.r_[0, np.cumsum(np.log1p(g))] + rng.normal(0, 0.02, 23)),
                   name="slowing")


def _steady(seed: int):
    rng = np.random.default_rng(seed)
    return _series(1000 * np.exp(np.log1p(0.06) * np.arange(23) + rng.normal(0, 0.03, 23)),
                   name="steady")


def test_the_rule_by_hand_without_seasons():
    s = _slowing(3)
    fc = _forecast(s, model="exponential")
    c = slowdown_check(fc)
    y = s.values
    # mean growth over the last 4 periods, carried one period on: y_T (y_T / y_{T-4})^(1/4)
    assert c.basis == "per period" and c.window == 4
    assert c.recent_growth == pytest.approx((y[-1] / y[-5]) ** 0.25 - 1, rel=1e-12)
    assert c.pace_value == pytest.approx(y[-1] * (y[-1] / y[-5]) ** 0.25, rel=1e-12)
    row = fc.table.iloc[0]
    assert (c.median, c.lower, c.upper) == (row["median"], row["lower_80"], row["upper_80"])
    assert c.implied_growth == pytest.approx(row["median"] / y[-1] - 1, rel=1e-12)
    assert c.flagged == (c.pace_value < row["lower_80"])
    # a level the forecast lacks comes from the draws' quantiles
    c90 = slowdown_check(fc, level=90)
    assert c90.lower == pytest.approx(np.quantile(fc.draws[:, 0], 0.05), rel=1e-12)


def test_the_rule_by_hand_with_seasons_and_a_gap():
    rng = np.random.default_rng(8)
    season = np.tile([0.0, 0.1, -0.05, -0.05], 6)
    s = _series(1000 * np.exp(0.03 * np.arange(24) + season + rng.normal(0, 0.01, 24)))
    fc = _forecast(s, **DEFAULT_MODEL)
    assert fc.fit.spec.seasonal
    c = slowdown_check(fc)
    y = s.values
    # same quarter a year before the first forecast period, grown by the latest
    # year-on-year growth: y_{T-3} * y_T / y_{T-4}
    assert c.basis == "year on year" and c.window == 4
    assert c.pace_value == pytest.approx(y[-4] * y[-1] / y[-5], rel=1e-12)
    assert c.recent_growth == pytest.approx(y[-1] / y[-5] - 1, rel=1e-12)
    assert c.implied_growth == pytest.approx(c.median / y[-4] - 1, rel=1e-12)
    # without the quarter a year before the first forecast period there is no verdict
    gap = _series(s.values, drop=[20])
    assert slowdown_check(_forecast(gap, **DEFAULT_MODEL)) is None


def test_gaps_count_as_the_periods_they_span():
    s = _series(1000 * 1.05 ** np.arange(12), drop=[9])
    c = slowdown_check(_forecast(s, model="exponential"))
    # window from t = 7 (the earliest observation at or after t_last - 4) to t = 11
    assert c.window == 4 and c.recent_growth == pytest.approx(0.05, rel=1e-10)


@pytest.mark.parametrize("seed", [3, 4, 5])
def test_an_exponential_curve_on_a_slowing_series_is_flagged_the_default_is_not(seed):
    s = _slowing(seed)
    exp_fc = _forecast(s, model="exponential")
    text = slowdown_warning(exp_fc)
    assert text is not None and text.startswith("slowdown: over the last 4 periods")
    c = slowdown_check(exp_fc)
    assert c.implied_growth > 0.2 and c.recent_growth < 0.03  # the jump the issue describes
    assert misfit_lines(exp_fc) == [f"warning: {text}"]
    assert slowdown_warning(_forecast(s, **DEFAULT_MODEL)) is None


@pytest.mark.parametrize("seed", [3, 4, 5])
def test_steady_growth_raises_no_warning(seed):
    s = _steady(seed)
    for options in ({"model": "exponential"}, DEFAULT_MODEL):
        assert misfit_lines(_forecast(s, **options)) == []


def test_bad_settings():
    fc = _forecast(_steady(1), model="exponential")
    with pytest.raises(ValueError, match="recent must be at least 1"):
        slowdown_check(fc, recent=0)
    assert math.isfinite(slowdown_check(fc, recent=1).recent_growth)


def test_a_wide_band_does_not_hide_a_median_far_ahead_of_the_recent_pace():
    # growth fading smoothly from 13% to about 1% a quarter (invented): the exponential
    # curve's band is wide enough to hold the recent pace, but its median runs >10% ahead
    import bayesgrowth as bg
    from bayesgrowth.data.periods import PeriodAxis
    from bayesgrowth.data.series import GrowthSeries

    v, values = 1000.0, []
    for i in range(24):
        v *= 1 + 0.12 * math.exp(-i / 5) + 0.01
        values.append(v)
    s = GrowthSeries(values=np.asarray(values), t=np.arange(24),
                     axis=PeriodAxis(style="quarter", step=1, origin=2019 * 4))
    fc = bg.GrowthModel(model="exponential", seasonal=False, seed=1).fit(s).forecast(4)
    c = slowdown_check(fc)
    assert c.pace_value >= c.lower  # inside the 80% band ...
    assert c.pace_value < c.lower_50 and c.median > 1.1 * c.pace_value  # ... yet far behind
    assert c.flagged and "runs more than 10% ahead" in slowdown_warning(fc)
    assert slowdown_warning(bg.GrowthModel(seed=1).fit(s).forecast(4)) is None


def test_the_advice_fits_the_model_it_is_given_for():
    # Three years of about 10% growth, then the value falls to a twelfth (invented): the
    # default local trend is flagged too, and must not be told to try itself.
    from bayesgrowth.data.periods import PeriodAxis
    from bayesgrowth.data.series import GrowthSeries

    s = GrowthSeries(values=np.array([100.0, 110.0, 120.0, 10.0]), t=np.arange(4),
                     axis=PeriodAxis(style="year", step=1, origin=2024), name="drop")
    default = slowdown_warning(_forecast(s, **DEFAULT_MODEL))
    assert default is not None and "(the default damped local trend)" not in default
    assert "its growth rate can change" in default
    curve = slowdown_warning(_forecast(s, model="exponential"))
    assert curve is not None and "(the default damped local trend)" in curve
