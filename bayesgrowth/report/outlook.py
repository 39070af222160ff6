"""Sentences about when a target is reached and where the band comes from.

Shared by the command line and the HTML report, so both say it the same way.
"""

from __future__ import annotations

import html
from collections.abc import Callable

import pandas as pd

from bayesgrowth.forecast.band_sources import SOURCES
from bayesgrowth.report.words import fmt_number, fmt_probability

__all__ = ["band_sources_phrase", "outlook_html", "time_to_target_phrase"]


def time_to_target_phrase(entry: dict) -> str:
    """"time to target 9,000 (first reached): by 2026Q3 with 50% probability, ...".

    Parameters
    ----------
    entry : dict
        The ``time_to_target`` entry of a forecast summary.

    Returns
    -------
    str
        The periods by which the target is reached (at least once) with each
        probability of the entry, and the probability of not reaching it within
        the horizon.
    """
    by_period = entry["probability_reached_by_period"]
    last = list(by_period)[-1]
    head = f"time to target {fmt_number(entry['value'])} (reached at least once): "
    not_reached = fmt_probability(entry["probability_not_reached_within_horizon"])
    reached = [(float(p), period) for p, period in entry["reached_by_with_probability"].items()
               if period]
    if not reached:
        return (head + f"{fmt_probability(by_period[last])} probability by {last}, "
                f"{not_reached} of not reaching it within the horizon")
    parts = [f"by {period} with {fmt_probability(p)}" + (" probability" if i == 0 else "")
             for i, (p, period) in enumerate(reached)]
    return head + ", ".join(parts) + f"; {not_reached} probability of not reaching it by {last}"


def band_sources_phrase(table: pd.DataFrame, period: str | None = None) -> str:
    """"band of 2027Q4 (variance of the log value): 42% from not knowing ..., ...".

    Parameters
    ----------
    table : pandas.DataFrame
        :func:`bayesgrowth.forecast.band_sources.band_sources`.
    period : str, optional
        Default the last period.

    Returns
    -------
    str
    """
    period = period or table["period"].iloc[-1]
    rows = table[table["period"] == period].set_index("source")
    shares = ", ".join(f"{fmt_probability(rows.loc[s, 'share'])} from {rows.loc[s, 'label']}"
                       for s in SOURCES)
    return f"band of {period} (variance of the log value): {shares}"


def outlook_html(fc, summary: dict, figure_uri: Callable) -> str:
    """The report's paragraphs on time to target and, for state-space fits, the band's sources.

    Parameters
    ----------
    fc : Forecast
    summary : dict
        ``fc.summary(...)``.
    figure_uri : callable
        Turns a matplotlib figure into an image source (and closes it).

    Returns
    -------
    str
        HTML, empty when there is nothing to say.
    """
    out = ""
    if "time_to_target" in summary:
        text = time_to_target_phrase(summary["time_to_target"])
        out += (f"<p>{html.escape(text[0].upper() + text[1:])}. A period counts once the "
                "value is at or above the target in it or any earlier forecast period, "
                "counted over the simulated paths.</p>")
    if getattr(fc.fit, "state_space", None) is None:
        return out
    from bayesgrowth.forecast.band_sources import band_sources
    from bayesgrowth.plots.band_sources import plot_band_sources

    text = band_sources_phrase(band_sources(fc))
    uri = figure_uri(plot_band_sources(fc).figure)
    return out + (
        f"<p>{html.escape(text[0].upper() + text[1:])} (computed exactly from the model's "
        "own band, before any recalibration).</p>"
        f'<figure><img alt="Sources of the band by forecast period" src="{uri}">'
        "<figcaption>Share of each forecast period's predictive variance (log scale) from "
        "each source; the shares of a period add to 100%.</figcaption></figure>"
    )
