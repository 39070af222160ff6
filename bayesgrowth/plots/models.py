"""Plots for choosing models: model bands with their average, prior predictive, sensitivity."""

from __future__ import annotations

import numpy as np

from bayesgrowth.display import fmt_weight
from bayesgrowth.plots.plain import literal
from bayesgrowth.plots.style import (
    BAND_SHADES,
    CATEGORICAL,
    FORECAST,
    HISTORY,
    ValueFormatter,
    draw_history,
    draw_nested_bands,
    format_value_axis,
    legend,
    legend_in_reading_order,
    mark_forecast_start,
    set_period_ticks,
    style_axes,
)

__all__ = ["MODEL_COLORS", "plot_model_bands", "plot_prior_predictive", "plot_sensitivity"]

#: Okabe & Ito (2008) colours for the individual models (the teal is kept for the average).
MODEL_COLORS = CATEGORICAL

#: Line style of each model, so models differ in greyscale too.
MODEL_DASHES = ("-", (0, (5, 1.5)), (0, (1.5, 1.5)), (0, (6, 1.5, 1.5, 1.5)), (0, (3, 3)), "-")


def plot_model_bands(forecasts, averaged=None, *, weights=None, level: int = 80,
                     history: int | None = 12, ax=None, title: str | None = None,
                     unit: str | None = None, comparison=None):
    """Overlay each model's forecast band and the model-averaged band.

    Parameters
    ----------
    forecasts : mapping of str to Forecast
        Forecasts of the same series and periods, keyed by model name.
    averaged : AveragedForecast, optional
        Drawn as a filled band (the forecast hue) with its median.
    weights : mapping of str to float, optional
        Shown in the legend (default ``averaged.weights`` when given).
    level : int
        The band level drawn for every model (must be one of their levels).
    history : int, optional
        Show only the last ``history`` observations (default 12), so that the
        bands get the room; ``None`` shows the whole history.
    ax : matplotlib.axes.Axes, optional
    title : str, optional
    unit : str, optional
        Y-axis label (default: the series' value column if known, else "Value").
    comparison : ModelComparison, optional
        When given, the legend shows each weight with its 90% bootstrap interval.

    Returns
    -------
    matplotlib.axes.Axes
    """
    import matplotlib.pyplot as plt

    if not forecasts:
        raise ValueError("give at least one forecast to plot")
    if ax is None:
        _, ax = plt.subplots(figsize=(9, 5), layout="constrained")
    style_axes(ax)
    first = next(iter(forecasts.values()))
    series = first.fit.series
    if level not in first.levels:
        raise ValueError(f"level {level} is not one of the forecast levels {list(first.levels)}")
    if weights is None and averaged is not None:
        weights = averaged.weights
    t_obs, y_obs = series.t, series.values
    if history is not None:
        if int(history) < 1:
            raise ValueError(f"history must be at least 1 observation, got {history}")
        t_obs, y_obs = t_obs[-int(history):], y_obs[-int(history):]
    x = np.concatenate([[t_obs[-1]], first.t])

    def joined(col, table):
        return np.concatenate([[y_obs[-1]], table[col]])

    draw_history(ax, t_obs, y_obs)  # first in the legend; drawn on top by its zorder
    if averaged is not None:
        tab = averaged.table
        draw_nested_bands(ax, x, [(level, joined(f"lower_{level}", tab),
                                   joined(f"upper_{level}", tab))],
                          label="Model average: {level}% band")
        ax.plot(x, joined("median", tab), color=FORECAST, lw=2.6, zorder=4,
                label="Model average: median")
    for i, (name, fc) in enumerate(forecasts.items()):
        color = MODEL_COLORS[i % len(MODEL_COLORS)]
        dash = MODEL_DASHES[i % len(MODEL_DASHES)]
        tab = fc.table
        share = "" if weights is None else f" (weight {fmt_weight(weights.get(name, 0.0))})"
        if comparison is not None and name in set(comparison.table["model"]):
            row = comparison.table.set_index("model").loc[name]
            share = (f" (weight {fmt_weight(row['weight'])}, 90% interval "
                     f"{fmt_weight(row['weight_lower_90'])} to "
                     f"{fmt_weight(row['weight_upper_90'])})")
        ax.plot(x, joined("median", tab), color=color, lw=1.6, ls=dash, zorder=5,
                label=f"{name}{share}: median")
        for col in (f"lower_{level}", f"upper_{level}"):
            ax.plot(x, joined(col, tab), color=color, lw=0.8, ls=dash, alpha=0.8, zorder=5)
    ax.plot([], [], color=HISTORY, lw=0.8, label=f"thin lines: each model's {level}% band")
    all_t = np.arange(t_obs[0], first.t[-1] + 1)
    set_period_ticks(ax, all_t, series.axis.labels(all_t))
    mark_forecast_start(ax, t_obs[-1] + 0.5)
    ax.set_xlabel("Period")
    format_value_axis(ax, unit, series)
    ax.set_title(title or f"{literal(series.name)}\nEach model's forecast and their stacking "
                 "average", fontsize=11)
    legend(ax)
    return ax


def plot_prior_predictive(prior, ax=None, *, log_scale: bool = True, title: str | None = None,
                          unit: str | None = None):
    """Fan chart of a :class:`~bayesgrowth.forecast.prior.PriorPredictive` with the data.

    Parameters
    ----------
    prior : PriorPredictive
    ax : matplotlib.axes.Axes, optional
    log_scale : bool
        Logarithmic value axis (prior bands usually span orders of magnitude).
    title : str, optional
    unit : str, optional
        Y-axis label (default: the series' value column if known, else "Value").

    Returns
    -------
    matplotlib.axes.Axes
    """
    import matplotlib.pyplot as plt

    if ax is None:
        _, ax = plt.subplots(figsize=(9, 5), layout="constrained")
    style_axes(ax)
    tab = prior.table
    t = prior.t
    levels = sorted(prior.levels, reverse=True)
    draw_nested_bands(ax, t, [(lv, tab[f"lower_{lv}"].to_numpy(dtype=float),
                               tab[f"upper_{lv}"].to_numpy(dtype=float)) for lv in levels],
                      label="{level}% prior predictive band")
    ax.plot(t, tab["median"], color=FORECAST, lw=2, zorder=4, label="Prior predictive median")
    series = prior.series
    draw_history(ax, series.t, series.values, label="Observed (not used by the priors' draws)")
    if log_scale:
        ax.set_yscale("log")
        top = max(levels)
        lo = np.nanmin(np.concatenate([tab[f"lower_{top}"], series.values]))
        hi = np.nanmax(np.concatenate([tab[f"upper_{top}"], series.values]))
        lo = max(lo, hi * 1e-12, np.finfo(float).tiny)
        ax.set_ylim(lo / 1.5, hi * 1.5)
    else:
        ax.set_ylim(bottom=0)
    set_period_ticks(ax, t, prior.periods)
    if prior.horizon:
        mark_forecast_start(ax, series.t_last + 0.5)
    ax.set_xlabel("Period")
    format_value_axis(ax, unit, series)
    if log_scale:
        ax.set_ylabel(f"{ax.get_ylabel()} (log scale)")
    ax.set_title(title or f"{literal(series.name)}\nWhat the priors imply before fitting\n"
                 f"{prior.spec.label()}", fontsize=11)
    legend_in_reading_order(ax, where="below")  # inside, it would hide the wide bands
    return ax


def plot_sensitivity(result, axes=None, *, title: str | None = None):
    """One panel per prior factor: the median and band at the horizon for each setting.

    Parameters
    ----------
    result : SensitivityResult
    axes : sequence of matplotlib.axes.Axes, optional
        One per factor in ``result.table`` (in table order).
    title : str, optional

    Returns
    -------
    numpy.ndarray of matplotlib.axes.Axes
    """
    import matplotlib.pyplot as plt

    tab = result.table
    factors = list(dict.fromkeys(tab["factor"]))
    if axes is None:
        fig, axes = plt.subplots(1, len(factors), figsize=(3.2 * len(factors) + 1, 4.2),
                                 sharey=True, layout="constrained", squeeze=False)
        axes = axes[0]
    else:
        axes = np.atleast_1d(np.asarray(axes, dtype=object))
        if len(axes) != len(factors):
            raise ValueError(f"need {len(factors)} axes, one per factor, got {len(axes)}")
        fig = axes[0].figure
    lev = result.level
    base = tab[tab["is_base"]].iloc[0]
    for ax, factor in zip(axes, factors, strict=True):
        _sensitivity_panel(ax, tab[tab["factor"] == factor].reset_index(drop=True), base, lev)
        ax.set_title(factor, fontsize=10)
    axes[0].set_ylabel(f"Value in {result.period}: median and {lev}% band")
    axes[0].plot([], [], "o", mfc=HISTORY, mec=HISTORY, label="base setting")
    axes[0].plot([], [], "o", mfc="white", mec=HISTORY, label="other settings")
    if not tab["diagnostics_ok"].all():
        axes[0].plot([], [], "X", mfc="white", mec=HISTORY, label="sampling diagnostics failed")
    legend(axes[0], ncol=1, fontsize=7.5)
    fig.suptitle(title or f"{literal(result.series_name)}: prior sensitivity of the forecast for "
                 f"{result.period}\n{result.model}", fontsize=11)
    return axes


def _sensitivity_panel(ax, rows, base, lev: int) -> None:
    """One factor: the base setting's band behind, each setting's median and band in front."""
    style_axes(ax)
    x = np.arange(len(rows))
    ax.axhspan(base[f"lower_{lev}"], base[f"upper_{lev}"], facecolor=BAND_SHADES[2],
               edgecolor=BAND_SHADES[1], lw=0.6, zorder=1, label=f"base setting: {lev}% band")
    ax.axhline(base["median"], color=FORECAST, lw=1, ls=":", zorder=1.5)
    err = np.vstack([rows["median"] - rows[f"lower_{lev}"],
                     rows[f"upper_{lev}"] - rows["median"]])
    ax.errorbar(x, rows["median"], yerr=err, fmt="none", ecolor=HISTORY, capsize=4, lw=1.2,
                zorder=2)
    for xi, row in zip(x, rows.itertuples(), strict=True):
        face = HISTORY if row.is_base else "white"
        marker = "o" if row.diagnostics_ok else "X"
        ax.plot(xi, row.median, marker, mfc=face, mec=HISTORY, ms=7, zorder=3)
    ax.set_xticks(x)
    ax.set_xticklabels(rows["setting"], rotation=35, ha="right", fontsize=8)
    ax.set_xlim(-0.6, len(rows) - 0.4)
    ax.yaxis.set_major_formatter(ValueFormatter())
