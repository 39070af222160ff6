"""User errors exit 2 with one plain line naming the file, row or option and the fix.

Exit code 1 stays for the tool's own failures. Each case also checks that nothing
was written and that the input is untouched.
"""

from __future__ import annotations

import os

import pytest

from bayesgrowth.cli import main

QUARTERS = "period,value\n2023Q1,100\n2023Q2,110\n2023Q3,121\n2023Q4,133\n"


def _case(tmp_path, name: str, text: str | bytes):
    data = tmp_path / "input"
    data.mkdir()
    src = data / name
    src.write_bytes(text if isinstance(text, bytes) else text.encode())
    return data, src


def _refused(tmp_path, run_cli, snapshot, user_error, name, text, *fragments, command="forecast",
             extra=()):
    data, src = _case(tmp_path, name, text)
    before = snapshot(data)
    out = tmp_path / "out"
    argv = [command, src, "--horizon", 4, "--out", out, *extra]
    if command != "batch":
        argv += ["--engine", "exact"]
    line = user_error(run_cli(*argv), *fragments)
    assert not out.exists()
    assert snapshot(data) == before
    return line


@pytest.mark.parametrize("command", ["forecast", "batch"])
def test_duplicate_header_is_refused(tmp_path, run_cli, snapshot, user_error, command):
    text = ("series,period,value,value\n" + "".join(f"a,2023Q{q},{100 + q},{q}\n"
                                                    for q in (1, 2, 3, 4)))
    _refused(tmp_path, run_cli, snapshot, user_error, "sales.csv", text,
             "sales.csv, row 1: column 'value' appears twice", "columns 3 and 4",
             "rename or delete one", command=command)


def test_period_number_beyond_int64_is_refused(tmp_path, run_cli, snapshot, user_error):
    text = "period,value\n1,100\n2,110\n99999999999999999999,121\n"
    _refused(tmp_path, run_cli, snapshot, user_error, "count.csv", text,
             "count.csv, row 4, column 'period'", "9223372036854775807",
             "number the periods 1, 2, 3")


def test_period_span_is_bounded(tmp_path, run_cli, snapshot, user_error):
    """A label just inside int64 must not make the calendar hold 9.2e18 periods."""
    text = "period,value\n1,100\n2,110\n9223372036854775806,121\n"
    _refused(tmp_path, run_cli, snapshot, user_error, "count.csv", text,
             "count.csv, row 4, column 'period'", "at most 10,000 periods")


@pytest.mark.parametrize("last, fix", [
    ("9999Q3", "forecast at most 1 period(s)"),
    ("9999Q4", "the calendar ends there"),
])
def test_calendar_past_9999_is_refused(tmp_path, run_cli, snapshot, user_error, last, fix):
    q = int(last[-1])
    periods = [f"9999Q{k}" for k in range(q - 2, q + 1)] if q >= 3 else []
    text = "period,value\n" + "".join(f"{p},{100 + 10 * i}\n" for i, p in enumerate(periods))
    _refused(tmp_path, run_cli, snapshot, user_error, "late.csv", text,
             "--horizon 4", f"ends in {last}", "past the year 9999", fix)


def test_dates_past_9999_are_refused(tmp_path, run_cli, snapshot, user_error):
    text = "period,value\n9999-10-31,100\n9999-11-30,110\n9999-12-31,121\n"
    _refused(tmp_path, run_cli, snapshot, user_error, "late.csv", text,
             "--horizon 4", "ends in 9999-12-31", "past the year 9999")


@pytest.mark.parametrize("command, seasonal", [("forecast", "yes"), ("forecast", "drifting"),
                                               ("report", "yes")])
def test_seasonal_factors_on_yearly_data_are_refused(tmp_path, run_cli, snapshot, user_error,
                                                     command, seasonal):
    text = "period,value\n" + "".join(f"{2015 + i},{100 + 20 * i}\n" for i in range(6))
    _refused(tmp_path, run_cli, snapshot, user_error, "years.csv", text,
             f"--seasonal {seasonal}: years.csv is not quarterly or monthly", "auto or give no",
             command=command, extra=("--seasonal", seasonal))


@pytest.mark.parametrize("name, text, fragments", [
    ("utf16.csv", QUARTERS.encode("utf-16"), ("utf16.csv: not a text CSV file", "UTF-8")),
    ("ragged.csv", "period,value\n2023Q1,100\n2023Q2,110,5\n2023Q3,121\n",
     ("ragged.csv, row 3: 3 cells, but the header has 2", "double quotes")),
    ("quote.csv", 'period,value\n2023Q1,100\n2023Q2,110\n2023Q3,"121\n',
     ("quote.csv, row 4: a double quote opens a cell", "close it")),
    ("empty.csv", "", ("empty.csv: the file is empty",)),
])
def test_unreadable_files(tmp_path, run_cli, snapshot, user_error, name, text, fragments):
    _refused(tmp_path, run_cli, snapshot, user_error, name, text, *fragments)


@pytest.mark.skipif(os.name != "posix" or os.geteuid() == 0,
                    reason="file permissions do not bind the superuser")
def test_file_without_read_permission(tmp_path, run_cli, user_error):
    data, src = _case(tmp_path, "locked.csv", QUARTERS)
    src.chmod(0)
    try:
        proc = run_cli("forecast", src, "--horizon", 4, "--out", tmp_path / "out",
                       "--engine", "exact")
    finally:
        src.chmod(0o644)
    user_error(proc, "locked.csv: cannot be read", "Permission denied")
    assert not (tmp_path / "out").exists()


def test_read_error_of_the_system_is_a_user_error(tmp_path, monkeypatch, capsys):
    """The same path in-process, for machines where the tests run as the superuser."""
    import pandas as pd

    src = tmp_path / "locked.csv"
    src.write_text(QUARTERS)

    def denied(*args, **kwargs):
        raise PermissionError(13, "Permission denied", str(src))

    monkeypatch.setattr(pd, "read_csv", denied)
    rc = main(["forecast", str(src), "--horizon", "4", "--out", str(tmp_path / "out"),
               "--engine", "exact"])
    err = capsys.readouterr().err.strip()
    assert rc == 2 and len(err.splitlines()) == 1
    assert "locked.csv: cannot be read (Permission denied)" in err
    assert not (tmp_path / "out").exists()


def test_own_failure_stays_exit_1(tmp_path, monkeypatch, capsys):
    import importlib

    fc_module = importlib.import_module("bayesgrowth.forecast.forecast")

    src = tmp_path / "sales.csv"
    src.write_text(QUARTERS)

    def broken(*args, **kwargs):
        raise RuntimeError("internal")

    monkeypatch.setattr(fc_module, "forecast", broken)
    rc = main(["forecast", str(src), "--horizon", "4", "--out", str(tmp_path / "out"),
               "--engine", "exact", "--quiet"])
    err = capsys.readouterr().err.strip()
    assert rc == 1 and len(err.splitlines()) == 1 and "unexpected failure" in err
    assert not (tmp_path / "out").exists()


@pytest.mark.parametrize("name", ["sales$q$.csv", "r$\\frac$.csv", "r$^$.csv"])
def test_dollar_signs_in_the_file_name(tmp_path, run_cli, snapshot, name):
    """Matplotlib reads $...$ as mathtext; the chart title must show the name as typed."""
    data, src = _case(tmp_path, name, QUARTERS)
    before = snapshot(data)
    out = tmp_path / "out"
    proc = run_cli("forecast", src, "--horizon", 4, "--out", out, "--engine", "exact",
                   "--unit", "US$ m $", "--quiet")
    assert proc.returncode == 0, proc.stderr
    assert (out / "fan_chart.png").stat().st_size > 0
    assert snapshot(data) == before


def test_dollar_title_is_drawn_as_typed():
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    from matplotlib import cbook

    from bayesgrowth.plots.plain import literal

    assert cbook.is_math_text(r"r$\frac$")  # what matplotlib would parse as mathtext
    assert not cbook.is_math_text(literal(r"r$\frac$"))
    fig, ax = plt.subplots()
    ax.set_title(literal(r"r$\frac$"))
    fig.canvas.draw()  # raised ValueError (mathtext) before the escape
    plt.close(fig)


@pytest.mark.parametrize("command, extra", [
    ("backtest", ("--min-train", 3)),
    ("report", ("--engine", "exact")),
    ("compare", ("--engine", "exact")),
    ("models", ("--engine", "exact")),
])
def test_constant_series_is_a_user_error_everywhere(tmp_path, run_cli, snapshot, user_error,
                                                    command, extra):
    data, src = _case(tmp_path, "flat.csv", "period,value\n" + "".join(
        f"2023Q{q},250\n" for q in (1, 2, 3, 4)))
    before = snapshot(data)
    out = tmp_path / "out"
    proc = run_cli(command, src, "--horizon", 2, "--out", out, *extra)
    user_error(proc, "flat.csv, column 'value': every value is 250")
    assert not out.exists()
    assert snapshot(data) == before


def test_batch_series_past_9999_fails_alone_before_fitting(tmp_path, run_cli):
    src = tmp_path / "panel.csv"
    rows = [("late", f"9999Q{q}", 100 + 10 * q) for q in (2, 3, 4)]
    rows += [("early", f"2020Q{q}", 100 + 10 * q) for q in (1, 2, 3)]
    src.write_text("series,period,value\n" + "".join(f"{s},{p},{v}\n" for s, p, v in rows))
    out = tmp_path / "out"
    proc = run_cli("batch", src, "--horizon", 2, "--out", out, "--workers", 1, "--quiet")
    assert proc.returncode == 3, proc.stderr
    reason = (out / "failures.csv").read_text().splitlines()[1]
    assert reason.startswith("late,") and "past the year 9999" in reason
    assert "Error" not in reason  # no Python exception name
