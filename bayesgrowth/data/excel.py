"""Reading one sheet of an Excel workbook (``.xlsx``) into text cells.

The first sheet unless another is named; when the workbook has several and none is
named, the reader says which one it read.

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

from bayesgrowth.data.formats import check_header, drop_trailing_blank_rows, title_line
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


def _sheet_name(names: list[str], sheet: str | None, path: Path) -> str:
    """The sheet to read: the one named, by default the first.

    A name matches exactly, else the one sheet alike but for case and surrounding spaces.
    """
    if sheet is None:
        return names[0]
    if sheet in names:
        return sheet
    alike = [n for n in names if n.strip().casefold() == sheet.strip().casefold()]
    if len(alike) == 1:
        return alike[0]
    listed = ", ".join(repr(n) for n in names)
    raise InputError(f"--sheet {sheet!r}: {path.name} has no sheet of that name; its sheets "
                     f"are {listed}")


def _read_cells(path: Path, sheet: str | None) -> tuple[pd.DataFrame, str, list[str]]:
    """The raw cells of the sheet to read, its name and the names of every sheet."""
    try:
        with pd.ExcelFile(path, engine="openpyxl") as book:
            names = [str(n) for n in book.sheet_names]
            name = _sheet_name(names, sheet, path)
            frame = pd.read_excel(book, sheet_name=name, header=None, dtype=object)
    except (zipfile.BadZipFile, ValueError, KeyError, OSError) as exc:
        if isinstance(exc, InputError):
            raise
        detail = getattr(exc, "strerror", None) or "not an .xlsx workbook"
        raise InputError(
            f"{path.name}: cannot be read as an Excel workbook ({detail}); open it in a "
            "spreadsheet and save it again as .xlsx or as CSV"
        ) from None
    return frame, name, names


def read_excel_file(path: Path, sheet: str | None = None) -> pd.DataFrame:
    """The cells of one sheet of a workbook, header in row 1, all as text.

    Parameters
    ----------
    path : pathlib.Path
    sheet : str, optional
        The sheet's name (case and surrounding spaces aside); by default the first.

    Returns
    -------
    pandas.DataFrame
        One column per header name (stripped), every cell a ``str``; blank rows at the
        end are left out. ``attrs["sheet"]``
        is the sheet read; ``attrs["notes"]`` names it when the workbook has several
        and none was named.

    Raises
    ------
    InputError
        One line naming the file and the fix: the Excel reader is not installed,
        the file is not a workbook, it has no sheet of the name given (its sheets
        are listed), or the sheet is empty.
    """
    try:
        import openpyxl  # noqa: F401 - only to tell a missing reader apart
    except ImportError:
        raise InputError(
            f"{path.name}: reading Excel files needs the optional Excel reader; install it "
            f"with {INSTALL}, or save the sheet as CSV"
        ) from None
    frame, name, names = _read_cells(path, sheet)
    if frame.empty:
        raise InputError(f"{path.name}: the sheet {name!r} is empty" + (
            "; name the sheet that holds the series with --sheet" if len(names) > 1 else ""))
    cells = frame.map(_text)
    header = [c.strip() for c in cells.iloc[0].tolist()]
    check_header(header, path.name)
    body = drop_trailing_blank_rows(cells.iloc[1:].reset_index(drop=True))
    body.columns = header
    body.attrs["title_line"] = title_line(cells.iloc[:3].values.tolist())
    body.attrs["sheet"] = name
    body.attrs["sheets"] = names
    if sheet is None and len(names) > 1:
        listed = ", ".join(repr(n) for n in names)
        body.attrs["notes"] = [f"{path.name}: read the sheet {name!r}, the first of "
                               f"{len(names)} ({listed}); name another with --sheet"]
    return body
