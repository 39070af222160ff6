"""Many series in one long-format table: a series column, a period column, a value column.

Each series is validated exactly as a single series is (see
:func:`bayesgrowth.data.series.read_series`), with its messages naming the
series and the row of the file. A series that fails validation does not stop
the others: it is listed with its reason, and the caller decides what to do.
Problems of the file itself (missing file, missing column, a row without a
series name) raise :class:`~bayesgrowth.data.series.InputError`.
"""

from __future__ import annotations

import warnings
from pathlib import Path

import numpy as np
import pandas as pd

from bayesgrowth.data.columns import require_columns
from bayesgrowth.data.csvfile import read_csv_file, separator_of
from bayesgrowth.data.excel import EXCEL_SUFFIXES
from bayesgrowth.data.series import GrowthSeries, InputError, _from_columns

__all__ = ["read_panel", "Panel", "invented_panel", "panel_frame"]

#: A panel: series by name, in order of first appearance in the input.
Panel = dict[str, GrowthSeries]


def _names_as_written(path: Path, frame: pd.DataFrame, series_col: str) -> list[str]:
    """Series names with the leading spaces of unquoted cells, which the reader skips.

    The file is read again without skipping spaces; where that reading parses
    differently (a quoted cell after a space), the names as first read are kept.
    """
    names = frame[series_col].astype(str).tolist()
    if path.suffix.lower() in EXCEL_SUFFIXES:
        return names
    try:
        raw = pd.read_csv(path, dtype=str, keep_default_na=False, sep=separator_of(path))
    except (ValueError, OSError):
        return names
    if raw.shape != frame.shape:
        return names
    cells = raw.iloc[:, list(frame.columns).index(series_col)].astype(str).tolist()
    return [c if c != n and c.lstrip(" ") == n else n for c, n in zip(cells, names, strict=True)]


def _check_spellings(raw: list[str], source: str, series_col: str, offset: int) -> None:
    """Refuse names that differ only in surrounding blanks: one series or two is unclear."""
    first: dict[str, tuple[str, int]] = {}
    for i, name in enumerate(raw):
        key = name.strip()
        seen = first.setdefault(key, (name, i))
        if seen[0] != name:
            raise InputError(
                f"{source}, row {i + offset}, column {series_col!r}: series name {name!r} "
                f"differs from {seen[0]!r} (row {seen[1] + offset}) only in spaces or tabs "
                "around it; write it the same way in every row, or give it its own name"
            )


def read_panel(
    data: str | Path | pd.DataFrame,
    series_col: str = "series",
    period_col: str = "period",
    value_col: str = "value",
    decimal: str = "auto",
    fiscal_start: int | None = None,
    sheet: str | None = None,
) -> tuple[Panel, list[tuple[str, str]]]:
    """Read many series from a long-format CSV file or DataFrame.

    Parameters
    ----------
    data : str, pathlib.Path or pandas.DataFrame
        A CSV file with a header row, or a DataFrame, with one row per series
        and period.
    series_col, period_col, value_col : str
        Column names of the series name, the period and the value.
    decimal, fiscal_start
        The values' decimal mark and the fiscal-year start month, as in
        :func:`bayesgrowth.data.series.read_series`.
    sheet : str, optional
        The sheet of an ``.xlsx`` workbook to read, as in
        :func:`~bayesgrowth.data.series.read_series`.

    Returns
    -------
    series : dict of str to GrowthSeries
        The series that passed validation, in order of first appearance.
    failures : list of (str, str)
        ``(series name, reason)`` for every series that did not; the reason is
        the one-line message single-series reading gives, naming the row.

    Raises
    ------
    InputError
        If the file cannot be read, a column is missing, a row has no series
        name, two names differ only in surrounding spaces or tabs, or the table
        has no rows. Rows are counted as a spreadsheet shows
        them (the header is row 1); DataFrame rows from 0.

    Examples
    --------
    >>> import pandas as pd
    >>> frame = pd.DataFrame({"series": ["a"] * 3 + ["b"] * 2,
    ...                       "period": ["2024Q1", "2024Q2", "2024Q3", "2024Q1", "2024Q2"],
    ...                       "value": [1.0, 1.1, 1.2, 5.0, 5.5]})
    >>> good, bad = read_panel(frame)
    >>> list(good), bad[0][0]
    (['a'], 'b')
    """
    path = None
    if isinstance(data, pd.DataFrame):
        frame, source, offset = data, "DataFrame", 0
    else:
        path = Path(data)
        frame, source, offset = read_csv_file(path, sheet=sheet), path.name, 2
        for note in frame.attrs.get("notes", ()):  # the sheet read: once, not per series
            warnings.warn(note, stacklevel=2)
    frame = require_columns(frame, source, ((series_col, "--series-col"), (period_col,
                                            "--period-col"), (value_col, "--value-col")))
    if len(frame) == 0:
        raise InputError(f"{source}: no rows below the header; add one row per series and period")
    names = _series_names(frame, path, series_col, source, offset)
    periods = frame[period_col].astype(str).tolist()
    values = frame[value_col].tolist()
    groups: dict[str, list[int]] = {}
    for i, name in enumerate(names):
        groups.setdefault(name, []).append(i)
    good: Panel = {}
    failures: list[tuple[str, str]] = []
    for name, idx in groups.items():
        try:
            good[name] = _from_columns(
                [periods[i] for i in idx],
                [values[i] for i in idx],
                [i + offset for i in idx],
                source=f"{source}, series {name!r}",
                period_col=period_col,
                value_col=value_col,
                name=name,
                decimal=decimal,
                fiscal_start=fiscal_start,
                separator=frame.attrs.get("separator", ","),
            )
        except InputError as exc:
            failures.append((name, str(exc)))
    return good, failures


def _series_names(frame: pd.DataFrame, path: Path | None, series_col: str, source: str,
                  offset: int) -> list[str]:
    """Each row's series name, stripped; refuse a missing name or two spellings of one."""
    raw_names = (frame[series_col].astype(str).tolist() if path is None
                 else _names_as_written(path, frame, series_col))
    names = pd.Series(raw_names, dtype=object).str.strip()
    blank = (names == "") | names.str.lower().isin(("nan", "none", "null"))
    if blank.any():
        row = int(blank.to_numpy().nonzero()[0][0]) + offset
        raise InputError(
            f"{source}, row {row}, column {series_col!r}: series name is missing; "
            "fill it in or delete the row"
        )
    _check_spellings(raw_names, source, series_col, offset)
    return names.tolist()


def panel_frame(panel: Panel) -> pd.DataFrame:
    """The panel back in long format (``series``, ``period``, ``value``), for writing."""
    parts = [
        pd.DataFrame({"series": name, "period": s.labels, "value": s.values})
        for name, s in panel.items()
    ]
    return pd.concat(parts, ignore_index=True) if parts else pd.DataFrame(
        columns=["series", "period", "value"]
    )


def quiet_read_panel(*args, **kwargs) -> tuple[Panel, list[tuple[str, str]], list[str]]:
    """:func:`read_panel`, with data warnings (gaps) returned as notes instead of warned."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        good, bad = read_panel(*args, **kwargs)
    return good, bad, [str(w.message) for w in caught]


def invented_panel(
    n_series: int,
    *,
    min_periods: int = 12,
    max_periods: int = 40,
    seed: int = 0,
    start: str = "2015Q1",
) -> pd.DataFrame:
    """Invented quarterly series in long format, for demos and benchmarks.

    Each series ``s0001``, ``s0002``, ... has a length drawn uniformly from
    ``min_periods`` to ``max_periods`` quarters, a starting value log-uniform
    between 50 and 5,000, a growth rate per quarter from Normal(3%, 2 points) and
    log-normal noise with a standard deviation uniform between 2% and 10%:
    ``value_t = a (1 + g)^t exp(e_t)``. Nothing here describes a real business.

    Parameters
    ----------
    n_series : int
    min_periods, max_periods : int
        Range of series lengths (inclusive).
    seed : int
        Seed of the generator; the same seed gives the same table.
    start : str
        First quarter of every series.

    Returns
    -------
    pandas.DataFrame
        Columns ``series``, ``period``, ``value``.
    """
    from bayesgrowth.data.periods import parse_periods

    rng = np.random.default_rng(seed)
    axis, _ = parse_periods([start])
    rows = []
    for i in range(n_series):
        n = int(rng.integers(min_periods, max_periods + 1))
        a = float(np.exp(rng.uniform(np.log(50), np.log(5000))))
        g = float(rng.normal(0.03, 0.02))
        sd = float(rng.uniform(0.02, 0.10))
        t = np.arange(n)
        values = a * (1 + g) ** t * np.exp(sd * rng.standard_normal(n))
        name = f"s{i + 1:04d}"
        rows.append(pd.DataFrame({"series": name, "period": axis.labels(t),
                                  "value": np.round(values, 2)}))
    return pd.concat(rows, ignore_index=True)
