"""What :func:`~bayesgrowth.data.series.read_series` takes from a notebook, and how.

A file path, a DataFrame or a Series is read; anything else (a list or an array of
values, a dict) is refused with a message saying how to make a Series of it. A
DataFrame without a period column whose index is a DatetimeIndex or a PeriodIndex (or
an index named like the period column) takes its periods from the index; its value
column is then ``value_col``, or its only column when it has one.
"""

from __future__ import annotations

import os

import pandas as pd

from bayesgrowth.data.series import InputError

__all__ = ["API_OPTIONS", "check_data", "series_frame", "index_frame"]

#: How a missing column's fix is named when the table came from Python, not a file.
API_OPTIONS = ("period_col=", "value_col=")

_SERIES_HINT = ("pass a pandas Series indexed by period, e.g. "
                "pd.Series(values, index=['2024Q1', '2024Q2', ...]), or a DataFrame with a "
                "period and a value column")


def check_data(data, argument: str = "data") -> None:
    """Refuse what :func:`read_series` cannot read, naming the argument and the fix.

    Raises
    ------
    TypeError
        For anything but a path (str or :class:`os.PathLike`), a DataFrame or a Series;
        the message names ``argument``, the parameter it was given as.
    """
    if isinstance(data, str | os.PathLike | pd.DataFrame | pd.Series):
        return
    raise TypeError(f"{argument} must be a CSV or Excel file path, a DataFrame or a Series, not "
                    f"{type(data).__name__}; {_SERIES_HINT}")


def series_frame(data: pd.Series, period_col: str, value_col: str) -> pd.DataFrame:
    """A Series as a table: its index the periods, its values the values."""
    return pd.DataFrame({period_col: data.index.astype(str), value_col: data.to_numpy()})


def _column(frame: pd.DataFrame, col: str):
    """The column named ``col``, or alike but for case and spaces, or ``None``."""
    if col in frame.columns:
        return col
    alike = [c for c in frame.columns if str(c).strip().casefold() == col.casefold()]
    return alike[0] if len(alike) == 1 else None


def index_frame(frame: pd.DataFrame, period_col: str, value_col: str) -> tuple[pd.DataFrame, str]:
    """A DataFrame whose index holds the periods, as a table with a period column.

    A frame that has a period column, or whose index is neither dates, periods nor
    named ``period_col``, is returned as it is (the column check then names what is
    missing).

    Returns
    -------
    tuple of (pandas.DataFrame, str)
        The table and the name of its value column (``value_col``, or the frame's
        only column when it has no column of that name).

    Raises
    ------
    InputError
        When the index holds the periods, no column is named ``value_col`` and there
        are several to choose from.
    """
    index = frame.index
    by_index = isinstance(index, pd.DatetimeIndex | pd.PeriodIndex) or (
        index.name is not None and str(index.name).strip().casefold() == period_col.casefold())
    if _column(frame, period_col) is not None or not by_index:
        return frame, value_col
    found = _column(frame, value_col)
    if found is None and len(frame.columns) == 1:
        found = frame.columns[0]
    if found is None:
        have = ", ".join(repr(str(c)) for c in frame.columns)
        raise InputError(
            f"DataFrame: the index holds the periods, but no column is named {value_col!r} "
            f"(columns are {have}); name the column to forecast with value_col=, or pass "
            f"that column alone (frame[{str(frame.columns[0])!r}], say)"
        )
    table = pd.DataFrame({period_col: index.astype(str), str(found): frame[found].to_numpy()})
    return table, str(found)
