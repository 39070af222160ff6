"""The inputs analysts export: separators, number formats, fiscal and free-form periods, .xlsx.

Each case asserts the values and periods read, or the refusal: exit code 2, one
plain line naming the file, row and column and the fix, and nothing written.

Outside references (from memory, as written by the standards named):
- Number formats follow the Unicode CLDR locale patterns: en "1,234.5",
  de "1.234,5", fr "1 234,5" (narrow no-break space), de-CH "1'234.5".
- A fiscal year is named by the calendar year it ends in: the US federal fiscal
  year 2024 ran 1 October 2023 to 30 September 2024 (31 U.S.C. 1102); the UK
  government's 2023-24 year, called FY24 here, starts on 1 April 2023.
"""

from __future__ import annotations

import sys
import warnings

import numpy as np
import pytest

from bayesgrowth.cli import main
from bayesgrowth.data import InputError, read_series
from bayesgrowth.data.panel import read_panel


def _read(tmp_path, text: str, name: str = "sales.csv", **options):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return read_series(path, **options)


def _refused(tmp_path, capsys, name: str, text: str | bytes, *fragments: str, extra=()):
    """Run ``forecast`` on the file: exit 2, one line with every fragment, nothing written."""
    data = tmp_path / "input"
    data.mkdir()
    src = data / name
    src.write_bytes(text if isinstance(text, bytes) else text.encode())
    before = src.read_bytes()
    out = tmp_path / "out"
    code = main(["forecast", str(src), "-H", "2", "--engine", "exact", "--out", str(out),
                 "--quiet", *extra])
    err = capsys.readouterr().err.strip().splitlines()
    assert code == 2
    assert len(err) == 1 and err[0].startswith("bayesgrowth: error: "), err
    assert "Traceback" not in err[0] and "Error" not in err[0]
    for fragment in fragments:
        assert fragment in err[0], (fragment, err[0])
    assert not out.exists()
    assert sorted(p.name for p in data.iterdir()) == [name] and src.read_bytes() == before
    return err[0]


# --- separators -----------------------------------------------------------------------------

@pytest.mark.parametrize("sep", [";", "\t", ","])
def test_separator_told_from_the_header(tmp_path, sep):
    text = f"period{sep}value\n2024Q1{sep}10\n2024Q2{sep}12\n2024Q3{sep}15\n"
    s = _read(tmp_path, text)
    assert s.labels == ["2024Q1", "2024Q2", "2024Q3"]
    np.testing.assert_array_equal(s.values, [10, 12, 15])


def test_second_separator_inside_quotes_is_not_counted(tmp_path):
    s = _read(tmp_path, 'period;"value, EUR"\n2024Q1;1,5\n2024Q2;2,5\n2024Q3;3\n',
              value_col="value, EUR")
    np.testing.assert_array_equal(s.values, [1.5, 2.5, 3.0])


def test_rows_pick_the_separator_when_the_header_has_two(tmp_path):
    # "value,eur" holds a comma, but only the semicolon splits every row like the header
    s = _read(tmp_path, "period;value,eur\n2024Q1;10\n2024Q2;12\n2024Q3;15\n",
              value_col="value,eur")
    np.testing.assert_array_equal(s.values, [10, 12, 15])


def test_separator_that_cannot_be_told_is_refused(tmp_path, capsys):
    _refused(tmp_path, capsys, "mixed.csv", "period;value,eur\n2024Q1;1,5\n2024Q2;2;3\n",
             "mixed.csv, row 1", "both comma and semicolon",
             "save the file with one separator")


# --- numbers --------------------------------------------------------------------------------

@pytest.mark.parametrize(("sep", "cells", "expected"), [
    (";", ["1.234,5", "1234,5", "2.000"], [1234.5, 1234.5, 2000.0]),        # CLDR de
    (";", ["1 234,5", "1\u202f300,25", "1\u00a0400"], [1234.5, 1300.25, 1400.0]),  # CLDR fr
    (",", ['"1,234.5"', '"1,300"', "1400.75"], [1234.5, 1300.0, 1400.75]),  # CLDR en
    (",", ["1'234.5", "1\u2019300", "1400"], [1234.5, 1300.0, 1400.0]),     # CLDR de-CH
    (",", ['"$1,200"', '"$1,350.50"', "$ 1400"], [1200.0, 1350.5, 1400.0]),
    (";", ["€ 1.200,50", "1.300,00 €", "EUR 1400"], [1200.5, 1300.0, 1400.0]),
    (",", ["1200 USD", "1300USD", "USD 1400.5"], [1200.0, 1300.0, 1400.5]),
    ("\t", ["12,5", "13", "14,25"], [12.5, 13.0, 14.25]),
])
def test_number_formats(tmp_path, sep, cells, expected):
    rows = "".join(f"2024Q{q}{sep}{c}\n" for q, c in zip((1, 2, 3), cells, strict=True))
    s = _read(tmp_path, f"period{sep}value\n{rows}")
    np.testing.assert_allclose(s.values, expected, rtol=0, atol=0)


@pytest.mark.parametrize(("decimal", "expected"), [(".", [1234.0, 1300.0, 1400.0]),
                                                   (",", [1.234, 1.3, 1.4])])
def test_stated_decimal_mark_reads_lone_groups(tmp_path, decimal, expected):
    text = 'period,value\n2024Q1,"1,234"\n2024Q2,"1,300"\n2024Q3,"1,400"\n'
    s = _read(tmp_path, text, decimal=decimal)
    np.testing.assert_allclose(s.values, expected, rtol=1e-15)


def test_ambiguous_thousands_or_decimals_is_refused(tmp_path, capsys):
    text = 'period,value\n2024Q1,"1,234"\n2024Q2,"1,300"\n2024Q3,"1,400"\n'
    _refused(tmp_path, capsys, "sales.csv", text, "sales.csv, row 2, column 'value'",
             "'1,234' could be 1234 or 1.234", "--decimal . (reads it as 1234)",
             "--decimal , (reads it as 1.234)")


def test_lone_point_in_a_semicolon_file_is_ambiguous(tmp_path, capsys):
    text = "period;value\n2024Q1;1.234\n2024Q2;1.300\n2024Q3;1.400\n"
    _refused(tmp_path, capsys, "sales.csv", text, "sales.csv, row 2, column 'value'",
             "'1.234' could be 1.234 or 1234", "--decimal , (reads it as 1234)")
    assert _read(tmp_path, text, decimal=",").values.tolist() == [1234.0, 1300.0, 1400.0]
    # in a comma-separated file 1.234 is the plain number it has always been
    plain = _read(tmp_path, text.replace(";", ","), name="plain.csv")
    assert plain.values.tolist() == [1.234, 1.3, 1.4]


def test_stated_decimal_mark_is_threaded_from_the_command_line(tmp_path, capsys):
    # With --decimal , the cell 1,234.5 breaks the stated format, on its own row.
    text = 'period,value\n2024Q1,"1,5"\n2024Q2,"1,234.5"\n2024Q3,"1,7"\n'
    _refused(tmp_path, capsys, "sales.csv", text, "sales.csv, row 3, column 'value'",
             "'1,234.5' is not a number", "decimal comma", extra=["--decimal", ","])


@pytest.mark.parametrize("stated, cell, other, reads", [(".", "1000,5", ",", "1000.5"),
                                                        (",", "1000.5", ".", "1000.5")])
def test_a_number_in_the_other_decimal_format_names_the_option(tmp_path, capsys, stated, cell,
                                                               other, reads):
    text = f'period;value\n2024Q1;100\n2024Q2;"{cell}"\n2024Q3;120\n'
    _refused(tmp_path, capsys, "sales.csv", text, "sales.csv, row 3, column 'value'",
             f"{cell!r} is not a number with a decimal", f"say so with --decimal {other} (it "
             f"then reads as {reads})", extra=["--decimal", stated])


def test_decimal_marks_both_ways_are_refused(tmp_path, capsys):
    text = "period;value\n2024Q1;1.234,5\n2024Q2;1,234.5\n2024Q3;1500\n"
    _refused(tmp_path, capsys, "sales.csv", text, "sales.csv, row 3, column 'value'",
             "the other way from '1.234,5' (sales.csv, row 2", "one decimal mark")


def test_percentages_are_refused(tmp_path, capsys):
    text = "period,value\n2024Q1,10\n2024Q2,12.5%\n2024Q3,15\n"
    _refused(tmp_path, capsys, "rates.csv", text, "rates.csv, row 3, column 'value'",
             "'12.5%' is a percentage", "values must be amounts", "not rates")


@pytest.mark.parametrize("sep", [",", ";"])
def test_percentages_are_refused_before_any_question_of_the_mark(tmp_path, capsys, sep):
    # 11.82% has two digits after the point and 2.500% has a percent sign after
    # the three: neither is a grouped thousand, so the percentage is the problem.
    text = f"period{sep}value\n2024Q1{sep}11.82%\n2024Q2{sep}2.500%\n2024Q3{sep}13.10%\n"
    message = _refused(tmp_path, capsys, "rates.csv", text, "rates.csv, row 2, column 'value'",
                       "'11.82%' is a percentage")
    assert "--decimal" not in message and "semicolon" not in message


@pytest.mark.parametrize(("cells", "expected"), [
    (["1.25", "1.5", "1.75"], [1.25, 1.5, 1.75]),          # two digits after the point
    (["1.2345", "1.3", "1.4"], [1.2345, 1.3, 1.4]),        # four digits after the point
    ([".234", ".3", ".4"], [0.234, 0.3, 0.4]),             # no digit before the point
])
def test_points_that_cannot_group_thousands_are_decimals_in_a_semicolon_file(
        tmp_path, cells, expected):
    rows = "".join(f"2024Q{q};{c}\n" for q, c in zip((1, 2, 3), cells, strict=True))
    s = _read(tmp_path, "period;value\n" + rows)
    np.testing.assert_allclose(s.values, expected, rtol=1e-15)


def test_two_currencies_are_refused(tmp_path, capsys):
    text = "period,value\n2024Q1,$100\n2024Q2,€110\n2024Q3,120\n"
    _refused(tmp_path, capsys, "sales.csv", text, "sales.csv, row 3, column 'value'",
             "'€110' is in EUR", "row 2, column 'value' in $", "convert the values to one currency")


@pytest.mark.parametrize("cell", ["1,23,4", "1.2.3,4,5", "1_100", "١٢٣", "12 34"])
def test_malformed_numbers_are_refused(tmp_path, cell):
    text = f'period;value\n2024Q1;{cell}\n2024Q2;5\n2024Q3;6\n'
    with pytest.raises(InputError, match=r"sales.csv, row 2, column 'value': .* is not a "
                       r"number; write it with the digits 0-9"):
        _read(tmp_path, text)


# --- periods --------------------------------------------------------------------------------

@pytest.mark.parametrize(("labels", "canonical", "future"), [
    (["Q1 2024", "Q2 2024", "Q3 2024"], ["2024Q1", "2024Q2", "2024Q3"], ["Q4 2024", "Q1 2025"]),
    (["Q3-2024", "Q4-2024", "Q1-2025"], ["2024Q3", "2024Q4", "2025Q1"], ["Q2-2025", "Q3-2025"]),
    (["2024 Q1", "2024 Q2", "2024 Q3"], None, ["2024Q4", "2025Q1"]),  # canonical on output
    (["Nov 2024", "Dec 2024", "Jan 2025"], ["2024-11", "2024-12", "2025-01"],
     ["Feb 2025", "Mar 2025"]),
    (["January 2024", "February 2024", "March 2024"], ["2024-01", "2024-02", "2024-03"],
     ["April 2024", "May 2024"]),
    (["2024/11", "2024/12", "2025/01"], None, ["2025-02", "2025-03"]),  # canonical on output
    (["11/2024", "12/2024", "01/2025"], ["2024-11", "2024-12", "2025-01"],
     ["02/2025", "03/2025"]),
])
def test_free_form_period_labels(tmp_path, labels, canonical, future):
    rows = "".join(f"{label},{10 + i}\n" for i, label in enumerate(labels))
    s = _read(tmp_path, "period,value\n" + rows)
    assert s.labels == (labels if canonical is not None else s.labels)
    assert s.future_labels(2) == future
    np.testing.assert_array_equal(s.t, [0, 1, 2])
    if canonical is not None:
        # the same periods as the canonical labels, on the same calendar
        plain = _read(tmp_path, "period,value\n" + "".join(
            f"{c},{10 + i}\n" for i, c in enumerate(canonical)), name="plain.csv")
        assert (plain.axis.style, plain.axis.origin) == (s.axis.style, s.axis.origin)


@pytest.mark.parametrize(("start", "labels", "calendar_first", "future"), [
    # US federal FY2024 began 1 October 2023 (31 U.S.C. 1102), so FY24 Q1 is Oct-Dec 2023
    (10, ["FY24 Q1", "FY24 Q2", "FY24 Q3", "FY24 Q4"], "2023Q4", ["FY25 Q1", "FY25 Q2"]),
    # UK government year 2023-24 (called FY24) began 1 April 2023
    (4, ["FY2024-Q3", "FY2024-Q4", "FY2025-Q1"], "2023Q4", ["FY2025-Q2", "FY2025-Q3"]),
    (1, ["Q3 FY24", "Q4 FY24", "Q1 FY25"], "2024Q3", ["Q2 FY25", "Q3 FY25"]),
])
def test_fiscal_quarters(tmp_path, start, labels, calendar_first, future):
    rows = "".join(f"{label},{10 + i}\n" for i, label in enumerate(labels))
    s = _read(tmp_path, "period,value\n" + rows, fiscal_start=start)
    assert s.labels == labels
    assert s.future_labels(2) == future
    plain = _read(tmp_path, f"period,value\n{calendar_first},1\n2099Q1,2\n2099Q2,3\n",
                  name="plain.csv")
    assert s.axis.origin == plain.axis.origin


def test_fiscal_quarters_need_the_fiscal_start(tmp_path, capsys):
    text = "period,value\nFY24 Q1,10\nFY24 Q2,12\nFY24 Q3,15\n"
    _refused(tmp_path, capsys, "sales.csv", text, "sales.csv, row 2, column 'period'",
             "'FY24 Q1' is a fiscal quarter", "--fiscal-start", "year ending in 2024")


def test_mixed_label_styles_are_refused(tmp_path, capsys):
    text = "period,value\nJan 2024,10\nFeb 2024,12\n2024-03,15\n"
    _refused(tmp_path, capsys, "sales.csv", text, "sales.csv, row 4, column 'period'",
             "'2024-03' is not written like the first period 'Jan 2024'")


@pytest.mark.parametrize(("labels", "odd", "first"), [
    (["2024Q1", "2024Q2", "2024Q3", "Q4 2024"], "Q4 2024", "2024Q1"),
    (["Q1 2024", "Q2 2024", "Q3 2024", "2024Q4"], "2024Q4", "Q1 2024"),
    (["2024-01", "2024-02", "Mar 2024"], "Mar 2024", "2024-01"),
    (["2024-01", "2024-02", "03/2024"], "03/2024", "2024-01"),
])
def test_a_second_label_style_is_refused_either_way_round(tmp_path, capsys, labels, odd, first):
    rows = "".join(f"{label},{10 + i}\n" for i, label in enumerate(labels))
    message = _refused(tmp_path, capsys, "sales.csv", "period,value\n" + rows,
                       f"sales.csv, row {labels.index(odd) + 2}, column 'period'",
                       f"period {odd!r} is not written like the first period {first!r}",
                       "write every period of a series the same way")
    assert "is not a quarter" not in message


def test_unreadable_label_before_a_second_style_is_named_first(tmp_path):
    text = "period,value\n2024Q1,1\nsoon,2\nQ3 2024,3\n"
    with pytest.raises(InputError, match=r"row 3, column 'period': period 'soon' is not a "
                       r"quarter"):
        _read(tmp_path, text)


def test_month_that_does_not_exist_is_refused(tmp_path):
    with pytest.raises(InputError, match=r"row 3, column 'period': period '13/2024'"):
        _read(tmp_path, "period,value\n12/2024,1\n13/2024,2\n01/2025,3\n")


def test_fiscal_start_option_is_checked(tmp_path, capsys):
    _refused(tmp_path, capsys, "sales.csv", "period,value\nFY24 Q1,1\n", "--fiscal-start",
             "'13' is not a month", extra=["--fiscal-start", "13"])


def test_fiscal_forecast_end_to_end(tmp_path, capsys):
    """Semicolons, decimal commas and fiscal labels through the command, labels kept."""
    src = tmp_path / "sales.csv"
    src.write_text("period;value\n" + "".join(
        f"FY{y} Q{q};{1000 * 1.05 ** i:.2f}".replace(".", ",") + "\n"
        for i, (y, q) in enumerate((y, q) for y in (23, 24) for q in (1, 2, 3, 4))))
    out = tmp_path / "out"
    code = main(["forecast", str(src), "-H", "2", "--engine", "exact", "--out", str(out),
                 "--quiet", "--fiscal-start", "april"])
    assert code == 0, capsys.readouterr().err
    periods = [line.split(",")[0] for line in (out / "forecast.csv").read_text().splitlines()]
    assert periods[1:] == ["FY25 Q1", "FY25 Q2"]


# --- title lines ----------------------------------------------------------------------------

@pytest.mark.parametrize(("name", "text", "header"), [
    ("sales.csv", "Quarterly sales (EUR k)\nperiod,value\n2024Q1,10\n2024Q2,12\n2024Q3,15\n",
     "period, value"),
    # a spreadsheet pads the title to the table's width; a comma inside quotes
    ("sales.csv", '"Sales, by quarter",,\nperiod,value,note\n2024Q1,10,\n2024Q2,12,x\n'
     "2024Q3,15,y\n", "period, value, note"),
    # semicolons: read with the title's (absent) separator the rows are ragged
    ("sales.csv", "Sales\nperiod;value\n2024Q1;10,5\n2024Q2;12\n2024Q3;15\n",
     "period, value"),
    # other column names: the header is as wide as the rows under it
    ("sales.csv", "Sales\nquarter,revenue\n2024Q1,10\n2024Q2,12\n2024Q3,15\n",
     "quarter, revenue"),
])
def test_title_line_above_the_header_is_named(tmp_path, capsys, name, text, header):
    title = text.split("\n")[0].split(",,")[0].strip('"')
    message = _refused(tmp_path, capsys, name, text,
                       f"{name}, row 1: the file seems to start with a title line ({title!r})",
                       f"above the header ({header}); delete that line")
    assert "--period-col" not in message


@pytest.mark.parametrize(("text", "fragment"), [
    ("period,\n2024Q1,10\n2024Q2,12\n2024Q3,15\n", "no column 'value'"),
    ("value\n1\n2\n3\n", "no column 'period'"),
    ("Sales\nquarter,revenue\n2024Q1,\n2024Q2,12\n2024Q3,15\n", "no column 'period'"),
])
def test_headers_that_are_not_under_a_title_keep_the_column_message(tmp_path, text, fragment):
    # a header naming only the period column, a one-column file, and a second
    # line that neither names the column nor is as wide as the next row
    with pytest.raises(InputError, match=fragment) as info:
        _read(tmp_path, text)
    assert "title line" not in str(info.value)


def test_title_line_above_a_panel_and_a_workbook(tmp_path):
    path = tmp_path / "group.csv"
    path.write_text("Group sales\nseries,period,value\na,2024Q1,10\na,2024Q2,12\n"
                    "a,2024Q3,15\n")
    with pytest.raises(InputError, match=r"^group.csv, row 1: the file seems to start with a "
                       r"title line \('Group sales'\) above the header \(series, period, "
                       r"value\)"):
        read_panel(path)
    pytest.importorskip("openpyxl")
    import pandas as pd

    book = tmp_path / "sales.xlsx"
    pd.DataFrame([["Sales (EUR k)", None], ["period", "value"], ["2024Q1", 10],
                  ["2024Q2", 12], ["2024Q3", 15]]).to_excel(book, index=False, header=False)
    with pytest.raises(InputError, match=r"^sales.xlsx, row 1: the file seems to start with a "
                       r"title line \('Sales \(EUR k\)'\)"):
        read_series(book)


# --- panels and workbooks -------------------------------------------------------------------

def test_panel_reads_formats_per_series(tmp_path):
    path = tmp_path / "panel.csv"
    path.write_text("series\tperiod\tvalue\n" + "".join(
        f"{name}\tFY25 Q{q}\t{v}\n" for name, vals in (("a", ("1.200,5", "1.300", "1.400")),
                                                        ("b", ("12%", "13%", "14%")))
        for q, v in zip((1, 2, 3), vals, strict=True)))
    good, bad = read_panel(path, fiscal_start=7)
    np.testing.assert_array_equal(good["a"].values, [1200.5, 1300.0, 1400.0])
    assert good["a"].future_labels(1) == ["FY25 Q4"]
    assert bad[0][0] == "b" and "row 5, column 'value': '12%' is a percentage" in bad[0][1]


def test_xlsx_input(tmp_path):
    pytest.importorskip("openpyxl")
    import datetime as dt

    import pandas as pd

    path = tmp_path / "sales.xlsx"
    pd.DataFrame({"period": [dt.datetime(2024, m, 1) for m in (1, 2, 3)] + ["2024-04-01"],
                  "value": [100, 120.5, "1,300.25", "$1,400"]}).to_excel(path, index=False)
    s = read_series(path)
    assert s.labels == ["2024-01-01", "2024-02-01", "2024-03-01", "2024-04-01"]
    np.testing.assert_array_equal(s.values, [100, 120.5, 1300.25, 1400])


def test_xlsx_problems_name_the_row(tmp_path):
    pytest.importorskip("openpyxl")
    import pandas as pd

    path = tmp_path / "sales.xlsx"
    pd.DataFrame({"period": ["Q1 2024", "Q2 2024", "Q3 2024"],
                  "value": [100, "", 120]}).to_excel(path, index=False)
    with pytest.raises(InputError, match=r"^sales.xlsx, row 3, column 'value': value is "
                       "missing"):
        read_series(path)


def test_blank_rows_at_the_end_are_left_out(tmp_path):
    # spreadsheets export once-used rows as ",,"; between values a blank row is still named
    clean = "period,value,comment\n2024Q1,100,\n2024Q2,110,\n2024Q3,121,\n"
    s = _read(tmp_path, clean + ",,\n , ,\n,,\n", name="trailing.csv")
    assert s.labels == ["2024Q1", "2024Q2", "2024Q3"]
    np.testing.assert_array_equal(s.values, [100, 110, 121])
    with pytest.raises(InputError, match=r"^middle.csv, row 3, column 'value': value is missing"):
        _read(tmp_path, "period,value\n2024Q1,100\n,\n2024Q3,121\n", name="middle.csv")


def test_blank_rows_at_the_end_of_a_sheet_are_left_out(tmp_path):
    pytest.importorskip("openpyxl")
    import pandas as pd

    path = tmp_path / "sales.xlsx"
    pd.DataFrame({"period": ["Q1 2024", "Q2 2024", "Q3 2024", None, ""],
                  "value": [100, 110, 121, None, ""]}).to_excel(path, index=False)
    np.testing.assert_array_equal(read_series(path).values, [100, 110, 121])


def test_xlsx_without_the_excel_reader(tmp_path, capsys, monkeypatch):
    monkeypatch.setitem(sys.modules, "openpyxl", None)  # import fails as if not installed
    _refused(tmp_path, capsys, "sales.xlsx", b"PK\x03\x04 not really", "sales.xlsx",
             "optional Excel reader", 'pip install "bayesgrowth[excel]"')


def test_not_a_workbook(tmp_path, capsys):
    pytest.importorskip("openpyxl")
    _refused(tmp_path, capsys, "sales.xlsx", b"period,value\n", "sales.xlsx",
             "cannot be read as an Excel workbook", "save it again as .xlsx or as CSV")
