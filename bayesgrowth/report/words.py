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
    "fades_to_zero",
    "fading_phrase",
    "fmt_interval",
    "fmt_number",
    "fmt_percent",
    "fmt_probability",
    "per_period",
    "period_noun",
    "period_words",
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


def period_words(label: str, axis) -> str:
    """A period's label as a sentence reads it: ``2026Q2``, but ``period 24`` for numbers.

    Examples
    --------
    >>> from bayesgrowth.data.periods import PeriodAxis
    >>> period_words("24", PeriodAxis("integer", 1, 0))
    'period 24'
    """
    return f"period {label}" if period_noun(axis) == "period" else str(label)


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


def fades_to_zero(priors) -> bool:
    """Whether fading growth heads for zero: the long-run rate fixed at 0 (the default)."""
    return priors.long_run_mu == 0 and priors.long_run_sd == 0


def fading_phrase(summary: Mapping, axis, long_run_zero: bool = True) -> str | None:
    """How long the growth may last, from a summary's half-life of growth; None without one.

    "growth fades towards zero: it halves in about 6.2 years (80% interval 2.4 to 18 years)";
    with both drifting and fading growth weighed (``drift="adaptive"``) it says how likely
    fading is. Half-lives are in years when the calendar has them.

    Parameters
    ----------
    summary : mapping
        A forecast summary (:meth:`Forecast.summary`).
    axis : PeriodAxis
        The series' calendar.
    long_run_zero : bool
        Whether growth fades towards zero (the default prior) rather than a long-run rate.
    """
    fades = summary.get("growth_fades")
    if "half_life_periods" in summary:  # the damped curve: growth always fades
        fades = {"probability": 1.0, "half_life_periods_if_fading": summary["half_life_periods"]}
    if not fades or "half_life_periods_if_fading" not in fades:
        return None
    h = fades["half_life_periods_if_fading"]
    ppy = getattr(axis, "periods_per_year", None)
    unit, scale = ("years", 1.0 / ppy) if ppy else (f"{period_noun(axis)}s", 1.0)
    lo, mid, hi = (h[k] * scale for k in ("lower_80", "median", "upper_80"))
    when = (f"about {fmt_number(mid, 2)} {unit} (80% interval {fmt_interval(lo, hi, 2)} "
            f"{unit})")
    goal = "zero" if long_run_zero else "its long-run rate"
    how = "halves in" if long_run_zero else "is halfway there in"
    if fades["probability"] >= 0.995:
        return f"growth fades towards {goal}: it {how} {when}"
    return (f"growth fades towards {goal} with probability "
            f"{fmt_probability(fades['probability'])}, and then {how} {when}; otherwise it "
            "drifts without fading")
