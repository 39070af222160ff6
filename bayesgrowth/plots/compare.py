"""Plot least-squares growth curves beside a Bayesian forecast band."""

from __future__ import annotations

import re
from collections.abc import Mapping, Sequence

import matplotlib.pyplot as plt
import numpy as np
import pandas as pd
from matplotlib.artist import Artist
from matplotlib.axes import Axes
from matplotlib.patches import Patch

from bayesgrowth.leastsq.fits import GrowthFit

__all__ = ["comparison_figure", "plot_comparison"]

_MAIN_STYLES = {
    "log-linear": ("tab:blue", "-"),
    "revenue-scale": ("tab:orange", "-"),
    "log-linear, anchored": ("tab:blue", "--"),
    "revenue-scale, anchored": ("tab:orange", "--"),
    # The bending curve of the Bayesian model, fitted by least squares.
    "logistic (revenue scale)": ("black", "-."),
    "gompertz (revenue scale)": ("black", "-."),
    "damped (revenue scale)": ("black", "-."),
}
_FAMILIES = (
    ("log-linear, drop last", "tab:red", "log-linear, last points dropped"),
    ("log-linear, drop first", "tab:purple", "log-linear, first points dropped"),
    ("log-linear, leave out", "tab:gray", "log-linear, one point left out"),
)
_BAND_COLOUR = "tab:green"


#: At most this many period labels on the x axis (the rest are thinned out).
MAX_TICKS = 12


def _band_levels(band: pd.DataFrame) -> list[str]:
    levels = []
    for col in band.columns:
        match = re.fullmatch(r"lower_(.+)", str(col))
        if match and f"upper_{match.group(1)}" in band.columns:
            levels.append(match.group(1))
    return sorted(levels, key=float, reverse=True)


def plot_comparison(
    t_obs: np.ndarray,
    y_obs: np.ndarray,
    fits: Sequence[GrowthFit],
    horizon: float,
    *,
    band: pd.DataFrame | None = None,
    ax: Axes | None = None,
    period_labels: Mapping[float, str] | Sequence[str] | None = None,
) -> Axes:
    """Draw the data, every least-squares curve, their envelope and a Bayesian band.

    Parameters
    ----------
    t_obs, y_obs : numpy.ndarray
        Observed periods and values.
    fits : sequence of GrowthFit
        Least-squares fits, e.g. from ``bayesgrowth.leastsq.fit_variants``.
        Each is drawn as a thin line labelled with its variant. The four main
        variants get their own legend entries; the data-window variants get one
        legend entry per family.
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

    Returns
    -------
    matplotlib.axes.Axes
        The axes drawn on. Its lines are, in order: the band median (with a
        band), one per fit, the data, and a dotted vertical line at the last
        observation.
    """
    t_obs = np.asarray(t_obs, dtype=float)
    y_obs = np.asarray(y_obs, dtype=float)
    if t_obs.ndim != 1 or t_obs.shape != y_obs.shape or t_obs.size == 0:
        raise ValueError("t_obs and y_obs must be non-empty 1-D arrays of the same length")
    if ax is None:
        _, ax = plt.subplots(figsize=(9, 5.5))

    t_end = float(t_obs.max()) + float(horizon)
    grid = np.linspace(float(t_obs.min()), t_end, 200)
    handles: list[Artist] = []
    labels: list[str] = []

    if band is not None:
        if "median" not in band.columns or not ({"t", "step"} & set(band.columns)):
            raise ValueError("band needs a 'median' column and a 't' or 'step' column")
        band_t = (
            band["t"].to_numpy(dtype=float)
            if "t" in band.columns
            else float(t_obs.max()) + band["step"].to_numpy(dtype=float)
        )
        levels = _band_levels(band)
        for i, level in enumerate(levels):
            alpha = 0.15 + 0.15 * i
            ax.fill_between(
                band_t,
                band[f"lower_{level}"],
                band[f"upper_{level}"],
                color=_BAND_COLOUR,
                alpha=alpha,
                linewidth=0,
            )
            handles.append(Patch(color=_BAND_COLOUR, alpha=alpha))
            labels.append(f"Bayesian {level}% band")
        (median,) = ax.plot(
            band_t, band["median"], color=_BAND_COLOUR, lw=2, label="Bayesian median", zorder=4
        )
        handles.append(median)
        labels.append("Bayesian median")

    if fits:
        curves = np.array([fit.value_at(grid) for fit in fits])
        ax.fill_between(
            grid, curves.min(axis=0), curves.max(axis=0), color="tab:blue", alpha=0.12, linewidth=0
        )
        handles.append(Patch(color="tab:blue", alpha=0.12))
        labels.append("Range of least-squares curves")
        seen_family: set[str] = set()
        for fit, curve in zip(fits, curves, strict=True):
            colour, style = _MAIN_STYLES.get(fit.variant, ("0.3", ":"))
            legend_name = fit.variant
            for prefix, fam_colour, fam_name in _FAMILIES:
                if fit.variant.startswith(prefix):
                    colour, style, legend_name = fam_colour, "-", fam_name
                    break
            (line,) = ax.plot(
                grid,
                curve,
                color=colour,
                linestyle=style,
                linewidth=1.0,
                alpha=0.8,
                label=fit.variant,
            )
            if legend_name not in seen_family:
                seen_family.add(legend_name)
                handles.append(line)
                labels.append(legend_name)

    (data,) = ax.plot(
        t_obs,
        y_obs,
        linestyle="none",
        marker="o",
        color="black",
        markersize=5,
        label="Observed",
        zorder=5,
    )
    handles.insert(0, data)
    labels.insert(0, "Observed")
    ax.axvline(
        float(t_obs.max()), color="0.35", linestyle=":", linewidth=1.0, label="Last observation"
    )

    if period_labels is not None:
        if isinstance(period_labels, Mapping):
            ticks = [float(k) for k in period_labels]
            names = [str(v) for v in period_labels.values()]
        else:
            names = [str(v) for v in period_labels]
            if len(names) != t_obs.size:
                raise ValueError("period_labels must give one label per observed period")
            ticks = list(t_obs)
        step = max(1, int(np.ceil(len(ticks) / MAX_TICKS)))
        ax.set_xticks(ticks[::step])
        ax.set_xticklabels(names[::step], rotation=45, ha="right")

    ax.set_xlabel("Period")
    ax.set_ylabel("Value")
    ax.set_title("Least-squares growth curves and the Bayesian forecast")
    pad = 0.02 * (t_end - float(t_obs.min()))
    ax.set_xlim(float(t_obs.min()) - pad, t_end + pad)
    ax.legend(handles, labels, loc="upper left", fontsize="small", frameon=False)
    ax.text(
        float(t_obs.max()),
        0.02,
        "  forecast",
        transform=ax.get_xaxis_transform(),
        ha="left",
        va="bottom",
        fontsize="small",
        color="0.35",
    )
    return ax


def comparison_figure(comparison):
    """A new figure of a :class:`~bayesgrowth.comparison.Comparison`: curves, range, band."""
    import matplotlib.pyplot as plt

    fc = comparison.forecast
    series = fc.fit.series
    fig, ax = plt.subplots(figsize=(9, 5), layout="constrained")
    all_t = list(series.t) + list(fc.t)
    plot_comparison(series.t, series.values, comparison.fits, fc.horizon, band=fc.table, ax=ax,
                    period_labels=dict(zip(all_t, series.axis.labels(all_t), strict=True)))
    ax.set_title(f"{series.name}: least-squares point forecasts and the Bayesian band")
    return fig
