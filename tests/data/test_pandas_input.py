"""What a notebook hands the API: DataFrames indexed by period, and things that are no series."""

import warnings

import numpy as np
import pandas as pd
import pytest

import bayesgrowth as bg
from bayesgrowth.data import InputError, read_series


@pytest.fixture(scope="module")
def table(demo):
    return demo.to_frame()[["period", "value"]]


@pytest.mark.parametrize("data", [[10.0, 12.0, 15.0], np.array([10.0, 12.0, 15.0]),
                                  {"2024Q1": 10.0}, None, 12])
def test_values_that_are_no_series_are_refused_naming_the_argument(data):
    with pytest.raises(TypeError, match=r"^data must be a CSV or Excel file path, a DataFrame "
                                        r"or a Series, not \w+; pass a pandas Series"):
        read_series(data)
    with pytest.raises(TypeError, match=r"^data must be"):
        bg.GrowthModel().fit(data)
    with pytest.raises(TypeError, match=r"^series must be"):
        bg.fit_series(data, engine="exact", model="exponential")


@pytest.mark.parametrize("index", ["period", "datetime"])
def test_a_frame_indexed_by_period_reads_like_its_period_column(demo, table, index):
    periods = pd.PeriodIndex(table["period"], freq="Q")
    frame = pd.DataFrame({"revenue": table["value"].to_numpy()},
                         index=periods if index == "period" else periods.to_timestamp())
    from_column = read_series(table if index == "period" else pd.DataFrame(
        {"period": frame.index.astype(str), "value": table["value"]}))
    s = read_series(frame)
    assert s.labels == from_column.labels
    np.testing.assert_array_equal(s.values, demo.values)
    assert s.future_labels(1) == from_column.future_labels(1)


def test_a_frame_indexed_by_period_with_several_columns_asks_which(table):
    frame = pd.DataFrame({"north": table["value"].to_numpy(),
                          "south": 2 * table["value"].to_numpy()},
                         index=pd.PeriodIndex(table["period"], freq="Q"))
    with pytest.raises(InputError, match=r"^DataFrame: the index holds the periods, but no "
                                         r"column is named 'value' \(columns are 'north', "
                                         r"'south'\); name the column to forecast with "
                                         r"value_col="):
        read_series(frame)
    np.testing.assert_array_equal(read_series(frame, value_col="south").values,
                                  2 * table["value"].to_numpy())


def test_a_frame_without_its_columns_names_the_python_argument(table):
    frame = table.rename(columns={"period": "quarter"})
    with pytest.raises(InputError, match=r"no column 'period' .*with period_col=") as caught:
        read_series(frame)
    assert "--period-col" not in str(caught.value)
    with pytest.raises(InputError, match=r"no column 'value' .*with value_col="):
        read_series(table.rename(columns={"value": "amount"}))


def test_every_entry_point_reads_a_frame_as_the_series_it_holds(demo, table):
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        by_frame = bg.backtest(table, horizon=2, min_train=16, methods=["naive"])
    by_series = bg.backtest(demo, horizon=2, min_train=16, methods=["naive"])
    pd.testing.assert_frame_equal(by_frame.scores, by_series.scores)
    fit = bg.fit_series(table.set_index("period")["value"], engine="exact", seed=3,
                        model="exponential")
    np.testing.assert_array_equal(fit.series.values, demo.values)
    np.testing.assert_array_equal(
        fit.derived()["growth_per_period"],
        bg.fit_series(demo, engine="exact", seed=3,
                      model="exponential").derived()["growth_per_period"])
    prior = bg.prior_predictive(table, 2, seed=1)
    assert prior.series.labels == demo.labels
