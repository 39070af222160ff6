"""Fan chart: observed values, shaded credible bands, median, history/forecast boundary."""

from __future__ import annotations

import numpy as np

__all__ = ["plot_fan", "BAND_COLOR", "DATA_COLOR", "set_period_ticks"]

#: Okabe & Ito (2008) colour-blind-safe palette: blue for bands, black for data.
BAND_COLOR = "#0072B2"
DATA_COLOR = "#000000"


def set_period_ticks(ax, t: np.ndarray, labels: list[str], max_ticks: int = 10) -> None:
    """Label the x axis with period labels, thinned to at most ``max_ticks``."""
    step = max(1, int(np.ceil(len(t) / max_ticks)))
    ax.set_xticks(t[::step])
    ax.set_xticklabels(labels[::step], rotation=45, ha="right")


def plot_fan(forecast, ax=None, *, show_curve=False, title: str | None = None):
    """Draw a fan chart of a :class:`~bayesgrowth.forecast.Forecast`.

    Parameters
    ----------
    forecast : Forecast
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made when omitted.
    show_curve : bool
        Also draw the 95% band of the mean curve alone (parameter uncertainty).
    title : str, optional

    Returns
    -------
    matplotlib.axes.Axes
    """
    import matplotlib.pyplot as plt

    if ax is None:
        _, ax = plt.subplots(figsize=(8, 4.5), layout="constrained")
    series = forecast.fit.series
    table = forecast.table
    t_obs, y_obs = series.t, series.values
    t_f = forecast.t
    # Bands start at the last observation so the fan joins the history.
    x = np.concatenate([[t_obs[-1]], t_f])
    levels = sorted(forecast.levels, reverse=True)
    for i, level in enumerate(levels):
        lo = np.concatenate([[y_obs[-1]], table[f"lower_{level}"]])
        hi = np.concatenate([[y_obs[-1]], table[f"upper_{level}"]])
        alpha = 0.18 + 0.22 * i
        ax.fill_between(x, lo, hi, color=BAND_COLOR, alpha=alpha, lw=0,
                        label=f"{level}% credible band")
    ax.plot(x, np.concatenate([[y_obs[-1]], table["median"]]), color=BAND_COLOR, lw=2,
            label="forecast median")
    if show_curve:
        top = max(forecast.levels)
        ax.plot(t_f, table[f"curve_lower_{top}"], color=BAND_COLOR, ls=":", lw=1,
                label=f"{top}% band of the trend curve")
        ax.plot(t_f, table[f"curve_upper_{top}"], color=BAND_COLOR, ls=":", lw=1)
    ax.plot(t_obs, y_obs, "o-", color=DATA_COLOR, ms=4, lw=1, label="observed")
    ax.axvline(t_obs[-1] + 0.5, color="0.4", ls="--", lw=1)
    ymax = ax.get_ylim()[1]
    ax.text(t_obs[-1] + 0.6, ymax, " forecast", va="top", ha="left", color="0.3", fontsize=9)
    ax.text(t_obs[-1] + 0.4, ymax, "history ", va="top", ha="right", color="0.3", fontsize=9)
    all_t = np.concatenate([t_obs, t_f])
    set_period_ticks(ax, all_t, series.axis.labels(all_t))
    ax.set_ylabel("Value")
    ax.set_xlabel("Period")
    ax.set_ylim(bottom=0)
    ax.set_title(title or f"{series.name}: forecast with credible bands ({forecast.fit.engine})")
    ax.legend(loc="upper left", fontsize=8, frameon=False)
    ax.grid(alpha=0.3)
    return ax
