"""Checks of a series' cells: values above zero, periods on one calendar, notes for the user.

Refusals raise :class:`~bayesgrowth.data.series.InputError` with one line naming the
file, the row and the column. Notes are sentences the reader hands on (as warnings, and
in :attr:`~bayesgrowth.data.series.GrowthSeries.notes`): dates placed in the period of
the month they fall in (:mod:`bayesgrowth.data.dategrid`), and values far out of line
with their neighbours (:mod:`bayesgrowth.data.unusual`), which are used as they are.
"""

from __future__ import annotations

import numpy as np

from bayesgrowth.data.dategrid import off_day_positions
from bayesgrowth.data.periods import PeriodError, parse_periods
from bayesgrowth.data.series import MAX_VALUE, InputError
from bayesgrowth.data.unusual import unusual_values
from bayesgrowth.display import fmt_number

__all__ = ["placement_note", "time_axis", "unusual_notes", "values_of", "where"]

#: Rows named in one note at most.
SHOWN = 5


def where(source: str, row: int | None, column: str | None) -> str:
    """``"sales.csv, row 7, column 'value'"``: the place a message is about."""
    parts = [source]
    if row is not None:
        parts.append(f"row {row}")
    if column is not None:
        parts.append(f"column {column!r}")
    return ", ".join(parts)


def values_of(raw_values: list[str], rows: list[int], *, source: str, value_col: str,
              decimal: str, separator: str) -> list[float]:
    """The cells as numbers above zero (decimal mark and currency read once for all)."""
    from bayesgrowth.data.formats import amount, decimal_mark

    wheres = [where(source, row, value_col) for row in rows]
    mark = decimal_mark([str(v).strip() for v in raw_values], wheres, decimal, separator)
    currencies: dict[str, str] = {}
    values = []
    for raw, place in zip(raw_values, wheres, strict=True):
        text = str(raw).strip()
        if text == "" or text.lower() in ("nan", "na", "none", "null"):
            raise InputError(f"{place}: value is missing; fill it in or delete the row")
        value = amount(text, mark, place, currencies)
        if value <= 0:
            raise InputError(
                f"{place}: value {text} is not above zero; the growth "
                "model works on the log scale and needs every value > 0"
            )
        if value > MAX_VALUE:
            raise InputError(
                f"{place}: value {text} is above {MAX_VALUE:g}, too "
                "close to the largest number a computer holds to forecast from; express the "
                "values in larger units (divide them all by the same power of ten)"
            )
        values.append(value)
    return values


def time_axis(periods: list[str], rows: list[int], *, source: str, period_col: str,
              fiscal_start: int | None):
    """The calendar, the sorted time indices and the order that sorts the rows.

    Raises
    ------
    InputError
        For an unreadable period, a date off the others' grid, or two rows in one period.
    """
    from bayesgrowth.data.fiscal import read_labels, restyle

    try:
        canonical, style = read_labels([str(p).strip() for p in periods], fiscal_start)
        axis, t = parse_periods(canonical)
    except PeriodError as exc:
        raise InputError(f"{where(source, rows[exc.position], period_col)}: {exc}") from None
    axis = restyle(axis, style)
    t_arr = np.asarray(t, dtype=int)
    order = np.argsort(t_arr, kind="stable")
    t_sorted = t_arr[order]
    dup = np.flatnonzero(np.diff(t_sorted) == 0)
    if dup.size:
        first, second = order[dup[0]], order[dup[0] + 1]
        lo, hi = sorted((rows[first], rows[second]))
        a, b = (str(periods[i]).strip() for i in (first, second))
        noun = {"monthly": "month", "quarterly": "quarter", "yearly": "year"}.get(
            axis.frequency, "period")
        same = "repeats row" if a == b else f"falls in the same {noun} as row"
        also = "" if a == b else f" ({a})"
        raise InputError(
            f"{where(source, hi, period_col)}: period {periods[second]!r} {same} {lo}{also}; "
            f"keep one value per {noun}"
        )
    return axis, t_sorted, order


def placement_note(periods: list[str], rows: list[int], t: np.ndarray, axis,
                   source: str) -> str | None:
    """The note naming dates off the others' day of the month, and the period of each.

    ``t`` is each row's time index, in input order; ``None`` when no date is off.
    """
    if axis.style != "date":
        return None
    off = off_day_positions([str(p) for p in periods])
    if not off:
        return None
    placed = [f"row {rows[i]} ({str(periods[i]).strip()}) in {axis.label(int(t[i]))}"
              for i in sorted(off, key=lambda i: rows[i])]
    more = f" and {len(placed) - SHOWN} more" if len(placed) > SHOWN else ""
    return (f"{source}: {len(placed)} date(s) on another day of the month than the others, "
            f"each placed in the period of the month it falls in: "
            f"{'; '.join(placed[:SHOWN])}{more}; check that they belong there")


def _ratio_words(ratio: float) -> str:
    if ratio >= 1:
        return f"about {fmt_number(ratio, 2)} times"
    return f"about 1/{fmt_number(1 / ratio, 2)} of"


def unusual_notes(values: np.ndarray, t: np.ndarray, axis, rows: list[int],
                  raw_values: list[str], source: str) -> list[str]:
    """One note per value far out of line with its neighbours (sorted series, input rows)."""
    notes = []
    season = axis.periods_per_year if axis.frequency in ("quarterly", "monthly") else None
    labels = axis.labels(t)
    for i, ratio in unusual_values(values, t, int(season) if season else None):
        level = values[i] / ratio
        notes.append(
            f"{source}, row {rows[i]} ({labels[i]}): value {str(raw_values[i]).strip()} is "
            f"{_ratio_words(ratio)} the level of the periods around it (about "
            f"{fmt_number(level)}); check that it was keyed in the same units as the others "
            "(it is used as it is)"
        )
    return notes
