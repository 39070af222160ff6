"""Results describe themselves in a few lines (repr) and in a compact notebook table."""

from __future__ import annotations

import dataclasses
import re

import pandas as pd
import pytest

import bayesgrowth as bg
from bayesgrowth.comparison import compare_to_forecast
from bayesgrowth.display import HTML_ROWS, fmt_interval, fmt_number, fmt_weight
from bayesgrowth.priors import GrowthPrior, Priors
from bayesgrowth.select import compare_models

MAX_LINES, MAX_CHARS = 6, 600


@pytest.fixture(scope="module")
def demo_forecast(demo_exact_fit):
    return bg.forecast(demo_exact_fit, 4)


@pytest.fixture(scope="module")
def demo_backtest(demo):
    return bg.backtest(demo, horizon=2, min_train=16, seed=1, methods=["exact", "naive"])


def _short(text: str) -> None:
    assert len(text.splitlines()) <= MAX_LINES and len(text) <= MAX_CHARS, text


def test_forecast_repr_names_model_series_horizon_and_last_band(demo_forecast):
    text = repr(demo_forecast)
    _short(text)
    last = demo_forecast.table.iloc[-1]
    assert demo_forecast.fit.series.name in text and demo_forecast.fit.spec.label() in text
    assert f"4 periods, {demo_forecast.periods[0]} to {demo_forecast.periods[-1]}" in text
    assert f"median {fmt_number(last['median'])}" in text
    assert f"95% band {fmt_interval(last['lower_95'], last['upper_95'])}" in text


def test_forecast_html_has_one_row_per_period_and_escapes_names(demo_forecast):
    page = demo_forecast._repr_html_()
    assert page.count("<tr>") == 1 + demo_forecast.horizon  # header and one per period
    fit = dataclasses.replace(demo_forecast.fit,
                              series=dataclasses.replace(demo_forecast.fit.series,
                                                                 name="<b>north</b>"))
    odd = dataclasses.replace(demo_forecast, fit=fit)
    assert "<b>north" not in odd._repr_html_() and "&lt;b&gt;north" in odd._repr_html_()


def test_long_html_tables_keep_their_first_and_last_rows(demo_exact_fit):
    fc = bg.forecast(demo_exact_fit, HTML_ROWS + 5)
    page = fc._repr_html_()
    assert page.count("<tr>") == 1 + HTML_ROWS + 1  # header, rows kept, the "…" row
    assert fc.periods[0] in page and fc.periods[-1] in page
    assert fc.periods[HTML_ROWS // 2] not in page


def test_fit_repr_gives_growth_interval_and_diagnostics(demo_exact_fit):
    text = repr(demo_exact_fit)
    _short(text)
    assert "exact engine" in text and "diagnostics ok" in text
    g = demo_exact_fit.derived()["growth_per_period"]
    lo, hi = (float(x) for x in re.search(r"95% interval ([\d.]+)% to ([\d.]+)%", text).groups())
    share = ((g >= lo / 100 - 5e-4) & (g <= hi / 100 + 5e-4)).mean()
    assert 0.94 <= share <= 0.96  # the printed 95% interval holds 95% of the draws
    assert demo_exact_fit._repr_html_().count("<tr>") == 1 + len(demo_exact_fit.derived())


def test_comparison_repr_is_short_and_names_the_extreme_variants(demo_forecast):
    comp = compare_to_forecast(demo_forecast)
    text = repr(comp)
    _short(text)
    table = comp.table.set_index("variant")["value_at_horizon"]
    assert f"lowest {table.idxmin()} ({fmt_number(table.min())})" in text
    assert f"highest {table.idxmax()} ({fmt_number(table.max())})" in text
    # the headline's range is the same two numbers, not rounded outward like a band
    assert f"point forecasts {fmt_number(table.min())} to {fmt_number(table.max())};" in text
    assert "<table>" in comp._repr_html_()


def test_backtest_repr_has_a_line_per_model_and_the_lowest_crps(demo_backtest):
    text = repr(demo_backtest)
    _short(text)
    overall = demo_backtest.scores[demo_backtest.scores["step"] == "all"].set_index("method")
    assert f"lowest mean CRPS: {overall['crps'].idxmin()}" in text
    for method in demo_backtest.methods:
        assert f"\n  {method}: " in text
    assert demo_backtest._repr_html_().count("<tr>") == 1 + len(demo_backtest.methods)


def test_model_comparison_repr_names_the_best_and_its_weight(demo):
    fits = {"default": demo_exact_fit_of(demo),
            "no growth": demo_exact_fit_of(demo, Priors(growth=GrowthPrior(0, 0.5)))}
    comp = compare_models(fits)
    text = repr(comp)
    _short(text)
    weight = fmt_weight(comp.weights[comp.best])
    assert f"best by PSIS-LOO: {comp.best} (stacking weight {weight})" in text
    assert comp._repr_html_().count("<tr>") == 3


def demo_exact_fit_of(series, priors=None):
    return bg.fit_series(series, engine="exact", seed=3, priors=priors, model="exponential")


@pytest.fixture(scope="module")
def pooled_fit(demo):
    # A pooled posterior written down directly (no sampling): two series of the demo,
    # 2 chains x 200 draws around 8% growth per period.
    import numpy as np

    from bayesgrowth.inference.diagnostics import Diagnostics
    from bayesgrowth.inference.pooled import PooledFit
    from bayesgrowth.models.hierarchical import GroupPrior

    rng = np.random.default_rng(5)
    series = {"older": dataclasses.replace(demo, name="older"),
              "newer": dataclasses.replace(demo.head(12), name="newer")}
    shape = (2, 200, 2)
    posterior = {
        "log_a": np.log(demo.values[0]) + 0.02 * rng.standard_normal(shape),
        "log1p_g": np.log1p(0.08) + 0.005 * rng.standard_normal(shape),
        "sigma": 0.05 + 0.005 * rng.random(shape),
        "mu_growth": np.log1p(0.08) + 0.01 * rng.standard_normal(shape[:2]),
        "tau_growth": 0.02 + 0.01 * rng.random(shape[:2]),
    }
    return PooledFit(series=series, priors={n: Priors().resolve(s) for n, s in series.items()},
                     group=GroupPrior(), errors="independent", seed=3, posterior=posterior,
                     diagnostics=Diagnostics.from_values(1.0, 1000, 1000, 0, "NUTS (test)"),
                     settings={})


def test_pooled_fit_and_forecast_reprs_give_the_group_and_the_total(pooled_fit):
    import numpy as np

    from bayesgrowth.display import fmt_percent

    text = repr(pooled_fit)
    _short(text)
    centre = np.expm1(np.median(pooled_fit.posterior["mu_growth"]))
    assert f"group growth centre {fmt_percent(centre)} per period" in text
    assert pooled_fit._repr_html_().count("<tr>") == 1 + 2
    fc = bg.forecast(pooled_fit, 3, levels=(80,))
    np.testing.assert_array_equal(fc.total_draws, fc.aligned["older"] + fc.aligned["newer"])
    text = repr(fc)
    _short(text)
    last = fc.total.iloc[-1]
    assert f"group total in {last['period']}: median {fmt_number(last['median'])}" in text


def test_model_average_reprs_name_the_weights_and_the_last_band(demo):
    fits = {"exponential": demo_exact_fit_of(demo),
            "local trend": bg.fit_series(demo, engine="exact", seed=3, model="local-trend",
                                         drift="random-walk", seasonal=False)}
    avg = bg.model_average(fits, 4, seed=1)
    text = repr(avg)
    _short(text)
    w = avg.averaged.weights
    assert f"exponential {w['exponential']:.2f}, local trend {w['local trend']:.2f}" in text
    last = avg.averaged.table.iloc[-1]
    assert f"median {fmt_number(last['median'])}" in text and "median" in repr(avg.averaged)
    assert avg.averaged._repr_html_().count("<tr>") == 1 + 4


def test_huge_numbers_are_written_with_a_power_of_ten():
    # a steep series' far periods: 289 digits with separators read as nothing; the power of
    # ten keeps three significant figures, rounded outwards for an interval
    assert fmt_number(3.006e288) == "3.01e288"
    assert fmt_number(999e12) == "999,000,000,000,000"
    assert fmt_number(1e15) == "1e15"
    assert fmt_interval(1.1234e266, 1.1011e303) == "1.12e266 to 1.11e303"


def test_error_messages_echo_numbers_as_typed():
    # "-4", not "-4.0": the user typed --noise -4
    from bayesgrowth.priors.stated import NoisePrior

    with pytest.raises(ValueError, match=r"got -4$"):
        NoisePrior(typical_pct=-4.0)


def test_series_repr_is_one_line_whatever_its_length(demo):
    text = repr(demo)
    _short(text)
    assert text == ("GrowthSeries('Larkspur Instruments revenue (demo)': 20 quarterly values, "
                    "2021Q1 to 2025Q4, from 1,180 to 4,950; source 'demo_revenue.csv')")
    long = bg.read_series(pd.Series(range(1, 601), dtype=float), name="long")
    assert len(repr(long).splitlines()) == 1 and "600 values, 0 to 599" in repr(long)


def test_prior_predictive_repr_names_series_model_periods_and_coverage(demo):
    pp = bg.prior_predictive(demo, seed=1, horizon=4)
    text = repr(pp)
    _short(text)
    assert demo.name in text and pp.spec.label() in text
    assert f"{pp.periods[0]} to {pp.periods[-1]}: the history and 4 periods" in text
    assert f"{round(100 * pp.coverage(95))}% of the observed values inside the 95%" in text
