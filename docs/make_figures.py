"""Regenerate the figures of the guide pages from the bundled demo series.

Run ``python docs/make_figures.py``; every figure uses a fixed seed.
"""

from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import matplotlib.pyplot as plt  # noqa: E402

import bayesgrowth as bg  # noqa: E402
from bayesgrowth.comparison import compare_to_forecast  # noqa: E402
from bayesgrowth.plots.compare import plot_comparison  # noqa: E402

IMAGES = Path(__file__).with_name("images")


def main() -> None:
    """Write every guide figure to docs/images/ and print the numbers quoted in the text."""
    IMAGES.mkdir(exist_ok=True)
    series = bg.load_demo()
    model = bg.GrowthModel(engine="exact", seed=1).fit(series)
    fc = model.forecast(8)
    ax = bg.plot_fan(fc, show_curve=True)
    ax.figure.savefig(IMAGES / "fan_chart.png", dpi=110)
    plt.close(ax.figure)

    comp = compare_to_forecast(fc)
    fig, ax = plt.subplots(figsize=(9, 5), layout="constrained")
    all_t = list(series.t) + list(fc.t)
    plot_comparison(series.t, series.values, comp.fits, fc.horizon, band=fc.table, ax=ax,
                    period_labels=dict(zip(all_t, series.axis.labels(all_t), strict=True)))
    ax.set_title("Demo series: least-squares point forecasts and the Bayesian band")
    fig.savefig(IMAGES / "comparison.png", dpi=110)
    plt.close(fig)
    cols = ["variant", "n_points", "growth_per_period", "value_at_horizon", "prob_at_least"]
    print(comp.table[cols].round(4).to_string(index=False))
    print(comp.spread)
    print(fc.table.iloc[-1])


if __name__ == "__main__":
    main()
