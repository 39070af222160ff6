"""Dates off the period grid are refused or named, never moved in silence.

A quarterly file with one date off the quarter months, dates two months apart, or
scattered months used to be read as monthly data with the months between missing; a
date on another day of the month was placed in its month without a word.
"""

from __future__ import annotations

import json
import warnings

import pytest

from bayesgrowth.cli import main
from bayesgrowth.data import read_series

QUARTER_STARTS = ["2020-01-01", "2020-04-01", "2020-07-01", "2020-10-01", "2021-01-01",
                  "2021-04-01", "2021-07-01", "2021-10-01"]


def _text(dates: list[str]) -> str:
    return "period,value\n" + "".join(f"{d},{100 + 5 * i}\n" for i, d in enumerate(dates))


def test_a_date_off_the_quarter_months_is_refused(refused):
    dates = QUARTER_STARTS.copy()
    dates[5] = "2021-02-17"  # row 7
    refused("sales.csv", _text(dates), "sales.csv, row 7, column 'period'", "'2021-02-17'",
            "off the quarterly grid", "Jan, Apr, Jul and Oct", "correct it")


def test_a_date_off_the_yearly_month_is_refused(refused):
    text = _text(["2017-12-31", "2018-12-31", "2019-12-31", "2020-09-30", "2021-12-31"])
    refused("years.csv", text, "row 5", "'2020-09-30'", "off the yearly grid", "December")


def test_dates_two_months_apart_are_refused(refused):
    text = _text(["2021-01-31", "2021-03-31", "2021-05-31", "2021-07-31", "2021-09-30"])
    refused("bimonthly.csv", text, "row 3", "2 months apart", "number the periods 1, 2, 3")


def test_scattered_months_are_refused(refused):
    text = _text(["2020-01-01", "2020-03-01", "2020-04-01", "2020-08-01", "2020-09-01",
                  "2021-01-01"])
    refused("scattered.csv", text, "row 7", "'2021-01-01'", "irregularly spaced",
            "7 of the 13 months")


def test_two_dates_in_one_quarter_are_named_as_such(refused):
    dates = ["2020-03-31", "2020-06-30", "2020-09-30", "2020-12-31", "2021-03-31",
             "2021-06-01", "2021-06-30"]
    refused("ends.csv", _text(dates), "row 8", "'2021-06-30' falls in the same quarter as row "
            "7 (2021-06-01)", "one value per quarter")


def test_monthly_data_with_a_few_gaps_stay_monthly():
    dates = ["2021-01-31", "2021-02-28", "2021-04-30", "2021-05-31", "2021-06-30"]
    with pytest.warns(UserWarning, match="1 missing period"):
        s = read_series(_frame(dates))
    assert s.axis.frequency == "monthly" and s.gaps == ("2021-03-31",)


def _frame(dates):
    import pandas as pd

    return pd.DataFrame({"period": dates, "value": [100 + 5 * i for i in range(len(dates))]})


@pytest.mark.parametrize(("dates", "row", "placed"), [
    (["2021-01-31", "2021-02-28", "2021-03-31", "2021-04-15", "2021-05-31", "2021-06-30"],
     5, "row 5 (2021-04-15) in 2021-04-30"),
    (QUARTER_STARTS[:2] + ["2020-07-15"] + QUARTER_STARTS[3:], 4,
     "row 4 (2020-07-15) in 2020-07-01"),
])
def test_a_date_on_another_day_is_placed_with_a_note(tmp_path, capsys, dates, row, placed):
    src = tmp_path / "days.csv"
    src.write_text(_text(dates))
    out = tmp_path / "out"
    assert main(["forecast", str(src), "-H", "1", "--out", str(out), "--quiet"]) == 0
    err = capsys.readouterr().err
    assert "note: days.csv: 1 date(s) on another day of the month" in err and placed in err
    notes = json.loads((out / "summary.json").read_text())["input"]["notes"]
    assert any(placed in n for n in notes)


def test_business_day_month_ends_need_no_note():
    dates = ["2021-01-29", "2021-02-26", "2021-03-31", "2021-04-30", "2021-05-31"]
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # no note at all
        s = read_series(_frame(dates))
    assert s.axis.frequency == "monthly" and s.notes == ()


def test_another_day_of_a_month_finds_that_month_in_a_monthly_series():
    s = read_series(_frame(["2024-01-31", "2024-02-29", "2024-03-31", "2024-04-30"]))
    # read with the first label alone, April was one quarter on, so February
    assert s.index_of("2024-04-15") == 3 and s.index_of("2024-03-01") == 2


def test_dates_on_any_day_of_each_month_are_monthly_without_a_note():
    # a date each month on no shared day: each is simply in its month, and a note naming
    # most of the rows as "on another day than the others" would name no real slip
    days = [5, 19, 2, 27, 3, 9, 4, 22, 14, 1, 25, 8]
    dates = [f"2022-{m:02d}-{d:02d}" for m, d in enumerate(days, start=1)]
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # no note at all
        s = read_series(_frame(dates))
    assert s.axis.frequency == "monthly" and s.n == 12 and s.notes == ()
