"""Where the band comes from: each future period's predictive variance split by source."""

from __future__ import annotations

import numpy as np
from matplotlib.axes import Axes
from matplotlib.ticker import PercentFormatter

from bayesgrowth.forecast.band_sources import SOURCES, band_sources
from bayesgrowth.plots.style import CATEGORICAL, FORECAST, legend, style_axes

__all__ = ["plot_band_sources"]

#: One fill per source: dark teal, orange, light grey (apart in greyscale too), with
#: hatching on the middle one so the three also differ without colour.
_FILLS = {"estimation": (FORECAST, ""), "shocks": (CATEGORICAL[1], "///"),
          "noise": ("#C9CDD3", "")}


def plot_band_sources(forecast, ax: Axes | None = None) -> Axes:
    """Stacked bars: each future period's predictive variance (log scale) by source.

    Parameters
    ----------
    forecast : Forecast
        From a fit by the exact state-space engine (see
        :func:`bayesgrowth.forecast.band_sources.band_sources`).
    ax : matplotlib.axes.Axes, optional

    Returns
    -------
    matplotlib.axes.Axes
    """
    import matplotlib.pyplot as plt

    table = band_sources(forecast)
    if ax is None:
        _, ax = plt.subplots(figsize=(7.5, 3.6), layout="constrained")
    style_axes(ax)
    wide = table.pivot(index="step", columns="source", values="share")
    labels = table.drop_duplicates("source").set_index("source")["label"]
    x = np.arange(len(forecast.periods))
    bottom = np.zeros(x.size)
    for source in SOURCES:
        share = wide[source].to_numpy()
        fill, hatch = _FILLS[source]
        ax.bar(x, share, bottom=bottom, width=0.72, color=fill, hatch=hatch,
               edgecolor="white", linewidth=0.8, label=labels[source].capitalize(),
               zorder=2)
        bottom += share
    ax.set_xticks(x, forecast.periods, rotation=0 if x.size <= 8 else 45)
    ax.set_xlim(-0.6, x.size - 0.4)
    ax.set_ylim(0, 1)
    ax.yaxis.set_major_formatter(PercentFormatter(1.0, decimals=0))
    ax.set_ylabel("Share of predictive variance\n(log value)")
    ax.set_title(f"{forecast.fit.series.name}: where the band's width comes from", loc="left",
                 fontsize=11)
    handles, labels = ax.get_legend_handles_labels()  # top of the stack first, as drawn
    legend(ax, handles[::-1], labels[::-1], where="below", ncol=1, loc="upper left",
           bbox_to_anchor=(0.0, -0.1))
    return ax
