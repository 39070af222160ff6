"""Workbooks with several sheets: the sheet read is named, and ``--sheet`` picks another."""

from __future__ import annotations

import json

import pandas as pd
import pytest

from bayesgrowth.cli import main
from bayesgrowth.data import read_series

pytest.importorskip("openpyxl")

QUARTERS = ["2024Q1", "2024Q2", "2024Q3", "2024Q4"]


def _book(path, **sheets) -> None:
    with pd.ExcelWriter(path) as writer:
        for name, values in sheets.items():
            pd.DataFrame({"period": QUARTERS, "value": values}).to_excel(
                writer, sheet_name=name, index=False)


def test_the_sheet_read_is_named_when_there_are_several(tmp_path, capsys):
    src = tmp_path / "book.xlsx"
    _book(src, Revenue=[100, 110, 121, 133], Costs=[50, 52, 54, 56])
    out = tmp_path / "out"
    assert main(["forecast", str(src), "-H", "1", "--out", str(out), "--quiet"]) == 0
    said = ("book.xlsx: read the sheet 'Revenue', the first of 2 ('Revenue', 'Costs'); name "
            "another with --sheet")
    assert f"note: {said}" in capsys.readouterr().err
    summary = json.loads((out / "summary.json").read_text())
    assert summary["input"]["notes"] == [said]


def test_one_sheet_needs_no_note(tmp_path):
    src = tmp_path / "book.xlsx"
    _book(src, Revenue=[100, 110, 121, 133])
    assert read_series(src).notes == ()


def test_sheet_option_reads_that_sheet(tmp_path, capsys):
    src = tmp_path / "book.xlsx"
    _book(src, Revenue=[100, 110, 121, 133], Costs=[50, 52, 54, 56])
    out = tmp_path / "out"
    assert main(["forecast", str(src), "-H", "1", "--out", str(out), "--quiet",
                 "--sheet", " costs "]) == 0  # case and spaces aside
    assert "note:" not in capsys.readouterr().err
    assert read_series(src, sheet="Costs").values.tolist() == [50, 52, 54, 56]
    summary = json.loads((out / "summary.json").read_text())
    assert summary["input"]["notes"] == []


def test_unknown_sheet_is_refused_with_the_sheets_listed(tmp_path, refused):
    book = tmp_path / "made.xlsx"
    _book(book, Revenue=[100, 110, 121, 133], Costs=[50, 52, 54, 56])
    refused("book.xlsx", book.read_bytes(), "--sheet 'Sales': book.xlsx has no sheet of that "
            "name; its sheets are 'Revenue', 'Costs'", extra=["--sheet", "Sales"])


def test_sheet_option_with_a_csv_file_is_refused(refused):
    refused("sales.csv", "period,value\n2024Q1,1\n2024Q2,2\n2024Q3,3\n",
            "--sheet 'Revenue': sales.csv is not an .xlsx workbook", "leave --sheet out",
            extra=["--sheet", "Revenue"])


def test_batch_reads_the_sheet_named(tmp_path):
    src = tmp_path / "panel.xlsx"
    rows = pd.DataFrame({"series": ["a"] * 4 + ["b"] * 4, "period": QUARTERS * 2,
                         "value": [1, 2, 3, 4, 10, 11, 12, 13]})
    with pd.ExcelWriter(src) as writer:
        pd.DataFrame({"note": ["invented figures"]}).to_excel(writer, sheet_name="About",
                                                              index=False)
        rows.to_excel(writer, sheet_name="Data", index=False)
    out = tmp_path / "out"
    assert main(["batch", str(src), "-H", "1", "--out", str(out), "--quiet", "--workers", "1",
                 "--sheet", "Data"]) == 0
    assert sorted(pd.read_csv(out / "forecast.csv")["series"].unique()) == ["a", "b"]


def test_pool_reads_the_sheet_named(tmp_path, capsys):
    # the named sheet holds one series, the first sheet two: refused for pooling one
    # series proves the named sheet was read (before any sampling)
    src = tmp_path / "panel.xlsx"
    two = pd.DataFrame({"series": ["a"] * 4 + ["b"] * 4, "period": QUARTERS * 2,
                        "value": [1, 2, 3, 4, 10, 11, 12, 13]})
    with pd.ExcelWriter(src) as writer:
        two.to_excel(writer, sheet_name="Both", index=False)
        two.iloc[:4].to_excel(writer, sheet_name="One", index=False)
    out = tmp_path / "out"
    assert main(["pool", str(src), "-H", "1", "--out", str(out), "--sheet", "One"]) == 2
    assert "pooling needs at least 2 series" in capsys.readouterr().err
    assert main(["pool", str(src), "-H", "1", "--out", str(out), "--sheet", "Neither"]) == 2
    assert "its sheets are 'Both', 'One'" in capsys.readouterr().err
    assert not out.exists()


def test_a_first_sheet_without_the_columns_points_to_the_others(tmp_path, capsys):
    src = tmp_path / "book.xlsx"
    with pd.ExcelWriter(src) as writer:
        pd.DataFrame({"note": ["invented figures"]}).to_excel(writer, sheet_name="Cover",
                                                              index=False)
        pd.DataFrame({"period": QUARTERS, "value": [1, 2, 3, 4]}).to_excel(
            writer, sheet_name="Revenue", index=False)
    out = tmp_path / "out"
    assert main(["forecast", str(src), "-H", "1", "--out", str(out), "--quiet"]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert err == ["bayesgrowth: error: book.xlsx: no column 'period' in the sheet 'Cover' "
                   "(columns are 'note'); name the right one with --period-col, or another "
                   "of its 2 sheets ('Cover', 'Revenue') with --sheet"]
    assert not out.exists()

