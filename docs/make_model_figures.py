"""Regenerate the figures of docs/choosing-models.md from the bundled demo series.

Run ``python docs/make_images.py`` to regenerate every image, or
``python docs/make_model_figures.py`` for these (a few minutes: it fits four curves
by NUTS and a logistic sensitivity grid). Every figure uses a fixed seed; the
tables printed are the ones quoted in the page.
"""

from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402
import pandas as pd  # noqa: E402

import bayesgrowth as bg  # noqa: E402
from bayesgrowth.forecast.prior import prior_predictive  # noqa: E402
from bayesgrowth.forecast.sensitivity import SensitivityResult, prior_sensitivity  # noqa: E402
from bayesgrowth.plots.models import (  # noqa: E402
    plot_model_bands,
    plot_prior_predictive,
    plot_sensitivity,
)
from bayesgrowth.select import fit_models, model_average  # noqa: E402

IMAGES = Path(__file__).with_name("images")
CURVES = ("exponential", "damped", "logistic", "gompertz")


def _save(fig, name: str, images: Path = IMAGES) -> None:
    fig.savefig(images / name, dpi=110)
    plt.close(fig)


def prior_predictive_figures(images: Path = IMAGES) -> list[str]:
    """prior_predictive.png and prior_predictive_logistic.png (prior draws, no fitting)."""
    series = bg.load_demo()
    names = []
    for model, name in [("exponential", "prior_predictive.png"),
                        ("logistic", "prior_predictive_logistic.png")]:
        pp = prior_predictive(series, 8, model=model, seed=1)
        ax = plot_prior_predictive(pp)
        _save(ax.figure, name, images)
        names.append(name)
        print(model, "prior predictive: share of observations inside the 95% band",
              pp.coverage(95))
        print(pp.table[["period", "median", "lower_95", "upper_95"]].iloc[[0, 19, 27]])
    return names


def sensitivity_figure(images: Path = IMAGES) -> list[str]:
    """prior_sensitivity.png: the exponential curve on six quarters (exact engine)."""
    series = bg.load_demo()
    sens = prior_sensitivity(series.head(6), 8, model="exponential", seed=1)
    axes = plot_sensitivity(sens, title="First six quarters of the demo: prior sensitivity of "
                            f"the forecast for {sens.period} (exponential, exact engine)")
    _save(axes[0].figure, "prior_sensitivity.png", images)
    print(sens.table.drop(columns=["engine", "period"]).round(1).to_string(index=False))
    print(prior_sensitivity(series, 8, model="exponential", seed=1).spread())
    return ["prior_sensitivity.png"]


def ceiling_figure(images: Path = IMAGES) -> list[str]:
    """prior_sensitivity_ceiling.png: the logistic curve's ceiling prior (NUTS fits)."""
    series = bg.load_demo()
    ceil = prior_sensitivity(series, 8, model="logistic", anchors=(), growth_centres=(),
                             growth_spreads=(), seed=1)
    ceil_table = ceil.table[ceil.table["factor"] == "ceiling"]
    print(ceil_table.drop(columns=["engine"]).round(1).to_string(index=False))
    fig, ax = plt.subplots(figsize=(5.5, 4.2), layout="constrained")
    only = SensitivityResult(ceil_table.reset_index(drop=True), ceil.series_name, ceil.model,
                             ceil.horizon, ceil.period, ceil.level)
    plot_sensitivity(only, axes=[ax], title=f"Demo, logistic curve: the ceiling prior and the "
                     f"forecast for {ceil.period}")
    _save(fig, "prior_sensitivity_ceiling.png", images)
    return ["prior_sensitivity_ceiling.png"]


def models_figure(images: Path = IMAGES) -> list[str]:
    """models.png: four curves fitted by NUTS, compared by PSIS-LOO and averaged by stacking."""
    fits = fit_models(bg.load_demo(), CURVES, seed=1)
    ma = model_average(fits, 8, seed=1)
    print(ma.comparison.table.drop(columns=["description"]).round(3).to_string(index=False))
    for line in ma.comparison.reading() + ma.comparison.messages():
        print(line)
    for name, fc in ma.forecasts.items():
        row = fc.table.iloc[-1]
        print(name, round(row["median"]), round(row["lower_80"]), round(row["upper_80"]))
    print(ma.averaged.table.iloc[-1])
    ax = plot_model_bands(ma.forecasts, ma.averaged, comparison=ma.comparison)
    _save(ax.figure, "models.png", images)
    return ["models.png"]


def main() -> None:
    """Draw every figure of the page and print the numbers it quotes."""
    pd.set_option("display.width", 140)
    IMAGES.mkdir(exist_ok=True)
    prior_predictive_figures()
    sensitivity_figure()
    ceiling_figure()
    models_figure()


if __name__ == "__main__":
    main()
