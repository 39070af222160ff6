"""Dates on the period grid: the step of a date column, and the dates that do not fit it.

A column of dates is read as monthly, quarterly or yearly: the step is the greatest
common divisor of the months between the dates (1, 3 or 12). Where that would misread
the file, the date that does not fit is refused, never moved:

- **Off a coarser grid.** When all but a few dates (at least two of every three, and at
  least three dates) fall on one quarterly or yearly grid, the others are typing slips
  (``2021-02-17`` among quarter starts), not the sign of monthly data: the first of them
  is refused, with the grid's months named. Read as months instead, the file would turn
  into a monthly series with two months in three missing.
- **Another spacing.** Dates 2, 4 or 6 months apart (or multiples) are refused: the
  calendar continues months, quarters and years only, so the periods are to be numbered.
- **Scattered months.** Dates that, read as months, would leave more months without a
  value than with one are refused at the date after the longest gap. Fewer missing months
  are gaps: they keep their place in time, and the reader names them in a note.

A date whose day of the month differs from the others' (``2021-04-15`` among month ends)
is placed in the period of the month it falls in, and the reader names it in a note
(:func:`off_day_positions`); days within :data:`DAY_SLACK` of the others' (business days
around a weekend) are not named.
"""

from __future__ import annotations

import calendar
import datetime as dt
import math
import re
from collections import Counter
from collections.abc import Sequence
from functools import reduce

__all__ = ["DAY_SLACK", "STEPS", "date_step", "off_day_positions"]

#: Steps in months a date column may have: monthly, quarterly, yearly.
STEPS = (1, 3, 12)

#: Days a date may sit from the others' day of the month without a note (a weekend and a
#: holiday move a business day's date by up to three days).
DAY_SLACK = 3

_DATE = re.compile(r"^\s*(\d{4})-?(\d{2})-?(\d{2})\s*$", re.ASCII)
_GRIDS = {12: "yearly", 3: "quarterly"}


def _months(residue: int, coarse: int) -> str:
    """The months of a grid in words: ``"Jan, Apr, Jul and Oct"``, ``"March"``."""
    if coarse == 12:
        return calendar.month_name[residue + 1]
    names = [calendar.month_abbr[m + 1] for m in range(residue, 12, coarse)]
    return ", ".join(names[:-1]) + " and " + names[-1]


def _off_grid(ordinals: Sequence[int], labels: Sequence[str],
              coarse: int) -> tuple[int, str] | None:
    """The first date off a grid of ``coarse`` months that all but a few dates are on."""
    counts = Counter(o % coarse for o in ordinals)
    residue, on = counts.most_common(1)[0]
    misfits = [i for i, o in enumerate(ordinals) if o % coarse != residue]
    if not misfits or on < 3 or on < 2 * len(misfits):
        return None
    every = "one a year" if coarse == 12 else f"one every {coarse} months"
    return misfits[0], (
        f"date {labels[misfits[0]].strip()!r} is off the {_GRIDS[coarse]} grid of the other "
        f"dates ({every}, in {_months(residue, coarse)}); correct it to the period it belongs "
        "to, or delete the row"
    )


def date_step(ordinals: Sequence[int],
              labels: Sequence[str]) -> tuple[int, tuple[int, str] | None]:
    """The step in months of a date column, or the date that does not fit it.

    Parameters
    ----------
    ordinals : sequence of int
        Each date's month as ``year * 12 + month - 1``, in input order.
    labels : sequence of str
        The dates as written, for the message.

    Returns
    -------
    step : int
        1, 3 or 12 when the dates fit (see the module docstring).
    misfit : (int, str) or None
        The position of a date to refuse and the reason, naming the date; ``None``
        when the dates fit.

    Examples
    --------
    >>> months = [2021 * 12 + m for m in (0, 3, 6, 1, 9)]
    >>> date_step(months[:3] + months[4:], ["2021-01-01", "2021-04-01", "2021-07-01",
    ...                                     "2021-10-01"])
    (3, None)
    >>> step, (position, why) = date_step(months, ["2021-01-01", "2021-04-01", "2021-07-01",
    ...                                            "2021-02-17", "2021-10-01"])
    >>> step, position, why.split(" (")[0]
    (3, 3, "date '2021-02-17' is off the quarterly grid of the other dates")
    """
    origin = min(ordinals)
    step = reduce(math.gcd, (o - origin for o in ordinals), 0) or 1
    for coarse in (12, 3):
        if coarse <= step:
            break
        misfit = _off_grid(ordinals, labels, coarse)
        if misfit is not None:
            return coarse, misfit
    if step == 1:
        return 1, _sparse(ordinals, labels)
    if step in STEPS:
        return step, None
    second = min((o, i) for i, o in enumerate(ordinals) if o != origin)[1]
    return step, (second, (
        f"date {labels[second].strip()!r}: the dates are {step} months apart (or a multiple "
        f"of {step}), but a date column must step by a month, a quarter or a year; number "
        f"the periods 1, 2, 3, ... to forecast in steps of {step} months"
    ))


def _sparse(ordinals: Sequence[int], labels: Sequence[str]) -> tuple[int, str] | None:
    """The date after the longest gap, when read as months most months have no value."""
    months = sorted(set(ordinals))
    span = months[-1] - months[0] + 1
    if span - len(months) <= len(months):
        return None
    gap, after = max((b - a, b) for a, b in zip(months, months[1:], strict=False))
    position = list(ordinals).index(after)
    return position, (
        f"date {labels[position].strip()!r} comes {gap} months after the date before it: the "
        f"dates are irregularly spaced, and read as months {span - len(months)} of the "
        f"{span} months from the first to the last would have no value; give one date per "
        "month, quarter or year, or number the periods 1, 2, 3, ..."
    )


def _day_position(text: str) -> tuple[int, int] | None:
    """A date's day of the month and its days to the month's end."""
    m = _DATE.match(text)
    if m is None:
        return None
    year, month, day = (int(g) for g in m.groups())
    dt.date(year, month, day)
    return day, calendar.monthrange(year, month)[1] - day


def off_day_positions(labels: Sequence[str]) -> list[int]:
    """Positions of the dates whose day of the month is out of line with the others'.

    The others' day is the month's end when most dates are within :data:`DAY_SLACK`
    days of it, else the most common day; a date more than :data:`DAY_SLACK` days from
    it is out of line. When fewer than half the dates are near either, the dates share no
    day (a date each month, on any day): none is out of line.

    Parameters
    ----------
    labels : sequence of str
        ISO dates (``2024-03-31`` or ``20240331``), in input order.

    Returns
    -------
    list of int
        In input order; empty when every date is on the others' day.

    Examples
    --------
    >>> off_day_positions(["2021-01-31", "2021-02-28", "2021-04-15", "2021-05-29"])
    [2]
    """
    days = [_day_position(label) for label in labels]
    if any(d is None for d in days):
        return []
    near_end = [to_end <= DAY_SLACK for _, to_end in days]
    modal = Counter(day for day, _ in days).most_common(1)[0][0]
    near_day = [abs(day - modal) <= DAY_SLACK for day, _ in days]
    fits = near_end if sum(near_end) >= sum(near_day) else near_day
    if 2 * sum(fits) < len(fits):  # no day most dates share: each is simply in its month
        return []
    return [i for i, ok in enumerate(fits) if not ok]
