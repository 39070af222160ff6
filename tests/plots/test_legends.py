"""Legends sit outside the plotting area, so they cover no data, band or target whatever the
series does; weights too small to print in two decimals read "< 0.01"."""

from __future__ import annotations

import matplotlib

matplotlib.use("Agg")

import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402
import pytest  # noqa: E402

import bayesgrowth as bg  # noqa: E402
from bayesgrowth.data.series import read_series  # noqa: E402
from bayesgrowth.plots.backtest import calibration_figure, fans_figure  # noqa: E402
from bayesgrowth.plots.fan import plot_fan  # noqa: E402
from bayesgrowth.plots.models import plot_model_bands  # noqa: E402


def _declining():
    # an invented series falling from 5,000: its history fills the upper left corner
    values = 5000 * 0.93 ** np.arange(16) * np.exp(0.03 * np.sin(np.arange(16)))
    labels = [f"{2021 + i // 4}Q{i % 4 + 1}" for i in range(16)]
    return read_series(pd.DataFrame({"period": labels, "value": values}), name="falling")


def _clear_of_the_plot(ax) -> None:
    """The legend overlaps neither the plotting area nor the x axis' labels."""
    ax.figure.canvas.draw()
    box = ax.get_legend().get_window_extent()
    assert not box.overlaps(ax.get_window_extent()), ax.get_title()
    labels = ax.xaxis.get_tightbbox()
    assert labels is None or not box.overlaps(labels), ax.get_title()


@pytest.mark.parametrize("horizon", [4, 60])
def test_fan_legend_covers_nothing_drawn(horizon):
    fc = bg.forecast(bg.fit_series(_declining(), engine="exact", seed=1,
                                   model="exponential"), horizon)
    _clear_of_the_plot(plot_fan(fc, target=3000.0))


def test_backtest_legends_cover_nothing_drawn(demo):
    result = bg.backtest(demo, horizon=2, min_train=16, seed=1, methods=["exact", "naive"])
    for fig in (fans_figure(result), calibration_figure(result)):
        for ax in fig.axes:
            if ax.get_legend() is not None:
                _clear_of_the_plot(ax)


def test_models_chart_legend_covers_nothing_and_writes_a_tiny_weight_readably(demo):
    fits = {"default": bg.fit_series(demo, engine="exact", seed=2, model="exponential"),
            "exponential": bg.fit_series(demo, engine="exact", seed=2, model="exponential")}
    forecasts = {name: bg.forecast(fit, 4) for name, fit in fits.items()}
    # an optimiser leaves a weight it drives to zero at about 1e-17, not at 0
    ax = plot_model_bands(forecasts, weights={"default": 0.998, "exponential": 1.3e-17})
    texts = [t.get_text() for t in ax.get_legend().get_texts()]
    assert "exponential (weight < 0.01): median" in texts
    assert "default (weight > 0.99): median" in texts
    assert not any("e-" in t for t in texts)
    _clear_of_the_plot(ax)


def _inside_the_figure(artist) -> None:
    """The artist's box lies within its figure's, left to right (the saved image's edges)."""
    fig = artist.figure
    fig.canvas.draw()
    box = artist.get_window_extent()
    assert box.x0 >= 0 and box.x1 <= fig.bbox.width, (box, fig.bbox)


def test_a_long_scenario_label_is_wrapped_inside_the_figure(demo):
    from bayesgrowth.forecast.scenario import Scenario, apply_scenario
    from bayesgrowth.plots.scenario import draw_scenario

    fc = bg.forecast(bg.fit_series(demo, engine="exact", seed=1, model="exponential"), 8)
    sc = Scenario(growth_factor=0.5, growth_from="2027Q1", shock_pct=-10, shock_at="2026Q3")
    words = sc.describe(fc.periods)
    ax = draw_scenario(plot_fan(fc, target=9000.0), apply_scenario(fc, sc), words)
    _inside_the_figure(ax.get_legend())
    texts = [" ".join(t.get_text().split()) for t in ax.get_legend().get_texts()]
    assert f"Scenario ({words}): median" in texts  # wrapped, not cut


def test_backtest_model_title_is_wrapped_inside_the_figure(demo):
    from bayesgrowth.plots.backtest import model_figure

    # From origin 6 the default model gains seasonal factors on the way: a long description.
    result = bg.backtest(demo, models=["default"], horizon=1, min_train=6, seed=1)
    title = model_figure(result, "default")._suptitle
    _inside_the_figure(title)
    assert " ".join(result.descriptions["default"].split()) in " ".join(title.get_text().split())


def test_legend_on_a_users_own_figure_stays_inside_the_saved_image(demo, tmp_path):
    import matplotlib.pyplot as plt

    fc = bg.forecast(bg.fit_series(demo, engine="exact", seed=1, model="exponential"), 4)
    fig, ax = plt.subplots(figsize=(7, 4))  # no layout engine: the legend below needs room
    plot_fan(fc, ax=ax)
    fig.savefig(tmp_path / "fan.png", dpi=60)
    box = ax.get_legend().get_window_extent()
    assert box.y0 >= 0 and box.x0 >= 0 and box.x1 <= fig.bbox.x1, box
    _clear_of_the_plot(ax)
    plt.close(fig)


@pytest.mark.parametrize("chart", ["fan", "comparison"])
def test_a_long_title_on_a_users_narrow_figure_is_wrapped_inside_it(demo, chart):
    import matplotlib.pyplot as plt

    fc = bg.forecast(bg.fit_series(demo, seed=1), 8)  # the default: a long model description
    fig, ax = plt.subplots()  # matplotlib's default 6.4 by 4.8 inches
    if chart == "fan":
        plot_fan(fc, ax=ax)
    else:
        bg.plot_compared(bg.compare_to_forecast(fc), ax=ax)
    _inside_the_figure(ax.title)  # drawn with the constrained layout the legend asks for
    assert " ".join(ax.get_title().split()).endswith(
        "independent errors, normal noise, seasonal factors")  # wrapped, not cut
    plt.close(fig)
