"""Means that overflow are left empty (NaN), and the caution says from which period."""

from __future__ import annotations

import numpy as np
import pandas as pd

from bayesgrowth.forecast.bands import draws_table
from bayesgrowth.forecast.means import mean_caution


def test_a_column_of_draws_whose_sum_overflows_has_no_mean():
    # two draws of 1e308 sum past the largest double (about 1.8e308, IEEE 754)
    draws = np.array([[1.0, 1e308], [3.0, 1e308], [2.0, 1.0]])
    with np.errstate(all="raise"):  # and no floating-point warning reaches the user
        table = draws_table(["1", "2"], draws, draws, (80,))
    assert table["mean"].iloc[0] == 2.0 and np.isnan(table["mean"].iloc[1])
    assert np.isfinite(table["median"]).all()


def test_the_caution_names_the_first_period_above_the_band_and_the_first_empty_one():
    table = pd.DataFrame({"period": ["2026Q1", "2026Q2", "2026Q3", "2026Q4"],
                          "mean": [10.0, 30.0, 5e9, np.nan],
                          "upper_80": [12.0, 20.0, 40.0, 80.0],
                          "upper_95": [15.0, 35.0, 60.0, 120.0]})
    text = mean_caution(table, (80, 95))  # the widest band is the yardstick
    assert text.startswith("The predictive mean lies above the 95% band's upper end from "
                           "period 2026Q3 and is too large to compute from period 2026Q4 on")
    assert mean_caution(table.iloc[:2], (80, 95)) is None
    only_empty = table.assign(mean=[10.0, 30.0, np.nan, np.nan])
    assert "is too large to compute from period 2026Q3 on" in mean_caution(only_empty, (95,))
