"""Plot least-squares growth curves beside a Bayesian forecast band."""

from __future__ import annotations

import re
from collections.abc import Mapping, Sequence

import numpy as np
import pandas as pd
from matplotlib.artist import Artist
from matplotlib.axes import Axes
from matplotlib.patches import Patch

from bayesgrowth.leastsq.fits import GrowthFit
from bayesgrowth.plots.plain import literal
from bayesgrowth.plots.style import (
    CATEGORICAL,
    FORECAST,
    MUTED,
    RANGE,
    draw_history,
    draw_nested_bands,
    fit_title_to_axes,
    format_value_axis,
    legend,
    mark_forecast_start,
    period_label,
    set_period_ticks,
    style_axes,
    unit_label,
)

__all__ = ["comparison_figure", "plot_compared", "plot_comparison"]

#: Colour, line style and legend text of each main least-squares variant.
_MAIN_STYLES = {
    "log-linear": (CATEGORICAL[0], "-", "log-linear (least squares on log values)"),
    "revenue-scale": (CATEGORICAL[1], "-", "revenue-scale (least squares on values)"),
    "log-linear, anchored": (CATEGORICAL[0], "--",
                             "log-linear, anchored (through the starting value)"),
    "revenue-scale, anchored": (CATEGORICAL[1], "--",
                                "revenue-scale, anchored (through the starting value)"),
}
#: The bending curves of the Bayesian models, fitted by least squares on the values.
_CURVE = re.compile(r"^(logistic|gompertz|damped) \(revenue scale\)$")
#: Data-window variants: one thin grey family each, one legend entry per family.
_FAMILIES = (
    ("log-linear, drop last", "-", "log-linear, last points dropped"),
    ("log-linear, drop first", "--", "log-linear, first points dropped"),
    ("log-linear, leave out", ":", "log-linear, one point left out at a time"),
)
_FAMILY_COLOUR = "#8A9099"

#: At most this many period labels on the x axis (the rest are thinned out).
MAX_TICKS = 12


def _band_levels(band: pd.DataFrame) -> list[str]:
    levels = []
    for col in band.columns:
        match = re.fullmatch(r"lower_(.+)", str(col))
        if match and f"upper_{match.group(1)}" in band.columns:
            levels.append(match.group(1))
    return sorted(levels, key=float, reverse=True)


def _line_style(variant: str) -> tuple[str, object, float, str, bool]:
    """Colour, line style, width, legend text and whether it is a window family."""
    if variant in _MAIN_STYLES:
        colour, style, text = _MAIN_STYLES[variant]
        return colour, style, 1.2, text, False
    match = _CURVE.match(variant)
    if match:
        return CATEGORICAL[2], "-.", 1.4, f"{match.group(1)} curve (least squares on values)", False
    for prefix, style, text in _FAMILIES:
        if variant.startswith(prefix):
            return _FAMILY_COLOUR, style, 0.7, text, True
    return MUTED, ":", 1.0, variant, False


def plot_comparison(
    t_obs: np.ndarray,
    y_obs: np.ndarray,
    fits: Sequence[GrowthFit],
    horizon: float,
    *,
    band: pd.DataFrame | None = None,
    ax: Axes | None = None,
    period_labels: Mapping[float, str] | Sequence[str] | None = None,
    unit: str | None = None,
) -> Axes:
    """Draw the data, every least-squares curve, their envelope and a Bayesian band.

    Parameters
    ----------
    t_obs, y_obs : numpy.ndarray
        Observed periods and values.
    fits : sequence of GrowthFit
        Least-squares fits, e.g. from ``bayesgrowth.leastsq.fit_variants``.
        Each is drawn as a line labelled with its variant. The main variants
        and the bending curves get their own colours and legend entries; the
        data-window variants are thin grey lines with one legend entry per family.
    horizon : float
        Number of periods past the last observation to draw.
    band : pandas.DataFrame, optional
        Bayesian forecast band: a column ``t`` (periods on the same index as
        ``t_obs``) or ``step`` (periods after the last observation, 1, 2, ...),
        a column ``median``, and pairs ``lower_L`` / ``upper_L`` for any levels
        ``L`` (e.g. ``lower_80``, ``upper_80``); other columns are ignored, so
        a forecast table with these columns can be passed as it is. Each level is shaded,
        wider levels lighter, and the median is drawn as a line.
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made when omitted.
    period_labels : mapping or sequence of str, optional
        Tick labels for the periods: either a mapping from period to label or
        one label per entry of ``t_obs``.
    unit : str, optional
        Y-axis label; default "Value".

    Returns
    -------
    matplotlib.axes.Axes
        The axes drawn on. Its lines are, in order: the band median (with a
        band), one per fit, the data, and a vertical rule where the forecast
        starts (half a period after the last observation).
    """
    t_obs = np.asarray(t_obs, dtype=float)
    y_obs = np.asarray(y_obs, dtype=float)
    if t_obs.ndim != 1 or t_obs.shape != y_obs.shape or t_obs.size == 0:
        raise ValueError("t_obs and y_obs must be non-empty 1-D arrays of the same length")
    if ax is None:
        import matplotlib.pyplot as plt

        _, ax = plt.subplots(figsize=(9.5, 6.4), layout="constrained")
    style_axes(ax)
    t_end = float(t_obs.max()) + float(horizon)
    grid = np.linspace(float(t_obs.min()), t_end, 200)
    entries: list[tuple[int, Artist, str]] = []
    if band is not None:
        entries += _draw_band(ax, band, float(t_obs.max()))
    if fits:
        entries += _draw_fits(ax, fits, grid)
    data = draw_history(ax, t_obs, y_obs, label="Observed")
    entries.insert(0, (0, data, "Observed"))
    mark_forecast_start(ax, float(t_obs.max()) + 0.5)
    if period_labels is not None:
        _period_ticks(ax, t_obs, period_labels)
    ax.set_xlabel("Period")
    format_value_axis(ax, unit)
    ax.set_ylim(bottom=0)
    ax.set_title("Least-squares growth curves beside the Bayesian forecast", fontsize=11)
    pad = 0.02 * (t_end - float(t_obs.min()))
    ax.set_xlim(float(t_obs.min()) - pad, t_end + pad)
    _two_column_legend(ax, sorted(entries, key=lambda e: e[0]))
    return ax


def _two_column_legend(ax: Axes, entries: list[tuple[int, Artist, str]]) -> None:
    """The data and the Bayesian forecast in the left column, least squares in the right."""
    left = [(h, t) for rank, h, t in entries if rank <= 2]
    right = [(h, t) for rank, h, t in entries if rank > 2]
    blank = (Patch(visible=False), "")
    if right:
        rows = max(len(left), len(right))
        left += [blank] * (rows - len(left))
        right += [blank] * (rows - len(right))
    pairs = left + right
    legend(ax, [p[0] for p in pairs], [p[1] for p in pairs], where="below",
           ncol=2 if right else 1)


def _draw_band(ax: Axes, band: pd.DataFrame, t_last: float) -> list[tuple[int, Artist, str]]:
    """The Bayesian median and nested bands; legend entries median first, narrow bands next."""
    if "median" not in band.columns or not ({"t", "step"} & set(band.columns)):
        raise ValueError("band needs a 'median' column and a 't' or 'step' column")
    band_t = (band["t"].to_numpy(dtype=float) if "t" in band.columns
              else t_last + band["step"].to_numpy(dtype=float))
    levels = _band_levels(band)
    polys = draw_nested_bands(ax, band_t, [
        (lv, band[f"lower_{lv}"].to_numpy(dtype=float), band[f"upper_{lv}"].to_numpy(dtype=float))
        for lv in levels], label="Bayesian {level}% band")
    (median,) = ax.plot(band_t, band["median"], color=FORECAST, lw=2.2, label="Bayesian median",
                        zorder=6)
    entries: list[tuple[int, Artist, str]] = [(1, median, "Bayesian median")]
    for poly in polys[::-1]:
        entries.append((2, poly, poly.get_label()))
    return entries


def _draw_fits(ax: Axes, fits, grid: np.ndarray) -> list[tuple[int, Artist, str]]:
    """Every least-squares curve and their range; one legend entry per variant or family."""
    curves = np.array([fit.value_at(grid) for fit in fits])
    ax.fill_between(grid, curves.min(axis=0), curves.max(axis=0), facecolor=RANGE,
                    edgecolor="none", zorder=1)
    counts: dict[str, int] = {}
    first: dict[str, tuple[int, Artist]] = {}
    for fit, curve in zip(fits, curves, strict=True):
        colour, style, width, text, family = _line_style(fit.variant)
        (line,) = ax.plot(grid, curve, color=colour, linestyle=style, linewidth=width,
                          label=fit.variant, zorder=3 if family else 4)
        counts[text] = counts.get(text, 0) + 1
        first.setdefault(text, (5 if family else 4, line))
    entries: list[tuple[int, Artist, str]] = [
        (3, Patch(facecolor=RANGE), "Range of least-squares curves")]
    for text, (rank, line) in first.items():
        many = rank == 5 and counts[text] > 1
        entries.append((rank, line, f"{text} ({counts[text]} curves)" if many else text))
    return entries


def _period_ticks(ax: Axes, t_obs: np.ndarray, period_labels) -> None:
    if isinstance(period_labels, Mapping):
        ticks = np.array([float(k) for k in period_labels])
        names = [str(v) for v in period_labels.values()]
    else:
        names = [str(v) for v in period_labels]
        if len(names) != t_obs.size:
            raise ValueError("period_labels must give one label per observed period")
        ticks = t_obs
    set_period_ticks(ax, ticks, names, max_ticks=MAX_TICKS)


def plot_compared(comparison, *, ax: Axes | None = None, unit: str | None = None) -> Axes:
    """Draw a :class:`~bayesgrowth.comparison.Comparison`: data, curves, their range, the band.

    Parameters
    ----------
    comparison : Comparison
        From :func:`~bayesgrowth.comparison.compare_to_forecast`.
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made when omitted. The legend lists every
        family of fits below the axes: a figure of about 9.5 by 6.4 inches, the
        size of the new one, shows it whole.
    unit : str, optional
        Y-axis label (default: the series' value column if known, else "Value").

    Returns
    -------
    matplotlib.axes.Axes

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> fc = bg.GrowthModel(seed=1).fit(bg.load_demo()).forecast(8)
    >>> ax = bg.plot_compared(bg.compare_to_forecast(fc))
    >>> ax.get_xlabel()
    'Period (quarterly)'
    """
    from bayesgrowth.plots.fan import describe_model

    fc = comparison.forecast
    series = fc.fit.series
    all_t = list(series.t) + list(fc.t)
    ax = plot_comparison(series.t, series.values, comparison.fits, fc.horizon, band=fc.table,
                         ax=ax, period_labels=dict(zip(all_t, series.axis.labels(all_t),
                                                       strict=True)),
                         unit=unit_label(unit, series))
    ax.set_xlabel(period_label(series))
    ax.set_title(f"{literal(series.name)}: least-squares point forecasts beside the Bayesian band\n"
                 f"Bayesian model: {describe_model(fc)}", fontsize=11)
    fit_title_to_axes(ax)
    return ax


def comparison_figure(comparison, unit: str | None = None):
    """A new figure of a :class:`~bayesgrowth.comparison.Comparison` (see :func:`plot_compared`).

    Returns
    -------
    matplotlib.figure.Figure
    """
    import matplotlib.pyplot as plt

    fig, ax = plt.subplots(figsize=(9.5, 6.4), layout="constrained")
    plot_compared(comparison, ax=ax, unit=unit)
    return fig
