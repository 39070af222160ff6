"""Period labels: parse them, put them on one time axis, and continue the calendar.

Each supported label style maps to an integer *ordinal* on a regular grid, so that
the time index ``t`` of an observation is the number of grid steps since the
first observation. Gaps in the input keep their true ``t``.

Supported styles
----------------
quarter   ``2024Q1``, ``2024-Q1``, ``2024 Q1`` (case-insensitive)
month     ``2024-01``, ``2024/01``
date      ISO dates ``2024-03-31``; the step (1, 3 or 12 months) is inferred
year      four-digit years ``1990`` .. ``2199``
integer   any other whole numbers (a plain period counter)
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass
from functools import reduce

import pandas as pd

__all__ = ["PeriodAxis", "parse_periods", "PeriodError"]

_QUARTER = re.compile(r"^\s*(\d{4})\s*[-_ ]?\s*[Qq]([1-4])\s*$")
_MONTH = re.compile(r"^\s*(\d{4})[-/](\d{1,2})\s*$")
_DATE = re.compile(r"^\s*(\d{4})-(\d{2})-(\d{2})\s*$")
_INTEGER = re.compile(r"^\s*[-+]?\d+\s*$")

#: Periods per year for each style (``None`` where the calendar is unknown).
PERIODS_PER_YEAR = {"quarter": 4, "month": 12, "year": 1}


class PeriodError(ValueError):
    """A period label that cannot be read, with its position in the input."""

    def __init__(self, position: int, message: str) -> None:
        super().__init__(message)
        self.position = position


def _style_of(label: str) -> str | None:
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
    """

    style: str
    step: int
    origin: int
    month_end: bool = False
    day: int = 1

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

    def label(self, t: int) -> str:
        """Label, in the input's style, of the period with time index ``t``."""
        ordinal = self.origin + t * self.step
        if self.style == "quarter":
            return f"{ordinal // 4}Q{ordinal % 4 + 1}"
        if self.style == "month":
            return f"{ordinal // 12}-{ordinal % 12 + 1:02d}"
        if self.style in ("year", "integer"):
            return str(ordinal)
        year, month0 = divmod(ordinal, 12)
        first = pd.Timestamp(year=year, month=month0 + 1, day=1)
        if self.month_end:
            return (first + pd.offsets.MonthEnd(0)).strftime("%Y-%m-%d")
        day = min(self.day, first.days_in_month)
        return first.replace(day=day).strftime("%Y-%m-%d")

    def labels(self, ts: list[int] | range) -> list[str]:
        """Labels for several time indices."""
        return [self.label(int(t)) for t in ts]


def _ordinal(style: str, label: str) -> tuple[int, int]:
    """Ordinal of a label and, for dates, its day of month."""
    if style == "quarter":
        m = _QUARTER.match(label)
        return int(m.group(1)) * 4 + int(m.group(2)) - 1, 1
    if style == "month":
        m = _MONTH.match(label)
        month = int(m.group(2))
        if not 1 <= month <= 12:
            raise ValueError(f"month {month} is not between 1 and 12")
        return int(m.group(1)) * 12 + month - 1, 1
    if style == "date":
        stamp = pd.Timestamp(label.strip())
        return stamp.year * 12 + stamp.month - 1, stamp.day
    return int(label), 1


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
        If a label is unreadable or its style differs from the first label's; the
        error's ``position`` is the index of the offending label.
    """
    styles = []
    for i, label in enumerate(labels):
        style = _style_of(label)
        if style is None:
            raise PeriodError(
                i,
                f"period {label!r} is not a quarter (2024Q1), month (2024-01), "
                "ISO date (2024-03-31), year or whole number",
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
    ordinals, days = [], []
    for i, label in enumerate(labels):
        try:
            ordinal, day = _ordinal(first, label)
        except ValueError as exc:
            raise PeriodError(i, f"period {label!r} is not a valid {first}: {exc}") from None
        ordinals.append(ordinal)
        days.append(day)

    style, step, month_end = first, 1, False
    if style == "integer" and all(1800 <= o <= 2199 for o in ordinals) and all(
        len(label.strip()) == 4 for label in labels
    ):
        style = "year"
    origin = min(ordinals)
    if style == "date":
        diffs = [o - origin for o in ordinals if o != origin]
        step = reduce(math.gcd, diffs, 0) or 1
        if step not in (1, 3, 12):
            # Irregular spacing: fall back to months, the finest calendar step.
            step = 1
        for i, o in enumerate(ordinals):
            if (o - origin) % step:
                raise PeriodError(i, f"period {labels[i]!r} is off the {step}-month grid")
        stamps = [pd.Timestamp(label.strip()) for label in labels]
        month_end = all(s.is_month_end for s in stamps)
    t = [(o - origin) // step for o in ordinals]
    day = days[ordinals.index(origin)]
    return PeriodAxis(style=style, step=step, origin=origin, month_end=month_end, day=day), t
