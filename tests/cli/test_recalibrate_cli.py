"""``--recalibrate`` on the command line: forecast and batch say so, and bad options exit 2."""

import json

import numpy as np
import pandas as pd
import pytest

from bayesgrowth.cli import main
from bayesgrowth.data.demo import demo_path

BASE_COLUMNS = ["period", "step", "mean", "median", "lower_50", "upper_50", "lower_80",
                "upper_80", "lower_95", "upper_95"]


def _outcomes(n: int, min_train: int, horizon: int) -> int:
    # A rolling-origin backtest with stride 1 scores, from the origin after k training
    # points, the next min(horizon, n - k) observations.
    return sum(min(horizon, n - k) for k in range(min_train, n))


def test_forecast_recalibrate_says_so_everywhere(tmp_path, capsys):
    out = tmp_path / "out"
    rc = main(["forecast", str(demo_path()), "-H", "4", "--out", str(out), "--recalibrate",
               "--min-train", "10", "--quiet"])
    assert rc == 0
    n = _outcomes(20, 10, 4)  # the demo has 20 quarters
    summary = json.loads((out / "summary.json").read_text())
    info = summary["recalibrated"]
    assert info["method"] == "quantile" and info["n_outcomes"] == n
    assert len(info["effective_n"]) == 4 and all(0 < e <= n for e in info["effective_n"])
    assert info["min_train"] == 10 and info["origins"] == 10
    assert f"recalibrated from {n} outcomes" in summary["cautions"][0]
    table = pd.read_csv(out / "forecast.csv")
    assert list(table.columns[:10]) == BASE_COLUMNS  # the contract's columns, in place
    assert list(table["recalibration_outcomes"]) == [n] * 4
    printed = capsys.readouterr().out
    assert f"bands recalibrated from {n} backtest outcomes" in printed
    assert summary["final_period"]["upper_95"] == pytest.approx(table["upper_95"].iloc[-1],
                                                                rel=1e-5)


def test_forecast_recalibrate_matches_the_python_api(tmp_path):
    import warnings

    import bayesgrowth as bg
    from bayesgrowth.backtest.recalibrate import recalibrate

    out = tmp_path / "out"
    assert main(["forecast", str(demo_path()), "-H", "3", "--out", str(out), "--recalibrate",
                 "--quiet"]) == 0
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        fc = bg.GrowthModel(seed=1).fit(bg.load_demo()).forecast(3)
        fixed = recalibrate(fc)  # default first training set: half the history
    table = pd.read_csv(out / "forecast.csv")
    for col in ("median", "lower_80", "upper_80", "lower_95", "upper_95"):
        np.testing.assert_allclose(table[col], fixed.table[col], rtol=1e-5)
    assert fixed.recalibrated["min_train"] == 10


@pytest.mark.parametrize("extra, fragment", [
    (["--min-train", "8"], "--min-train: only with --recalibrate"),
    (["--recalibrate", "--min-train", "19"], "give a --min-train from 3 to 18"),
    (["--recalibrate", "--min-train", "2"], "--min-train 2: must be at least 3"),
])
def test_bad_recalibrate_options_exit_2_and_write_nothing(tmp_path, capsys, extra, fragment):
    out = tmp_path / "out"
    rc = main(["forecast", str(demo_path()), "-H", "3", "--out", str(out), "--quiet", *extra])
    assert rc == 2
    err = capsys.readouterr().err.strip()
    assert err.count("\n") == 0 and fragment in err and "Traceback" not in err
    assert not out.exists() or not any(p.name.endswith((".csv", ".json")) for p in out.iterdir())


def test_batch_recalibrate_pools_the_panel(tmp_path, capsys):
    from bayesgrowth.data.panel import invented_panel

    path = tmp_path / "panel.csv"
    invented_panel(5, min_periods=12, max_periods=16, seed=3).to_csv(path, index=False)
    lengths = pd.read_csv(path).groupby("series").size()
    out = tmp_path / "out"
    rc = main(["batch", str(path), "-H", "3", "--out", str(out), "--recalibrate",
               "--min-train", "9", "--workers", "1", "--quiet"])
    assert rc == 0
    n = sum(_outcomes(int(k), 9, 3) for k in lengths)
    forecast = pd.read_csv(out / "forecast.csv")
    assert list(forecast.columns[:11]) == ["series", *BASE_COLUMNS]
    summary = pd.read_csv(out / "summary.csv")
    assert list(summary["recalibration_outcomes"]) == [n] * 5
    printed = capsys.readouterr().out
    assert f"quarterly series: bands recalibrated from {n} backtest outcomes" in printed
    assert "backtests of 5 quarterly series pooled" in printed
    rc = main(["batch", str(path), "-H", "3", "--out", str(tmp_path / "o2"), "--min-train", "9",
               "--quiet"])
    assert rc == 2 and "--min-train: only with --recalibrate" in capsys.readouterr().err


def _quarters(n: int) -> str:
    return "period,value\n" + "".join(
        f"{2024 + i // 4}Q{i % 4 + 1},{100 + 5 * i}\n" for i in range(n))


@pytest.mark.parametrize("extra", [[], ["--min-train", "3"]])
@pytest.mark.parametrize("n", [3, 4])
def test_recalibrate_too_short_says_so_and_suggests_no_impossible_min_train(
        tmp_path, capsys, n, extra):
    from bayesgrowth.backtest.recalibrate import MIN_ORIGINS
    from bayesgrowth.cli.recalibration import SHORTEST_RECALIBRATED
    from bayesgrowth.data.series import MIN_OBSERVATIONS

    assert SHORTEST_RECALIBRATED == MIN_OBSERVATIONS + MIN_ORIGINS
    path = tmp_path / "short.csv"
    path.write_text(_quarters(n))
    out = tmp_path / "out"
    rc = main(["forecast", str(path), "-H", "2", "--out", str(out), "--quiet", "--recalibrate",
               *extra])
    err = capsys.readouterr().err.strip()
    assert rc == 2 and err.count("\n") == 0, err
    assert f"has {n} observations, too short for its backtest" in err
    assert "at least 5" in err and "at most" not in err
    assert not out.exists()


def test_recalibrate_advice_is_a_range_that_is_accepted(tmp_path, capsys):
    path = tmp_path / "five.csv"
    path.write_text(_quarters(5))
    rc = main(["forecast", str(path), "-H", "1", "--out", str(tmp_path / "no"), "--quiet",
               "--recalibrate", "--min-train", "4"])
    err = capsys.readouterr().err
    assert rc == 2 and "give a --min-train of 3" in err
    assert main(["forecast", str(path), "-H", "1", "--out", str(tmp_path / "yes"), "--quiet",
                 "--recalibrate", "--min-train", "3"]) == 0


def test_batch_recalibrate_on_a_panel_too_short_says_so(tmp_path, capsys):
    path = tmp_path / "panel.csv"
    rows = [f"{name},{line}" for name, n in (("A", 3), ("B", 4))
            for line in _quarters(n).splitlines()[1:]]
    path.write_text("series,period,value\n" + "\n".join(rows) + "\n")
    out = tmp_path / "out"
    rc = main(["batch", str(path), "-H", "1", "--out", str(out), "--recalibrate", "--quiet",
               "--workers", "1"])
    err = capsys.readouterr().err.strip()
    assert rc == 2 and err.count("\n") == 0, err
    assert "every series is too short for its backtest (the longest has 4" in err
    assert "at least 5" in err and "at most" not in err
    assert not out.exists()
