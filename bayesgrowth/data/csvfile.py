"""Reading an input CSV file into text cells, with every problem of the file in one plain line.

Rows are counted as a spreadsheet shows them: the header is row 1.
"""

from __future__ import annotations

import re
from pathlib import Path

import pandas as pd

from bayesgrowth.data.excel import EXCEL_SUFFIXES, read_excel_file
from bayesgrowth.data.formats import (
    check_header,
    detect_separator,
    drop_trailing_blank_rows,
    title_line,
    title_message,
    title_rows,
)
from bayesgrowth.data.series import InputError

__all__ = ["read_csv_file", "separator_of"]

_FIELDS = re.compile(r"Expected (\d+) fields in line (\d+), saw (\d+)")
_OPEN_QUOTE = re.compile(r"EOF inside string starting at row (\d+)")


def _parser_problem(source: str, exc: Exception) -> str:
    """The pandas tokenizer's complaint in the user's terms."""
    text = str(exc)
    m = _FIELDS.search(text)
    if m:
        want, line, saw = (int(g) for g in m.groups())
        return (f"{source}, row {line}: {saw} cells, but the header has {want}; delete the "
                "extra cells, or put a value that holds a comma in double quotes")
    m = _OPEN_QUOTE.search(text)
    if m:
        return (f"{source}, row {int(m.group(1)) + 1}: a double quote opens a cell that is "
                "never closed; close it or delete it")
    return f"{source}: not a readable CSV file ({text.strip()}); save it again as CSV"


def _check_header(path: Path, source: str, sep: str = ",") -> None:
    """Refuse a header that names a column twice (pandas would rename the second one)."""
    head = pd.read_csv(path, header=None, nrows=1, dtype=str, keep_default_na=False,
                       skipinitialspace=True, sep=sep)
    check_header([str(c).strip() for c in head.iloc[0].tolist()], source)


def separator_of(path: str | Path) -> str:
    """The column separator of a CSV file (comma, semicolon or tab), told from its header.

    Raises
    ------
    InputError
        When the header does not tell (see :func:`bayesgrowth.data.formats.detect_separator`).
    """
    path = Path(path)
    return detect_separator(_head(path), path.name)


def _head(path: Path) -> str:
    """The start of a file as text (enough for the header and the first rows)."""
    with open(path, encoding="utf-8-sig", newline="") as handle:
        return handle.read(64 * 1024)


def read_csv_file(path: str | Path, sheet: str | None = None) -> pd.DataFrame:
    """The cells of a CSV file with a header row, all as text, column names stripped.

    The separator (comma, semicolon or tab) is told from the header line; an
    ``.xlsx`` workbook is read from the sheet named, by default its first (with the
    optional Excel reader; :func:`bayesgrowth.data.excel.read_excel_file`).

    Parameters
    ----------
    path : str or pathlib.Path
    sheet : str, optional
        The sheet of a workbook to read; refused for a CSV file, which has none.

    Returns
    -------
    pandas.DataFrame
        One column per header name, every cell a ``str`` (empty cells are ``""``);
        blank rows at the end are left out.
        ``attrs["separator"]`` is the separator; ``attrs["title_line"]`` says
        whether the first line looks like a title above the header (see
        :func:`bayesgrowth.data.formats.title_line`), for the message when a
        column is missing.

    Raises
    ------
    InputError
        With one line naming the file (and the row, where there is one) and the fix:
        missing, a folder, not readable, not UTF-8 text, empty, ragged rows, an open
        quote, or a column named twice in the header; ragged rows under a line
        that looks like a title above the header are refused as that title line; a
        sheet named for a CSV file.
    """
    path = Path(path)
    source = path.name
    if not path.exists():
        raise InputError(f"{path}: no such file")
    if path.is_dir():
        raise InputError(f"{path}: is a folder, not a CSV file")
    if path.suffix.lower() in EXCEL_SUFFIXES:
        return read_excel_file(path, sheet)
    if path.suffix.lower() == ".xls":
        raise InputError(f"{source}: an old-style Excel file (.xls); open it in a spreadsheet "
                         "and save it as .xlsx or as CSV")
    if sheet is not None:
        raise InputError(f"--sheet {sheet!r}: {source} is not an .xlsx workbook and has no "
                         "sheets; leave --sheet out")
    try:
        head = _head(path)
        sep = detect_separator(head, source)
        frame = pd.read_csv(path, dtype=str, keep_default_na=False, skipinitialspace=True,
                            sep=sep)
        _check_header(path, source, sep)
    except UnicodeDecodeError:
        raise InputError(
            f"{source}: not a text CSV file (could not decode it as UTF-8); save it as CSV "
            "UTF-8"
        ) from None
    except pd.errors.EmptyDataError:
        raise InputError(f"{source}: the file is empty") from None
    except pd.errors.ParserError as exc:
        title = title_line(title_rows(head))
        if title and title["fits"]:
            raise InputError(title_message(source, title)) from None
        raise InputError(_parser_problem(source, exc)) from None
    except OSError as exc:
        raise InputError(
            f"{path}: cannot be read ({exc.strerror or type(exc).__name__}); check that "
            "you may read it"
        ) from None
    frame.columns = [str(c).strip() for c in frame.columns]
    frame = drop_trailing_blank_rows(frame)
    frame.attrs["separator"] = sep
    frame.attrs["title_line"] = title_line(title_rows(head))
    return frame
