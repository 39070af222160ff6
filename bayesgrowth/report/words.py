"""How periods and bands are written, in the CLI and the report.

:func:`per_period` gives the calendar word ("per quarter"), :func:`band_phrases`
the bands of a row. Numbers and probabilities are written by
:mod:`bayesgrowth.display` (re-exported here), which the charts use too.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence

from bayesgrowth.display import (
    SIGNIFICANT,
    fmt_interval,
    fmt_number,
    fmt_percent,
    fmt_probability,
)

__all__ = [
    "SIGNIFICANT",
    "band_phrases",
    "fmt_interval",
    "fmt_number",
    "fmt_percent",
    "fmt_probability",
    "per_period",
    "period_noun",
]

_NOUNS = {1: "month", 3: "quarter", 6: "half-year", 12: "year"}


def period_noun(axis) -> str:
    """The calendar word of one period: "quarter", "month", "year", or "period".

    Parameters
    ----------
    axis : PeriodAxis
        The series' calendar (``series.axis``).
    """
    months = getattr(axis, "months_per_period", None)
    if months in _NOUNS:
        return _NOUNS[months]
    if months:
        return f"{months} months"
    return "period"


def per_period(axis) -> str:
    """"per quarter", "per month", "per year", "per 2 months" or "per period"."""
    return f"per {period_noun(axis)}"


def band_phrases(row: Mapping, levels: Sequence[int]) -> list[str]:
    """"80% band 9,050 to 10,600" for each level of ``row`` (narrowest first).

    Parameters
    ----------
    row : mapping
        Holds ``lower_L`` and ``upper_L`` for the levels ``L``.
    levels : sequence of int
        The levels asked for; those missing from ``row`` are left out.
    """
    out = []
    for level in sorted(levels):
        lo, hi = row.get(f"lower_{level}"), row.get(f"upper_{level}")
        if lo is not None and hi is not None:
            out.append(f"{level}% band {fmt_interval(lo, hi)}")
    return out
