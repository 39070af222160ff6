"""Files the tool writes for people: CSV cells that a spreadsheet cannot run as formulas.

A spreadsheet opening a CSV file treats a cell that starts with ``=``, ``+``,
``-``, ``@``, a tab or a carriage return as a formula, so a series name such as
``=HYPERLINK(...)`` in an output table would run when the file is opened. The
OWASP guidance on CSV injection (https://owasp.org/www-community/attacks/CSV_Injection)
is to prefix such a cell with a single quote, which spreadsheets read as "this is
text". Every CSV file the command line writes goes through :func:`write_csv`.

Only text cells change: numeric columns are written as numbers, and a text cell
that is a plain decimal number (``-3``, ``-3.2``, ``+1e5``, as integer period
labels are) stays as it is, since a spreadsheet reads it as that number and runs
nothing. The prefix is added once: a neutralised cell starts with a quote, which is
not a trigger, so neutralising twice changes nothing.
"""

from __future__ import annotations

import re
from pathlib import Path

import pandas as pd

__all__ = ["FORMULA_TRIGGERS", "neutralise_cell", "neutralise_frame", "write_csv"]

#: First characters that make a spreadsheet read a cell as a formula (OWASP, CSV Injection).
FORMULA_TRIGGERS = ("=", "+", "-", "@", "\t", "\r")

#: A plain decimal number in ASCII digits: read as a number, never as a formula.
_PLAIN_NUMBER = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?", re.ASCII)


def neutralise_cell(value: object) -> object:
    """``value`` with a leading single quote if it is text a spreadsheet would run.

    Parameters
    ----------
    value : object
        One cell. Anything but a ``str`` is returned unchanged.

    Returns
    -------
    object
        ``"'" + value`` for text starting with one of :data:`FORMULA_TRIGGERS` that is
        not a plain decimal number; otherwise ``value`` itself.

    Examples
    --------
    >>> neutralise_cell("=1+2"), neutralise_cell("-3.2"), neutralise_cell("north")
    ("'=1+2", '-3.2', 'north')
    """
    if (
        isinstance(value, str)
        and value.startswith(FORMULA_TRIGGERS)
        and not _PLAIN_NUMBER.fullmatch(value)
    ):
        return "'" + value
    return value


def _is_text_column(column: pd.Series) -> bool:
    dtype = column.dtype
    return pd.api.types.is_object_dtype(dtype) or pd.api.types.is_string_dtype(dtype) or (
        isinstance(dtype, pd.CategoricalDtype)
    )


def neutralise_frame(frame: pd.DataFrame) -> pd.DataFrame:
    """A copy of ``frame`` whose text cells and column names cannot run as formulas.

    Parameters
    ----------
    frame : pandas.DataFrame

    Returns
    -------
    pandas.DataFrame
        Same shape and order; numeric, boolean and date columns untouched.
    """
    out = frame.copy()
    for i in range(out.shape[1]):
        column = out.iloc[:, i]
        if _is_text_column(column):
            out.isetitem(i, column.astype(object).map(neutralise_cell))
    out.columns = [neutralise_cell(str(c)) for c in out.columns]
    return out


def write_csv(frame: pd.DataFrame, path: str | Path, float_format: str | None = "%.6g") -> None:
    """Write ``frame`` as CSV (no index) with its text cells neutralised.

    Parameters
    ----------
    frame : pandas.DataFrame
    path : str or pathlib.Path
        The file to write (the caller stages it; see :mod:`bayesgrowth.cli.output`).
    float_format : str, optional
        Format of floating-point numbers [``%.6g``]; ``None`` writes them in full.
    """
    neutralise_frame(frame).to_csv(path, index=False, float_format=float_format)
