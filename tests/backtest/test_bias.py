"""Bias verdicts: outcomes below and above a band, with the exact binomial check."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats

from bayesgrowth.backtest import backtest
from bayesgrowth.scoring.bias import (
    BIAS_HIGH,
    BIAS_LOW,
    FEW_OUTCOMES,
    NO_CLEAR_BIAS,
    band_bias,
)


def _band(values_below: int, values_above: int, inside: int):
    y = np.r_[np.zeros(values_below), np.full(values_above, 3.0), np.ones(inside)]
    return y, np.full(y.size, 0.5), np.full(y.size, 2.0)


def test_counts_and_the_binomial_p_value_by_hand():
    # 7 below, 3 above: two-sided exact binomial p for 7 of 10 at 1/2 is
    # 2 * (C(10,7) + C(10,8) + C(10,9) + C(10,10)) / 2^10 = 2 * 176 / 1024 = 0.34375
    # (the binomial distribution; scipy.stats.binomtest computes the same).
    y, lo, hi = _band(7, 3, 30)
    b = band_bias(y, lo, hi, 80)
    assert (b.n, b.below, b.above) == (40, 7, 3)
    assert b.share_below == pytest.approx(7 / 40) and b.share_above == pytest.approx(3 / 40)
    assert b.pvalue == pytest.approx(352 / 1024, rel=1e-12)
    assert b.pvalue == pytest.approx(stats.binomtest(7, 10, 0.5).pvalue, rel=1e-12)
    assert b.verdict == NO_CLEAR_BIAS
    # 0 below, 9 above: p = 2 / 2^9 = 0.00390625 (both tails of the symmetric binomial)
    high = band_bias(*_band(0, 9, 33), 80)
    assert high.pvalue == pytest.approx(2 / 512, rel=1e-12) and high.verdict == BIAS_LOW
    low = band_bias(*_band(10, 1, 20), 80)
    assert low.verdict == BIAS_HIGH and "mostly below" in low.sentence()


def test_no_misses_few_outcomes_and_missing_rows():
    none = band_bias(*_band(0, 0, 12), 95)
    assert none.pvalue == 1.0 and none.verdict == NO_CLEAR_BIAS
    few = band_bias(*_band(5, 0, 3), 80)
    assert few.verdict == FEW_OUTCOMES and few.below == 5
    y, lo, hi = _band(2, 2, 10)
    lo[0] = np.nan  # a point forecast's missing band is left out
    b = band_bias(y, lo, hi, 80)
    assert (b.n, b.below) == (13, 1)
    empty = band_bias([], [], [], 80)
    assert empty.n == 0 and math.isnan(empty.share_below)


def test_simulated_shifted_forecasts_are_caught_and_calibrated_ones_pass():
    # Outcomes N(0.6, 1) against the 80% band of N(0, 1): misses fall above about 3.3 times
    # as often as below (P(Z > 1.28 - 0.6) = 0.248 against P(Z < -1.28 - 0.6) = 0.030), so
    # with 400 outcomes the test flags forecasts too low. Calibrated: no verdict (seeded).
    rng = np.random.default_rng(5)
    q = stats.norm.ppf(0.9)
    lo, hi = np.full(400, -q), np.full(400, q)
    shifted = band_bias(rng.normal(0.6, 1.0, 400), lo, hi, 80)
    assert shifted.verdict == BIAS_LOW and shifted.pvalue < 1e-6
    calibrated = band_bias(rng.normal(0.0, 1.0, 400), lo, hi, 80)
    assert calibrated.verdict == NO_CLEAR_BIAS


def test_backtest_bias_table_agrees_with_the_coverage(demo):
    r = backtest(demo, models="default,exponential,revenue-scale", horizon=2, min_train=12)
    table = r.bias()
    assert set(table["method"]) == {"default", "exponential"}  # the point forecast has no band
    overall = table[table["step"] == "all"].set_index(["method", "level"])
    scores = r.scores[r.scores["step"] == "all"].set_index("method")
    for (method, level), row in overall.iterrows():
        inside = 1 - row["share_below"] - row["share_above"]
        assert inside == pytest.approx(scores.loc[method, f"coverage_{level}"], abs=1e-12)
    per_step = table[(table["step"] != "all") & (table["level"] == 80)]
    sums = per_step.groupby("method")[["n", "below", "above"]].sum()
    for method in sums.index:
        np.testing.assert_array_equal(sums.loc[method].to_numpy(),
                                      overall.loc[(method, 80), ["n", "below", "above"]])
    lines = r.bias_lines()
    assert [line.split(":")[0] for line in lines] == ["default", "exponential"]
    assert all("80% band:" in line and "binomial test" in line for line in lines)
    with pytest.raises(ValueError, match="level 90"):
        r.bias_lines(90)
