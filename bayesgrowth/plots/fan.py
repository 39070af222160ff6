"""Fan chart: the history, the fitted curve, nested credible bands, the median and a target."""

from __future__ import annotations

import numpy as np
from matplotlib.axes import Axes

from bayesgrowth.display import fmt_number, fmt_probability
from bayesgrowth.forecast.bands import band_probabilities
from bayesgrowth.plots.plain import literal
from bayesgrowth.plots.style import (
    BAND_SHADES,
    FORECAST,
    HISTORY,
    draw_history,
    draw_nested_bands,
    draw_target,
    fit_title_to_axes,
    format_value_axis,
    legend_in_reading_order,
    mark_forecast_start,
    period_label,
    set_period_ticks,
    style_axes,
)

__all__ = ["BAND_COLOR", "DATA_COLOR", "FAN_SIZE", "describe_model", "fitted_curve", "plot_fan",
           "set_period_ticks"]

#: The forecast hue and the history colour (kept as names other charts import).
BAND_COLOR = FORECAST
#: Size in inches of the figure :func:`plot_fan` makes when given no Axes.
FAN_SIZE = (8.6, 4.8)
DATA_COLOR = HISTORY


def describe_model(forecast) -> str:
    """The model in words for a chart title, e.g. "exponential curve, normal noise".

    A forecast whose ``fit`` has no model specification (an average of models)
    is described by its ``fit.engine`` text instead.
    """
    spec = getattr(forecast.fit, "spec", None)
    if spec is None or not hasattr(spec, "label"):
        return str(getattr(forecast.fit, "engine", "forecast"))
    parts = spec.label().split(", ")
    if not spec.family.states:  # one fitted curve (not a local trend)
        parts[0] = f"{parts[0]} growth curve"
    return ", ".join(parts)


def fitted_curve(forecast) -> np.ndarray | None:
    """Draws of the fitted curve at the observed periods, shape ``(n_draws, n_obs)``.

    ``None`` when the forecast has no single fitted curve to show (an average of
    models, or the local trend, whose path over the history is integrated out).
    """
    fit = forecast.fit
    spec = getattr(fit, "spec", None)
    if spec is None or spec.family.states:
        return None
    from bayesgrowth.models import exponential, general

    series, params, t_ref = fit.series, fit.flat(), fit.priors.t_ref
    if spec.is_plain_exponential:
        log_curve = exponential.log_mean(params, series.t, t_ref)
    else:
        log_curve = general.log_trend(spec, params, series.t, t_ref, series.axis)
    return np.exp(log_curve)


def _probability_at_least(forecast, target: float) -> float:
    """Probability of a value of at least ``target`` in the last forecast period."""
    if hasattr(forecast, "prob_exceeds"):
        return float(forecast.prob_exceeds(target).iloc[-1])
    return float(np.mean(np.asarray(forecast.draws)[:, -1] >= target))


def _title(forecast) -> str:
    title = f"{literal(forecast.fit.series.name)}\nForecast: {describe_model(forecast)}"
    if getattr(forecast, "calibration", None) is not None:  # a RecalibratedForecast
        title += "\nBands recalibrated by a backtest"
    return title


def _draw_fit(ax: Axes, forecast, level: int) -> None:
    """The fitted curve over the history, or a local trend's one-step-ahead forecasts."""
    t_obs = forecast.fit.series.t
    curve = fitted_curve(forecast)
    what = "Fitted curve"
    if curve is None:
        from bayesgrowth.forecast.history import one_step_history

        found = one_step_history(forecast.fit, seed=int(getattr(forecast.fit, "seed", 0)))
        if found is None or not hasattr(forecast.fit, "extra"):
            return
        curve, first = found
        curve, t_obs = curve[:, first:], t_obs[first:]
        what = "One-step-ahead forecasts"
    lo, hi = np.quantile(curve, band_probabilities(level), axis=0)
    ax.fill_between(t_obs, lo, hi, facecolor=BAND_SHADES[-1], edgecolor="none", zorder=1.8,
                    label=f"{what}, {level}% band")
    ax.plot(t_obs, np.median(curve, axis=0), color=FORECAST, linewidth=1.0,
            linestyle=(0, (4, 2)), zorder=3, label=f"{what} (median)")


def plot_fan(forecast, ax: Axes | None = None, *, show_curve: bool = False,
             show_fit: bool = True, title: str | None = None, unit: str | None = None,
             target: float | None = None) -> Axes:
    """Draw a fan chart of a :class:`~bayesgrowth.forecast.Forecast`.

    Parameters
    ----------
    forecast : Forecast
        Or an averaged forecast (anything with ``fit.series``, ``table``,
        ``levels``, ``t`` and ``periods``).
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made when omitted.
    show_curve : bool, default False
        Also draw the widest band of the mean curve alone over the forecast
        (parameter uncertainty, without the period-to-period noise).
    show_fit : bool, default True
        Draw the fitted curve over the history with its widest credible band.
    title : str, optional
        Default: the series name and the model's description.
    unit : str, optional
        Y-axis label, e.g. "Revenue (EUR thousand)"; default the value column's
        name if the series knows it, else "Value".
    target : float, optional
        A budget or guidance value, drawn as a line labelled with the
        probability of reaching it by the last forecast period.

    Returns
    -------
    matplotlib.axes.Axes

    Examples
    --------
    >>> import matplotlib.pyplot as plt
    >>> import bayesgrowth as bg
    >>> fc = bg.forecast(bg.fit_series(bg.load_demo(), seed=1), 4)
    >>> ax = bg.plot_fan(fc)
    >>> ax.get_title().splitlines()[0]
    'Larkspur Instruments revenue (demo)'
    >>> plt.close(ax.figure)
    """
    if ax is None:
        import matplotlib.pyplot as plt

        _, ax = plt.subplots(figsize=FAN_SIZE, layout="constrained")
    style_axes(ax)
    series = forecast.fit.series
    table = forecast.table
    t_obs, y_obs = series.t, series.values
    top = max(forecast.levels)
    # Bands start at the last observation so the fan joins the history.
    x = np.concatenate([[t_obs[-1]], forecast.t])

    def joined(col):
        return np.concatenate([[y_obs[-1]], table[col].to_numpy(dtype=float)])

    draw_nested_bands(ax, x, [(lv, joined(f"lower_{lv}"), joined(f"upper_{lv}"))
                              for lv in forecast.levels])
    ax.plot(x, joined("median"), color=FORECAST, linewidth=2.2, zorder=4,
            label="Forecast (median)")
    if show_curve:
        ax.plot(forecast.t, table[f"curve_lower_{top}"], color=FORECAST, linestyle=":",
                linewidth=1.1, zorder=4, label=f"Trend curve alone, {top}% band")
        ax.plot(forecast.t, table[f"curve_upper_{top}"], color=FORECAST, linestyle=":",
                linewidth=1.1, zorder=4)
    if show_fit:
        _draw_fit(ax, forecast, top)
    draw_history(ax, t_obs, y_obs)
    if target is not None:
        p_last = _probability_at_least(forecast, target)
        draw_target(ax, target, f"Target {fmt_number(target)}: {fmt_probability(p_last)} "
                                f"chance of reaching it by {forecast.periods[-1]}")
    all_t = np.concatenate([t_obs, forecast.t])
    set_period_ticks(ax, all_t, series.axis.labels(all_t))
    ax.set_ylim(bottom=0)
    mark_forecast_start(ax, t_obs[-1] + 0.5)
    format_value_axis(ax, unit, series)
    ax.set_xlabel(period_label(series))
    ax.set_title(title or _title(forecast), fontsize=11)
    fit_title_to_axes(ax)
    legend_in_reading_order(ax, ncol=3)
    return ax
