"""``bayesgrowth backtest`` end to end on the bundled demo, and its one-line usage errors."""

from __future__ import annotations

import subprocess
import sys

import pandas as pd
import pytest

from bayesgrowth.cli.backtest import OUTPUT_FILES, output_files
from bayesgrowth.cli.main import main
from bayesgrowth.cli.output import MANIFEST
from bayesgrowth.data.demo import demo_path


def _run(argv, capsys):
    code = main(argv)
    out = capsys.readouterr()
    return code, out.out, out.err


def test_backtest_writes_every_file_and_prints_verdicts(tmp_path, capsys):
    out = tmp_path / "bt"
    code, stdout, stderr = _run(
        ["backtest", str(demo_path()), "--horizon", "3", "--min-train", "10", "--out", str(out),
         "--methods", "exact,log-linear, anchored,revenue-scale,naive", "--levels", "50,80",
         "--draws", "250", "--quiet"],
        capsys,
    )
    assert code == 0, stderr
    methods = ["exact", "log-linear, anchored", "revenue-scale", "naive"]
    assert sorted(p.name for p in out.iterdir()) == sorted([*output_files(methods), MANIFEST])
    assert set(OUTPUT_FILES) < set(output_files(methods))
    assert "backtest_model_log-linear-anchored.png" in output_files(methods)
    forecasts = pd.read_csv(out / "backtest_forecasts.csv")
    for col in ("method", "origin", "step", "period", "actual", "median", "lower_80",
                "upper_80", "pit", "crps", "log_score"):
        assert col in forecasts.columns
    assert "lower_95" not in forecasts.columns
    assert list(pd.unique(forecasts["method"])) == [
        "exact", "log-linear, anchored", "revenue-scale", "naive"
    ]
    scores = pd.read_csv(out / "backtest_scores.csv")
    for col in ("method", "step", "n", "coverage_50", "coverage_80", "crps", "log_score",
                "abs_pct_error_median", "verdict"):
        assert col in scores.columns
    assert set(scores["step"].astype(str)) == {"1", "2", "3", "all"}
    diagnostics = pd.read_csv(out / "backtest_diagnostics.csv")
    assert set(diagnostics["method"]) == {"exact"} and len(diagnostics) == 10
    for png in (n for n in output_files(methods) if n.endswith(".png")):
        assert (out / png).read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    for method in ("exact", "log-linear, anchored", "naive"):
        assert any(line.strip().startswith(f"{method}: ") and "80% bands held" in line
                   for line in stdout.splitlines())
    assert "revenue-scale: no bands (point forecast)" in stdout
    assert "caution:" in stdout and "not investment advice" in stdout
    assert "overlapping origins" in stdout


def test_default_models_are_compared_ranked_and_drawn_one_figure_each(tmp_path, capsys):
    out = tmp_path / "bt"
    code, stdout, stderr = _run(
        ["backtest", str(demo_path()), "-H", "2", "--min-train", "14", "--out", str(out),
         "--quiet"], capsys)
    assert code == 0, stderr
    names = ["default", "exponential", "log-linear"]
    assert sorted(p.name for p in out.iterdir()) == sorted([*output_files(names), MANIFEST])
    for png in ("backtest_model_default.png", "backtest_model_exponential.png",
                "backtest_model_log-linear.png"):
        assert (out / png).read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    forecasts = pd.read_csv(out / "backtest_forecasts.csv")
    assert list(pd.unique(forecasts["method"])) == names
    ranking = pd.read_csv(out / "backtest_ranking.csv")
    top = ranking[ranking["step"].astype(str) == "all"]
    assert sorted(top["method"]) == sorted(names) and top["rank"].tolist() == [1, 2, 3]
    for col in ("score", "mean", "diff", "diff_se", "dm_stat", "p_value", "verdict"):
        assert col in ranking.columns
    bias = pd.read_csv(out / "backtest_bias.csv")
    assert set(bias["method"]) == set(names) and {"share_below", "p_value"} <= set(bias)
    lines = stdout.splitlines()
    assert any(line.startswith("ranking by mean CRPS") for line in lines)
    assert any(line.strip().startswith("1. ") and "(best)" in line for line in lines)
    assert "  default: local-trend (mean-reverting)" in stdout
    assert any("80% band:" in line and "binomial test" in line for line in lines)


def test_named_models_label_every_file(tmp_path, capsys):
    out = tmp_path / "bt"
    code, stdout, stderr = _run(
        ["backtest", str(demo_path()), "-H", "1", "--min-train", "16", "--out", str(out),
         "--models", "exponential,naive,log-linear-anchored", "--quiet"], capsys)
    assert code == 0, stderr
    names = ["exponential", "naive", "log-linear-anchored"]
    assert sorted(p.name for p in out.iterdir()) == sorted([*output_files(names), MANIFEST])
    for table in ("forecasts", "scores", "ranking"):
        frame = pd.read_csv(out / f"backtest_{table}.csv")
        assert set(frame["method"]) == set(names), table
    assert set(pd.read_csv(out / "backtest_diagnostics.csv")["method"]) == {"exponential"}


@pytest.mark.parametrize(
    ("extra", "needle"),
    [
        (["--models", "default", "--methods", "exact"], "--models and --methods"),
        (["--models", "exact,naive"], "--models 'exact,naive': unknown model 'exact'"),
        (["--models", "default/sideways"], "unknown modifier 'sideways'"),
        (["--models", "logistic/exact"], "logistic/nuts"),
        (["--models", "naive,naive"], "appears twice"),
        (["--models", "default,naive", "--model", "logistic"], "--models: name each model"),
    ],
)
def test_bad_models_exit_2_with_one_line(tmp_path, capsys, extra, needle):
    out = tmp_path / "never"
    code, stdout, stderr = _run(["backtest", str(demo_path()), "-H", "2", "--min-train", "10",
                                 "--out", str(out), "--quiet", *extra], capsys)
    assert code == 2
    lines = stderr.strip().splitlines()
    assert len(lines) == 1 and needle in lines[0], stderr
    assert not out.exists()


@pytest.mark.parametrize(
    ("extra", "needle"),
    [
        (["--horizon", "0"], "--horizon"),
        (["--min-train", "2"], "--min-train 2"),
        (["--min-train", "20"], "--min-train 20"),
        (["--window", "12"], "--window 12"),
        (["--stride", "0"], "--stride 0"),
        (["--methods", "exact,guesswork"], "--methods"),
        (["--engine", "nuts"], "--engine"),
        (["--levels", "80,150"], "--levels"),
        (["--growth-give-or-take", "-1"], "prior options"),
        (["--reference-period", "1999Q1"], "--reference-period 1999Q1"),
        # in the series, but after the first training set (10 of 20 quarters)
        (["--reference-period", "2025Q1"], "no observation of the backtest's first training set"),
        # the default model anchors its level at the first observation (2021Q1)
        (["--reference-period", "2021Q2"], "the local-trend model anchors its level"),
    ],
)
def test_bad_options_exit_2_with_one_line_and_no_files(tmp_path, capsys, extra, needle):
    out = tmp_path / "never"
    argv = ["backtest", str(demo_path()), "--horizon", "2", "--min-train", "10",
            "--out", str(out), "--quiet", *extra]
    code, stdout, stderr = _run(argv, capsys)
    assert code == 2
    lines = stderr.strip().splitlines()
    assert len(lines) == 1 and needle in lines[0], stderr
    assert "Traceback" not in stderr
    assert not out.exists()
    assert not list(tmp_path.iterdir())


def test_missing_file_and_bad_value_exit_2_from_a_fresh_process(tmp_path):
    bad = tmp_path / "bad.csv"
    bad.write_text("period,value\n2024Q1,100\n2024Q2,0\n2024Q3,120\n2024Q4,130\n")
    for path in (tmp_path / "absent.csv", bad):
        proc = subprocess.run(
            [sys.executable, "-m", "bayesgrowth", "backtest", str(path), "--horizon", "1",
             "--min-train", "3", "--out", str(tmp_path / "out")],
            capture_output=True, text=True,
        )
        assert proc.returncode == 2, proc.stderr
        assert len(proc.stderr.strip().splitlines()) == 1 and "Traceback" not in proc.stderr
        assert not (tmp_path / "out").exists()


def _quarters(n: int) -> str:
    return "period,value\n" + "".join(
        f"{2024 + i // 4}Q{i % 4 + 1},{100 + 5 * i}\n" for i in range(n))


@pytest.mark.parametrize("min_train", ["2", "3"])
def test_a_series_too_short_for_any_backtest_says_so(tmp_path, capsys, min_train):
    path = tmp_path / "three.csv"
    path.write_text(_quarters(3))
    out = tmp_path / "out"
    code, _, stderr = _run(["backtest", str(path), "-H", "1", "--min-train", min_train,
                            "--out", str(out), "--quiet"], capsys)
    assert code == 2 and len(stderr.strip().splitlines()) == 1, stderr
    assert "has only 3 points, too short for a backtest: it needs at least 4" in stderr
    assert "at most" not in stderr and not out.exists()


def test_min_train_advice_names_a_value_the_command_accepts(tmp_path, capsys):
    path = tmp_path / "four.csv"
    path.write_text(_quarters(4))
    code, _, stderr = _run(["backtest", str(path), "-H", "1", "--min-train", "4",
                            "--out", str(tmp_path / "no"), "--quiet"], capsys)
    assert code == 2 and "choose a --min-train of 3 so that" in stderr
    code, _, _ = _run(["backtest", str(path), "-H", "1", "--min-train", "3",
                       "--out", str(tmp_path / "yes"), "--quiet", "--methods", "naive"], capsys)
    assert code == 0


def test_help_names_every_file_the_command_writes(capsys):
    with pytest.raises(SystemExit):
        main(["backtest", "--help"])
    text = " ".join(capsys.readouterr().out.split())
    for name in [*OUTPUT_FILES, "backtest_model_NAME.png"]:
        assert name in text, name
