"""Results describe themselves in a few lines (repr) and in a compact notebook table."""

from __future__ import annotations

import dataclasses
import re

import pytest

import bayesgrowth as bg
from bayesgrowth.comparison import compare_to_forecast
from bayesgrowth.display import HTML_ROWS, fmt_interval, fmt_number
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
    assert f"best by PSIS-LOO: {comp.best} (stacking weight {comp.weights[comp.best]:.2f})" in text
    assert comp._repr_html_().count("<tr>") == 3


def demo_exact_fit_of(series, priors=None):
    return bg.fit_series(series, engine="exact", seed=3, priors=priors)
