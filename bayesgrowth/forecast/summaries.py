"""Short summaries of a forecast for people: its ``repr`` and its notebook table."""

from __future__ import annotations

from bayesgrowth.display import fmt_interval, fmt_number, html_summary, text_summary

__all__ = ["forecast_html", "forecast_text"]


def _title(fc) -> str:
    fit = fc.fit
    return f"Forecast of {fit.series.name!r}: {fit.spec.label()}; {fit.engine} engine"


def _headline(fc) -> str:
    row = fc.table.iloc[-1]
    level = max(fc.levels)
    band = fmt_interval(row[f"lower_{level}"], row[f"upper_{level}"])
    return f"{row['period']}: median {fmt_number(row['median'])}, {level}% band {band}"


def forecast_text(fc) -> str:
    """A few lines: the model and series, the periods, and the last period's band."""
    levels = ", ".join(str(v) for v in fc.levels)
    return text_summary(_title(fc), [
        f"{fc.horizon} periods, {fc.periods[0]} to {fc.periods[-1]}; bands {levels}%; "
        f"{fc.draws.shape[0]:,} draws; seed {fc.seed}",
        _headline(fc),
    ])


def forecast_html(fc) -> str:
    """The title, the last period's band and a table of every period's bands."""
    table = fc.table
    cols = ["period", "median"] + [f"{v}% band" for v in fc.levels]
    rows = [
        [row["period"], fmt_number(row["median"])]
        + [fmt_interval(row[f"lower_{v}"], row[f"upper_{v}"]) for v in fc.levels]
        for _, row in table.iterrows()
    ]
    return html_summary(_title(fc), _headline(fc), cols, rows)
