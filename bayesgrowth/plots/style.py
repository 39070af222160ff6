"""The look of every bayesgrowth chart: palette, band shading, line styles, axes and ticks.

One place decides how a chart looks, so the fan, comparison, backtest,
calibration and model charts read as one family:

* forecasts are drawn in one hue (a deep teal) with nested bands of stepped
  lightness, opaque and edged, so that the band levels stay apart in greyscale;
* the history is a solid dark slate line with small markers, plainly not the
  forecast;
* a vertical rule with a label marks where the forecast starts;
* a target is a dash-dotted vermillion line labelled with its probability;
* categorical lines (methods, models, least-squares variants) take the
  Okabe & Ito (2008) colour-blind-safe palette;
* a white background with light horizontal rules only, no box, values with
  thousands separators and a unit, period labels on the calendar's rhythm.
"""

from __future__ import annotations

import re
import textwrap
from collections.abc import Sequence

import numpy as np
from matplotlib.axes import Axes
from matplotlib.ticker import Formatter, FuncFormatter, NullFormatter
from matplotlib.transforms import ScaledTranslation, Transform

from bayesgrowth.display import HUGE, fmt_number
from bayesgrowth.plots.plain import literal

__all__ = [
    "BAND_SHADES",
    "CATEGORICAL",
    "FORECAST",
    "GRID",
    "HISTORY",
    "MUTED",
    "RANGE",
    "TARGET",
    "ValueFormatter",
    "band_edge",
    "band_shades",
    "draw_history",
    "draw_nested_bands",
    "draw_target",
    "fit_title_to_axes",
    "format_value_axis",
    "legend",
    "legend_in_reading_order",
    "mark_forecast_start",
    "period_label",
    "set_period_ticks",
    "style_axes",
    "unit_label",
]

#: Dark teal of forecast medians; the hue of every forecast band.
FORECAST = "#0E4F4C"
#: Band fills from the narrowest level (darkest) to the widest (lightest), same hue.
BAND_SHADES = ("#4E9E95", "#8CC5BD", "#C4E2DD", "#E4F2EF")
#: Dark slate of the observed history and of text.
HISTORY = "#23272F"
#: Grey of rules, secondary text and the forecast-start marker.
MUTED = "#6B717C"
#: Light horizontal rules behind the data.
GRID = "#E2E5E9"
#: Vermillion (Okabe & Ito) of a target line and of misses.
TARGET = "#D55E00"
#: Sand fill of a range of point forecasts (kept apart from the teal bands).
RANGE = "#EFE4D2"
#: Okabe & Ito (2008) colour-blind-safe palette, black and yellow left out, for lines that
#: name a method, model or variant (vermillion last: it also marks targets and misses).
CATEGORICAL = ("#0072B2", "#E69F00", "#CC79A7", "#009E73", "#56B4E9", "#D55E00")


def band_shades(n: int) -> list[str]:
    """Fill colours for ``n`` nested bands, widest (lightest) first.

    One level takes a light shade (lines drawn over it stay readable); up to four
    take the darkest ``n`` shades; more levels repeat the lightest, so the narrow
    bands keep their dark shades.
    """
    if n < 1:
        return []
    if n == 1:
        return [BAND_SHADES[2]]
    dark_first = list(BAND_SHADES[:n]) + [BAND_SHADES[-1]] * max(0, n - len(BAND_SHADES))
    return dark_first[::-1]


def band_edge(fill: str) -> str:
    """The edge drawn around a band: the next darker shade of the same hue."""
    if fill in BAND_SHADES:
        i = BAND_SHADES.index(fill)
        return BAND_SHADES[i - 1] if i > 0 else FORECAST
    return FORECAST


def style_axes(ax: Axes, *, grid: str = "y") -> Axes:
    """White background, light rules along ``grid`` ("y", "x", "both" or "none"), no box."""
    ax.set_facecolor("white")
    ax.grid(False)
    if grid in ("y", "both"):
        ax.yaxis.grid(True, color=GRID, linewidth=0.8, linestyle="-")
    if grid in ("x", "both"):
        ax.xaxis.grid(True, color=GRID, linewidth=0.8, linestyle="-")
    ax.set_axisbelow(True)
    for side in ("top", "right", "left"):
        ax.spines[side].set_visible(False)
    ax.spines["bottom"].set_color(MUTED)
    ax.tick_params(axis="both", colors=HISTORY, labelsize=9, length=3, color=MUTED)
    ax.tick_params(axis="y", which="both", length=0)
    ax.title.set_color(HISTORY)
    ax.xaxis.label.set_color(HISTORY)
    ax.yaxis.label.set_color(HISTORY)
    return ax


class ValueFormatter(Formatter):
    """Tick labels with thousands separators and only the decimals the tick spacing needs."""

    def __init__(self) -> None:
        self._ticks = np.array([], dtype=float)

    def set_locs(self, locs) -> None:  # noqa: D102 - a matplotlib Formatter
        self._ticks = np.asarray(locs, dtype=float)

    def __call__(self, x, pos=None):  # noqa: D102 - a matplotlib Formatter
        locs = self._ticks
        if locs.size and np.max(np.abs(locs)) >= HUGE:  # with a power of ten, as printed
            return fmt_number(x, 3)
        step = np.min(np.diff(np.sort(locs))) if locs.size > 1 else abs(x) or 1.0
        decimals = 0 if step >= 1 else int(np.ceil(-np.log10(step) - 1e-9))
        text = f"{x:,.{decimals}f}"
        return "0" if text.lstrip("-") == f"{0:.{decimals}f}" else text


def unit_label(unit: str | None = None, series=None) -> str:
    """The y-axis label: ``unit``, else the series' value column if it is known, else "Value"."""
    if unit:
        return literal(unit)
    for name in ("unit", "value_col", "value_name"):
        known = getattr(series, name, None)
        if isinstance(known, str) and known.strip() and known.strip().lower() != "value":
            return literal(known.strip())
    return "Value"


def format_value_axis(ax: Axes, unit: str | None = None, series=None) -> None:
    """Label the value axis with its unit and give its ticks thousands separators."""
    if ax.get_yscale() == "log":
        ax.yaxis.set_major_formatter(FuncFormatter(lambda v, _pos: fmt_number(v, 2)))
        ax.yaxis.set_minor_formatter(NullFormatter())
    else:
        ax.yaxis.set_major_formatter(ValueFormatter())
    ax.set_ylabel(unit_label(unit, series))


_QUARTER = re.compile(r"^\d{4}Q([1-4])$")
_MONTH = re.compile(r"^\d{4}-(\d{2})(-\d{2})?$")


def _calendar(labels: Sequence[str]) -> tuple[Sequence[int], list[int]]:
    """Candidate tick steps and the positions where a year starts, from the labels' style."""
    if labels and all(_QUARTER.match(str(s)) for s in labels):
        return (1, 2, 4, 8, 12, 20, 40), [i for i, s in enumerate(labels) if s.endswith("Q1")]
    if labels and all(_MONTH.match(str(s)) for s in labels):
        starts = [i for i, s in enumerate(labels) if _MONTH.match(str(s)).group(1) == "01"]
        return (1, 2, 3, 6, 12, 24, 36, 60, 120), starts
    return (1, 2, 5, 10, 20, 25, 50, 100, 200, 500, 1000), []


def period_label(series) -> str:
    """The x axis' label: "Period (quarterly)", or "Period" for numbered periods."""
    frequency = series.axis.frequency
    return f"Period ({frequency})" if frequency != "per period" else "Period"


def set_period_ticks(ax: Axes, t, labels: Sequence[str], max_ticks: int = 8) -> None:
    """Label the x axis with period labels, at most ``max_ticks``, on the calendar's rhythm.

    Quarterly labels are thinned to every 2nd, 4th, 8th ... quarter and monthly
    labels to every 3rd, 6th, 12th ... month, starting at a year's first period
    when the step is a whole number of years; labels stay horizontal when they fit.
    """
    t = np.asarray(t)
    labels = [str(s) for s in labels]
    if len(labels) != t.size:
        raise ValueError("set_period_ticks needs one label per period")
    if t.size == 0:
        return
    steps, year_starts = _calendar(labels)
    step = next((s for s in steps if -(-t.size // s) <= max_ticks), steps[-1])
    first = 0
    per_year = 4 if steps[2] == 4 else 12 if steps[2] == 3 else None
    if per_year and step % per_year == 0 and year_starts:
        first = year_starts[0]
    elif per_year and per_year % step == 0 and year_starts:
        first = year_starts[0] % step
    ax.set_xticks(t[first::step])
    shown = labels[first::step]
    long = max(len(s) for s in labels) > 8 or len(shown) > 9
    ax.set_xticklabels(shown, rotation=30 if long else 0, ha="right" if long else "center")


def draw_history(ax: Axes, t, y, label: str = "Observed history", **kwargs):
    """The observed values: a solid dark line with small round markers."""
    style = {"color": HISTORY, "linewidth": 1.6, "marker": "o", "markersize": 3.2,
             "markerfacecolor": HISTORY, "markeredgecolor": "white", "markeredgewidth": 0.5,
             "zorder": 5, "label": label}
    style.update(kwargs)
    (line,) = ax.plot(t, y, **style)
    return line


def draw_nested_bands(ax: Axes, x, bands: Sequence[tuple[int, np.ndarray, np.ndarray]],
                      label: str = "{level}% credible band", zorder: float = 2.0) -> list:
    """Nested bands of one hue, widest and lightest first, each with a thin edge.

    Parameters
    ----------
    ax : Axes
    x : array_like
    bands : sequence of (level, lower, upper)
        In any order; drawn widest first.
    label : str
        Legend text; ``{level}`` is replaced by the level.
    zorder : float

    Returns
    -------
    list of PolyCollection
        Widest first.
    """
    ordered = sorted(bands, key=lambda b: -float(b[0]))
    shades = band_shades(len(ordered))
    drawn = []
    for (level, lo, hi), fill in zip(ordered, shades, strict=True):
        drawn.append(ax.fill_between(
            x, lo, hi, facecolor=fill, edgecolor=band_edge(fill), linewidth=0.6,
            zorder=zorder, label=label.format(level=level),
        ))
    return drawn


def mark_forecast_start(ax: Axes, x: float, text: str = "forecast", *,
                        where: str = "bottom") -> None:
    """A vertical rule at ``x`` (between the last observation and the first forecast), labelled.

    The rule lies over the bands and under the lines; its label ("<- history | forecast ->")
    sits on a white patch at the bottom (or ``where="top"``) so it reads over any band.
    """
    ax.axvline(x, color=MUTED, linewidth=1.0, linestyle="-", zorder=3)
    y, va = (0.02, "bottom") if where == "bottom" else (0.98, "top")
    patch = {"facecolor": "white", "edgecolor": "none", "alpha": 0.85, "pad": 1.5}
    for label, ha in ((f" {text} \u2192", "left"), ("\u2190 history ", "right")):
        ax.text(x, y, label, transform=ax.get_xaxis_transform(), ha=ha, va=va, fontsize=8.5,
                color=MUTED, zorder=6, bbox=patch)


def draw_target(ax: Axes, value: float, label: str):
    """A horizontal target line across the chart, labelled in the legend."""
    return ax.axhline(value, color=TARGET, linewidth=1.3, linestyle=(0, (6, 2, 1, 2)),
                      zorder=4, label=label)


def _under_the_axis(ax: Axes) -> Transform:
    """Axes coordinates moved down past the x axis' tick labels and label, whatever their size.

    The drop is measured in inches on the text as drawn (rotated period labels reach further
    down), so it holds when a constrained layout later resizes the axes or the figure is
    saved at another resolution.
    """
    fig = ax.figure
    box = ax.xaxis.get_tightbbox()  # tick labels and axis label, in display pixels
    drop = 0.0 if box is None else max(0.0, ax.get_window_extent().y0 - box.y0) / fig.dpi
    return ax.transAxes + ScaledTranslation(0.0, -(drop + 0.08), fig.dpi_scale_trans)


def legend(ax: Axes, handles=None, labels=None, *, where: str = "below", **kwargs):
    """The package's legend: small text, below the axes, to the right, or inside.

    Parameters
    ----------
    ax : Axes
    handles, labels : list, optional
        Default: the labelled artists of ``ax``.
    where : {"below", "right", "inside"}
        Outside the plotting area, the legend covers no data, band or target
        whatever the series does: "below" spreads the entries over columns
        (``ncol``, default 2) under the x axis' labels, "right" lists them beside
        the axes. "inside" (upper left, on a white panel) hides what is behind it:
        only for charts whose corner is known to be empty. Outside the axes, the
        legend needs room in the figure: on a figure without a layout engine (one
        made by ``plt.subplots()`` on an ``ax`` passed in) the constrained layout is
        switched on, which makes that room when the figure is drawn.
    **kwargs
        Passed to :meth:`matplotlib.axes.Axes.legend`. Call it once the x axis'
        ticks and label are set: "below" is placed under them.
    """
    style = {"fontsize": 8.5, "labelcolor": HISTORY, "handlelength": 2.2}
    if where == "right":
        style.update(loc="upper left", bbox_to_anchor=(1.01, 1.0), borderaxespad=0.0,
                     frameon=False)
    elif where == "below":
        style.update(loc="upper center", bbox_to_anchor=(0.5, 0.0),
                     bbox_transform=_under_the_axis(ax), borderaxespad=0.0, frameon=False,
                     ncol=2, columnspacing=2.0)
    elif where == "inside":
        style.update(loc="upper left", frameon=True, facecolor="white", edgecolor="none",
                     framealpha=1.0)
    else:
        raise ValueError(f"where must be inside, right or below, got {where!r}")
    style.update(kwargs)
    if where != "inside" and ax.figure.get_layout_engine() is None:
        ax.figure.set_layout_engine("constrained")  # else the legend is cut off when saved
    made = ax.legend(**style) if handles is None else ax.legend(handles, labels, **style)
    made.set_zorder(10)
    if where == "below":
        _wrap_to_width(made.get_texts(), made.get_window_extent, ax.figure)
    return made


def fit_to_figure_width(text) -> None:
    """Wrap a text of a figure (a title) into lines until it fits the figure's width.

    Parameters
    ----------
    text : matplotlib.text.Text
        A text placed in its figure, such as the return of ``Figure.suptitle``.
    """
    _wrap_to_width([text], text.get_window_extent, text.figure)


def fit_title_to_axes(ax: Axes) -> None:
    """Wrap the title of ``ax`` into lines until it fits the figure, centred on the axes.

    On a narrow figure of the user's, a long title would otherwise run off both edges.
    A layout engine moves the axes right by up to about 7% of the figure's width, so
    the title keeps to 84% of it.
    """
    _wrap_to_width([ax.title], ax.title.get_window_extent, ax.figure, share=0.84)


def _wrap_to_width(texts, extent, fig, *, share: float = 0.97, shortest: int = 16) -> None:
    """Wrap the longest line of ``texts`` until ``extent()`` fits ``share`` of the figure.

    A long label (a scenario described in words, a model's description) would
    otherwise run off the saved image's edges. Each round fills the lines the text
    with the longest line had at first afresh, at three quarters of that length, so
    the lines break between words, once.
    """
    first = {id(t): t.get_text().splitlines() for t in texts}
    for _ in range(16):
        if extent().width <= share * fig.bbox.width:
            return
        text = max(texts, key=lambda t: max(map(len, t.get_text().splitlines() or [""])))
        longest = max(map(len, text.get_text().splitlines() or [""]))
        if longest <= shortest:
            return
        width = max(shortest, int(longest * 0.75))
        text.set_text("\n".join(textwrap.fill(line, width) if len(line) > width else line
                                for line in first[id(text)]))


_LEVEL = re.compile(r"(\d+(?:\.\d+)?)% .*band")


def _reading_rank(handle, label: str) -> tuple[int, float]:
    if getattr(handle, "get_color", None) and handle.get_color() == HISTORY \
            and getattr(handle, "get_marker", lambda: None)() == "o":
        return (0, 0.0)
    if "median" in label.lower() and "curve" not in label.lower():
        return (1, 0.0)
    match = _LEVEL.search(label)
    if match and "curve" not in label.lower():
        return (2, float(match.group(1)))
    return (3, 0.0)


def legend_in_reading_order(ax: Axes, **kwargs):
    """The legend with the history first, then the median, the bands narrowest first, the rest.

    Parameters
    ----------
    ax : Axes
    **kwargs
        Passed to :func:`legend`.
    """
    pairs = list(zip(*ax.get_legend_handles_labels(), strict=True))
    ranked = sorted(pairs, key=lambda hl: _reading_rank(*hl))
    return legend(ax, [h for h, _ in ranked], [lab for _, lab in ranked], **kwargs)
