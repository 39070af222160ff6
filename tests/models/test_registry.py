"""The model registry: a family added in one module reaches every part of the package.

The toy family of ``toy_power_law.py`` is registered for these tests only and
removed afterwards, so the rest of the suite sees the package's own families.
"""

from __future__ import annotations

import contextlib
import importlib
import warnings

import numpy as np
import pytest

from bayesgrowth.backtest.models import label_for_options, parse_model
from bayesgrowth.cli.main import build_parser, main
from bayesgrowth.data.demo import demo_path
from bayesgrowth.forecast.forecast import extrapolation_caution
from bayesgrowth.models import registry
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.priors import Priors

# tests/models is on the import path (pytest's rootdir-relative imports). Importing the
# module registers the toy, as a family module of the package would; it is taken out
# again at once, so that only the tests below, which register it, see it.
toy = importlib.import_module("toy_power_law")
TOY = toy.FAMILY.name
registry.unregister(TOY)


@contextlib.contextmanager
def _registered():
    registry.register(toy.FAMILY)
    try:
        yield toy.FAMILY
    finally:
        registry.unregister(TOY)


@pytest.fixture
def toy_family():
    with _registered() as family:
        yield family


@pytest.fixture(scope="module")
def toy_fit(demo):
    """One small NUTS fit of the toy model to the demo series, shared by the slow tests."""
    from bayesgrowth.inference import fit_series

    with _registered(), warnings.catch_warnings():
        warnings.simplefilter("ignore")
        yield fit_series(demo, engine="nuts", model=TOY, seed=5, draws=150, tune=150,
                         chains=2, progressbar=False, drift="random-walk", seasonal=False)


def test_toy_is_unknown_until_registered():
    with pytest.raises(ValueError, match="model must be one of"):
        ModelSpec(model=TOY)
    with _registered():
        assert TOY in registry.names()
    assert TOY not in registry.names()


def test_a_second_family_under_a_taken_name_is_refused(toy_family):
    import dataclasses

    with pytest.raises(ValueError, match="already registered"):
        registry.register(dataclasses.replace(toy_family, summary="another"))


def test_declarations_are_checked():
    with pytest.raises(ValueError, match="include nuts"):
        registry.ModelFamily("x", "x", (), toy.curve, engines=("gaussian",))
    with pytest.raises(ValueError, match="log_mean"):
        registry.ModelFamily("x", "x", (), None)


def test_toy_in_cli_choices(toy_family, capsys):
    args = build_parser().parse_args(
        ["forecast", str(demo_path()), "-H", "4", "--out", "x", "--model", TOY])
    assert args.model == TOY
    with pytest.raises(SystemExit):
        build_parser().parse_args(["forecast", "--help"])
    help_text = " ".join(capsys.readouterr().out.split())
    assert f"{TOY}: {toy_family.summary}" in help_text  # listed and described


def test_cli_refuses_the_exact_engine_for_the_toy(toy_family, tmp_path, capsys):
    # the toy declares NUTS only: the one-line refusal, exit code 2, nothing written
    out = tmp_path / "out"
    rc = main(["forecast", str(demo_path()), "-H", "4", "--out", str(out), "--model", TOY,
               "--engine", "exact", "--quiet"])
    assert rc == 2
    err = capsys.readouterr().err
    assert TOY in err and len(err.strip().splitlines()) == 1
    assert not out.exists()


def test_toy_describes_itself(toy_family, demo):
    spec = ModelSpec(model=TOY, errors="ar1")
    assert spec.parameters() == ("log_a", "power", "sigma", "phi")
    assert not spec.exact_fits and not spec.family.states
    assert spec.label().startswith(f"{TOY}, AR(1) errors")
    lines = Priors().resolve(demo).describe(spec)
    assert "power of the growth curve: about 1, give or take 1" in lines
    assert lines[-1].startswith("persistence of deviations")  # shared options follow


def test_toy_names_a_backtest_model(toy_family):
    choice = parse_model(f"{TOY}/student-t")
    assert choice.method == "nuts"
    assert choice.options["model"] == TOY and choice.options["noise"] == "student-t"
    assert "drift" not in choice.options  # only families that drift keep it
    assert label_for_options({"model": TOY, "noise": "student-t"}) == f"{TOY}/student-t"
    with pytest.raises(ValueError, match="exact engine"):
        parse_model(f"{TOY}/exact")


def test_mean_function_is_one_formula_for_numpy_and_pytensor(toy_family):
    import pytensor.tensor as pt

    dt = np.arange(6.0)
    p = {"log_a": 2.0, "power": 0.7}
    expected = 2.0 + 0.7 * np.log1p(dt)  # R = a (1 + dt)^p on the log scale
    np.testing.assert_allclose(toy.curve(p, dt), expected, rtol=1e-14)
    symbolic = toy.curve({"log_a": pt.as_tensor(2.0), "power": pt.as_tensor(0.7)},
                         pt.as_tensor(dt), pt)
    np.testing.assert_allclose(symbolic.eval(mode="FAST_COMPILE"), expected, rtol=1e-14)


def test_saturation_caution_follows_the_ceiling_flag():
    assert "saturation" in extrapolation_caution(8, 10, saturates=False)
    assert "saturation" not in extrapolation_caution(8, 10, saturates=True)
    for name in registry.names():
        spec = ModelSpec(model=name)
        assert spec.family.ceiling == (name in ("logistic", "gompertz"))


@pytest.mark.slow
def test_toy_fits_forecasts_and_reaches_the_backtest_and_report(toy_fit, demo):
    from bayesgrowth.backtest import backtest
    from bayesgrowth.forecast.forecast import forecast
    from bayesgrowth.plots.fan import describe_model
    from bayesgrowth.report.html import ReportParts, render_report

    with _registered():
        assert set(toy_fit.flat()) == {"log_a", "power", "sigma"}
        fc = forecast(toy_fit, 4, seed=1)
        assert np.all(np.diff(fc.table["median"].to_numpy()) > 0)  # the demo keeps growing
        assert describe_model(fc).startswith(f"{TOY} growth curve")
        page = render_report(ReportParts(forecast=fc, fan_chart="", command="test"))
        assert TOY in page
        assert "power of the growth curve: about 1, give or take 1" in page
        assert "Saturation, competition and shocks are not in the model" in page
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            result = backtest(demo, models={"toy": {"model": TOY, "draws": 100, "tune": 100,
                                                    "chains": 1}},
                              horizon=2, min_train=demo.n - 3, n_draws=100, seed=1)
    scores = result.scores
    assert set(scores["method"]) == {"toy"}
    assert np.isfinite(scores.loc[scores["step"] == "all", "crps"]).all()


@pytest.mark.parametrize("name", ["logistic", "gompertz", "damped"])
def test_families_and_their_least_squares_curves_agree(name):
    # The family's mean function against the least-squares curve it names, each written from
    # the curve's textbook form (logistic K / (1 + ((K - a) / a) e^{-r t}); Gompertz
    # K exp(-ln(K / a) e^{-r t}); damped growth whose first log growth b fades by e^{-r}
    # a period), with r = ln 2 / half-life and, for the damped curve, long-run growth 0.
    from bayesgrowth.leastsq import curves

    family = registry.get_family(name)
    assert family.leastsq_curve == name and name in curves.CURVE_NAMES
    t = np.arange(0.0, 12.0)
    a, r = 120.0, 0.3
    if name == "damped":
        p, lsq = {"log_a": np.log(a), "log1p_g": 0.2, "long_run": 0.0}, (a, 0.2, r)
    else:
        p, lsq = {"log_a": np.log(a), "log_k": np.log(900.0)}, (a, 900.0, r)
    p["half_life"] = np.log(2.0) / r
    lsq_curve = getattr(curves, f"{name}_curve")
    np.testing.assert_allclose(np.exp(family.log_mean(p, t)), lsq_curve(t, np.array(lsq)),
                               rtol=1e-12)


def test_contributor_guide_example_registers_a_family(demo):
    # the example of DEVELOPERS.md "How to add a model" runs as written
    import re
    from pathlib import Path

    guide = (Path(__file__).parents[2] / "DEVELOPERS.md").read_text()
    section = guide[guide.index("## How to add a model"):]
    code = re.search(r"```python\n(.*?)```", section, re.S).group(1)
    namespace: dict = {}
    exec(compile(code, "DEVELOPERS.md", "exec"), namespace)
    try:
        family = namespace["FAMILY"]
        assert registry.get_family(family.name) is family
        spec = ModelSpec(model=family.name)
        assert "power" in spec.parameters()
        assert Priors().resolve(demo).describe(spec)[-1].startswith("power of the growth")
    finally:
        registry.unregister(namespace["FAMILY"].name)
