"""What the commands print: forecast headlines in plain words, and the chart unit option.

Numbers go through :mod:`bayesgrowth.report.words`, so the terminal and the
HTML report write every value, probability and growth rate the same way.
"""

from __future__ import annotations

import argparse

from bayesgrowth.report.words import (
    band_phrases,
    fades_to_zero,
    fading_phrase,
    fmt_number,
    fmt_percent,
    fmt_probability,
    per_period,
    period_noun,
    period_words,
)

__all__ = ["add_unit_option", "forecast_lines", "growth_phrase", "outlook_lines",
           "unit_from_args"]


def add_unit_option(p: argparse.ArgumentParser) -> None:
    """``--unit``: the label of the charts' value axis."""
    p.add_argument("--unit", default=None, metavar="TEXT",
                   help="label of the charts' value axis, e.g. 'Revenue (EUR thousand)' "
                   "[the value column's name, or 'Value' when it is called value]")


def unit_from_args(args) -> str | None:
    """The chart unit: ``--unit``, else the value column's name unless it is the default."""
    unit = getattr(args, "unit", None)
    if unit:
        return unit
    col = getattr(args, "value_col", None)
    return col if col and col.strip().lower() != "value" else None


def growth_phrase(summary: dict, axis) -> str:
    """"growth per quarter 8.1% (95% interval 7.7% to 8.5%); per year 36.6% (...)"."""
    g = summary["growth_per_period"]
    text = (f"growth {per_period(axis)} {fmt_percent(g['median'])} (95% interval "
            f"{fmt_percent(g['lower_95'])} to {fmt_percent(g['upper_95'])})")
    gy = summary.get("growth_per_year")
    if gy and period_noun(axis) != "year":
        text += (f"; per year {fmt_percent(gy['median'])} (95% interval "
                 f"{fmt_percent(gy['lower_95'])} to {fmt_percent(gy['upper_95'])})")
    return text


def _ahead(horizon: int, axis) -> str:
    noun = period_noun(axis)
    plural = noun if horizon == 1 else ("periods" if noun == "period" else f"{noun}s")
    return f"{horizon} {plural} ahead"


def forecast_lines(fc, summary: dict) -> list[str]:
    """The headline of ``forecast``: final period, its bands, growth, target, sampling checks.

    Parameters
    ----------
    fc : Forecast
    summary : dict
        ``fc.summary(...)``.

    Returns
    -------
    list of str
        One line each, ready to print.
    """
    axis = fc.fit.series.axis
    fin = summary["final_period"]
    lines = [
        f"{summary['series']}: forecast for {period_words(fin['period'], axis)} "
        f"({_ahead(fc.horizon, axis)})",
        f"  model: {summary['model_description']}",
        "  " + "; ".join([f"median {fmt_number(fin['median'])}",
                          *band_phrases(fin, summary["levels"])]),
        "  " + growth_phrase(summary, axis),
    ]
    fading = fading_phrase(summary, axis, fades_to_zero(fc.fit.priors))
    if fading:
        lines.append("  " + fading)
    if "target" in summary:
        tg = summary["target"]
        p_last = tg["probability_at_least_by_period"][fin["period"]]
        reach = tg["first_period_reaching"]
        noun, at_least = period_noun(axis), fmt_probability(tg["probability"])
        first = (f"first {noun} with at least {at_least} probability: {reach}" if reach else
                 f"no {noun} within the horizon reaches {at_least} probability")
        lines.append(f"  target {fmt_number(tg['value'])}: probability "
                     f"{fmt_probability(p_last)} of reaching it by {fin['period']}; {first}")
    d = summary["diagnostics"]
    if summary.get("engine") == "exact":
        lines.append("  computed exactly (no sampling, so no sampling checks are needed)"
                     if d["ok"] else "  computed exactly, but " + "; ".join(d["problems"]))
    else:
        lines.append("  sampling checks: passed" if d["ok"] else
                     "  sampling checks: FAILED - " + "; ".join(d["problems"]))
    return lines


def outlook_lines(fc, summary: dict) -> list[str]:
    """Time to the target (when one is given) and, for state-space fits, the band's sources.

    Parameters
    ----------
    fc : Forecast
    summary : dict
        ``fc.summary(...)``.

    Returns
    -------
    list of str
        Zero to two indented lines.
    """
    from bayesgrowth.report.outlook import band_sources_phrase, time_to_target_phrase

    lines = []
    if "time_to_target" in summary:
        lines.append("  " + time_to_target_phrase(summary["time_to_target"]))
    if getattr(fc.fit, "state_space", None) is not None:
        from bayesgrowth.forecast.band_sources import band_sources

        lines.append("  " + band_sources_phrase(band_sources(fc)))
    return lines
