"""Files the tool writes for people: CSV cells that cannot run as formulas, valid JSON.

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

JSON has no infinity and no "not a number" (RFC 8259, section 6), though Python's
``json`` module writes them by default. :func:`json_text` writes ``null`` where a
number does not exist, lists each such field with the reason under
``"numbers_not_available"``, and refuses (``allow_nan=False``) anything it missed.
"""

from __future__ import annotations

import json
import math
import os
import re
import tempfile
from collections.abc import Callable
from pathlib import Path
from typing import Any

import numpy as np
import pandas as pd

from bayesgrowth.data.leftovers import TMP_PREFIX, temp_prefix

__all__ = [
    "FORMULA_TRIGGERS",
    "NOT_AVAILABLE_KEY",
    "atomic_write",
    "json_ready",
    "json_text",
    "neutralise_cell",
    "neutralise_frame",
    "write_csv",
]

#: Key of the list of fields written as ``null`` because their number does not exist.
NOT_AVAILABLE_KEY = "numbers_not_available"

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


def _why(value: float) -> str:
    if math.isnan(value):
        return ("not a number: the value is undefined (for example a band computed from draws "
                "that overflowed to infinity)")
    side, bound = ("above", "1.8e308") if value > 0 else ("below", "-1.8e308")
    return (f"infinite: {side} the range of numbers a computer holds (about {bound}); "
            "the draws overflowed, or the quantity has no finite value")


def json_ready(data: Any, where: str = "") -> tuple[Any, list[dict[str, str]]]:
    """``data`` with every non-finite number replaced by ``None``, and the list of them.

    Parameters
    ----------
    data : object
        Dicts, lists, tuples, strings, numbers (Python or NumPy), booleans and ``None``.
    where : str
        Path of ``data`` inside the document, for the list of replaced fields.

    Returns
    -------
    data : object
        Plain Python values that ``json.dumps(..., allow_nan=False)`` accepts.
    missing : list of dict
        ``{"field": "final_period.upper_95", "reason": "..."}`` for each ``None`` put in.
    """
    if isinstance(data, np.generic):
        data = data.item()
    if isinstance(data, float) and not math.isfinite(data):
        return None, [{"field": where or "(document)", "reason": _why(data)}]
    if isinstance(data, dict):
        out, missing = {}, []
        for key, value in data.items():
            out[key], more = json_ready(value, f"{where}.{key}" if where else str(key))
            missing += more
        return out, missing
    if isinstance(data, list | tuple | np.ndarray):
        out_list, missing = [], []
        for i, value in enumerate(data):
            clean, more = json_ready(value, f"{where}[{i}]")
            out_list.append(clean)
            missing += more
        return out_list, missing
    return data, []


def json_text(data: Any, *, indent: int | None = 2) -> str:
    """Strictly valid JSON text (RFC 8259) of ``data``, ending in a newline.

    Non-finite numbers become ``null``; when ``data`` is a dict, the list of those
    fields and why each has no number is added under :data:`NOT_AVAILABLE_KEY`.

    Examples
    --------
    >>> print(json_text({"upper_95": float("inf")}, indent=None), end="")  # doctest: +ELLIPSIS
    {"upper_95": null, "numbers_not_available": [{"field": "upper_95", "reason": "infinite: ...}]}
    """
    clean, missing = json_ready(data)
    if missing and isinstance(clean, dict):
        clean[NOT_AVAILABLE_KEY] = missing
    return json.dumps(clean, indent=indent, allow_nan=False) + "\n"


def _file_mode() -> int:
    mask = os.umask(0)
    os.umask(mask)
    return 0o666 & ~mask


def atomic_write(path: str | Path, write: Callable[[Path], None], *, suffix: str = ".tmp") -> None:
    """Call ``write(tmp)`` on a temporary file beside ``path``, then rename it to ``path``.

    A reader sees the old file or the whole new one, never a half-written one; a
    failure leaves no temporary file behind. The file gets the mode of an ordinary
    new file (not the owner-only mode of a temporary one).

    Parameters
    ----------
    path : str or Path
        The file to write.
    write : callable
        Writes the content to the path it is given.
    suffix : str
        Ending of the temporary file's name (some writers choose a format by it).

    Examples
    --------
    >>> import tempfile
    >>> folder = Path(tempfile.mkdtemp())
    >>> atomic_write(folder / "a.txt", lambda tmp: tmp.write_text("done"))
    >>> (folder / "a.txt").read_text(), sorted(p.name for p in folder.iterdir())
    ('done', ['a.txt'])
    """
    path = Path(path)
    # named with this process's id, so that a later run removes it if this one is killed
    fd, tmp = tempfile.mkstemp(prefix=temp_prefix(TMP_PREFIX), suffix=f".{path.name}{suffix}",
                               dir=path.parent)
    os.close(fd)
    try:
        write(Path(tmp))
        os.chmod(tmp, _file_mode())
        os.replace(tmp, path)
    finally:
        if os.path.exists(tmp):
            os.unlink(tmp)
