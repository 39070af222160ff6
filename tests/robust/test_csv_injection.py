"""Spreadsheet formula injection: no CSV the tool writes holds a cell a spreadsheet would run.

Reference: OWASP, "CSV Injection" (https://owasp.org/www-community/attacks/CSV_Injection):
cells starting with ``=``, ``+``, ``-``, ``@``, tab (0x09) or carriage return (0x0D)
are read as formulas; prefix them with a single quote.
"""

from __future__ import annotations

import csv
import re
from pathlib import Path

import pandas as pd
import pytest

from bayesgrowth.data.export import neutralise_cell, neutralise_frame, write_csv

#: The trigger characters the OWASP page lists.
OWASP_TRIGGERS = ("=", "+", "-", "@", "\t", "\r")
PLAIN_NUMBER = re.compile(r"[+-]?(\d+(\.\d*)?|\.\d+)([eE][+-]?\d+)?")

HOSTILE = ['=HYPERLINK("http://example.invalid","x")', "+SUM(1,2)", "-2+3", "@SUM(A1)",
           "=1+1", "-inf", "plain", "-3", "x\t=1"]


def _cells(path: Path) -> list[str]:
    with path.open(newline="", encoding="utf-8") as f:
        return [cell for row in csv.reader(f) for cell in row]


def _assert_no_formula(path: Path) -> None:
    for cell in _cells(path):
        assert not cell.startswith(OWASP_TRIGGERS) or PLAIN_NUMBER.fullmatch(cell), (path, cell)


@pytest.mark.parametrize("cell", ["=1+1", "+1+1", "-1+1", "@SUM(1)", "\t=1", "\r=1", "-inf",
                                  "-", "+", "=", "-3.2.1"])
def test_trigger_cells_get_one_quote(cell):
    assert neutralise_cell(cell) == "'" + cell
    assert neutralise_cell(neutralise_cell(cell)) == "'" + cell  # idempotent


@pytest.mark.parametrize("cell", ["-3", "-3.2", "+1e5", "-.5", "2024Q1", "north", "", "'=x"])
def test_numbers_and_plain_text_stay(cell):
    assert neutralise_cell(cell) == cell


def test_frame_numbers_stay_numbers(tmp_path):
    frame = pd.DataFrame({"series": ["=x", "-3", "ok"], "value": [-3.2, 1.0, -0.5],
                          "flag": [True, False, True]})
    path = tmp_path / "t.csv"
    write_csv(frame, path)
    back = pd.read_csv(path, dtype={"series": str})
    assert back["series"].tolist() == ["'=x", "-3", "ok"]
    assert back["value"].tolist() == [-3.2, 1.0, -0.5]  # numbers, not "'-3.2"
    assert back["flag"].tolist() == [True, False, True]
    assert frame["series"].tolist() == ["=x", "-3", "ok"]  # the caller's frame is untouched
    assert list(neutralise_frame(pd.DataFrame({"=a": [1]})).columns) == ["'=a"]


def _hostile_panel(path: Path) -> None:
    with path.open("w", newline="", encoding="utf-8") as f:
        w = csv.writer(f)
        w.writerow(["series", "period", "value"])
        for k, name in enumerate(HOSTILE):
            for q, v in enumerate((100, 110, 121, 133, 146)):
                w.writerow([name, f"2021Q{q % 4 + 1}" if q < 4 else "2022Q1", v + k])


def test_batch_outputs_hold_no_formulas(tmp_path, run_cli, snapshot):
    data = tmp_path / "input"
    data.mkdir()
    panel = data / "branches.csv"
    _hostile_panel(panel)
    before = snapshot(data)
    out = tmp_path / "out"
    proc = run_cli("batch", panel, "--horizon", 2, "--out", out, "--workers", 1, "--quiet")
    assert proc.returncode == 0, proc.stderr
    assert snapshot(data) == before  # the input is untouched
    written = sorted(p.name for p in out.glob("*.csv"))
    assert written == ["failures.csv", "forecast.csv", "summary.csv"]
    for name in written:
        _assert_no_formula(out / name)
    summary = pd.read_csv(out / "summary.csv", dtype={"series": str})
    shown = [s[1:] if s.startswith("'") else s for s in summary["series"]]
    assert shown == HOSTILE  # every name kept, only the quote added
    assert summary["series"].tolist()[HOSTILE.index("-3")] == "-3"
    assert pd.api.types.is_float_dtype(summary["growth_median"])


def test_negative_integer_periods_stay_numbers(tmp_path, run_cli):
    src = tmp_path / "counter.csv"
    src.write_text("period,value\n" + "".join(f"{p},{100 + 9 * i}\n"
                                              for i, p in enumerate(range(-10, -4))))
    out = tmp_path / "out"
    proc = run_cli("forecast", src, "--horizon", 3, "--out", out, "--engine", "exact",
                   "--quiet")
    assert proc.returncode == 0, proc.stderr
    _assert_no_formula(out / "forecast.csv")
    assert pd.read_csv(out / "forecast.csv")["period"].tolist() == [-4, -3, -2]


@pytest.mark.parametrize("other", ["a ", " a", "\ta"])
def test_names_differing_in_blanks_are_refused(tmp_path, run_cli, snapshot, user_error, other):
    data = tmp_path / "input"
    data.mkdir()
    panel = data / "stores.csv"
    rows = [("a", f"2021Q{q}", 100 + q) for q in (1, 2, 3)]
    rows += [(other, f"2022Q{q}", 120 + q) for q in (1, 2, 3)]
    panel.write_text("series,period,value\n" + "".join(f"{s},{p},{v}\n" for s, p, v in rows))
    before = snapshot(data)
    out = tmp_path / "out"
    proc = run_cli("batch", panel, "--horizon", 2, "--out", out, "--workers", 1)
    line = user_error(proc, "stores.csv, row 5, column 'series'", repr(other),
                      "write it the same way in every row")
    assert "(row 2)" in line
    assert not out.exists()
    assert snapshot(data) == before


def test_no_csv_writer_bypasses_the_helper():
    """Every ``to_csv`` call of the package is the helper's own or a hidden batch chunk."""
    root = Path(__file__).resolve().parents[2] / "bayesgrowth"
    allowed = {"data/export.py", "batch/store.py", "data/make_demo.py"}
    found = {str(p.relative_to(root)) for p in root.rglob("*.py") if ".to_csv(" in p.read_text()}
    assert found <= allowed, found - allowed
