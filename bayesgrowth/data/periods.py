"""Period labels: parse them, put them on one time axis, and continue the calendar.

Each supported label style maps to an integer *ordinal* on a regular grid, so that
the time index ``t`` of an observation is the number of grid steps since the
first observation. Gaps in the input keep their true ``t``.

Supported styles
----------------
quarter   ``2024Q1``, ``2024-Q1``, ``2024 Q1`` (case-insensitive)
month     ``2024-01``, ``2024/01``, and ``202401`` when every label is six digits
          that read as a year 1800..2199 and a month
date      ISO dates ``2024-03-31``, and ``20240331`` when every label is eight digits
          that read as such a date; the step (1, 3 or 12 months) is inferred
year      four-digit years ``1990`` .. ``2199``
integer   any other whole numbers (a plain period counter) within 64-bit integers

Digits are ASCII digits 0-9 only. Eight- or six-digit labels that look like
compact dates but are not all valid dates are refused rather than read as
counters, and a series may span at most :data:`MAX_SPAN` periods.
"""

from __future__ import annotations

import calendar
import datetime as dt
import re
from dataclasses import dataclass

from bayesgrowth.data.dategrid import date_step

__all__ = ["PeriodAxis", "parse_periods", "PeriodError", "MAX_SPAN", "LAST_YEAR"]

_QUARTER = re.compile(r"^\s*(\d{4})\s*[-_ ]?\s*[Qq]([1-4])\s*$", re.ASCII)
_MONTH = re.compile(r"^\s*(\d{4})[-/](\d{1,2})\s*$", re.ASCII)
_DATE = re.compile(r"^\s*(\d{4})-(\d{2})-(\d{2})\s*$", re.ASCII)
_INTEGER = re.compile(r"^\s*[-+]?\d+\s*$", re.ASCII)
_COMPACT_DATE = re.compile(r"^\s*(\d{4})(\d{2})(\d{2})\s*$", re.ASCII)
_COMPACT_MONTH = re.compile(r"^\s*(\d{4})(\d{2})\s*$", re.ASCII)

#: Most periods from the first to the last observation (800 years of months).
MAX_SPAN = 10_000

#: Last calendar year a period label may fall in (four-digit years).
LAST_YEAR = 9999

_INT64_MAX = 2**63 - 1

#: Periods per year for each style (``None`` where the calendar is unknown).
PERIODS_PER_YEAR = {"quarter": 4, "month": 12, "year": 1}


class PeriodError(ValueError):
    """A period label that cannot be read, with its position in the input."""

    def __init__(self, position: int, message: str) -> None:
        super().__init__(message)
        self.position = position


def style_of(label: str) -> str | None:
    """The style (``"quarter"``, ``"date"``, ``"month"``, ``"integer"``) of a label, or ``None``.

    Examples
    --------
    >>> style_of("2024Q1"), style_of("2024-01"), style_of("Q1 2024")
    ('quarter', 'month', None)
    """
    if _QUARTER.match(label):
        return "quarter"
    if _DATE.match(label):
        return "date"
    if _MONTH.match(label):
        return "month"
    if _INTEGER.match(label):
        return "integer"
    return None


_STYLE_WORDS = {
    "quarter": "a quarter (like 2024Q1)",
    "month": "a month (like 2024-01)",
    "date": "a date (like 2024-03-31)",
    "integer": "a whole number",
    "year": "a year",
}


@dataclass(frozen=True)
class PeriodAxis:
    """A regular calendar of periods, fixed by the input's own label style.

    Parameters
    ----------
    style : str
        One of ``"quarter"``, ``"month"``, ``"date"``, ``"year"``, ``"integer"``.
    step : int
        Grid step in the style's base unit (months for ``"date"``, else 1).
    origin : int
        Ordinal of the first observation.
    month_end : bool
        For ``"date"`` only: whether every input date is the last day of its month,
        in which case future dates are month ends too.
    day : int
        For ``"date"`` only: day of month of the first observation.
    compact : bool
        For ``"date"`` and ``"month"``: labels written without separators
        (``20240331``, ``202403``), as in the input.
    """

    style: str
    step: int
    origin: int
    month_end: bool = False
    day: int = 1
    compact: bool = False

    @property
    def frequency(self) -> str:
        """Plain-word frequency: ``quarterly``, ``monthly``, ``yearly`` or ``per period``."""
        months = self.months_per_period
        return {1: "monthly", 3: "quarterly", 12: "yearly"}.get(months or 0, "per period")

    @property
    def months_per_period(self) -> int | None:
        """Calendar months in one period, ``None`` for plain integers."""
        if self.style == "quarter":
            return 3
        if self.style == "month":
            return 1
        if self.style == "year":
            return 12
        if self.style == "date":
            return self.step
        return None

    @property
    def periods_per_year(self) -> float | None:
        """Periods in one year (4 for quarters), ``None`` for plain integers."""
        months = self.months_per_period
        return None if months is None else 12 / months

    def year_of(self, t: int) -> int | None:
        """Calendar year of the period with time index ``t``; ``None`` for plain integers."""
        ordinal = self.origin + t * self.step
        if self.style == "quarter":
            return ordinal // 4
        if self.style in ("month", "date"):
            return ordinal // 12
        return ordinal if self.style == "year" else None

    def label(self, t: int) -> str:
        """Label, in the input's style, of the period with time index ``t``.

        Raises
        ------
        ValueError
            For a calendar period after the year :data:`LAST_YEAR`.
        """
        ordinal = self.origin + t * self.step
        year = self.year_of(t)
        if year is not None and year > LAST_YEAR:
            raise ValueError(f"the period {t} steps on falls after the year {LAST_YEAR}")
        if self.style == "quarter":
            return f"{ordinal // 4}Q{ordinal % 4 + 1}"
        sep = "" if self.compact else "-"
        if self.style == "month":
            return f"{ordinal // 12}{sep}{ordinal % 12 + 1:02d}"
        if self.style in ("year", "integer"):
            return str(ordinal)
        year, month0 = divmod(ordinal, 12)
        last = calendar.monthrange(year, month0 + 1)[1]
        day = last if self.month_end else min(self.day, last)
        return f"{year:04d}{sep}{month0 + 1:02d}{sep}{day:02d}"

    def labels(self, ts: list[int] | range) -> list[str]:
        """Labels for several time indices."""
        return [self.label(int(t)) for t in ts]


def _compact_style(labels: list[str]) -> str | None:
    """``"date"`` or ``"month"`` for labels that are all compact dates (months), else ``None``.

    Labels that are all eight (six) digits starting with a year 1800..2199 are
    dates written YYYYMMDD (months written YYYYMM); if one of them is not a valid
    date, reading them as counters would be wrong, so it is refused.
    """
    for style, pattern, form in (("date", _COMPACT_DATE, "YYYYMMDD"),
                                 ("month", _COMPACT_MONTH, "YYYYMM")):
        matches = [pattern.match(label) for label in labels]
        if not all(matches) or not all(1800 <= int(m.group(1)) <= 2199 for m in matches):
            continue
        for i, m in enumerate(matches):
            parts = [int(g) for g in m.groups()] + [1]
            try:
                dt.date(*parts[:3])
            except ValueError:
                raise PeriodError(
                    i,
                    f"period {labels[i]!r} reads as a {style} written {form}, but it is not a "
                    f"valid {style}; write {style}s like "
                    f"{'2024-01-31' if style == 'date' else '2024-01'}, or number the periods "
                    "1, 2, 3, ...",
                ) from None
        return style
    return None


def _ordinal(style: str, label: str, compact: bool) -> tuple[int, int]:
    """Ordinal of a label and, for dates, its day of month."""
    if style == "quarter":
        m = _QUARTER.match(label)
        return int(m.group(1)) * 4 + int(m.group(2)) - 1, 1
    if style == "month":
        m = (_COMPACT_MONTH if compact else _MONTH).match(label)
        month = int(m.group(2))
        if not 1 <= month <= 12:
            raise ValueError(f"month {month} is not between 1 and 12")
        return int(m.group(1)) * 12 + month - 1, 1
    if style == "date":
        m = (_COMPACT_DATE if compact else _DATE).match(label)
        year, month, day = (int(g) for g in m.groups())
        dt.date(year, month, day)  # refuses 2024-02-30, month 13, year 0
        return year * 12 + month - 1, day
    value = int(label)
    if abs(value) > _INT64_MAX:
        raise ValueError(
            f"it is beyond the largest whole number the tool handles ({_INT64_MAX}); "
            "number the periods 1, 2, 3, ..."
        )
    return value, 1


#: Labels of a spreadsheet's summary rows below a series (a total, an average).
_SUMMARY_ROW = re.compile(r"(grand\s+)?(total|sum|average|avg|mean)s?\b.*", re.IGNORECASE)


def _styles(labels: list[str]) -> str:
    """The one label style of all ``labels``, or a :class:`PeriodError` at the first misfit."""
    styles = []
    for i, label in enumerate(labels):
        style = style_of(label)
        if style is None:
            summary = _SUMMARY_ROW.fullmatch(label.strip())
            raise PeriodError(
                i,
                f"period {label!r} is not a quarter (2024Q1, Q1 2024, FY24 Q1), month "
                "(2024-01, Jan 2024, 01/2024), "
                "ISO date (2024-03-31), year or whole number (digits 0-9)"
                + ("; a total or average row belongs outside the series: delete it"
                   if summary else ""),
            )
        styles.append(style)
    first = styles[0]
    for i, style in enumerate(styles):
        if style != first:
            raise PeriodError(
                i,
                f"period {labels[i]!r} is {_STYLE_WORDS[style]} but the first period "
                f"{labels[0]!r} is {_STYLE_WORDS[first]}; use one frequency per series",
            )
    return first


def parse_periods(labels: list[str]) -> tuple[PeriodAxis, list[int]]:
    """Read period labels and place them on one regular axis.

    Parameters
    ----------
    labels : list of str
        Period labels in input order (need not be sorted).

    Returns
    -------
    axis : PeriodAxis
        The calendar the labels live on, with its origin at the earliest label.
    t : list of int
        Time index of each label, in input order (0 for the earliest).

    Raises
    ------
    PeriodError
        If a label is unreadable, its style differs from the first label's, or the
        labels span more than :data:`MAX_SPAN` periods; the error's ``position`` is
        the index of the offending label.
    """
    style = _styles(labels)
    compact = False
    if style == "integer":
        found = _compact_style(labels)
        if found is not None:
            style, compact = found, True
    ordinals, days = [], []
    for i, label in enumerate(labels):
        try:
            ordinal, day = _ordinal(style, label, compact)
        except ValueError as exc:
            word = "period number" if style == "integer" else style
            raise PeriodError(i, f"period {label!r} is not a valid {word}: {exc}") from None
        ordinals.append(ordinal)
        days.append(day)

    step, month_end = 1, False
    if style == "integer" and all(1800 <= o <= 2199 for o in ordinals) and all(
        len(label.strip()) == 4 for label in labels
    ):
        style = "year"
    origin = min(ordinals)
    if style == "date":
        step, misfit = date_step(ordinals, labels)
        if misfit is not None:
            raise PeriodError(*misfit)
        month_end = all(
            d == calendar.monthrange(o // 12, o % 12 + 1)[1]
            for o, d in zip(ordinals, days, strict=True)
        )
    t = [(o - origin) // step for o in ordinals]
    far = max(range(len(t)), key=t.__getitem__)
    if t[far] > MAX_SPAN:
        first = labels[ordinals.index(origin)]
        raise PeriodError(
            far,
            f"period {labels[far]!r} is {t[far]:,} periods after the first, {first!r}; a series "
            f"may span at most {MAX_SPAN:,} periods: check the period column",
        )
    day = days[ordinals.index(origin)]
    axis = PeriodAxis(style=style, step=step, origin=origin, month_end=month_end, day=day,
                      compact=compact)
    return axis, t
