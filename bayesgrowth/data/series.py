"""The series object, and reading it from a CSV file or pandas objects."""

from __future__ import annotations

import hashlib
import warnings
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from bayesgrowth.data.periods import LAST_YEAR, PeriodAxis, PeriodError, parse_periods
from bayesgrowth.display import fmt_number

__all__ = ["GrowthSeries", "InputError", "read_series", "MIN_OBSERVATIONS", "MAX_VALUE"]

#: Fewest observations a growth curve is fitted to.
MIN_OBSERVATIONS = 3

#: Largest value accepted. Far above any business quantity, and far enough below the
#: largest double (about 1.8e308) that forecast draws do not overflow to infinity.
MAX_VALUE = 1e100


class InputError(ValueError):
    """Input that cannot be used, with a one-line message naming where and what to do."""


@dataclass(frozen=True)
class GrowthSeries:
    """A positive-valued series on a regular calendar, sorted by period.

    Parameters
    ----------
    values : numpy.ndarray
        Observed values, all finite and > 0, sorted by period.
    t : numpy.ndarray
        Integer time index of each value: periods since the first observation.
        Gaps (missing periods) keep their true index.
    axis : PeriodAxis
        The calendar, used to label past and future periods in the input's style.
    name : str
        A display name for the series.
    source : str
        Where the series came from (a file name, or ``"DataFrame"``).
    gaps : tuple of str
        Labels of the periods between the first and last observation without a value.
    notes : tuple of str
        What the reader noted about the input, one sentence each, as it warned them: the
        sheet read, missing periods, dates placed in a period, values far out of line.
    """

    values: np.ndarray
    t: np.ndarray
    axis: PeriodAxis
    name: str = "series"
    source: str = "DataFrame"
    gaps: tuple[str, ...] = field(default=())
    notes: tuple[str, ...] = field(default=())

    def __repr__(self) -> str:
        frequency = self.axis.frequency
        count = f"{self.n} {frequency} values" if frequency != "per period" else f"{self.n} values"
        gaps = f" ({len(self.gaps)} missing)" if self.gaps else ""
        return (f"GrowthSeries({self.name!r}: {count}, {self.labels[0]} to {self.labels[-1]}{gaps}"
                f", from {fmt_number(self.values[0])} to {fmt_number(self.values[-1])}; "
                f"source {self.source!r})")

    @property
    def n(self) -> int:
        """Number of observations."""
        return int(self.values.size)

    @property
    def labels(self) -> list[str]:
        """Period labels of the observations, in the input's style."""
        return self.axis.labels(self.t)

    @property
    def t_last(self) -> int:
        """Time index of the last observation."""
        return int(self.t[-1])

    @property
    def log_values(self) -> np.ndarray:
        """Natural log of the values."""
        return np.log(self.values)

    def future_t(self, horizon: int) -> np.ndarray:
        """Time indices of the ``horizon`` periods after the last observation."""
        return self.t_last + np.arange(1, horizon + 1)

    def future_labels(self, horizon: int) -> list[str]:
        """Labels of the ``horizon`` periods after the last observation; see ``check_horizon``."""
        self.check_horizon(horizon)
        return self.axis.labels(self.future_t(horizon))

    def check_horizon(self, horizon: int, option: str = "--horizon ") -> None:
        """Refuse a horizon whose last period would fall after the year 9999.

        Raises
        ------
        InputError
            Naming ``option`` (``"horizon="`` from Python) with the horizon, the last
            observed period and the longest horizon left.
        """
        year = self.axis.year_of(self.t_last + horizon)
        if year is None or year <= LAST_YEAR:
            return
        room = 0
        while self.axis.year_of(self.t_last + room + 1) <= LAST_YEAR:
            room += 1
        fix = (f"forecast at most {room} period(s)" if room
               else "the calendar ends there; number the periods 1, 2, 3, ... instead")
        raise InputError(
            f"{option}{horizon}: {self.source} ends in {self.labels[-1]}, and the forecast "
            f"would run past the year {LAST_YEAR}; {fix}"
        )

    def index_of(self, label: str) -> int:
        """Position of the observation whose period label is ``label``.

        Raises
        ------
        InputError
            If no observation has that label.
        """
        wanted = label.strip()
        labels = self.labels
        if wanted in labels:
            return labels.index(wanted)
        try:  # read with every label, so the step is the series' own
            _, t = parse_periods([*labels, wanted])
        except PeriodError:
            t = None
        if t is not None and t[-1] in t[:-1]:
            return t.index(t[-1])
        raise InputError(
            f"period {label!r} is not in the series (first {labels[0]}, last {labels[-1]})"
        )

    def head(self, n: int) -> GrowthSeries:
        """The first ``n`` observations, on the same calendar (for backtests)."""
        return self.take(np.arange(n))

    def take(self, positions: np.ndarray) -> GrowthSeries:
        """The observations at ``positions`` (sorted), on the same calendar.

        ``gaps`` lists the periods between the first and last kept observation
        that are not kept.
        """
        positions = np.sort(np.asarray(positions, dtype=int))
        t = self.t[positions]
        missing = sorted(set(range(int(t[0]), int(t[-1]) + 1)) - set(t.tolist())) if t.size else []
        return GrowthSeries(
            values=self.values[positions],
            t=t,
            axis=self.axis,
            name=self.name,
            source=self.source,
            gaps=tuple(self.axis.labels(missing)),
        )

    def fingerprint(self) -> str:
        """SHA-256 of the periods and values, to tell later whether the input changed."""
        digest = hashlib.sha256()
        for label, value in zip(self.labels, self.values, strict=True):
            digest.update(f"{label},{float(value)!r}\n".encode())
        return digest.hexdigest()

    def to_frame(self) -> pd.DataFrame:
        """The series as a DataFrame with columns ``period``, ``t`` and ``value``."""
        return pd.DataFrame({"period": self.labels, "t": self.t, "value": self.values})


def _from_columns(
    periods: list[str],
    raw_values: list[str],
    rows: list[int],
    *,
    source: str,
    period_col: str,
    value_col: str,
    name: str,
    decimal: str = "auto",
    fiscal_start: int | None = None,
    separator: str = ",",
    notes: tuple[str, ...] = (),
) -> GrowthSeries:
    """Validate raw cells and build a series; ``rows`` are the rows as the user counts them.

    ``decimal`` and ``fiscal_start`` are as in :func:`read_series`; ``separator`` is
    the file's column separator (see :func:`bayesgrowth.data.formats.decimal_mark`);
    ``notes`` are the file's own (the sheet read), warned before the series' notes
    (:mod:`bayesgrowth.data.checks`).
    """
    from bayesgrowth.data.checks import (
        placement_note,
        time_axis,
        unusual_notes,
        values_of,
        where,
    )

    values = values_of(raw_values, rows, source=source, value_col=value_col, decimal=decimal,
                       separator=separator)
    for label, row in zip(periods, rows, strict=True):
        if str(label).strip() == "":
            raise InputError(f"{where(source, row, period_col)}: period is missing")
    if len(values) < MIN_OBSERVATIONS:
        raise InputError(
            f"{source}: {len(values)} observation(s); a growth curve needs at least "
            f"{MIN_OBSERVATIONS}"
        )
    if min(values) == max(values):
        raise InputError(
            f"{source}, column {value_col!r}: every value is {str(raw_values[0]).strip()}; a "
            "series that never changes has no growth to fit and would get bands of zero "
            "width; check that this is the right column"
        )
    axis, t_sorted, order = time_axis(periods, rows, source=source, period_col=period_col,
                                      fiscal_start=fiscal_start)
    said = list(notes)
    missing = sorted(set(range(int(t_sorted[-1]) + 1)) - set(t_sorted.tolist()))
    gaps = tuple(axis.labels(missing))
    if gaps:
        shown = ", ".join(gaps[:5]) + (" ..." if len(gaps) > 5 else "")
        said.append(f"{source}: {len(gaps)} missing period(s) ({shown}); they keep their "
                    "place in time and are not filled")
    t_input = np.empty_like(t_sorted)
    t_input[order] = t_sorted
    said.append(placement_note(periods, rows, t_input, axis, source))
    sorted_values = np.asarray(values, dtype=float)[order]
    said += unusual_notes(sorted_values, t_sorted, axis, [rows[i] for i in order],
                          [raw_values[i] for i in order], source)
    said = [n for n in said if n]
    for note in said:
        warnings.warn(note, stacklevel=3)
    return GrowthSeries(values=sorted_values, t=t_sorted, axis=axis, name=name, source=source,
                        gaps=gaps, notes=tuple(said))


def read_series(
    data: str | Path | pd.DataFrame | pd.Series,
    *,
    period_col: str = "period",
    value_col: str = "value",
    name: str | None = None,
    decimal: str = "auto",
    fiscal_start: int | None = None,
    sheet: str | None = None,
) -> GrowthSeries:
    """Read one growth series from a CSV or Excel file, a DataFrame or a Series.

    Parameters
    ----------
    data : str, pathlib.Path, pandas.DataFrame or pandas.Series
        A CSV file with a header row, a DataFrame with a period column and a value
        column, or a Series whose index holds the periods. A DataFrame without a
        period column whose index holds dates or periods (a DatetimeIndex or a
        PeriodIndex) takes its periods from the index, and its values from
        ``value_col`` or its only column (:mod:`bayesgrowth.data.pandas_input`).
    period_col, value_col : str
        Column names of the periods and the values.
    name : str, optional
        Display name; defaults to the file's stem or the Series' name.
    decimal : {"auto", ".", ","}
        Decimal mark of the values; ``"auto"`` tells it from the cells and refuses
        a column whose cells read either way (see :mod:`bayesgrowth.data.formats`).
    fiscal_start : int, optional
        Month (1-12) the fiscal year starts in, for labels like ``FY24 Q1``; FY24
        is the fiscal year ending in 2024 (see :mod:`bayesgrowth.data.fiscal`).
    sheet : str, optional
        The sheet of an ``.xlsx`` workbook to read; by default the first, named in a
        note when the workbook has several (see :mod:`bayesgrowth.data.excel`).

    Returns
    -------
    GrowthSeries
        The validated series, sorted by period. What the reader noted (the sheet read,
        missing periods, dates placed in a period, values far out of line with their
        neighbours; :mod:`bayesgrowth.data.checks`) is warned and kept in ``notes``.

    Raises
    ------
    InputError
        With a one-line message that names the file, row and column at fault. Rows
        are counted as a spreadsheet shows them (the header is row 1).
    TypeError
        If ``data`` is none of the above (a list or an array of values, say).

    Examples
    --------
    >>> import pandas as pd
    >>> s = read_series(pd.DataFrame({"period": ["2024Q1", "2024Q2", "2024Q3"],
    ...                               "value": [10.0, 12.0, 14.5]}))
    >>> s.future_labels(2)
    ['2024Q4', '2025Q1']
    """
    from bayesgrowth.data.pandas_input import API_OPTIONS, check_data, index_frame, series_frame

    check_data(data)
    if isinstance(data, pd.Series):
        name = name or (str(data.name) if data.name is not None else "series")
        return _frame_to_series(series_frame(data, period_col, value_col), "Series", period_col,
                                value_col, name, header_offset=0, decimal=decimal,
                                fiscal_start=fiscal_start, options=API_OPTIONS)
    if isinstance(data, pd.DataFrame):
        frame, value_col = index_frame(data, period_col, value_col)
        return _frame_to_series(frame, "DataFrame", period_col, value_col, name or "series",
                                header_offset=0, decimal=decimal, fiscal_start=fiscal_start,
                                options=API_OPTIONS)
    from bayesgrowth.data.csvfile import read_csv_file

    path = Path(data)
    frame = read_csv_file(path, sheet=sheet)
    return _frame_to_series(frame, path.name, period_col, value_col, name or path.stem, 2,
                            decimal=decimal, fiscal_start=fiscal_start)


def _frame_to_series(
    frame: pd.DataFrame,
    source: str,
    period_col: str,
    value_col: str,
    name: str,
    header_offset: int,
    decimal: str = "auto",
    fiscal_start: int | None = None,
    options: tuple[str, str] = ("--period-col", "--value-col"),
) -> GrowthSeries:
    """``options`` name the settings of the two columns in a missing column's message."""
    from bayesgrowth.data.columns import require_columns

    frame = require_columns(frame, source, zip((period_col, value_col), options, strict=True))
    # Rows as the user counts them: CSV line numbers (header = 1), or DataFrame positions.
    rows = [i + header_offset for i in range(len(frame))]
    return _from_columns(
        frame[period_col].astype(str).tolist(),
        frame[value_col].tolist(),
        rows,
        source=source,
        period_col=period_col,
        value_col=value_col,
        name=name,
        decimal=decimal,
        fiscal_start=fiscal_start,
        separator=frame.attrs.get("separator", ","),
        notes=tuple(frame.attrs.get("notes", ())),
    )


def as_series(data: GrowthSeries | str | Path | pd.DataFrame | pd.Series,
              argument: str = "data") -> GrowthSeries:
    """Return ``data`` if it is a series already, else read it with the defaults.

    ``argument`` is the parameter's name a refusal of ``data``'s type names.
    """
    from bayesgrowth.data.pandas_input import check_data

    if isinstance(data, GrowthSeries):
        return data
    check_data(data, argument)
    return read_series(data)
