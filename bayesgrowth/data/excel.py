"""Reading the first sheet of an Excel workbook (``.xlsx``) into text cells.

The Excel reader (openpyxl) is optional: ``pip install "bayesgrowth[excel]"``.
Cells come out as the CSV reader gives them, as text: whole numbers without a
trailing ``.0``, dates as ISO dates (``2024-03-31``), empty cells as ``""``.
Rows are counted as Excel shows them when the header is in row 1.
"""

from __future__ import annotations

import datetime as dt
import math
import zipfile
from pathlib import Path

import pandas as pd

from bayesgrowth.data.formats import check_header, title_line
from bayesgrowth.data.series import InputError

__all__ = ["EXCEL_SUFFIXES", "read_excel_file"]

#: File endings read as Excel workbooks.
EXCEL_SUFFIXES = (".xlsx", ".xlsm")

#: The fix when the Excel reader is missing.
INSTALL = 'pip install "bayesgrowth[excel]"'


def _text(cell: object) -> str:
    """One cell as text, the way a CSV export would write it."""
    if cell is None or (isinstance(cell, float) and math.isnan(cell)):
        return ""
    if isinstance(cell, bool):
        return str(cell)
    if isinstance(cell, float) and cell.is_integer() and abs(cell) < 1e15:
        return str(int(cell))
    if isinstance(cell, (dt.datetime, pd.Timestamp)):
        return cell.date().isoformat() if cell.time() == dt.time() else cell.isoformat()
    if isinstance(cell, dt.date):
        return cell.isoformat()
    return str(cell)


def read_excel_file(path: Path) -> pd.DataFrame:
    """The cells of a workbook's first sheet, header in row 1, all as text.

    Parameters
    ----------
    path : pathlib.Path

    Returns
    -------
    pandas.DataFrame
        One column per header name (stripped), every cell a ``str``.

    Raises
    ------
    InputError
        One line naming the file and the fix: the Excel reader is not installed,
        the file is not a workbook, or the sheet is empty.
    """
    try:
        import openpyxl  # noqa: F401 - only to tell a missing reader apart
    except ImportError:
        raise InputError(
            f"{path.name}: reading Excel files needs the optional Excel reader; install it "
            f"with {INSTALL}, or save the sheet as CSV"
        ) from None
    try:
        frame = pd.read_excel(path, sheet_name=0, header=None, dtype=object,
                              engine="openpyxl")
    except (zipfile.BadZipFile, ValueError, KeyError, OSError) as exc:
        detail = getattr(exc, "strerror", None) or "not an .xlsx workbook"
        raise InputError(
            f"{path.name}: cannot be read as an Excel workbook ({detail}); open it in a "
            "spreadsheet and save it again as .xlsx or as CSV"
        ) from None
    if frame.empty:
        raise InputError(f"{path.name}: the first sheet is empty")
    cells = frame.map(_text)
    header = [c.strip() for c in cells.iloc[0].tolist()]
    check_header(header, path.name)
    body = cells.iloc[1:].reset_index(drop=True)
    body.columns = header
    body.attrs["title_line"] = title_line(cells.iloc[:3].values.tolist())
    return body
