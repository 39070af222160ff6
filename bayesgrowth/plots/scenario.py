"""A scenario drawn beside the base case on a fan chart, labelled as a scenario."""

from __future__ import annotations

import numpy as np
from matplotlib.axes import Axes

from bayesgrowth.plots.style import CATEGORICAL, _reading_rank, legend

__all__ = ["SCENARIO_COLOR", "draw_scenario", "plot_fan_with_scenario"]

#: Okabe & Ito's reddish purple: apart from the forecast's teal, the target's
#: vermilion and the history's near-black, and still distinct in greyscale as a dashed,
#: hatched outline.
SCENARIO_COLOR = CATEGORICAL[2]


def draw_scenario(ax: Axes, scenario_fc, description: str, *, level: int | None = None,
                  base_fc=None) -> Axes:
    """Draw a scenario's median and one band over a fan chart of its base case.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        A fan chart of the base case (:func:`~bayesgrowth.plots.fan.plot_fan`).
    scenario_fc : Forecast
        The base forecast under the scenario
        (:func:`~bayesgrowth.forecast.scenario.apply_scenario`).
    description : str
        The scenario in words, shown in the legend.
    level : int, optional
        The band drawn (default 80 when among the levels, else the widest).
    base_fc : Forecast, optional
        The base case: when given, the scenario is drawn from the last period it
        leaves unchanged, so it does not hide the base case before it departs.

    Returns
    -------
    matplotlib.axes.Axes
        The legend lists the base case first, the scenario's entries last.
    """
    levels = scenario_fc.levels
    level = level or (80 if 80 in levels else max(levels))
    series = scenario_fc.fit.series
    table = scenario_fc.table
    x = np.concatenate([[series.t[-1]], scenario_fc.t])
    start = 0
    if base_fc is not None:
        same = np.isclose(table["median"].to_numpy(dtype=float),
                          base_fc.table["median"].to_numpy(dtype=float), rtol=1e-12)
        start = int(np.argmin(same)) if not same.all() else len(same)

    def joined(col):
        full = np.concatenate([[series.values[-1]], table[col].to_numpy(dtype=float)])
        return full[start:]

    x = x[start:]

    lo, hi = joined(f"lower_{level}"), joined(f"upper_{level}")
    ax.fill_between(x, lo, hi, facecolor="none", edgecolor=SCENARIO_COLOR, hatch="////",
                    linewidth=0.0, alpha=0.55, zorder=3.2)
    for edge in (lo, hi):
        ax.plot(x, edge, color=SCENARIO_COLOR, linewidth=1.0, linestyle=(0, (3, 2)),
                zorder=3.3)
    ax.plot(x, joined("median"), color=SCENARIO_COLOR, linewidth=2.0, linestyle=(0, (6, 2)),
            zorder=4.2, label=f"Scenario ({description}): median")
    ax.fill_between([], [], [], facecolor="white", edgecolor=SCENARIO_COLOR, hatch="////",
                    label=f"Scenario: {level}% band")
    bottom, top = ax.get_ylim()
    ax.set_ylim(bottom, max(top, float(np.nanmax(hi)) * 1.04))
    pairs = list(zip(*ax.get_legend_handles_labels(), strict=True))
    base = sorted((p for p in pairs if not p[1].startswith("Scenario")),
                  key=lambda hl: _reading_rank(*hl))
    scen = [p for p in pairs if p[1].startswith("Scenario")]
    ordered = base + scen
    legend(ax, [h for h, _ in ordered], [lab for _, lab in ordered], ncol=3)
    return ax


def plot_fan_with_scenario(base_fc, scenario_fc, description: str, **fan_options) -> Axes:
    """A fan chart of ``base_fc`` with ``scenario_fc`` drawn beside it.

    Parameters
    ----------
    base_fc, scenario_fc : Forecast
    description : str
        The scenario in words.
    **fan_options
        Passed to :func:`~bayesgrowth.plots.fan.plot_fan` (``unit``, ``target``, ...).

    Returns
    -------
    matplotlib.axes.Axes
    """
    from bayesgrowth.plots.fan import plot_fan

    ax = plot_fan(base_fc, **fan_options)
    return draw_scenario(ax, scenario_fc, description, base_fc=base_fc)
