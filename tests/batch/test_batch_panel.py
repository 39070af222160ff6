"""Reading long-format panels: per-series validation with the file's row numbers."""

import numpy as np
import pandas as pd
import pytest

from bayesgrowth.data import InputError, read_series
from bayesgrowth.data.panel import invented_panel, panel_frame, read_panel


def test_good_and_bad_series_are_separated_with_rows(panel_csv):
    good, bad = read_panel(panel_csv)
    assert len(good) == 12
    reasons = dict(bad)
    assert list(reasons) == ["zero", "dup", "short"]
    # Rows as a spreadsheet shows them: the header is row 1, so the 0 in the 2nd
    # 'zero' row is line (number of good rows) + 3 of the file.
    n_good_rows = sum(s.n for s in good.values())
    assert reasons["zero"].startswith(f"panel.csv, series 'zero', row {n_good_rows + 3}, "
                                      "column 'value'")
    assert "not above zero" in reasons["zero"]
    dup_row = n_good_rows + 4 + 2
    assert f"row {dup_row + 1}, column 'period'" in reasons["dup"]
    assert f"repeats row {dup_row}" in reasons["dup"]
    assert "2 observation(s)" in reasons["short"] and "series 'short'" in reasons["short"]


def test_each_series_equals_reading_it_alone(tmp_path):
    frame = invented_panel(3, seed=2)
    good, bad = read_panel(frame)
    assert not bad
    for name, s in good.items():
        alone = read_series(frame[frame["series"] == name][["period", "value"]])
        np.testing.assert_array_equal(s.values, alone.values)
        assert s.labels == alone.labels and s.name == name
    back = panel_frame(good)
    np.testing.assert_allclose(back["value"], frame["value"])


def test_file_level_problems_raise(tmp_path):
    path = tmp_path / "p.csv"
    path.write_text("name,period,value\na,2020Q1,1\n")
    with pytest.raises(InputError, match=r"no column 'series'.*--series-col"):
        read_panel(path)
    path.write_text("series,period,value\na,2020Q1,1\n,2020Q2,2\n")
    with pytest.raises(InputError, match=r"row 3, column 'series': series name is missing"):
        read_panel(path)
    path.write_text("series,period,value\n")
    with pytest.raises(InputError, match="no rows"):
        read_panel(path)
    with pytest.raises(InputError, match="no such file"):
        read_panel(tmp_path / "missing.csv")


def test_other_column_names_and_unsorted_rows():
    frame = pd.DataFrame({"unit": ["b", "a", "b", "a", "b", "a"],
                          "month": ["2024-03", "2024-01", "2024-01", "2024-02", "2024-02",
                                    "2024-03"],
                          "revenue": [3.0, 1.0, 1.0, 2.0, 2.0, 3.0]})
    good, bad = read_panel(frame, series_col="unit", period_col="month", value_col="revenue")
    assert list(good) == ["b", "a"] and not bad
    assert good["b"].labels == ["2024-01", "2024-02", "2024-03"]
    np.testing.assert_array_equal(good["b"].values, [1.0, 2.0, 3.0])
