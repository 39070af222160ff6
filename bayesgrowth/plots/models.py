"""Plots for choosing models: model bands with their average, prior predictive, sensitivity."""

from __future__ import annotations

import numpy as np

from bayesgrowth.plots.fan import BAND_COLOR, DATA_COLOR, set_period_ticks

__all__ = ["MODEL_COLORS", "plot_model_bands", "plot_prior_predictive", "plot_sensitivity"]

#: Okabe & Ito (2008) colours for the individual models (blue is kept for the average).
MODEL_COLORS = ("#D55E00", "#009E73", "#CC79A7", "#E69F00", "#56B4E9", "#F0E442")


def _boundary(ax, t_last: float) -> None:
    ax.axvline(t_last + 0.5, color="0.4", ls="--", lw=1)
    top = ax.get_ylim()[1]
    ax.text(t_last + 0.6, top, " forecast", va="top", ha="left", color="0.3", fontsize=9)
    ax.text(t_last + 0.4, top, "history ", va="top", ha="right", color="0.3", fontsize=9)


def plot_model_bands(forecasts, averaged=None, *, weights=None, level: int = 80,
                     history: int | None = 12, ax=None, title: str | None = None):
    """Overlay each model's forecast band and the model-averaged band.

    Parameters
    ----------
    forecasts : mapping of str to Forecast
        Forecasts of the same series and periods, keyed by model name.
    averaged : AveragedForecast, optional
        Drawn as a filled blue band with its median.
    weights : mapping of str to float, optional
        Shown in the legend (default ``averaged.weights`` when given).
    level : int
        The band level drawn for every model (must be one of their levels).
    history : int, optional
        Show only the last ``history`` observations (default 12), so that the
        bands get the room; ``None`` shows the whole history.
    ax : matplotlib.axes.Axes, optional
    title : str, optional

    Returns
    -------
    matplotlib.axes.Axes
    """
    import matplotlib.pyplot as plt

    if not forecasts:
        raise ValueError("give at least one forecast to plot")
    if ax is None:
        _, ax = plt.subplots(figsize=(9, 5), layout="constrained")
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

    if averaged is not None:
        tab = averaged.table
        ax.fill_between(x, joined(f"lower_{level}", tab), joined(f"upper_{level}", tab),
                        color=BAND_COLOR, alpha=0.22, lw=0,
                        label=f"model average: {level}% band")
        ax.plot(x, joined("median", tab), color=BAND_COLOR, lw=2.5, label="model average: median")
    for i, (name, fc) in enumerate(forecasts.items()):
        color = MODEL_COLORS[i % len(MODEL_COLORS)]
        tab = fc.table
        share = "" if weights is None else f" (weight {weights.get(name, 0.0):.2f})"
        ax.plot(x, joined("median", tab), color=color, lw=1.5, label=f"{name}{share}")
        for col in (f"lower_{level}", f"upper_{level}"):
            ax.plot(x, joined(col, tab), color=color, lw=1, ls="--")
    ax.plot([], [], color="0.3", lw=1, ls="--", label=f"dashed: each model's {level}% band")
    ax.plot(t_obs, y_obs, "o-", color=DATA_COLOR, ms=4, lw=1, label="observed")
    all_t = np.arange(t_obs[0], first.t[-1] + 1)
    set_period_ticks(ax, all_t, series.axis.labels(all_t))
    _boundary(ax, t_obs[-1])
    ax.set_xlabel("Period")
    ax.set_ylabel("Value")
    ax.set_title(title or f"{series.name}: each model's forecast and the stacking average")
    ax.legend(loc="upper left", fontsize=8, frameon=False)
    ax.grid(alpha=0.3)
    return ax


def plot_prior_predictive(prior, ax=None, *, log_scale: bool = True, title: str | None = None):
    """Fan chart of a :class:`~bayesgrowth.forecast.prior.PriorPredictive` with the data.

    Parameters
    ----------
    prior : PriorPredictive
    ax : matplotlib.axes.Axes, optional
    log_scale : bool
        Logarithmic value axis (prior bands usually span orders of magnitude).
    title : str, optional

    Returns
    -------
    matplotlib.axes.Axes
    """
    import matplotlib.pyplot as plt

    if ax is None:
        _, ax = plt.subplots(figsize=(9, 5), layout="constrained")
    tab = prior.table
    t = prior.t
    levels = sorted(prior.levels, reverse=True)
    for i, level in enumerate(levels):
        ax.fill_between(t, tab[f"lower_{level}"], tab[f"upper_{level}"], color=BAND_COLOR,
                        alpha=0.15 + 0.2 * i, lw=0, label=f"{level}% prior predictive band")
    ax.plot(t, tab["median"], color=BAND_COLOR, lw=2, label="prior predictive median")
    series = prior.series
    ax.plot(series.t, series.values, "o", color=DATA_COLOR, ms=4,
            label="observed (not used by the priors' draws)")
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
        _boundary(ax, series.t_last)
    ax.set_xlabel("Period")
    ax.set_ylabel("Value" + (" (log scale)" if log_scale else ""))
    ax.set_title(title or f"What the priors imply before fitting: {prior.spec.label()}")
    ax.legend(loc="upper left", fontsize=8, frameon=False)
    ax.grid(alpha=0.3, which="both" if log_scale else "major")
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
        rows = tab[tab["factor"] == factor].reset_index(drop=True)
        x = np.arange(len(rows))
        ax.axhspan(base[f"lower_{lev}"], base[f"upper_{lev}"], color=BAND_COLOR, alpha=0.12,
                   lw=0, label=f"base setting: {lev}% band")
        ax.axhline(base["median"], color=BAND_COLOR, lw=1, ls=":")
        err = np.vstack([rows["median"] - rows[f"lower_{lev}"],
                         rows[f"upper_{lev}"] - rows["median"]])
        ax.errorbar(x, rows["median"], yerr=err, fmt="none", ecolor=DATA_COLOR, capsize=4, lw=1.2)
        for xi, row in zip(x, rows.itertuples(), strict=True):
            face = DATA_COLOR if row.is_base else "white"
            marker = "o" if row.diagnostics_ok else "X"
            ax.plot(xi, row.median, marker, mfc=face, mec=DATA_COLOR, ms=7, zorder=3)
        ax.set_xticks(x)
        ax.set_xticklabels(rows["setting"], rotation=35, ha="right", fontsize=8)
        ax.set_xlim(-0.6, len(rows) - 0.4)
        ax.set_title(factor, fontsize=10)
        ax.grid(alpha=0.3, axis="y")
    axes[0].set_ylabel(f"Value in {result.period}: median and {lev}% band")
    axes[0].plot([], [], "o", mfc=DATA_COLOR, mec=DATA_COLOR, label="base setting")
    axes[0].plot([], [], "o", mfc="white", mec=DATA_COLOR, label="other settings")
    if not tab["diagnostics_ok"].all():
        axes[0].plot([], [], "X", mfc="white", mec=DATA_COLOR, label="sampling diagnostics failed")
    axes[0].legend(loc="best", fontsize=7, frameon=False)
    fig.suptitle(title or f"{result.series_name}: prior sensitivity of the forecast for "
                 f"{result.period} ({result.model})", fontsize=11)
    return axes
