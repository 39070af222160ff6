"""Backtest plots: forecast fans from every origin over the actuals, and the calibration figure."""

from __future__ import annotations

import matplotlib.pyplot as plt
import numpy as np
from matplotlib.axes import Axes
from matplotlib.figure import Figure

from bayesgrowth.plots.calibration import plot_coverage, plot_pit_histogram
from bayesgrowth.plots.plain import literal
from bayesgrowth.plots.style import (
    BAND_SHADES,
    FORECAST,
    TARGET,
    draw_history,
    fit_to_figure_width,
    format_value_axis,
    legend,
    set_period_ticks,
    style_axes,
)

__all__ = ["calibration_figure", "fans_figure", "model_figure", "plot_backtest_fans"]

#: Colour of outcomes that fall outside their band (Okabe & Ito vermillion).
MISS_COLOR = TARGET


def plot_backtest_fans(result, method: str, level: int = 80, ax: Axes | None = None,
                       unit: str | None = None) -> Axes:
    """Draw the ``level``% band and median forecast from every origin over the actuals.

    Each origin's fan starts at its last training value. Outcomes outside
    their band are ringed, so a run of misses (a turning point the curve did not
    expect) stands out.

    Parameters
    ----------
    result : BacktestResult
        Output of :func:`bayesgrowth.backtest.backtest`.
    method : str
        Which method's forecasts to draw.
    level : int, default 80
        Band level; one of the backtest's levels.
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made if omitted.
    unit : str, optional
        Y-axis label (default: the series' value column if known, else "Value").

    Returns
    -------
    matplotlib.axes.Axes

    Raises
    ------
    ValueError
        If the method or level is not in the result.
    """
    if method not in result.methods:
        raise ValueError(f"method {method!r} is not in the backtest ({', '.join(result.methods)})")
    if level not in result.levels:
        raise ValueError(f"level {level} is not in the backtest's levels {list(result.levels)}")
    if ax is None:
        _, ax = plt.subplots(figsize=(8.6, 4.2), layout="constrained")
    style_axes(ax)
    series = result.series
    t_of = dict(zip(series.labels, series.t.tolist(), strict=True))
    y_of = dict(zip(series.labels, series.values.tolist(), strict=True))
    rows = result.forecasts[result.forecasts["method"] == method]
    lo_col, hi_col = f"lower_{level}", f"upper_{level}"
    banded = False
    for origin, block in rows.groupby("origin", sort=False):
        x = np.array([t_of[origin]] + [t_of[p] for p in block["period"]])
        start = y_of[origin]
        med = np.concatenate([[start], block["median"].to_numpy()])
        if block[lo_col].notna().all():
            lo = np.concatenate([[start], block[lo_col].to_numpy()])
            hi = np.concatenate([[start], block[hi_col].to_numpy()])
            ax.fill_between(x, lo, hi, facecolor=BAND_SHADES[1], alpha=0.35,
                            edgecolor=BAND_SHADES[0], linewidth=0.4, zorder=2)
            banded = True
        ax.plot(x, med, color=FORECAST, lw=0.9, alpha=0.8, zorder=3)
    draw_history(ax, series.t, series.values, label="Actual values")
    missed = rows[(rows["actual"] < rows[lo_col]) | (rows["actual"] > rows[hi_col])]
    if len(missed):
        ax.scatter([t_of[p] for p in missed["period"]], missed["actual"], s=60,
                   facecolors="none", edgecolors=MISS_COLOR, linewidths=1.4, zorder=6,
                   label=f"Outside its {level}% band (from some origin)")
    if banded:
        ax.fill_between([], [], facecolor=BAND_SHADES[1], alpha=0.6, edgecolor=BAND_SHADES[0],
                        linewidth=0.4, label=f"{level}% band from each origin")
    ax.plot([], [], color=FORECAST, lw=0.9, label="Median from each origin")
    set_period_ticks(ax, series.t, series.labels)
    format_value_axis(ax, unit, series)
    ax.set_title(f"{method}: forecasts from {rows['origin'].nunique()} origins", fontsize=10)
    legend(ax)
    return ax


def fans_figure(result, level: int = 80, unit: str | None = None) -> Figure:
    """One panel of :func:`plot_backtest_fans` per method, sharing the axes.

    Parameters
    ----------
    result : BacktestResult
    level : int, default 80
        Band level shown.
    unit : str, optional
        Y-axis label (default: the series' value column if known, else "Value").

    Returns
    -------
    matplotlib.figure.Figure
    """
    k = len(result.methods)
    fig, axes = plt.subplots(k, 1, figsize=(8.6, 3.2 * k), sharex=True, sharey=True,
                             layout="constrained", squeeze=False)
    for ax, method in zip(axes[:, 0], result.methods, strict=True):
        plot_backtest_fans(result, method, level=level, ax=ax, unit=unit)
    fig.suptitle(f"{literal(result.series.name)}: backtest forecasts ({level}% bands)", fontsize=11)
    return fig


def calibration_figure(result) -> Figure:
    """Band coverage against stated level for every method, then a PIT histogram per method.

    Methods without bands (point forecasts) have no coverage or PIT and are
    left out of the panels.

    Parameters
    ----------
    result : BacktestResult

    Returns
    -------
    matplotlib.figure.Figure
    """
    banded = [m for m in result.methods if result.has_bands(m)]
    panels = 1 + len(banded)
    ncols = 2 if panels == 4 else min(3, panels)
    nrows = -(-panels // ncols)
    fig, axes = plt.subplots(nrows, ncols, figsize=(5.2 * ncols, 4.3 * nrows),
                             layout="constrained", squeeze=False)
    flat = axes.ravel()
    scores = result.scores[result.scores["method"].isin(banded)]
    if banded:
        plot_coverage(scores, result.levels, ax=flat[0])
    else:
        flat[0].text(0.5, 0.5, "no method gave bands", ha="center", va="center")
        flat[0].set_axis_off()
    for ax, method in zip(flat[1:], banded, strict=False):
        pit = result.forecasts.loc[result.forecasts["method"] == method, "pit"]
        plot_pit_histogram(pit.to_numpy(dtype=float), ax=ax, label=method)
    for ax in flat[panels:]:
        ax.set_axis_off()
    n_origins = result.settings.get("n_origins")
    fig.suptitle(f"{literal(result.series.name)}: calibration over {n_origins} origins\n"
                 "PIT histogram shapes: U = bands too narrow, hump = too wide, slope = bias",
                 fontsize=11)
    return fig


def model_figure(result, method: str, level: int = 80, unit: str | None = None) -> Figure:
    """One model's backtest on one figure: its fans over the actuals, coverage and PIT.

    The title names the model and what it is; a model without bands (a point
    forecast) gets the fan panel only.

    Parameters
    ----------
    result : BacktestResult
    method : str
        The model's name (a value of the forecasts' ``method`` column).
    level : int, default 80
        Band level of the fans; one of the backtest's levels.
    unit : str, optional
        Y-axis label of the fans (default: the series' value column if known).

    Returns
    -------
    matplotlib.figure.Figure

    Raises
    ------
    ValueError
        If the model or level is not in the result.
    """
    banded = method in result.methods and result.has_bands(method)
    layout = [["fans", "fans"], ["coverage", "pit"]] if banded else [["fans"]]
    fig, axes = plt.subplot_mosaic(layout, figsize=(9.0, 7.6 if banded else 4.4),
                                   height_ratios=[1.15, 1] if banded else None,
                                   layout="constrained")
    plot_backtest_fans(result, method, level=level, ax=axes["fans"], unit=unit)
    if banded:
        scores = result.scores[result.scores["method"] == method]
        plot_coverage(scores, result.levels, ax=axes["coverage"])
        pit = result.forecasts.loc[result.forecasts["method"] == method, "pit"]
        plot_pit_histogram(pit.to_numpy(dtype=float), ax=axes["pit"], label=method)
    about = result.descriptions.get(method)
    title = f"{literal(result.series.name)}: backtest of {literal(method)}"
    made = fig.suptitle(title + (f"\n{literal(about)}" if about else ""), fontsize=11)
    fit_to_figure_width(made)
    return fig
