"""Several named models in one backtest: names, specs, the same folds, labels everywhere."""

from __future__ import annotations

import warnings

import numpy as np
import pandas as pd
import pytest

from bayesgrowth.backtest import backtest
from bayesgrowth.backtest.models import (
    DEFAULT_MODELS,
    ModelChoice,
    file_stem,
    label_for_options,
    parse_model,
    resolve_models,
)
from bayesgrowth.config import DEFAULT_MODEL
from bayesgrowth.models.spec import ModelSpec


@pytest.mark.parametrize(
    ("text", "method", "spec"),
    [
        ("default", "exact", {"model": "local-trend", "drift": "mean-reverting"}),
        ("local-trend", "exact", {"model": "local-trend", "drift": "random-walk"}),
        ("exponential", "exact", {"model": "exponential"}),
        ("exponential/ar1", "exact", {"model": "exponential", "errors": "ar1"}),
        ("exponential/ar1/student-t", "nuts",
         {"model": "exponential", "errors": "ar1", "noise": "student-t"}),
        ("logistic/student-t", "nuts", {"model": "logistic", "noise": "student-t"}),
        ("default/nuts", "nuts", {"model": "local-trend", "drift": "mean-reverting"}),
        ("Default / Adaptive", "exact", {"model": "local-trend", "drift": "adaptive"}),
        ("damped/seasonal", "nuts", {"model": "damped", "seasonal": True}),
        ("exponential/ar1/seasonal", "exact",
         {"model": "exponential", "errors": "ar1", "seasonal": True}),
    ],
)
def test_text_names_choose_curve_errors_and_engine(text, method, spec):
    choice = parse_model(text)
    assert choice.method == method and choice.bayesian
    assert choice.name == text.lower().replace(" ", "")
    for key, value in spec.items():
        assert choice.options[key] == value
    assert f"({method} engine)" in choice.describe()


@pytest.mark.parametrize("text", ["log-linear", "log-linear-anchored", "revenue-scale", "naive"])
def test_least_squares_and_baseline_names(text):
    choice = parse_model(text)
    assert not choice.bayesian and choice.options == {}
    assert choice.method == {"log-linear-anchored": "log-linear, anchored"}.get(text, text)


@pytest.mark.parametrize(
    ("text", "match"),
    [
        ("exact", "the engine is a modifier"),
        ("crystal-ball", "unknown model 'crystal-ball'.*exponential"),
        ("naive/ar1", "naive takes no modifiers"),
        ("default/sideways", "unknown modifier 'sideways'"),
        ("logistic/exact", "exact engine fits.*logistic/nuts"),
        ("default/student-t", "'default/student-t'.*normal noise"),
        ("default/adaptive/nuts", "adaptive drift needs the exact engine"),
        ("exponential/drifting-seasons", "drifting seasonal factors need the local-trend"),
    ],
)
def test_bad_names_raise_one_clear_error(text, match):
    with pytest.raises(ValueError, match=match):
        parse_model(text)


@pytest.mark.parametrize("options", [
    {"model": "local-trend", "drift": "mean-reverting", "seasonal": "auto"},
    {"model": "local-trend", "drift": "random-walk", "seasonal": False},
    {"model": "local-trend", "drift": "adaptive", "seasonal": True},
    {"model": "local-trend", "errors": "ar1"},
    {"model": "exponential", "seasonal": "auto"},
    {"model": "gompertz", "errors": "ar1", "noise": "student-t", "seasonal": True},
    {"model": "local-trend", "drift": "mean-reverting", "seasonal": "drifting"},
])
def test_label_for_options_names_the_same_model(options):
    def spec(o):
        o = {**DEFAULT_MODEL, **o}
        keys = {k: o[k] for k in ("model", "errors", "noise", "drift") if k in o}
        if ModelSpec(**keys).model != "local-trend":
            keys.pop("drift")  # only the local trend's growth drifts
        return ModelSpec(**keys), o["seasonal"]

    assert spec(parse_model(label_for_options(options)).options) == spec(options)


def test_every_accepted_form_resolves_to_named_choices():
    as_dict = resolve_models({"default": {}, "exponential": {"model": "exponential"},
                              "log-linear": "log-linear"})
    as_text = resolve_models("default, exponential,log-linear")
    as_list = resolve_models(list(DEFAULT_MODELS))
    assert as_dict == as_text == as_list
    assert [c.name for c in as_dict] == list(DEFAULT_MODELS)
    renamed = resolve_models({"fast": "exponential", "mine": ModelChoice("x", "naive")})
    assert [(c.name, c.method) for c in renamed] == [("fast", "exact"), ("mine", "naive")]
    assert resolve_models({"ar": {"model": "exponential", "errors": "ar1"}})[0].method == "exact"
    assert resolve_models({"ar": {"model": "local-trend", "errors": "ar1"}})[0].method == "nuts"
    with pytest.raises(ValueError, match="appears twice"):
        resolve_models("naive,naive")
    with pytest.raises(ValueError, match="unknown option 'curve'"):
        resolve_models({"x": {"curve": "logistic"}})
    with pytest.raises(ValueError, match="needs a name"):
        resolve_models([{"model": "exponential"}])
    with pytest.raises(ValueError, match="at least one model"):
        resolve_models("")


def test_file_stems_are_safe_and_unique():
    stems = file_stem(["exponential/ar1", "log-linear, anchored", "Exponential AR1", "//"])
    assert list(stems.values()) == ["exponential-ar1", "log-linear-anchored",
                                    "exponential-ar1-2", "model"]


@pytest.fixture(scope="module")
def three(demo):
    return backtest(demo, models={"default": {}, "exponential": {"model": "exponential"},
                                  "log-linear": "log-linear"},
                    horizon=3, min_train=12, seed=2, n_draws=1000)


def test_models_share_the_folds_and_label_every_table(three):
    f = three.forecasts
    assert list(pd.unique(f["method"])) == ["default", "exponential", "log-linear"]
    cases = {m: set(zip(g["origin"], g["step"], strict=True)) for m, g in f.groupby("method")}
    assert cases["default"] == cases["exponential"] == cases["log-linear"]
    assert set(three.scores["method"]) == set(three.methods)
    assert set(three.diagnostics["method"]) == {"default", "exponential"}
    assert list(three.verdicts()) == ["default", "exponential", "log-linear"]
    assert three.descriptions["default"].startswith("local-trend (mean-reverting)")
    assert set(three.ranking()["method"]) == set(three.methods)
    assert set(three.bias()["method"]) == set(three.methods)


def test_a_named_model_forecasts_as_its_method_does(demo, three):
    # Same seed and folds: the "default" rows are those of the exact engine given the
    # default model's options, the "exponential" rows those of the exact engine's plain
    # exponential (the earlier methods form), the least-squares rows those of log-linear.
    cols = ["origin", "step", "median", "lower_80", "upper_80", "pit", "crps"]
    f = three.forecasts
    for name, kwargs in (("default", {"model_options": DEFAULT_MODEL}),
                         ("exponential", {}), ("log-linear", {})):
        method = "log-linear" if name == "log-linear" else "exact"
        ref = backtest(demo, methods=(method,), horizon=3, min_train=12, seed=2, n_draws=1000,
                       **kwargs).forecasts
        pd.testing.assert_frame_equal(f[f["method"] == name][cols].reset_index(drop=True),
                                      ref[cols].reset_index(drop=True))


def test_sampler_settings_are_shared_and_model_keys_refused(demo):
    r = backtest(demo, models="default,naive", horizon=1, min_train=18,
                 model_options={"draws": 500, "chains": 2}, n_draws=1000)
    default = r.settings["models"][0]
    assert default["options"]["draws"] == 500 and r.settings["models"][1]["options"] == {}
    with pytest.raises(ValueError, match="'model' belongs in a model's own options"):
        backtest(demo, models="default", model_options={"model": "logistic"}, horizon=1,
                 min_train=18)
    with pytest.raises(ValueError, match="models or methods, not both"):
        backtest(demo, models="default", methods=("exact",), horizon=1, min_train=18)


def test_default_models_without_arguments(demo):
    with warnings.catch_warnings():
        warnings.simplefilter("error")  # no sampling warning from the exact engine
        r = backtest(demo, horizon=1, min_train=17)
    assert r.methods == DEFAULT_MODELS
    assert np.isfinite(r.forecasts["crps"]).all()


def test_model_figure_is_labelled_by_model(three):
    import matplotlib.pyplot as plt

    from bayesgrowth.plots.backtest import model_figure

    fig = model_figure(three, "exponential")
    assert "backtest of exponential" in fig._suptitle.get_text()
    assert "exact engine" in fig._suptitle.get_text()
    titles = [ax.get_title() for ax in fig.axes]
    assert any(t.startswith("exponential: forecasts from") for t in titles)
    assert any(t.startswith("PIT histogram: exponential") for t in titles)
    assert len(fig.axes) == 3
    plt.close(fig)
    r = backtest(three.series, models="revenue-scale", horizon=1, min_train=18)
    point = model_figure(r, "revenue-scale")
    assert len(point.axes) == 1  # no bands: the fans only
    plt.close(point)
    with pytest.raises(ValueError, match="not in the backtest"):
        model_figure(three, "naive")


def test_the_default_describes_the_seasons_its_fits_use():
    from bayesgrowth.backtest.models import AUTO_SEASONS
    from bayesgrowth.backtest.split import RollingOrigin
    from bayesgrowth.data.demo import load_demo
    from bayesgrowth.inference.run import fit_series

    demo = load_demo()  # quarterly: two full years after 8 points
    default = parse_model("default")
    assert default.describe().endswith(f"; {AUTO_SEASONS} (exact engine)")
    assert default.describe(demo, RollingOrigin(4, 8)).endswith(
        "normal noise, seasonal factors (exact engine)")
    assert "seasonal" not in default.describe(demo.head(7))
    mixed = default.describe(demo, RollingOrigin(4, 5))
    first = demo.labels[7]
    assert f"seasonal factors from origin {first} on, two full years in" in mixed
    assert ") (" not in mixed  # no brackets one after the other
    options = {k: v for k, v in default.options.items() if k not in ("draws", "chains")}
    assert not fit_series(demo.head(7), **options).spec.seasonal  # what the fits do
    assert fit_series(demo.head(8), **options).spec.seasonal
    for text in ("default/no-seasons", "exponential"):
        assert "seasonal" not in parse_model(text).describe(demo)
    assert parse_model("default/seasonal").describe(demo.head(5)).endswith(
        "seasonal factors (exact engine)")


def test_a_backtest_labels_the_default_with_its_seasons():
    from bayesgrowth.data.demo import load_demo

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        result = backtest(load_demo(), horizon=1, min_train=18, models=["default", "naive"],
                          n_draws=200)
    assert result.descriptions["default"] == (
        "local-trend (mean-reverting), independent errors, normal noise, seasonal factors "
        "(exact engine)")
