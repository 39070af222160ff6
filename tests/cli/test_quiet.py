"""``--quiet`` drops progress messages, never a note about the user's data."""

from __future__ import annotations

import numpy as np
import pytest

from bayesgrowth.cli import main
from bayesgrowth.cli.progress import QUIET_HELP

GAP = "period,value\n2024Q1,100\n2024Q2,110\n2024Q4,130\n2025Q1,140\n2025Q2,150\n2025Q3,161\n"


@pytest.mark.parametrize("quiet", [[], ["--quiet"]])
def test_a_missing_period_is_noted_with_or_without_quiet(tmp_path, capsys, quiet):
    path = tmp_path / "gap.csv"
    path.write_text(GAP)
    assert main(["forecast", str(path), "-H", "2", "--out", str(tmp_path / "o"), *quiet]) == 0
    err = capsys.readouterr().err
    assert "note: gap.csv: 1 missing period(s) (2024Q3)" in err
    assert ("fitting gap" in err) is not bool(quiet)  # the progress message alone goes


def test_batch_notes_a_missing_period_with_quiet(tmp_path, capsys):
    rows = [f"{name},{line}" for name in ("A", "B") for line in GAP.splitlines()[1:]
            if not (name == "B" and line.startswith("2024Q4"))]
    path = tmp_path / "panel.csv"
    path.write_text("series,period,value\n" + "\n".join(rows) + "\n")
    assert main(["batch", str(path), "-H", "1", "--out", str(tmp_path / "o"), "--quiet",
                 "--workers", "1"]) == 0
    err = capsys.readouterr().err
    assert "note:" in err and "2024Q3" in err and "2024Q4" in err


@pytest.mark.parametrize("command", ["forecast", "batch", "pool", "backtest", "report"])
def test_quiet_help_says_notes_and_cautions_stay(command, capsys):
    with pytest.raises(SystemExit):
        main([command, "--help"])
    assert " ".join(capsys.readouterr().out.split()).count(" ".join(QUIET_HELP.split())) == 1


def test_plain_numbered_periods_are_counted_without_a_frequency(tmp_path, capsys):
    from bayesgrowth.backtest.recalibrate import pooled_source
    from bayesgrowth.report.html import _periods_words

    path = tmp_path / "numbered.csv"
    path.write_text("period,value\n" + "".join(f"{i},{100 * 1.05**i:.2f}\n"
                                               for i in range(1, 21)))
    assert main(["forecast", str(path), "-H", "2", "--out", str(tmp_path / "o")]) == 0
    out, err = capsys.readouterr()
    assert "fitting numbered (20 observations)" in err and "per period" not in err
    assert "numbered: forecast for period 22 (2 periods ahead)" in out
    assert _periods_words("per period") == "" and _periods_words("quarterly") == (
        "; quarterly periods")
    assert pooled_source("per period", 3, np.array([0.5]), (80,))["where"] == (
        "backtests of 3 series pooled")


@pytest.mark.parametrize("terminal", [True, False])
def test_progress_bars_only_on_a_terminal(tmp_path, capsys, monkeypatch, terminal):
    # a bar redraws its line with carriage returns: in a log file or a pipe it would leave
    # one half-line per update, so there only the progress messages are written
    import sys

    from bayesgrowth.data.demo import demo_path

    monkeypatch.setattr(sys.stderr, "isatty", lambda: terminal)
    assert main(["backtest", str(demo_path()), "-H", "2", "--min-train", "16",
                 "--out", str(tmp_path / "o")]) == 0
    err = capsys.readouterr().err
    assert ("backtest origins" in err) is terminal
    assert ("\r" in err) is terminal
