"""Input that used to be accepted with a misleading result is read correctly or refused.

Calendar facts used below (month lengths, 2024 a leap year) are those of the
Gregorian calendar; Python's own ``calendar`` module gives the same.
"""

from __future__ import annotations

import argparse

import pandas as pd
import pytest

from bayesgrowth.cli import main
from bayesgrowth.cli.acceptance import EXIT_DIAGNOSTICS, diagnostics_exit

GROWING = (100, 110, 121, 133, 146, 161)


def _write(path, periods, values=GROWING):
    path.write_text("period,value\n" + "".join(f"{p},{v}\n" for p, v in zip(periods, values,
                                                                         strict=False)))
    return path


def _forecast(run_cli, src, out, *extra):
    return run_cli("forecast", src, "--horizon", 4, "--out", out, "--engine", "exact",
                   "--quiet", *extra)


def _summary(out):
    import json

    return json.loads((out / "summary.json").read_text())


def test_compact_dates_are_dates(tmp_path, run_cli):
    src = _write(tmp_path / "ends.csv", ["20240131", "20240229", "20240331", "20240430"])
    out = tmp_path / "out"
    proc = _forecast(run_cli, src, out)
    assert proc.returncode == 0, proc.stderr
    periods = pd.read_csv(out / "forecast.csv", dtype={"period": str})["period"].tolist()
    assert periods == ["20240531", "20240630", "20240731", "20240831"]  # month ends
    summary = _summary(out)
    assert summary["frequency"] == "monthly" and summary["input"]["missing_periods"] == []


def test_compact_months_are_months(tmp_path, run_cli):
    """As whole numbers, 202412 to 202501 would be 89 periods apart."""
    src = _write(tmp_path / "months.csv", ["202410", "202411", "202412", "202501"])
    out = tmp_path / "out"
    proc = _forecast(run_cli, src, out)
    assert proc.returncode == 0, proc.stderr
    periods = pd.read_csv(out / "forecast.csv", dtype={"period": str})["period"].tolist()
    assert periods == ["202502", "202503", "202504", "202505"]
    summary = _summary(out)
    assert summary["frequency"] == "monthly" and summary["input"]["missing_periods"] == []


@pytest.mark.parametrize("bad, row", [("20240230", 3), ("20241301", 3)])
def test_compact_date_that_is_no_date_is_refused(tmp_path, run_cli, snapshot, user_error,
                                                 bad, row):
    src = _write(tmp_path / "ends.csv", ["20240131", bad, "20240331"])
    before = snapshot(tmp_path)
    proc = _forecast(run_cli, src, tmp_path / "out")
    user_error(proc, f"ends.csv, row {row}, column 'period'", repr(bad), "2024-01-31")
    assert snapshot(tmp_path) == before


@pytest.mark.parametrize("value, column", [
    ("1_100", "value"),            # Python's float() reads this as 1100
    ("١١٠", "value"),              # Arabic-Indic digits: float() reads 110
    ("１１０", "value"),            # full-width digits: float() reads 110
])
def test_numbers_only_in_plain_digits(tmp_path, run_cli, snapshot, user_error, value, column):
    src = _write(tmp_path / "sales.csv", ["2024Q1", "2024Q2", "2024Q3"], [100, value, 121])
    before = snapshot(tmp_path)
    proc = _forecast(run_cli, src, tmp_path / "out")
    user_error(proc, f"sales.csv, row 3, column '{column}'", repr(value), "digits 0-9")
    assert snapshot(tmp_path) == before


def test_periods_only_in_plain_digits(tmp_path, run_cli, snapshot, user_error):
    src = _write(tmp_path / "count.csv", ["1", "٢", "3"])  # int() reads "٢" as 2
    before = snapshot(tmp_path)
    proc = _forecast(run_cli, src, tmp_path / "out")
    user_error(proc, "count.csv, row 3, column 'period'", "digits 0-9")
    assert snapshot(tmp_path) == before


def test_constant_series_is_refused(tmp_path, run_cli, snapshot, user_error):
    src = _write(tmp_path / "flat.csv", ["2024Q1", "2024Q2", "2024Q3", "2024Q4"], [250] * 4)
    before = snapshot(tmp_path)
    proc = _forecast(run_cli, src, tmp_path / "out")
    user_error(proc, "flat.csv, column 'value'", "every value is 250", "zero width")
    assert snapshot(tmp_path) == before


def test_constant_series_in_a_batch_fails_alone(tmp_path, run_cli):
    src = tmp_path / "panel.csv"
    rows = [("flat", q, 250) for q in (1, 2, 3, 4)]
    rows += [("grows", q, v) for q, v in zip((1, 2, 3, 4), GROWING, strict=False)]
    src.write_text("series,period,value\n" + "".join(f"{s},2024Q{q},{v}\n" for s, q, v in rows))
    out = tmp_path / "out"
    proc = run_cli("batch", src, "--horizon", 2, "--out", out, "--workers", 1, "--quiet")
    assert proc.returncode == 3, proc.stderr  # some series failed, the others finished
    failures = pd.read_csv(out / "failures.csv")
    assert failures["series"].tolist() == ["flat"]
    assert "every value is 250" in failures["reason"].iloc[0]
    assert pd.read_csv(out / "summary.csv")["series"].tolist() == ["grows"]


def test_accept_warnings_is_described_in_help(capsys):
    for command in ("forecast", "compare", "backtest", "report", "batch", "models"):
        with pytest.raises(SystemExit):
            main([command, "--help"])
        text = " ".join(capsys.readouterr().out.split())
        assert "--accept-warnings" in text, command
        assert f"exits with code {EXIT_DIAGNOSTICS}" in text, command


def test_failed_diagnostics_exit_code(capsys):
    plain = argparse.Namespace(accept_warnings=False)
    assert diagnostics_exit(plain, [], "out") == 0
    assert diagnostics_exit(plain, ["bulk ESS 32 below 400"], "out") == EXIT_DIAGNOSTICS
    line = capsys.readouterr().err.strip()
    assert "bulk ESS 32 below 400" in line and "--accept-warnings" in line and "\n" not in line
    accepted = argparse.Namespace(accept_warnings=True)
    assert diagnostics_exit(accepted, ["bulk ESS 32 below 400"], "out") == 0
    assert "accepted with --accept-warnings" in capsys.readouterr().err


@pytest.mark.slow
def test_failed_sampling_exits_non_zero_unless_accepted(tmp_path, run_cli):
    """Twenty draws per chain cannot reach the bulk ESS threshold of 400 (seeded)."""
    src = _write(tmp_path / "sales.csv", ["2024Q1", "2024Q2", "2024Q3", "2024Q4"])
    common = ("--horizon", 2, "--engine", "nuts", "--model", "exponential", "--draws", 20,
              "--chains", 2, "--seed", 3, "--quiet")
    proc = run_cli("forecast", src, "--out", tmp_path / "a", *common)
    assert proc.returncode == EXIT_DIAGNOSTICS, proc.stderr
    assert "--accept-warnings" in proc.stderr.strip().splitlines()[-1]
    assert (tmp_path / "a" / "summary.json").exists()  # written, and says it failed
    proc = run_cli("forecast", src, "--out", tmp_path / "b", *common, "--accept-warnings")
    assert proc.returncode == 0, proc.stderr
