"""Markdown tables and the coverage figure of the real-data benchmark."""

from __future__ import annotations

import numpy as np
import pandas as pd

__all__ = ["coverage_figure", "markdown_summary", "plot_coverage"]

_COLUMNS = {
    "method": "method",
    "series": "series",
    "failed": "failed",
    "inside_80": "in 80% band",
    "inside_95": "in 95% band",
    "below_95": "below 95%",
    "above_95": "above 95%",
    "msis": "MSIS",
    "msis_median": "MSIS median",
    "scaled_crps": "scaled CRPS",
    "scaled_crps_median": "scaled CRPS median",
    "smape": "sMAPE %",
    "mase": "MASE",
    "seconds_mean": "s / series",
    "cpu_seconds_mean": "CPU s / series",
}


def _cover(row: pd.Series, col: str) -> str:
    if np.isnan(row[col]):
        return "-"
    return f"{row[col]:.3f} [{row[f'{col}_lo']:.3f}, {row[f'{col}_hi']:.3f}]"


def _table(rows: pd.DataFrame) -> list[str]:
    head = "| " + " | ".join(_COLUMNS.values()) + " |"
    rule = "|" + "|".join("---" if c == "method" else "---:" for c in _COLUMNS) + "|"
    lines = [head, rule]
    for _, row in rows.iterrows():
        cells = []
        for col in _COLUMNS:
            value = row[col]
            if col in ("inside_80", "inside_95"):
                cells.append(_cover(row, col))
            elif col in ("method", "series", "failed"):
                cells.append(str(value))
            elif col in ("seconds_mean", "cpu_seconds_mean"):
                cells.append(f"{value:.3f}")
            else:
                cells.append("-" if np.isnan(value) else f"{value:.3f}")
        lines.append("| " + " | ".join(cells) + " |")
    return lines


def markdown_summary(summary: pd.DataFrame, title: str, notes: list[str]) -> str:
    """The summary as markdown: the pooled table first, then one table per group.

    Parameters
    ----------
    summary : pandas.DataFrame
        Output of :func:`realdata_scores.summarise`.
    title : str
        First heading.
    notes : list of str
        Lines printed under the title (data, methods, settings).
    """
    lines = [f"# {title}", "", *notes, ""]
    groups = ["pooled"] + [g for g in dict.fromkeys(summary["group"]) if g != "pooled"]
    for group in groups:
        rows = summary[summary["group"] == group]
        lines += [f"## {'All series' if group == 'pooled' else group}", "", *_table(rows), ""]
    lines += [
        "Coverage: share of hold-out points inside the central band, over the successful "
        "fits; brackets: 95% bootstrap interval resampling whole series. MSIS (95% band), "
        "scaled CRPS, sMAPE and MASE: means over series, with medians for MSIS and scaled "
        "CRPS (lower is better). s / series: mean "
        "wall time to fit and forecast one series in a worker; CPU s / series: the worker's "
        "CPU time for it (less swayed by other load on the machine).",
        "",
    ]
    return "\n".join(lines)


def plot_coverage(summary: pd.DataFrame, group: str = "pooled", ax=None):
    """Coverage of the 80% and 95% bands per method, with bootstrap intervals.

    Parameters
    ----------
    summary : pandas.DataFrame
        Output of :func:`realdata_scores.summarise`.
    group : str
        ``"pooled"`` or a ``"collection frequency"`` group.
    ax : matplotlib.axes.Axes, optional

    Returns
    -------
    matplotlib.axes.Axes
    """
    import matplotlib.pyplot as plt

    if ax is None:
        _, ax = plt.subplots(figsize=(6, 3.5))
    rows = summary[summary["group"] == group].reset_index(drop=True)
    x = np.arange(len(rows))
    for offset, level, colour in ((-0.12, 80, "tab:blue"), (0.12, 95, "tab:orange")):
        col = f"inside_{level}"
        centre = rows[col].to_numpy()
        err = np.vstack([centre - rows[f"{col}_lo"], rows[f"{col}_hi"] - centre])
        ax.errorbar(x + offset, centre, yerr=err, fmt="o", color=colour, capsize=3,
                    label=f"{level}% band")
        ax.axhline(level / 100, color=colour, linestyle="--", linewidth=1)
    ax.set_xticks(x, rows["method"], rotation=45, ha="right", rotation_mode="anchor")
    ax.set_ylabel("share of hold-out points inside")
    ax.set_title("All series" if group == "pooled" else group)
    ax.set_ylim(0, 1.02)
    return ax


def coverage_figure(summary: pd.DataFrame):
    """One coverage panel for all series, then one per group; returns the Figure."""
    import matplotlib.pyplot as plt

    groups = ["pooled"] + [g for g in dict.fromkeys(summary["group"]) if g != "pooled"]
    ncols = min(4, len(groups))
    nrows = int(np.ceil(len(groups) / ncols))
    fig, axes = plt.subplots(nrows, ncols, figsize=(3.6 * ncols, 3.3 * nrows), squeeze=False,
                             sharey=True)
    for ax, group in zip(axes.flat, groups, strict=False):
        plot_coverage(summary, group, ax=ax)
    for ax in list(axes.flat)[len(groups):]:
        ax.set_visible(False)
    axes.flat[0].legend(loc="lower left", fontsize="small")
    fig.tight_layout()
    return fig
