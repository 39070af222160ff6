"""The fan chart and the least-squares comparison of the guide pages, from the demo series.

Run ``python docs/make_images.py`` to regenerate every image; ``python docs/make_figures.py``
redraws these two and prints the numbers that docs/comparison.md quotes. Exact engine,
exponential curve, seed 1.
"""

from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402

import bayesgrowth as bg  # noqa: E402
from bayesgrowth.comparison import compare_to_forecast  # noqa: E402
from bayesgrowth.forecast.forecast import forecast  # noqa: E402
from bayesgrowth.inference import fit_series  # noqa: E402
from bayesgrowth.plots.compare import comparison_figure  # noqa: E402

IMAGES = Path(__file__).with_name("images")
#: An invented budget figure for the demo's last forecast quarter (as in the examples).
TARGET = 9000.0
#: What the demo values measure (the invented company's quarterly revenue).
UNIT = "Revenue"


def demo_forecast():
    """The demo's 8-quarter forecast by the exponential curve (exact engine, seed 1).

    The least-squares fits of the comparison chart stand beside this curve.
    """
    fit = fit_series(bg.load_demo(), engine="exact", seed=1, model="exponential")
    return forecast(fit, 8)


def fan_chart(images: Path = IMAGES, fc=None) -> list[str]:
    """fan_chart.png: the default model's forecast of the demo (seed 1), with a target.

    History, one-step forecasts over it, nested bands and the forecast start.
    """
    fc = fc or bg.GrowthModel(seed=1).fit(bg.load_demo()).forecast(8)
    ax = bg.plot_fan(fc, unit=UNIT, target=TARGET)
    ax.figure.savefig(images / "fan_chart.png", dpi=110)
    plt.close(ax.figure)
    return ["fan_chart.png"]


def comparison(images: Path = IMAGES, fc=None):
    """comparison.png: every least-squares curve beside the Bayesian band; returns the names."""
    fc = fc or demo_forecast()
    comp = compare_to_forecast(fc)
    fig = comparison_figure(comp, unit=UNIT)
    fig.savefig(images / "comparison.png", dpi=110)
    plt.close(fig)
    return ["comparison.png"], comp


def scenario_chart(images: Path = IMAGES) -> list[str]:
    """scenario.png: the default model's forecast with "growth halves from 2027Q1" beside it."""
    from bayesgrowth.forecast.scenario import Scenario, apply_scenario
    from bayesgrowth.plots.scenario import plot_fan_with_scenario

    fc = bg.GrowthModel(seed=1).fit(bg.load_demo()).forecast(8)
    sc = Scenario(growth_factor=0.5, growth_from="2027Q1")
    ax = plot_fan_with_scenario(fc, apply_scenario(fc, sc), sc.describe(fc.periods),
                                unit=UNIT, target=TARGET)
    ax.figure.savefig(images / "scenario.png", dpi=110)
    plt.close(ax.figure)
    return ["scenario.png"]


def main() -> None:
    """Write both figures to docs/images/ and print the numbers quoted in the text."""
    IMAGES.mkdir(exist_ok=True)
    fc = demo_forecast()
    fan_chart(IMAGES)
    _, comp = comparison(IMAGES, fc)
    cols = ["variant", "n_points", "growth_per_period", "value_at_horizon", "prob_at_least"]
    print(comp.table[cols].round(4).to_string(index=False))
    print(comp.spread)
    print(fc.table.iloc[-1])


if __name__ == "__main__":
    main()
