"""What a reader sees on the charts and in the printed words: titles, axes, ticks, legends.

Every chart is drawn on the bundled (invented) demo series with the exact engine and the
exponential curve, then read back from the returned Axes.
"""

from __future__ import annotations

import re

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
import pytest  # noqa: E402

from bayesgrowth.data import read_series  # noqa: E402
from bayesgrowth.plots.fan import plot_fan  # noqa: E402
from bayesgrowth.report.words import (  # noqa: E402
    band_phrases,
    fmt_interval,
    fmt_number,
    fmt_probability,
    per_period,
)

QUARTER = re.compile(r"^\d{4}Q[1-4]$")


@pytest.fixture(scope="module")
def demo_fc(demo):
    from bayesgrowth.forecast.forecast import forecast
    from bayesgrowth.inference import fit_series

    fit = fit_series(demo, engine="exact", seed=1, model="exponential")
    return forecast(fit, 8)


def _drawn(ax):
    ax.figure.canvas.draw()
    return ax


def _legend_texts(ax) -> list[str]:
    return [t.get_text() for t in ax.get_legend().get_texts() if t.get_text()]


def _check_value_ticks(ax) -> None:
    """Every y tick reads as its location with thousands separators."""
    for tick, loc in zip(ax.get_yticklabels(), ax.get_yticks(), strict=True):
        text = tick.get_text()
        if not text:
            continue
        # Reference: Python's own format mini-language with "," grouping (PEP 378).
        assert text == f"{loc:,.0f}", (text, loc)
    assert any("," in t.get_text() for t in ax.get_yticklabels())


# --- fan chart -------------------------------------------------------------------------------

def test_fan_title_names_the_series_and_the_model_not_the_engine(demo_fc):
    ax = _drawn(plot_fan(demo_fc))
    title = ax.get_title()
    assert demo_fc.fit.series.name in title
    assert "exponential growth curve, independent errors, normal noise" in title
    assert "exact" not in title and "nuts" not in title.lower()


def test_fan_axes_unit_thousands_and_period_labels(demo_fc):
    ax = _drawn(plot_fan(demo_fc))
    assert ax.get_ylabel() == "Value"
    _check_value_ticks(ax)
    labels = [t.get_text() for t in ax.get_xticklabels()]
    assert 2 <= len(labels) <= 8
    assert all(QUARTER.match(s) for s in labels)
    # Quarterly labels thinned to whole years start at the first quarter of a year.
    assert all(s.endswith("Q1") for s in labels)
    assert ax.get_xlabel() == "Period (quarterly)"
    ax2 = _drawn(plot_fan(demo_fc, unit="Revenue (EUR thousand)"))
    assert ax2.get_ylabel() == "Revenue (EUR thousand)"


def test_fan_legend_reads_history_median_bands_fit_target(demo_fc):
    ax = _drawn(plot_fan(demo_fc, target=9000))
    texts = _legend_texts(ax)
    assert texts[:5] == ["Observed history", "Forecast (median)", "50% credible band",
                         "80% credible band", "95% credible band"]
    assert "Fitted curve (median)" in texts and "Fitted curve, 95% band" in texts
    p = float(demo_fc.prob_exceeds(9000).iloc[-1])
    assert f"Target 9,000: {fmt_probability(p)} chance of reaching it by 2027Q4" in texts
    horizontal = [ln for ln in ax.get_lines() if np.ptp(np.asarray(ln.get_ydata(), float)) == 0
                  and len(ln.get_ydata()) == 2]
    assert any(np.allclose(ln.get_ydata(), 9000) for ln in horizontal)


def test_fan_marks_where_the_forecast_starts(demo_fc):
    ax = _drawn(plot_fan(demo_fc))
    t_last = demo_fc.fit.series.t[-1]
    rules = [ln for ln in ax.get_lines() if len(ln.get_xdata()) == 2
             and np.allclose(np.asarray(ln.get_xdata(), float), t_last + 0.5)]
    assert len(rules) == 1
    words = [t.get_text() for t in ax.texts]
    assert any("forecast" in w for w in words) and any("history" in w for w in words)


def test_fan_legend_follows_the_levels_given(demo_fc):
    from bayesgrowth.forecast.forecast import forecast

    fc = forecast(demo_fc.fit, 4, levels=(60, 90))
    texts = _legend_texts(_drawn(plot_fan(fc)))
    assert "60% credible band" in texts and "90% credible band" in texts
    assert not any(t.startswith(("50%", "80%", "95% credible")) for t in texts)


def test_fan_bands_are_opaque_one_hue_and_lighter_when_wider(demo_fc):
    from matplotlib.colors import to_rgb

    ax = plot_fan(demo_fc)
    bands = {c.get_label(): c for c in ax.collections if "credible band" in c.get_label()}
    # Greyscale lightness, ITU-R BT.601 luma weights (0.299, 0.587, 0.114).
    luma = {k: float(np.dot(to_rgb(c.get_facecolor()[0][:3]), [0.299, 0.587, 0.114]))
            for k, c in bands.items()}
    assert luma["50% credible band"] < luma["80% credible band"] < luma["95% credible band"]
    assert all(c.get_facecolor()[0][3] == 1.0 for c in bands.values())


# --- comparison chart ------------------------------------------------------------------------

def test_comparison_chart_text(demo_fc):
    from bayesgrowth.comparison import compare_to_forecast
    from bayesgrowth.plots.compare import comparison_figure

    comp = compare_to_forecast(demo_fc)
    fig = comparison_figure(comp, unit="Revenue")
    ax = _drawn(fig.axes[0])
    title = ax.get_title()
    assert demo_fc.fit.series.name in title
    assert "exponential growth curve" in title and "exact" not in title
    assert ax.get_ylabel() == "Revenue"
    _check_value_ticks(ax)
    labels = [t.get_text() for t in ax.get_xticklabels()]
    assert labels and all(QUARTER.match(s) for s in labels)
    texts = _legend_texts(ax)
    for expected in ("Observed", "Bayesian median", "Bayesian 50% band", "Bayesian 80% band",
                     "Bayesian 95% band", "Range of least-squares curves",
                     "log-linear (least squares on log values)",
                     "revenue-scale (least squares on values)"):
        assert expected in texts, expected
    n_loo = sum(f.variant.startswith("log-linear, leave out") for f in comp.fits)
    assert f"log-linear, one point left out at a time ({n_loo} curves)" in texts
    # One legend entry per family, not one per curve.
    assert len(texts) < len(comp.fits)
    # The data and the Bayesian side fill the left column, least squares the right.
    assert texts.index("Bayesian 95% band") < texts.index("Range of least-squares curves")
    plt.close(fig)


# --- words -----------------------------------------------------------------------------------

@pytest.mark.parametrize("p, text", [
    (0.0, "< 1%"), (0.004, "< 1%"), (0.005, "1%"), (0.5, "50%"), (0.914, "91%"),
    (0.994, "99%"), (0.995, "> 99%"), (1.0, "> 99%"), (None, "–"), (float("nan"), "–"),
])
def test_probabilities_never_print_as_certain(p, text):
    # Boundaries: whole percent rounded half up, as commonly printed (common practice, no
    # published source); 0% and 100% are never printed for an estimate from finite draws.
    assert fmt_probability(p) == text


def test_probability_out_of_range_is_refused():
    with pytest.raises(ValueError, match="between 0 and 1"):
        fmt_probability(1.5)


def test_numbers_have_three_significant_figures_and_thousands_separators():
    rng = np.random.default_rng(20261203)
    values = 10.0 ** rng.uniform(-4, 9, 400) * rng.choice([-1, 1], 400)
    for v in values:
        text = fmt_number(v)
        # Reference: numpy's Dragon4 printing with 3 significant digits.
        ref = np.format_float_positional(v, precision=3, unique=False, fractional=False,
                                         trim="-")
        assert float(text.replace(",", "")) == pytest.approx(float(ref), rel=1e-12), (v, text)
        whole = text.lstrip("-").split(".")[0]
        # Reference: Python's "," grouping of the same integer part (PEP 378).
        assert whole == f"{int(whole.replace(',', '')):,}"


@pytest.mark.parametrize("v, text", [
    (9797.6, "9,800"), (10598.0, "10,600"), (999.6, "1,000"), (42.0, "42"),
    (0.012345, "0.0123"), (0.0, "0"), (1234567.8, "1,230,000"), (2.675, "2.68"),
])
def test_number_examples(v, text):
    assert fmt_number(v) == text


def test_intervals_round_outward_so_they_contain_the_computed_one():
    rng = np.random.default_rng(7)
    for lo in 10.0 ** rng.uniform(0, 7, 300):
        hi = lo * (1 + rng.uniform(0.001, 2))
        low_text, high_text = fmt_interval(lo, hi).split(" to ")
        assert float(low_text.replace(",", "")) <= lo
        assert float(high_text.replace(",", "")) >= hi


def test_band_phrases_use_the_levels_given():
    row = {"lower_60": 9054.2, "upper_60": 10598.0, "lower_90": 8000.0, "upper_90": 12001.0}
    assert band_phrases(row, (90, 60)) == ["60% band 9,050 to 10,600",
                                           "90% band 8,000 to 12,100"]


@pytest.mark.parametrize("periods, words", [
    (["2024Q1", "2024Q2", "2024Q3"], "per quarter"),
    (["2024-01", "2024-02", "2024-03"], "per month"),
    (["2021", "2022", "2023"], "per year"),
])
def test_growth_is_per_calendar_period(periods, words):
    s = read_series(pd.DataFrame({"period": periods, "value": [10.0, 11.0, 12.5]}))
    assert per_period(s.axis) == words


def test_cli_headline_uses_levels_given_and_calendar_words(demo_fc):
    from bayesgrowth.cli.text import forecast_lines
    from bayesgrowth.forecast.forecast import forecast

    fc = forecast(demo_fc.fit, 8, levels=(60, 90))
    text = "\n".join(forecast_lines(fc, fc.summary(target=1.0)))
    assert "60% band" in text and "90% band" in text and "80% band" not in text
    assert "growth per quarter" in text and "per period" not in text
    assert "probability > 99% of reaching it" in text and "100%" not in text
    assert "8 quarters ahead" in text


def test_unit_comes_from_the_option_or_the_value_column():
    from types import SimpleNamespace

    from bayesgrowth.cli.text import unit_from_args

    assert unit_from_args(SimpleNamespace(unit="EUR m", value_col="revenue")) == "EUR m"
    assert unit_from_args(SimpleNamespace(unit=None, value_col="revenue")) == "revenue"
    assert unit_from_args(SimpleNamespace(unit=None, value_col="value")) is None


def test_fan_of_a_local_trend_shows_its_one_step_forecasts_over_the_history():
    import bayesgrowth as bg

    fc = bg.GrowthModel(seed=2).fit(bg.load_demo()).forecast(4)
    ax = _drawn(plot_fan(fc))
    texts = _legend_texts(ax)
    assert "One-step-ahead forecasts (median)" in texts
    assert "One-step-ahead forecasts, 95% band" in texts
    median = next(ln for ln in ax.get_lines()
                  if ln.get_label() == "One-step-ahead forecasts (median)")
    # shown once the model has seen as many periods as it has coefficients (6 here)
    t = fc.fit.series.t
    np.testing.assert_array_equal(np.asarray(median.get_xdata()), t[6:])


@pytest.mark.parametrize("periods, probability, expected", [
    # a half-life of 24 periods: 6 years of quarters, 2 of months; the 80% interval is
    # rounded outward to two digits
    (["2024Q1", "2024Q2", "2024Q3"], 1.0,
     "growth fades towards zero: it halves in about 6 years (80% interval 2.5 to 18 years)"),
    (["2024-01", "2024-02", "2024-03"], 0.3,
     "growth fades towards zero with probability 30%, and then halves in about 2 years (80% "
     "interval 0.83 to 6 years); otherwise it drifts without fading"),
])
def test_fading_phrase_says_how_long_growth_lasts_in_years(periods, probability, expected):
    from bayesgrowth.report.words import fading_phrase

    s = read_series(pd.DataFrame({"period": periods, "value": [10.0, 11.0, 12.5]}))
    summary = {"growth_fades": {"probability": probability, "half_life_periods_if_fading": {
        "median": 24.0, "lower_80": 10.0, "upper_80": 72.0}}}
    assert fading_phrase(summary, s.axis) == expected
    assert fading_phrase({"growth_per_period": {}}, s.axis) is None


def test_cli_headline_says_how_long_growth_lasts(demo):
    from bayesgrowth.cli.text import forecast_lines
    from bayesgrowth.config import DEFAULT_MODEL
    from bayesgrowth.forecast.forecast import forecast
    from bayesgrowth.inference import fit_series

    fc = forecast(fit_series(demo, engine="exact", seed=1, **DEFAULT_MODEL), 8)
    summary = fc.summary()
    text = "\n".join(forecast_lines(fc, summary))
    years = summary["growth_fades"]["half_life_periods_if_fading"]["median"] / 4
    assert f"growth fades towards zero: it halves in about {years:.2g} years (80% interval" in text
