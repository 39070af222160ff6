"""Calibration plots: band coverage against stated level, and PIT histograms."""

from __future__ import annotations

from collections.abc import Sequence

import matplotlib.pyplot as plt
import numpy as np
import pandas as pd
from matplotlib.axes import Axes
from numpy.typing import ArrayLike
from scipy import stats

from bayesgrowth.plots.style import (
    BAND_SHADES,
    CATEGORICAL,
    FORECAST,
    GRID,
    HISTORY,
    MUTED,
    legend,
    style_axes,
)
from bayesgrowth.scoring.pit import pit_histogram
from bayesgrowth.scoring.table import ALL_STEPS

__all__ = ["OKABE_ITO", "plot_coverage", "plot_pit_histogram"]

#: Okabe & Ito (2008) colour-blind-safe palette in the package's order (see ``style``).
OKABE_ITO = CATEGORICAL

#: Marker of each method in the coverage plot, so methods differ in greyscale too.
_MARKERS = ("o", "s", "D", "^", "v", "P")


def _axes(ax: Axes | None, grid: str = "y") -> Axes:
    if ax is None:
        _, ax = plt.subplots(figsize=(5.5, 4.5), layout="constrained")
    return style_axes(ax, grid=grid)


def plot_coverage(
    scores: pd.DataFrame,
    levels: Sequence[int] = (50, 80, 95),
    ax: Axes | None = None,
    step: int | str = ALL_STEPS,
) -> Axes:
    """Plot observed band coverage against the stated level, per method.

    Each method gets one marker per level at its observed coverage, with the
    binomial interval (``coverage_L_low`` to ``coverage_L_high``) as an error
    bar. Markers on the dashed diagonal mean the bands hold what they state;
    below it, the bands are too narrow.

    Parameters
    ----------
    scores : pandas.DataFrame
        Output of :func:`bayesgrowth.scoring.table.score_table`.
    levels : sequence of int, default (50, 80, 95)
        Band levels in percent to show.
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made if omitted.
    step : int or str, default "all"
        Which ``step`` rows to show; ``"all"`` pools every step.

    Returns
    -------
    matplotlib.axes.Axes
        The axes drawn on.

    Raises
    ------
    ValueError
        If no row has the given step or a coverage column is missing.
    """
    ax = _axes(ax, grid="both")
    rows = scores[scores["step"].astype(str) == str(step)]
    if rows.empty:
        raise ValueError(f"plot_coverage: no rows with step {step!r}")
    levs = [int(v) for v in levels]
    for lev in levs:
        for col in (f"coverage_{lev}", f"coverage_{lev}_low", f"coverage_{lev}_high"):
            if col not in rows.columns:
                raise ValueError(f"plot_coverage: scores lack column {col}")
    methods = list(pd.unique(rows["method"]))
    nominal = np.array(levs, dtype=float)
    dodge = 1.2 * (np.arange(len(methods)) - (len(methods) - 1) / 2)
    for i, method in enumerate(methods):
        row = rows[rows["method"] == method].iloc[0]
        cov = 100 * np.array([row[f"coverage_{lev}"] for lev in levs], dtype=float)
        low = 100 * np.array([row[f"coverage_{lev}_low"] for lev in levs], dtype=float)
        high = 100 * np.array([row[f"coverage_{lev}_high"] for lev in levs], dtype=float)
        n = int(row["n"]) if "n" in row.index else None
        ax.errorbar(
            nominal + dodge[i],
            cov,
            yerr=np.vstack([cov - low, high - cov]),
            fmt=_MARKERS[i % len(_MARKERS)],
            capsize=3,
            markersize=5.5,
            color=OKABE_ITO[i % len(OKABE_ITO)],
            label=f"{method} (n={n})" if n is not None else str(method),
        )
    lo_lim = max(0.0, min(levs) - 15.0)
    ax.plot([lo_lim, 100], [lo_lim, 100], linestyle="--", color=MUTED, linewidth=1,
            label="stated = observed")
    ax.set_xlim(lo_lim, 101)
    ax.set_ylim(min(lo_lim, ax.get_ylim()[0]), 102)
    ax.set_xticks(nominal)
    ax.set_xlabel("Stated band level (%)")
    ax.set_ylabel("Outcomes inside the band (%)")
    title_step = "all steps" if str(step) == ALL_STEPS else f"step {step}"
    ax.set_title(f"Band coverage, {title_step} (bars: 95% binomial interval)", fontsize=10)
    legend(ax)
    return ax


def plot_pit_histogram(
    pit_values: ArrayLike,
    ax: Axes | None = None,
    bins: int = 10,
    label: str | None = None,
) -> Axes:
    """Histogram of PIT values with the flat line expected under calibration.

    The shaded band is the central 95% range of a bin count under
    Binomial(n, 1 / bins), the count for calibrated, independent forecasts.
    It holds bin by bin, not for all bins at once (about one bin in twenty
    may leave it by chance), and forecasts from overlapping origins are not
    independent, so read it as a guide.

    Parameters
    ----------
    pit_values : array_like
        PIT values in [0, 1]; NaN entries are left out.
    ax : matplotlib.axes.Axes, optional
        Axes to draw on; a new figure is made if omitted.
    bins : int, default 10
        Number of equal-width bins.
    label : str, optional
        Name shown in the title, e.g. the method.

    Returns
    -------
    matplotlib.axes.Axes
        The axes drawn on.
    """
    ax = _axes(ax)
    counts = pit_histogram(pit_values, bins=bins)
    n = int(counts.sum())
    edges = np.linspace(0.0, 1.0, bins + 1)
    ax.bar(edges[:-1], counts, width=1.0 / bins, align="edge", color=BAND_SHADES[0],
           edgecolor=FORECAST, linewidth=0.6, label="forecasts", zorder=2)
    if n:
        p = 1.0 / bins
        lo, hi = stats.binom.ppf([0.025, 0.975], n, p)
        ax.axhspan(lo, hi, color=GRID, linewidth=0, zorder=1, label="95% range if calibrated")
        for bound in (lo, hi):
            ax.axhline(bound, color=MUTED, linestyle=":", linewidth=1, zorder=3)
        ax.axhline(
            n * p, color=HISTORY, linestyle="--", linewidth=1, zorder=3,
            label="expected if calibrated",
        )
        ax.set_ylim(0, 1.3 * max(hi, counts.max()))
    ax.set_xlim(0, 1)
    ax.set_xlabel("PIT value (share of the forecast below the outcome)")
    ax.set_ylabel("Number of forecasts")
    title = "PIT histogram" + (f": {label}" if label else "") + f" (n={n})"
    ax.set_title(title, fontsize=10)
    legend(ax, ncol=3, columnspacing=1.2)
    return ax
