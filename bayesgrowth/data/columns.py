"""Find a table's period, value and series columns, or say which is missing and how to name it."""

from __future__ import annotations

import pandas as pd

from bayesgrowth.data.series import InputError

__all__ = ["require_columns"]


def require_columns(frame: pd.DataFrame, source: str, columns) -> pd.DataFrame:
    """Refuse a table without one of ``columns`` (pairs of name and the option that sets it).

    A column named alike but for case and surrounding spaces (``Period`` for
    ``period``), when only one is, is taken for it. A file that seems to start with a
    title line above the header (``attrs["title_line"]``,
    :func:`bayesgrowth.data.formats.title_line`) is told to delete that line instead;
    a workbook of several sheets (``attrs["sheets"]``) is told which sheet was read
    and that ``--sheet`` names another.

    Returns
    -------
    pandas.DataFrame
        ``frame`` with such columns renamed to the names asked for (a new table;
        ``frame`` itself is left as it is).
    """
    from bayesgrowth.data.formats import title_message

    title = frame.attrs.get("title_line")
    columns = list(columns)
    if title and title["title"] in {col for col, _ in columns}:
        title = None  # a header naming one column only, not a title
    for col, option in columns:
        alike = [c for c in frame.columns if str(c).strip().casefold() == col.casefold()]
        if col not in frame.columns and len(alike) == 1:  # 'Period' for period
            frame = frame.rename(columns={alike[0]: col})
        elif col not in frame.columns:
            if title and (col in title["header"] or title["fits"]):
                raise InputError(title_message(source, title))
            have = ", ".join(repr(str(c)) for c in frame.columns)
            sheets = frame.attrs.get("sheets", [])
            where = f" in the sheet {frame.attrs['sheet']!r}" if len(sheets) > 1 else ""
            other = (f", or another of its {len(sheets)} sheets ("
                     + ", ".join(repr(n) for n in sheets) + ") with --sheet"
                     if len(sheets) > 1 else "")
            raise InputError(
                f"{source}: no column {col!r}{where} (columns are {have}); name the right one "
                f"with {option}{other}"
            )
    return frame
