import numpy as np
import pandas as pd
import pytest

from bayesgrowth.data import InputError, read_series
from bayesgrowth.data.demo import demo_path
from bayesgrowth.data.make_demo import make_demo_frame


def _csv(tmp_path, text, name="in.csv"):
    path = tmp_path / name
    path.write_text(text)
    return path


def test_reads_sorts_and_reports_gaps(tmp_path):
    path = _csv(tmp_path, "period,value\n2024Q3,12\n2024Q1,10\n2025Q1,15\n")
    with pytest.warns(UserWarning, match="2 missing period"):
        s = read_series(path)
    assert s.labels == ["2024Q1", "2024Q3", "2025Q1"]
    np.testing.assert_array_equal(s.t, [0, 2, 4])
    np.testing.assert_array_equal(s.values, [10, 12, 15])
    assert s.gaps == ("2024Q2", "2024Q4")
    assert s.future_labels(2) == ["2025Q2", "2025Q3"]
    # a subset keeps the gaps inside its own span, and a dropped row becomes one
    assert s.take(np.array([0, 1])).gaps == ("2024Q2",)
    assert s.take(np.array([1, 2])).gaps == ("2024Q4",)
    assert s.take(np.array([0, 2])).gaps == ("2024Q2", "2024Q3", "2024Q4")


def test_other_column_names(tmp_path):
    path = _csv(tmp_path, "quarter,revenue\n2024Q1,1\n2024Q2,2\n2024Q3,3\n")
    s = read_series(path, period_col="quarter", value_col="revenue")
    assert s.n == 3


def test_dataframe_and_series_input():
    frame = pd.DataFrame({"period": ["2024-01", "2024-02", "2024-03"], "value": [1.0, 2, 3]})
    assert read_series(frame).future_labels(1) == ["2024-04"]
    ser = pd.Series([1.0, 2.0, 4.0], index=["2020", "2021", "2022"], name="units")
    s = read_series(ser)
    assert s.name == "units"
    assert s.axis.style == "year"


@pytest.mark.parametrize(
    ("text", "match"),
    [
        ("period,value\n2024Q1,10\n2024Q2,\n2024Q3,12\n",
         r"in\.csv, row 3, column 'value'.*missing"),
        ("period,value\n2024Q1,10\n2024Q2,abc\n2024Q3,12\n",
         r"row 3, column 'value'.*not a number"),
        ("period,value\n2024Q1,10\n2024Q2,0\n2024Q3,12\n", r"row 3.*not above zero.*> 0"),
        ("period,value\n2024Q1,10\n2024Q2,-5\n2024Q3,12\n", r"row 3.*not above zero"),
        ("period,value\n2024Q1,10\n2024Q2,11\n2024Q2,12\n",
         r"row 4, column 'period'.*repeats row 3"),
        ("period,value\n2024Q1,10\n2024-05,11\n2024Q3,12\n", r"row 3, column 'period'.*frequency"),
        ("period,value\n2024Q1,10\n2024Q2,11\n", r"2 observation\(s\).*at least 3"),
        ("quarter,value\n2024Q1,10\n2024Q2,11\n2024Q3,12\n", r"no column 'period'.*--period-col"),
        ("period,value\n2024Q1,10\n2024Q2,inf\n2024Q3,12\n", r"row 3.*not a finite number"),
        ("", r"empty"),
        ("period,value\n2024Q1,10\n2024Q2,11\n2024Q3,12\nTotal,33\n",
         r"row 5, column 'period': period 'Total' is not a quarter.*a total or average row "
         r"belongs outside the series: delete it"),
        ("period,value\n2024Q1,10\n2024Q2,11\n2024Q3,12\nTotalled,33\n",
         r"'Totalled' is not a quarter .*digits 0-9\)$"),  # a word that is no summary
    ],
)
def test_bad_input_names_row_and_column(tmp_path, text, match):
    with pytest.raises(InputError, match=match):
        read_series(_csv(tmp_path, text))


def test_columns_named_alike_but_for_case_are_found(tmp_path):
    s = read_series(_csv(tmp_path, "Period, VALUE \n2024Q1,10\n2024Q2,11\n2024Q3,12\n"))
    assert s.labels == ["2024Q1", "2024Q2", "2024Q3"] and s.values.tolist() == [10, 11, 12]
    frame = pd.DataFrame({"Period": ["2024Q1", "2024Q2", "2024Q3"], "Value": [1.0, 2.0, 4.0]})
    assert read_series(frame).values.tolist() == [1.0, 2.0, 4.0]
    assert list(frame.columns) == ["Period", "Value"]  # the caller's table is left as it is
    with pytest.raises(InputError, match=r"no column 'value' \(columns are 'Value', 'VALUE'"):
        read_series(_csv(tmp_path, "Value,VALUE,period\n1,1,2024Q1\n2,2,2024Q2\n3,3,2024Q3\n"))


def test_missing_file(tmp_path):
    with pytest.raises(InputError, match="no such file"):
        read_series(tmp_path / "nope.csv")


def test_fingerprint_changes_with_data(tmp_path):
    a = read_series(_csv(tmp_path, "period,value\n1,1\n2,2\n3,3\n", "a.csv"))
    b = read_series(_csv(tmp_path, "period,value\n1,1\n2,2\n3,3.5\n", "b.csv"))
    assert a.fingerprint() != b.fingerprint()
    shuffled = read_series(_csv(tmp_path, "period,value\n3,3\n1,1\n2,2\n"))
    assert a.fingerprint() == shuffled.fingerprint()


def test_bundled_demo_matches_its_generator():
    bundled = pd.read_csv(demo_path())
    pd.testing.assert_frame_equal(bundled, make_demo_frame())


def test_index_of_accepts_other_spellings_and_rejects_absent(tmp_path):
    s = read_series(_csv(tmp_path, "period,value\n2024Q2,1\n2024Q3,2\n2024Q4,3\n"))
    assert s.index_of("2024-Q3") == 1
    for absent in ("2024Q1", "1999Q1", "2025Q1"):
        with pytest.raises(InputError, match="not in the series"):
            s.index_of(absent)
