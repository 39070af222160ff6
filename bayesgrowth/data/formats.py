"""Separators and number formats as spreadsheets and finance systems export them.

Separator
    Told from the header line: the one of comma, semicolon and tab that appears
    there (outside double quotes). A header holding more than one of them is read
    with the one that splits the next rows into as many cells as the header; if
    that does not single one out, the file is refused.

Numbers in the value column
    Decimal point or decimal comma (``1234.5``, ``1234,5``); thousands grouped by
    comma, point, space, no-break space or apostrophe (``1,234.5``, ``1.234,5``,
    ``1 234,5``, ``1'234.5``); a currency sign or three-letter code before or after
    the number (``$1,200``, ``€ 1.200,50``, ``1200 USD``). One column uses one
    decimal mark and one currency. With ``decimal="auto"`` the mark is told from
    the column's cells; when every cell could be read either way (``1,234``, and
    ``1.234`` in a semicolon-separated file, where the decimal comma is usual) the
    column is refused and ``--decimal`` states the mark. Percent signs are refused:
    the values must be amounts, not rates.
"""

from __future__ import annotations

import csv
import io
import math
import re
from collections.abc import Sequence

import pandas as pd

from bayesgrowth.data.series import InputError

__all__ = ["DECIMAL_CHOICES", "amount", "check_header", "decimal_mark", "detect_separator",
           "drop_trailing_blank_rows", "title_line", "title_message", "title_rows"]

#: Values of ``--decimal``: tell the mark from the column, or state it.
DECIMAL_CHOICES = ("auto", ".", ",")

_SEPARATORS = {",": "comma", ";": "semicolon", "\t": "tab"}
_NAMES = {",": "comma", ".": "point"}

#: A plain number as the rest of the tool reads it: ASCII digits, sign, point, exponent.
_PLAIN = re.compile(r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?", re.ASCII)

_SYMBOLS = "$€£¥₹₩₽₺₪₫₱₦₴฿"
_CURRENCY = rf"(?:[A-Z]{{1,3}}\$|[A-Z]{{3}}|[{_SYMBOLS}])"
_CELL = re.compile(
    rf"(?P<s1>[+-]?)\s*(?P<pre>{_CURRENCY})?\s*(?P<s2>[+-]?)\s*(?P<num>[^\s{_SYMBOLS}]"
    rf"(?:.*?[^\s{_SYMBOLS}])?)\s*(?P<post>{_CURRENCY})?"
)
_NOT_CURRENCY = {"INF", "NAN"}
#: Signs that name one currency only, as their ISO 4217 code.
_SAME = {"€": "EUR", "£": "GBP", "₹": "INR", "₩": "KRW", "₽": "RUB", "₺": "TRY", "₪": "ILS"}
_SPACES = " \u00a0\u202f"
_APOSTROPHES = "'\u2019"
_GROUPS = _SPACES + _APOSTROPHES
#: One to three digits, a mark, exactly three digits: all a grouped thousand can look like.
_THOUSAND = re.compile(r"[+-]?\d{1,3}[.,]\d{3}", re.ASCII)


def _count_outside_quotes(line: str) -> dict[str, int]:
    counts = dict.fromkeys(_SEPARATORS, 0)
    quoted = False
    for ch in line:
        if ch == '"':
            quoted = not quoted
        elif not quoted and ch in counts:
            counts[ch] += 1
    return counts


def detect_separator(text: str, source: str) -> str:
    """The column separator of a file, told from its header line.

    Parameters
    ----------
    text : str
        The start of the file (the header line and a few rows).
    source : str
        The file's name, for the message.

    Returns
    -------
    str
        a comma, a semicolon or a tab; a comma when the header has none of them
        (a single column).

    Raises
    ------
    InputError
        When the header holds several separators and the rows do not tell which
        one splits the columns.
    """
    lines = text.splitlines()
    header = lines[0] if lines else ""
    counts = _count_outside_quotes(header)
    found = [sep for sep, n in counts.items() if n]
    if len(found) <= 1:
        return found[0] if found else ","
    rows = [line for line in lines[1:21] if line.strip()]
    fits = []
    for sep in found:
        widths = {len(r) for r in csv.reader(io.StringIO("\n".join([header, *rows])),
                                             delimiter=sep)}
        if len(widths) == 1 and rows:
            fits.append(sep)
    if len(fits) == 1:
        return fits[0]
    both = " and ".join(_SEPARATORS[s] for s in found)
    raise InputError(
        f"{source}, row 1: the header holds both {both} signs, so the separator between "
        "columns cannot be told; save the file with one separator (comma, semicolon or "
        "tab) and no such sign inside a column name"
    )


def _strip_currency(text: str) -> tuple[str, str, bool] | None:
    """``(number, currency, negative)`` of a cell, or ``None`` if it is not that shape."""
    m = _CELL.fullmatch(text)
    if m is None:
        return None
    pre, post = m.group("pre") or "", m.group("post") or ""
    if pre in _NOT_CURRENCY or post in _NOT_CURRENCY or (pre and post and pre != post):
        return None
    if m.group("s1") and m.group("s2"):
        return None
    negative = "-" in (m.group("s1") + m.group("s2"))
    return m.group("num"), pre or post, negative


def _hint(num: str) -> str | None:
    """What a number's marks say of the decimal mark: ``"."``, ``","``, ``"?"`` or ``None``.

    ``"?"`` is a lone comma before exactly three digits after one to three
    digits (``1,234``): thousands or decimals, it cannot be told. ``"?."`` is the
    same with a point. Anything else after the mark (``11.82``, ``1.234%``) cannot
    be a grouped thousand, so the mark is a decimal mark.
    """
    commas, points = num.count(","), num.count(".")
    grouped = any(ch in num for ch in _GROUPS)
    if commas and points:
        return "," if num.rfind(",") > num.rfind(".") else "."
    if not commas and not points:
        return None
    mark, count = ("," if commas else "."), commas or points
    other = "." if mark == "," else ","
    if count > 1:
        return other
    if grouped or not _THOUSAND.fullmatch(num):
        return mark
    return "?" if mark == "," else "?."


def decimal_mark(texts: Sequence[str], wheres: Sequence[str], decimal: str = "auto",
                 separator: str = ",") -> str:
    """The decimal mark of one value column.

    Parameters
    ----------
    texts : sequence of str
        The column's cells (blank ones are skipped).
    wheres : sequence of str
        For each cell, where it is (file, row, column), for the messages.
    decimal : {"auto", ".", ","}
        ``"auto"`` tells the mark from the cells; otherwise it is returned.
    separator : str
        The file's column separator. In a semicolon-separated file, where the
        decimal comma is usual, a lone point before three digits (``1.234``) is
        as ambiguous as a lone comma.

    Raises
    ------
    InputError
        When cells write the mark both ways, or every cell could be read either way.
    """
    if decimal != "auto":
        return decimal
    seen: dict[str, tuple[int, str, str]] = {}
    for i, (text, where) in enumerate(zip(texts, wheres, strict=True)):
        cell = _strip_currency(str(text).strip())
        if cell is None or (_PLAIN.fullmatch(cell[0]) and separator != ";"):
            continue
        if cell[0].endswith("%"):
            continue  # refused as a percentage by amount(), whatever the mark
        hint = _hint(cell[0])
        if hint is not None:
            seen.setdefault(hint, (i, str(text).strip(), where))
    if "." in seen and "," in seen:
        (_, t1, w1), (_, t2, w2) = sorted((seen["."], seen[","]))
        raise InputError(
            f"{w2}: {t2!r} writes the decimal mark the other way from {t1!r} ({w1}); "
            "write every value with one decimal mark, or state it with --decimal . or "
            "--decimal ,"
        )
    for mark in (".", ","):
        if mark in seen:
            return mark
    for hint in ("?", "?."):
        if hint in seen:
            _, text, where = seen[hint]
            return _ambiguous(text, where, "," if hint == "?" else ".")
    return "."


def _ambiguous(text: str, where: str, mark: str) -> str:
    whole, frac = text.replace(mark, ""), text.replace(",", ".")
    if mark == ".":
        raise InputError(
            f"{where}: {text!r} could be {frac} or {whole} (a semicolon-separated file often "
            f"groups thousands with a point); state the decimal mark with --decimal . (reads "
            f"it as {frac}) or --decimal , (reads it as {whole})"
        )
    raise InputError(
        f"{where}: {text!r} could be {whole} or {frac}; state the decimal mark with "
        f"--decimal . (reads it as {whole}) or --decimal , (reads it as {frac})"
    )


def _grouped(num: str, mark: str) -> str | None:
    """``num`` with its thousands groups removed and a decimal point, or ``None``."""
    group_chars = _GROUPS + ("." if mark == "," else ",")
    pattern = (rf"(?P<int>\d{{1,3}}(?:(?P<g>[{re.escape(group_chars)}])\d{{3}})"
               rf"(?:(?P=g)\d{{3}})*|\d+)(?:{re.escape(mark)}(?P<frac>\d*))?")
    m = re.fullmatch(pattern, num, flags=re.ASCII)
    if m is None or (m.group("int") is None):
        return None
    integer = re.sub(r"\D", "", m.group("int"))
    frac = m.group("frac")
    return f"{integer}.{frac}" if frac else integer


def _refuse(text: str, where: str, mark: str) -> None:
    if text.rstrip().endswith("%"):
        raise InputError(
            f"{where}: {text!r} is a percentage; values must be amounts (revenue, units, "
            "customers), not rates or shares: give the column of amounts the rate is "
            "taken from"
        )
    try:
        value = float(text)
    except ValueError:
        value = 0.0
    if not math.isfinite(value):
        raise InputError(f"{where}: {text!r} is not a finite number")
    example = "1100 or 1100.5" if mark == "." else "1100 or 1100,5"
    word = "a decimal point" if mark == "." else "a decimal comma"
    other = "," if mark == "." else "."
    cell = _strip_currency(text)
    reads = None if cell is None else _grouped(cell[0], other)
    if reads is not None:  # the file's decimal mark is the other one
        raise InputError(
            f"{where}: {text!r} is not a number with {word}; if the file writes "
            f"{'decimal commas' if other == ',' else 'decimal points'}, say so with "
            f"--decimal {other} (it then reads as {reads})"
        )
    raise InputError(
        f"{where}: {text!r} is not a number; write it with the digits 0-9, an optional sign "
        f"and {word} (like {example})"
    )


def amount(text: str, mark: str, where: str, currencies: dict[str, str] | None = None) -> float:
    """The number in one value cell.

    Parameters
    ----------
    text : str
        The cell, stripped, not blank.
    mark : {".", ","}
        The column's decimal mark (see :func:`decimal_mark`).
    where : str
        File, row and column of the cell, for the message.
    currencies : dict, optional
        Currency seen so far in the column, mapped to where; filled in here, and a
        second currency is refused.

    Raises
    ------
    InputError
        Naming ``where`` and the fix: a percentage, a second currency, an amount
        that is not a number in the column's format, or a non-finite number.
    """
    if mark == "." and _PLAIN.fullmatch(text):
        return float(text)
    cell = _strip_currency(text)
    number = None if cell is None else _grouped(cell[0], mark)
    if number is None:
        _refuse(text, where, mark)
    num, currency, negative = cell
    currency = _SAME.get(currency, currency)
    if currency and currencies is not None:
        currencies.setdefault(currency, where)
        other = next((c for c in currencies if c != currency), None)
        if other is not None:
            raise InputError(
                f"{where}: {text!r} is in {currency}, the value at {currencies[other]} in "
                f"{other}; "
                "convert the values to one currency"
            )
    value = float(number)
    return -value if negative else value


def check_header(names: Sequence[str], source: str) -> None:
    """Refuse a header that names a column twice (a reader would rename the second one).

    Examples
    --------
    >>> check_header(["period", "value", "period"], "sales.csv")
    Traceback (most recent call last):
    ...
    bayesgrowth.data.series.InputError: sales.csv, row 1: column 'period' appears twice in the \
header (columns 1 and 3); rename or delete one of them
    """
    seen: dict[str, int] = {}
    for i, name in enumerate(names, start=1):
        if name and name in seen:
            raise InputError(
                f"{source}, row 1: column {name!r} appears twice in the header (columns "
                f"{seen[name]} and {i}); rename or delete one of them"
            )
        seen.setdefault(name, i)


def drop_trailing_blank_rows(frame: pd.DataFrame) -> pd.DataFrame:
    """``frame`` without the rows at its end whose every cell is blank.

    Spreadsheets export rows that were once formatted or typed in as ``,,``; at the end
    of a file they hold nothing to read. Blank rows between values are kept, so that
    the value missing there is named by its row; rows keep their numbers.
    """
    blank = frame.apply(lambda col: col.str.strip() == "").all(axis=1).to_numpy()
    n = len(blank)
    while n and blank[n - 1]:
        n -= 1
    return frame if n == len(blank) else frame.iloc[:n]


def title_rows(text: str) -> list[list[str]]:
    """The first non-blank lines of a CSV file as cells, for :func:`title_line`.

    The separator is told from the lines after the first, since a title line
    holds none. Empty when those lines do not tell it.
    """
    lines = [line for line in text.splitlines()[:40] if line.strip()][:21]
    if len(lines) < 2:
        return []
    try:
        sep = detect_separator("\n".join(lines[1:]), "")
    except InputError:
        return []
    return list(csv.reader(io.StringIO("\n".join(lines)), delimiter=sep))


def title_line(rows: Sequence[Sequence[str]]) -> dict | None:
    """A title line above the header, as spreadsheets put one, or ``None``.

    The first row must hold one non-empty cell and the second at least two; the
    second row is then likely the header. ``fits`` also asks that no cell of the
    second row is a plain number, as no column name is and many data cells are.

    Parameters
    ----------
    rows : sequence of sequences of str
        The first rows of the file, as cells.

    Returns
    -------
    dict or None
        ``title`` (the first row's cell), ``header`` (the second row's cells,
        stripped, empty ones left out) and ``fits`` (whether the next row has as
        many non-empty cells as the second, as data rows under a header do).

    Examples
    --------
    >>> title_line([["Sales (EUR k)", ""], ["period", "value"], ["2024Q1", "10"]])
    {'title': 'Sales (EUR k)', 'header': ['period', 'value'], 'fits': True}
    >>> title_line([["period", "value"], ["2024Q1", "10"]]) is None
    True
    """
    filled = [[str(c).strip() for c in row if str(c).strip()] for row in rows[:3]]
    if len(filled) < 2 or len(filled[0]) != 1 or len(filled[1]) < 2:
        return None
    fits = (len(filled) == 3 and len(filled[2]) == len(filled[1])
            and not any(_PLAIN.fullmatch(c) for c in filled[1]))
    return {"title": filled[0][0], "header": filled[1], "fits": fits}


def title_message(source: str, title: dict) -> str:
    """The one-line message for a file that starts with ``title`` (from :func:`title_line`)."""
    return (f"{source}, row 1: the file seems to start with a title line ({title['title']!r}) "
            f"above the header ({', '.join(title['header'])}); delete that line so the header "
            "is row 1")
