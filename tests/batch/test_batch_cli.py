"""The batch command: exit codes 0 / 3 / 2, one-line errors, resuming, input kept."""

import subprocess
import sys

import pandas as pd
import pytest

from bayesgrowth.cli import main
from bayesgrowth.cli.batch import EXIT_SOME_FAILED


def _batch(*args):
    return main(["batch", *map(str, args), "--engine", "exact", "--draws", "200", "--quiet"])


def test_all_good_exits_0_and_writes_three_files(tmp_path, good_csv, capsys):
    out = tmp_path / "out"
    assert _batch(good_csv, "-H", 3, "--out", out) == 0
    assert {"forecast.csv", "summary.csv", "failures.csv"} <= {p.name for p in out.iterdir()}
    assert len(pd.read_csv(out / "failures.csv")) == 0
    assert "6 of 6 series forecast" in capsys.readouterr().out


def test_some_failed_exits_3_and_resume_skips_finished(tmp_path, panel_csv, capsys):
    out = tmp_path / "out"
    assert EXIT_SOME_FAILED == 3
    assert _batch(panel_csv, "-H", 2, "--out", out, "--workers", 2) == 3
    err = capsys.readouterr().err
    assert "failed: panel.csv, series 'zero', row" in err
    assert _batch(panel_csv, "-H", 2, "--out", out) == 3
    assert "0 fitted now, 12 finished earlier" in capsys.readouterr().out


def test_bad_usage_exits_2_with_one_line_and_writes_nothing(tmp_path, good_csv, capsys):
    out = tmp_path / "out"
    cases = [
        (tmp_path / "missing.csv", "-H", 2, "--out", out),
        (good_csv, "-H", 2, "--out", out, "--series-col", "unit"),
        (good_csv, "-H", 2, "--out", out, "--seed", -1),
        (good_csv, "-H", 2, "--out", out, "--scheduler", "tcp://127.0.0.1:9"),
        (good_csv, "-H", 0, "--out", out),
        (good_csv, "-H", 2, "--out", good_csv),
    ]
    for args in cases:
        assert _batch(*args) == 2, args
        err = capsys.readouterr().err.strip()
        assert err.count("\n") == 0 and err.startswith("bayesgrowth"), err
        assert "Traceback" not in err
        assert not out.exists()
    assert good_csv.read_text().startswith("series,period,value")
    assert _batch(good_csv, "-H", 2, "--out", out) == 0
    assert _batch(good_csv, "-H", 3, "--out", out) == 2
    assert "other settings (horizon was 2, now 3)" in capsys.readouterr().err


def test_command_line_entry_point_exit_code(tmp_path, panel_csv):
    proc = subprocess.run(
        [sys.executable, "-m", "bayesgrowth", "batch", str(panel_csv), "-H", "2", "--out",
         str(tmp_path / "o"), "--engine", "exact", "--draws", "200", "--quiet"],
        capture_output=True, text=True,
    )
    assert proc.returncode == 3, proc.stderr
    assert "Traceback" not in proc.stderr


def test_cautions_printed_with_the_forecasts(tmp_path, good_csv, capsys):
    # The invented series have 9 to 14 quarters: a horizon of 3 is within half of every
    # history, a horizon of 5 more than half of those shorter than 10 quarters only.
    from bayesgrowth.forecast.forecast import CAUTION

    assert _batch(good_csv, "-H", 3, "--out", tmp_path / "short") == 0
    out = capsys.readouterr().out
    assert f"caution: {CAUTION}" in out
    assert "more than half the history" not in out
    spans = pd.read_csv(good_csv).groupby("series").size()
    long = sorted(spans[spans < 10].index)
    assert long and len(long) < len(spans)
    assert _batch(good_csv, "-H", 5, "--out", tmp_path / "long") == 0
    line = [x for x in capsys.readouterr().out.splitlines() if "more than half" in x]
    assert len(line) == 1
    assert f"history of {len(long)} of {len(spans)} series" in line[0]
    assert all(repr(str(name)) in line[0] for name in long)


def test_a_fixed_curve_batch_gets_its_caution(tmp_path, good_csv, capsys):
    # as forecast --model exponential prints it (independent errors: bands too narrow)
    from bayesgrowth.forecast.forecast import FIXED_CURVE_CAUTION

    assert _batch(good_csv, "-H", 3, "--out", tmp_path / "o", "--model", "exponential") == 0
    assert f"caution: {FIXED_CURVE_CAUTION}" in capsys.readouterr().out


def test_help_gives_every_exit_code(capsys):
    # the exit codes of docs/many-series.md other than 1 (unexpected) and 130/143 (stopped)
    with pytest.raises(SystemExit):
        main(["batch", "--help"])
    text = " ".join(capsys.readouterr().out.split())
    for code in ("0: all series done", "3: some series failed", "4: sampling diagnostics "
                 "failed", "2: bad input"):
        assert code in text, code
