"""The command line end to end: contracts, reproducibility, bad input."""

import json
import subprocess
import sys

import pandas as pd
import pytest

from bayesgrowth.cli import main
from bayesgrowth.cli.output import MANIFEST
from bayesgrowth.data.demo import demo_path

GOOD = "period,value\n2023Q1,100\n2023Q2,108\n2023Q3,119\n2023Q4,127\n2024Q1,140\n2024Q2,150\n"


@pytest.fixture
def good_csv(tmp_path):
    path = tmp_path / "revenue.csv"
    path.write_text(GOOD)
    return path


def _run(argv):
    return main(argv)


def test_forecast_exact_follows_the_contract(tmp_path, good_csv, capsys):
    out = tmp_path / "out"
    rc = _run(["forecast", str(good_csv), "--horizon", "4", "--out", str(out), "--engine",
               "exact", "--target", "200", "--quiet"])
    assert rc == 0
    assert sorted(p.name for p in out.iterdir()) == [
        MANIFEST, "fan_chart.png", "forecast.csv", "summary.json"]  # posterior.nc on request
    fc = pd.read_csv(out / "forecast.csv")
    assert list(fc.columns[:4]) == ["period", "step", "mean", "median"]
    for level in (50, 80, 95):
        assert f"lower_{level}" in fc and f"upper_{level}" in fc
    assert list(fc["period"]) == ["2024Q3", "2024Q4", "2025Q1", "2025Q2"]
    summary = json.loads((out / "summary.json").read_text())
    for key in ("growth_per_period", "initial_value"):
        assert set(summary[key]) >= {"median", "lower_95", "upper_95"}
    assert set(summary["diagnostics"]) >= {"max_rhat", "min_ess_bulk", "divergences", "ok"}
    assert summary["engine"] == "exact"
    assert summary["seed"] == 1
    assert "target" in summary
    printed = capsys.readouterr().out
    assert "not investment advice" in printed
    assert (out / "fan_chart.png").read_bytes()[:4] == b"\x89PNG"


def test_same_seed_identical_forecast_csv(tmp_path, good_csv):
    for name in ("a", "b"):
        assert _run(["forecast", str(good_csv), "-H", "3", "--out", str(tmp_path / name),
                     "--engine", "exact", "--seed", "9", "--quiet"]) == 0
    assert (tmp_path / "a" / "forecast.csv").read_bytes() == (
        tmp_path / "b" / "forecast.csv").read_bytes()


def test_levels_option(tmp_path, good_csv):
    assert _run(["forecast", str(good_csv), "-H", "2", "--out", str(tmp_path / "o"),
                 "--engine", "exact", "--levels", "60,90", "--quiet"]) == 0
    cols = pd.read_csv(tmp_path / "o" / "forecast.csv").columns
    assert "lower_60" in cols and "upper_90" in cols and "lower_80" not in cols


BAD_INPUTS = {
    "zero": ("period,value\n2024Q1,10\n2024Q2,0\n2024Q3,12\n", "row 3"),
    "negative": ("period,value\n2024Q1,10\n2024Q2,-1\n2024Q3,12\n", "above zero"),
    "duplicate": ("period,value\n2024Q1,10\n2024Q1,11\n2024Q3,12\n", "repeats row 2"),
    "text": ("period,value\n2024Q1,10\n2024Q2,lots\n2024Q3,12\n", "not a number"),
    "short": ("period,value\n2024Q1,10\n2024Q2,11\n", "at least 3"),
    "mixed": ("period,value\n2024Q1,10\n2024-05,11\n2024Q3,12\n", "frequency"),
}


@pytest.mark.parametrize("case", sorted(BAD_INPUTS))
@pytest.mark.parametrize("command", ["forecast", "compare"])
def test_bad_input_one_line_exit_2_no_files(tmp_path, case, command):
    text, fragment = BAD_INPUTS[case]
    path = tmp_path / "bad.csv"
    path.write_text(text)
    out = tmp_path / "out"
    proc = subprocess.run(
        [sys.executable, "-m", "bayesgrowth", command, str(path), "-H", "4", "--out", str(out),
         "--engine", "exact"],
        capture_output=True, text=True, check=False,
    )
    assert proc.returncode == 2
    lines = proc.stderr.strip().splitlines()
    assert len(lines) == 1, proc.stderr
    assert fragment in lines[0] and "bad.csv" in lines[0]
    assert "Traceback" not in proc.stderr
    assert not out.exists()
    assert path.read_text() == text  # the input is untouched


@pytest.mark.parametrize(
    ("argv", "fragment"),
    [
        (["forecast", "{f}", "--out", "{o}"], "--horizon"),
        (["forecast", "{f}", "-H", "0", "--out", "{o}"], "at least 1"),
        (["forecast", "{f}", "-H", "3", "--out", "{o}", "--levels", "80,120"], "got 120 ("),
        (["forecast", "{f}", "-H", "3", "--out", "{o}", "--engine", "gibbs"], "--engine"),
        (["forecast", "{f}", "-H", "3", "--out", "{o}", "--noise", "-3"], "noise"),
        (["forecast", "{f}", "-H", "3", "--out", "{o}", "--reference-period", "1999Q1"],
         "--reference-period 1999Q1: no observation of"),
        (["forecast", "{f}", "-H", "3", "--out", "{o}", "--reference-period", "2023Q2"],
         "--reference-period 2023Q2: the local-trend model anchors its level at the first "
         "observation (2023Q1); leave the option out, or fit only curves (exponential,"),
        (["forecast", "{f}", "-H", "3", "--out", "{o}", "--value-col", "sales"], "--value-col"),
        (["forecast", "{f}", "-H", "3", "--out", "{o}", "--target", "-5"], "--target -5: must"),
        (["forecast", "{f}", "-H", "3", "--out", "{o}", "--model", "exponential", "--seasonal",
          "drifting"], "drifting seasonal factors need the local-trend model"),
        # a misspelt option is named before the required option it left out
        (["forecast", "{f}", "--horizn", "3", "--out", "{o}"],
         "unknown option --horizn; did you mean --horizon?"),
        (["forecast", "{f}", "-H", "3", "--out={o}", "--levls=80"],
         "unknown option --levls; did you mean --levels?"),
        (["forecast", "{f}", "-H", "3", "--out", "{o}", "--zzz"], "unknown option --zzz (see"),
        (["forecast", "{f}", "-H", "3", "--out", "{o}", "--s", "1"],
         "ambiguous option: --s could match"),
        (["forcast", "{f}", "-H", "3", "--out", "{o}"], "; did you mean 'forecast'?"),
    ],
)
def test_bad_options(tmp_path, good_csv, capsys, argv, fragment):
    out = tmp_path / "out"
    argv = [a.format(f=good_csv, o=out) for a in argv] + ["--quiet", "--engine", "exact"] * (
        "--engine" not in argv)
    assert _run(argv) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and fragment in err[0]
    assert not out.exists()


def test_an_option_cut_short_still_reads_as_the_option_it_starts(tmp_path, good_csv):
    # argparse's abbreviations (allow_abbrev) pass the check for unknown options
    out = tmp_path / "out"
    assert _run(["forecast", str(good_csv), "--hor", "2", "--out", str(out), "--quiet"]) == 0
    assert (out / "forecast.csv").exists()


def test_never_overwrites_the_input(tmp_path):
    path = tmp_path / "forecast.csv"
    path.write_text(GOOD)
    assert _run(["forecast", str(path), "-H", "2", "--out", str(tmp_path), "--engine", "exact",
                 "--quiet"]) == 2
    assert path.read_text() == GOOD


def test_existing_output_folder_keeps_other_files(tmp_path, good_csv):
    out = tmp_path / "out"
    out.mkdir()
    (out / "notes.txt").write_text("mine")
    assert _run(["forecast", str(good_csv), "-H", "2", "--out", str(out), "--engine", "exact",
                 "--quiet"]) == 0
    assert (out / "notes.txt").read_text() == "mine"
    assert not any(p.name.startswith(".bayesgrowth-") for p in tmp_path.iterdir())


def test_demo_command(tmp_path):
    out = tmp_path / "demo"
    assert _run(["demo", "--engine", "exact", "--out", str(out), "--quiet"]) == 0
    fc = pd.read_csv(out / "forecast.csv")
    assert len(fc) == 8 and fc["period"].iloc[0] == "2026Q1"


def test_compare_writes_contract(tmp_path):
    out = tmp_path / "cmp"
    assert _run(["compare", str(demo_path()), "-H", "6", "--out", str(out), "--engine", "exact",
                 "--quiet"]) == 0
    table = pd.read_csv(out / "comparison.csv")
    for col in ("variant", "n_points", "initial_value", "growth_per_period", "value_at_horizon",
                "bayes_median", "bayes_lower_80", "bayes_upper_80", "prob_at_least"):
        assert col in table
    assert {"log-linear", "revenue-scale", "log-linear, anchored"} <= set(table["variant"])
    assert (out / "comparison.png").exists()


@pytest.mark.parametrize(("model", "horizon"), [((), 12), (("--model", "exponential"), 4)])
def test_commands_showing_a_forecast_print_the_forecasts_cautions(tmp_path, capsys, model,
                                                                   horizon):
    # The demo has 20 quarters: a horizon of 12 is more than half of them, 4 is not; the
    # exponential curve (independent errors) has its own caution.
    def cautions(command, *extra):
        out = tmp_path / f"{command}-{horizon}"
        assert _run([command, str(demo_path()), "-H", str(horizon), "--out", str(out),
                     "--quiet", *model, *extra]) == 0
        return [line.removeprefix("caution: ") for line in capsys.readouterr().out.splitlines()
                if line.startswith("caution: ")], out

    _, out = cautions("forecast")
    expected = json.loads((out / "summary.json").read_text())["cautions"]
    assert any("more than half the history" in c for c in expected) == (horizon == 12)
    assert any("fixed curve" in c for c in expected) == bool(model)
    assert cautions("compare")[0] == expected
    assert cautions("sensitivity")[0] == expected


def test_help_documents_every_option(capsys):
    with pytest.raises(SystemExit) as exc:
        main(["forecast", "--help"])
    assert exc.value.code == 0
    text = capsys.readouterr().out
    for option in ("--horizon", "--out", "--seed", "--levels", "--engine", "--target",
                   "--initial-give-or-take", "--growth", "--noise", "--period-col"):
        assert option in text


@pytest.mark.slow
def test_forecast_nuts_end_to_end(tmp_path, good_csv):
    out = tmp_path / "nuts"
    nuts = ["--engine", "nuts", "--model", "exponential"]
    assert _run(["forecast", str(good_csv), "-H", "3", "--out", str(out), "--quiet", *nuts]) == 0
    summary = json.loads((out / "summary.json").read_text())
    assert summary["engine"] == "nuts"
    assert summary["diagnostics"]["ok"] is True
    assert (out / "posterior.nc").exists()  # always from nuts: its draws are the posterior
    again = tmp_path / "nuts2"
    assert _run(["forecast", str(good_csv), "-H", "3", "--out", str(again), "--quiet",
                 *nuts]) == 0
    assert (out / "forecast.csv").read_bytes() == (again / "forecast.csv").read_bytes()


@pytest.mark.parametrize("command", ["backtest", "report"])
def test_exact_engine_refuses_other_curves(tmp_path, command):
    out = tmp_path / "out"
    argv = [command, str(demo_path()), "-H", "2", "--out", str(out), "--model", "logistic",
            "--quiet"]
    argv += ["--min-train", "16", "--methods", "exact"] if command == "backtest" else [
        "--engine", "exact"]
    proc = subprocess.run([sys.executable, "-m", "bayesgrowth", *argv], capture_output=True,
                          text=True, check=False)
    assert proc.returncode == 2
    assert len(proc.stderr.strip().splitlines()) == 1
    # the models it does fit are named from the model registry
    assert "the exact engine fits the exponential model" in proc.stderr
    assert "the local-trend model" in proc.stderr and "not logistic" in proc.stderr
    assert not out.exists()


def test_backtest_defaults_to_nuts_when_a_model_option_needs_it(tmp_path, monkeypatch):
    # With --errors ar1 and neither --models nor --methods, the first default model is the one
    # the options describe, on nuts (the exact engine does not fit the local trend with AR(1)
    # errors) rather than a refusal (the options are parsed, the run itself is not started here).
    from bayesgrowth.cli import backtest as cli_backtest
    from bayesgrowth.cli.main import build_parser

    args = build_parser().parse_args(["backtest", str(demo_path()), "-H", "2", "--min-train",
                                      "16", "--out", str(tmp_path / "o"), "--errors", "ar1"])
    choices, _ = cli_backtest._choices(args)
    assert [(c.name, c.method) for c in choices] == [
        ("default/ar1", "nuts"), ("exponential", "exact"), ("log-linear", "log-linear")]
    plain = build_parser().parse_args(["backtest", str(demo_path()), "-H", "2", "--min-train",
                                       "16", "--out", str(tmp_path / "o")])
    choices, _ = cli_backtest._choices(plain)
    assert [(c.name, c.method) for c in choices] == [
        ("default", "exact"), ("exponential", "exact"), ("log-linear", "log-linear")]


def test_one_recommended_default_in_the_api_and_the_cli(tmp_path):
    # the damped local trend on the exact engine, seasons on a quarterly calendar with two
    # full years observed (bayesgrowth.config.DEFAULT_MODEL), in Python and on the command line
    import bayesgrowth as bg

    expected = {"model": "local-trend", "drift": "mean-reverting", "seasonal": True,
                "errors": "independent", "noise": "normal", "season_drift": False}
    fit = bg.GrowthModel(seed=1).fit(bg.load_demo()).fit_
    assert fit.engine == "exact" and fit.spec.to_dict() == expected
    out = tmp_path / "default"
    assert _run(["forecast", str(demo_path()), "-H", "4", "--out", str(out), "--quiet"]) == 0
    summary = json.loads((out / "summary.json").read_text())
    assert summary["engine"] == "exact"
    assert summary["model_options"] == expected
    assert 0 < summary["growth_fades"]["probability"] <= 1


def _commands_with(option: str) -> list[str]:
    import argparse

    from bayesgrowth.cli.main import build_parser

    sub = next(a for a in build_parser()._actions if isinstance(a, argparse._SubParsersAction))
    return [name for name, p in sub.choices.items() if option in p._option_string_actions]


def test_every_command_refuses_a_negative_seed_at_parsing(tmp_path, good_csv, capsys,
                                                           monkeypatch):
    import bayesgrowth.inference.run as run

    commands = _commands_with("--seed")
    assert {"forecast", "compare", "backtest", "report", "batch", "pool"} <= set(commands)
    monkeypatch.setattr(run, "fit_series", lambda *a, **k: pytest.fail("fitted"))
    out = tmp_path / "out"
    with_min_train = set(_commands_with("--min-train"))
    for command in commands:
        given = [] if command == "demo" else [str(good_csv), "-H", "2"]
        given += ["--min-train", "3"] if command in with_min_train else []
        rc = _run([command, *given, "--out", str(out), "--seed", "-1"])
        err = capsys.readouterr().err.strip()
        assert rc == 2 and err.count("\n") == 0, (command, err)
        assert "argument --seed: '-1' must be 0 or more" in err, (command, err)
        assert not out.exists()
    monkeypatch.undo()
    assert _run(["forecast", str(good_csv), "-H", "2", "--out", str(out), "--seed", "0",
                 "--quiet"]) == 0


@pytest.mark.parametrize(("extra", "says", "python_spelling"), [
    (["--noise-dist", "student-t"], "use --noise-dist normal with it", "noise='normal'"),
    (["--errors", "ar1"], "use nuts instead of exact (--engine nuts)", "engine="),
    (["--ceiling", "100"], "--ceiling 100: applies only to the curves with a ceiling "
     "(--model logistic or --model gompertz), not to the local-trend model",
     "not above the largest observed value"),
    (["--ceiling", "1e6"], "leave --ceiling out", "ceiling="),
])
def test_model_option_errors_speak_the_command_line(tmp_path, capsys, extra, says,
                                                    python_spelling):
    out = tmp_path / "out"
    rc = _run(["forecast", str(demo_path()), "-H", "2", "--out", str(out), "--quiet", *extra])
    err = capsys.readouterr().err.strip()
    assert rc == 2 and err.count("\n") == 0, err
    assert says in err and python_spelling not in err, err
    assert not out.exists()


def test_cli_spelling_names_the_options():
    from bayesgrowth.cli.common import cli_spelling

    text = ("use noise='normal', errors=\"ar1\", engine='nuts', drift='random-walk', "
            "model='logistic' or seasonal=False; noise is kept")
    assert cli_spelling(text) == ("use --noise-dist normal, --errors ar1, --engine nuts, "
                                  "--drift random-walk, --model logistic or --seasonal no; "
                                  "noise is kept")


def test_a_ceiling_with_a_ceiling_curve_is_checked_against_the_data(tmp_path, capsys):
    out = tmp_path / "out"
    rc = _run(["backtest", str(demo_path()), "-H", "1", "--min-train", "18", "--out", str(out),
               "--quiet", "--ceiling", "100"])
    err = capsys.readouterr().err
    assert rc == 2 and "not to the local-trend or exponential models" in err
    rc = _run(["backtest", str(demo_path()), "-H", "1", "--min-train", "18", "--out", str(out),
               "--quiet", "--ceiling", "100", "--models", "naive"])
    assert rc == 2 and "no model of this run has one" in capsys.readouterr().err
    assert not out.exists()
