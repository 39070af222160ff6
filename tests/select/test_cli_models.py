"""``bayesgrowth models`` end to end on the bundled demo, and its refusals of bad usage."""

import pandas as pd
import pytest

from bayesgrowth.cli import main
from bayesgrowth.cli.output import MANIFEST
from bayesgrowth.data.demo import demo_path
from bayesgrowth.select import registered_models

FORECAST_COLUMNS = ["period", "step", "mean", "median", "lower_50", "upper_50", "lower_80",
                    "upper_80", "lower_95", "upper_95", "curve_median"]


def test_models_exact_on_the_demo(tmp_path, capsys):
    out = tmp_path / "out"
    rc = main(["models", str(demo_path()), "--horizon", "4", "--out", str(out), "--engine",
               "exact", "--models", "exponential", "--quiet"])
    assert rc == 0
    assert sorted(p.name for p in out.iterdir()) == [
        MANIFEST, "averaged_forecast.csv", "model_comparison.csv", "models.png"]
    comp = pd.read_csv(out / "model_comparison.csv")
    assert comp["model"].tolist() == ["exponential"]
    for col in ("elpd_loo", "se", "elpd_diff", "dse", "p_loo", "weight", "max_pareto_k"):
        assert col in comp
    assert comp["weight"].iloc[0] == pytest.approx(1.0)
    avg = pd.read_csv(out / "averaged_forecast.csv")
    assert list(avg.columns[:len(FORECAST_COLUMNS)]) == FORECAST_COLUMNS
    assert avg["period"].tolist() == ["2026Q1", "2026Q2", "2026Q3", "2026Q4"]
    printed = capsys.readouterr().out
    assert "elpd_loo" in printed and "not investment advice" in printed
    assert "extrapolates" in printed
    assert (out / "models.png").read_bytes()[:4] == b"\x89PNG"


def test_models_takes_default_as_backtest_does(tmp_path):
    # backtest --models names the default model "default"; models takes the same name
    out = tmp_path / "out"
    assert main(["models", str(demo_path()), "-H", "3", "--out", str(out), "--engine", "exact",
                 "--models", "default,exponential", "--quiet"]) == 0
    comp = pd.read_csv(out / "model_comparison.csv")
    assert sorted(comp["model"]) == ["exponential", "local-trend"]


def test_models_same_seed_same_files(tmp_path):
    for name in ("a", "b"):
        assert main(["models", str(demo_path()), "-H", "3", "--out", str(tmp_path / name),
                     "--engine", "exact", "--models", "exponential", "--seed", "4",
                     "--quiet"]) == 0
    for f in ("model_comparison.csv", "averaged_forecast.csv"):
        assert (tmp_path / "a" / f).read_bytes() == (tmp_path / "b" / f).read_bytes()


def _bad_usage_cases():
    cases = [
        (["--models", "exponential,cubic"], "unknown model 'cubic'"),
        (["--models", "exponential,exponential"], "named twice"),
        (["--models", "default,local-trend"], "local-trend is named twice"),
        (["--models", ","], "name at least one"),
        (["--noise", "-5"], "prior options"),
        (["--horizon", "0"], "horizon"),
        (["--model", "logistic"], "--model does not apply"),
        (["--ceiling", "10"], "not above the largest observed value"),
    ]
    if "local-trend" in registered_models():
        cases.append((["--models", "local-trend", "--reference-period", "2022Q1"],
                      "first observation"))
        cases.append((["--models", "exponential,local-trend", "--noise-dist", "student-t"],
                      "--models local-trend"))
    return cases


@pytest.mark.parametrize("extra, message", _bad_usage_cases())
def test_bad_usage_exits_2_with_one_line_and_no_output(tmp_path, capsys, extra, message):
    out = tmp_path / "out"
    argv = ["models", str(demo_path()), "--out", str(out), "--engine", "exact", "--quiet"]
    if "--horizon" not in extra:
        argv += ["--horizon", "4"]
    rc = main(argv + extra)
    err = capsys.readouterr().err
    assert rc == 2
    assert message in err
    assert len(err.strip().splitlines()) == 1 and "Traceback" not in err
    assert not out.exists()


def test_missing_input_and_out_that_is_a_file(tmp_path, capsys):
    assert main(["models", str(tmp_path / "nope.csv"), "-H", "2", "--out",
                 str(tmp_path / "o"), "--quiet"]) == 2
    blocker = tmp_path / "file.txt"
    blocker.write_text("x")
    assert main(["models", str(demo_path()), "-H", "2", "--out", str(blocker), "--engine",
                 "exact", "--models", "exponential", "--quiet"]) == 2
    err = capsys.readouterr().err
    assert "not a folder" in err and "Traceback" not in err
    assert blocker.read_text() == "x"


@pytest.mark.slow
def test_models_nuts_two_curves_on_the_demo(tmp_path, capsys):
    if "logistic" not in registered_models():
        pytest.skip("the logistic curve is not registered yet")
    out = tmp_path / "out"
    rc = main(["models", str(demo_path()), "-H", "8", "--out", str(out), "--models",
               "exponential,logistic", "--engine", "nuts", "--draws", "300", "--chains", "2",
               "--accept-warnings", "--quiet"])
    assert rc == 0
    comp = pd.read_csv(out / "model_comparison.csv")
    assert sorted(comp["model"]) == ["exponential", "logistic"]
    assert set(comp["engine"]) == {"nuts"}
    assert comp["weight"].sum() == pytest.approx(1.0)
    avg = pd.read_csv(out / "averaged_forecast.csv")
    assert len(avg) == 8 and (avg["lower_95"] <= avg["upper_95"]).all()
    printed = capsys.readouterr().out
    assert "model-averaged forecast for 2027Q4" in printed


def test_progress_names_the_engine_each_model_is_fitted_with():
    # the same rule as fit_models: the exact engine wherever it fits the model's options
    from bayesgrowth.cli.models import engine_of
    from bayesgrowth.data.demo import load_demo

    demo = load_demo()
    plain = {"errors": "independent", "noise": "normal", "seasonal": "auto",
             "drift": "mean-reverting"}
    assert engine_of("exponential", demo, plain, "auto") == "exact"
    assert engine_of("exponential", demo, {**plain, "errors": "ar1"}, "auto") == "exact"
    assert engine_of("exponential", demo, {**plain, "noise": "student-t"}, "auto") == "nuts"
    assert engine_of("logistic", demo, plain, "auto") == "nuts"
    assert engine_of("exponential", demo, plain, "nuts") == "nuts"
    if "local-trend" in registered_models():
        assert engine_of("local-trend", demo, plain, "auto") == "exact"
        assert engine_of("local-trend", demo, {**plain, "errors": "ar1"}, "auto") == "nuts"


def test_the_printed_table_keeps_its_columns_whatever_the_weights():
    # the widest weight intervals ("< 0.01 to > 0.99") stay in their column
    from bayesgrowth.cli.models import _table_lines

    table = pd.DataFrame({
        "rank": [1, 2], "model": ["exponential", "local-trend"], "elpd_loo": [-125.8, -130.0],
        "se": [3.8, 5.6], "elpd_diff": [0.0, 4.2], "dse": [0.0, 3.6], "p_loo": [2.5, 7.0],
        "weight": [0.999, 1e-17], "weight_lower_90": [0.38, 1e-17],
        "weight_upper_90": [0.9999, 0.62], "max_pareto_k": [0.43, 0.91],
        "diagnostics_ok": [True, True]})
    head, *rows = _table_lines(table)
    assert all(len(row) == len(head) for row in rows)
    assert all(" (" in row for row in rows)  # the interval is set apart from the weight
