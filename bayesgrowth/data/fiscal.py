"""Fiscal and free-form period labels, read onto the calendar and written back in their style.

Labels read here (case-insensitive; all labels of a series in one style):

========================  ======================================================
``Q1 2024``, ``Q1-2024``  calendar quarter, quarter first
``FY24 Q1``, ``FY2024-Q1``, ``Q1 FY24``
                          fiscal quarter; needs the fiscal-year start month
``Jan 2024``, ``January 2024``, ``Jan-2024``
                          month by its English name
``01/2024``, ``1/2024``, ``01.2024``, ``01-2024``
                          month number first
========================  ======================================================

Fiscal years are named by the calendar year they end in: with the fiscal year
starting in April (``fiscal_start=4``) FY24 runs from April 2023 to March 2024, so
FY24 Q1 is April-June 2023; with ``fiscal_start=1`` FY24 is the calendar year 2024.
A two-digit fiscal year ``YY`` is the year ``20YY``.

Forecast periods are labelled in the input's own style (``FY25 Q2``, ``Feb 2025``).
Styles the period calendar reads itself (``2024Q1``, ``2024 Q1``, ``2024-01``,
``2024/01``) are not handled here; they come out in its canonical style
(``2024Q1``, ``2024-01``).
"""

from __future__ import annotations

import re
from dataclasses import dataclass

from bayesgrowth.data.periods import PeriodAxis, PeriodError, style_of

__all__ = ["StyledAxis", "month_number", "read_labels", "restyle"]

_MONTHS = ("january", "february", "march", "april", "may", "june", "july", "august",
           "september", "october", "november", "december")

_YEAR = r"(?P<y>\d{4})"
_FY = r"FY\s*'?(?P<y>\d{4}|\d{2})"
_SEP = r"\s*[-/ ]?\s*"
#: (kind, pattern) in the order they are tried.
_PATTERNS = (
    ("quarter", re.compile(rf"\s*Q(?P<q>[1-4]){_SEP}{_YEAR}\s*", re.I | re.ASCII)),
    ("fiscal", re.compile(rf"\s*{_FY}{_SEP}Q(?P<q>[1-4])\s*", re.I | re.ASCII)),
    ("fiscal", re.compile(rf"\s*Q(?P<q>[1-4]){_SEP}{_FY}\s*", re.I | re.ASCII)),
    ("month-name", re.compile(rf"\s*(?P<m>[A-Z]{{3,9}})\.?\s*[-/ ]?\s*{_YEAR}\s*",
                              re.I | re.ASCII)),
    ("month-number", re.compile(rf"\s*(?P<m>\d{{1,2}})[-/.]{_YEAR}\s*", re.ASCII)),
)


def _month_of_name(word: str) -> int | None:
    word = word.lower()
    for i, full in enumerate(_MONTHS, start=1):
        if word == full or word == full[:3] or (word == "sept" and i == 9):
            return i
    return None


def month_number(text: str) -> int | None:
    """A month given as 1-12 or by its English name (``4``, ``apr``, ``April``), else ``None``."""
    text = text.strip()
    if text.isascii() and text.isdigit():
        return int(text) if 1 <= int(text) <= 12 else None
    return _month_of_name(text)


@dataclass(frozen=True)
class StyledAxis(PeriodAxis):
    """A period calendar that writes its labels in the input's own style.

    Parameters
    ----------
    template : str
        The first input label with its year, quarter or month replaced by
        ``{y}``, ``{q}``, ``{m}`` placeholders.
    kind : str
        ``"quarter"``, ``"fiscal"``, ``"month-name"`` or ``"month-number"``.
    fiscal_start : int
        Month (1-12) the fiscal year starts in; fiscal quarters only.
    year_digits : int
        2 or 4: how the input writes the year.
    month_form : str
        Month names: ``"abbr"`` or ``"full"`` and the case (``"title"``, ``"upper"``,
        ``"lower"``), joined by a space; month numbers: ``"pad"`` or ``"nopad"``.
    """

    template: str = "{y}"
    kind: str = "quarter"
    fiscal_start: int = 1
    year_digits: int = 4
    month_form: str = "abbr title"

    def label(self, t: int) -> str:
        """The label of the period with time index ``t``, in the input's style."""
        super().label(t)  # refuses periods after the last year
        ordinal = self.origin + t * self.step
        if self.kind == "quarter":
            return self.template.format(y=ordinal // 4, q=ordinal % 4 + 1)
        if self.kind == "fiscal":
            first_month = ordinal * 3 + (self.fiscal_start - 1) % 3
            months_in = first_month - (self.fiscal_start - 1)
            year = months_in // 12 + (1 if self.fiscal_start > 1 else 0)
            shown = f"{year % 100:02d}" if self.year_digits == 2 else str(year)
            return self.template.format(y=shown, q=(months_in % 12) // 3 + 1)
        year, month = divmod(ordinal, 12)
        return self.template.format(y=year, m=self._month(month + 1))

    def _month(self, month: int) -> str:
        if self.kind == "month-number":
            return f"{month:02d}" if self.month_form == "pad" else str(month)
        length, case = self.month_form.split()
        name = _MONTHS[month - 1] if length == "full" else _MONTHS[month - 1][:3]
        return {"title": name.title(), "upper": name.upper()}.get(case, name)


def _canonical(kind: str, m: re.Match, fiscal_start: int | None) -> str | None:
    """The label in a style :func:`~bayesgrowth.data.periods.parse_periods` reads."""
    if kind == "quarter":
        return f"{m.group('y')}Q{m.group('q')}"
    if kind == "fiscal":
        year = int(m.group("y")) + (2000 if len(m.group("y")) == 2 else 0)
        start = year * 12 + (fiscal_start - 1) - (12 if fiscal_start > 1 else 0)
        first_month = start + 3 * (int(m.group("q")) - 1)
        quarter = first_month // 3
        return f"{quarter // 4}Q{quarter % 4 + 1}"
    month = _month_of_name(m.group("m")) if kind == "month-name" else int(m.group("m"))
    if month is None or not 1 <= month <= 12:
        return None
    return f"{m.group('y')}-{month:02d}"


def _template(kind: str, label: str, m: re.Match) -> str:
    parts, last = [], 0
    for group in ("y", "q", "m"):
        if group in m.re.groupindex and m.start(group) >= 0:
            parts.append((m.start(group), m.end(group), group))
    out = ""
    for start, end, group in sorted(parts):
        out += label[last:start].replace("{", "{{").replace("}", "}}") + "{" + group + "}"
        last = end
    return out + label[last:].replace("{", "{{").replace("}", "}}")


def _month_form(kind: str, word: str) -> str:
    if kind == "month-number":
        return "pad" if len(word) == 2 else "nopad"
    length = "full" if len(word) > 3 and word.lower() in _MONTHS else "abbr"
    case = "upper" if word.isupper() else "lower" if word.islower() else "title"
    return f"{length} {case}"


def _match(label: str) -> tuple[str, re.Match] | None:
    for kind, pattern in _PATTERNS:
        m = pattern.fullmatch(label)
        if m and (kind != "month-name" or _month_of_name(m.group("m")) is not None):
            return kind, m
    return None


def _check_calendar_styles(labels: list[str]) -> None:
    """Refuse a label written in a style read here after a first label the calendar reads.

    The labels are walked in order up to the first one the calendar does not read
    itself: if that one is in a style read here (``Q4 2024`` after ``2024Q1``), it
    is refused as written unlike the first; anything else is left to the calendar.
    """
    if not labels or style_of(labels[0]) is None:
        return
    for i, label in enumerate(labels):
        if style_of(label) is not None:
            continue
        if _match(label) is not None:
            raise PeriodError(
                i,
                f"period {label!r} is not written like the first period {labels[0]!r}; "
                "write every period of a series the same way",
            )
        return


def read_labels(labels: list[str], fiscal_start: int | None = None) -> tuple[list[str], dict]:
    """Free-form labels in the calendar's canonical style, and how to write them back.

    Parameters
    ----------
    labels : list of str
        Period labels as written in the input.
    fiscal_start : int, optional
        Month (1-12) the fiscal year starts in; needed for fiscal labels (``FY24 Q1``).

    Returns
    -------
    canonical : list of str
        The labels unchanged when the first one is not a free-form style read
        here, else each in the canonical style (``2024Q1``, ``2024-01``).
    style : dict
        Keyword arguments of :class:`StyledAxis` beyond the calendar's own
        (empty when the labels are unchanged); see :func:`restyle`.

    Raises
    ------
    PeriodError
        A label in another style than the first (either way round: ``Q4 2024``
        after ``2024Q1``, or ``2024Q4`` after ``Q1 2024``), a month that does not exist,
        or fiscal labels without ``fiscal_start``.
    """
    found = _match(labels[0]) if labels else None
    if found is None:
        _check_calendar_styles(labels)
        return labels, {}
    kind, first = found
    if kind == "fiscal" and fiscal_start is None:
        raise PeriodError(
            0,
            f"period {labels[0]!r} is a fiscal quarter; state the month the fiscal year starts "
            "in with --fiscal-start (e.g. --fiscal-start 4 for April; FY24 is the year ending "
            "in 2024), or --fiscal-start 1 if it is the calendar year",
        )
    out = []
    for i, label in enumerate(labels):
        found = _match(label)
        canonical = None
        if found is not None and found[0] == kind:
            canonical = _canonical(kind, found[1], fiscal_start)
        if canonical is None:
            raise PeriodError(
                i,
                f"period {label!r} is not written like the first period {labels[0]!r}; "
                "write every period of a series the same way",
            )
        out.append(canonical)
    style = {"template": _template(kind, labels[0].strip(), first), "kind": kind,
             "fiscal_start": fiscal_start or 1, "year_digits": len(first.group("y"))}
    if kind.startswith("month"):
        style["month_form"] = _month_form(kind, first.group("m"))
    return out, style


def restyle(axis: PeriodAxis, style: dict) -> PeriodAxis:
    """``axis`` writing its labels in ``style`` (from :func:`read_labels`); unchanged if none."""
    if not style:
        return axis
    return StyledAxis(style=axis.style, step=axis.step, origin=axis.origin,
                      month_end=axis.month_end, day=axis.day, compact=axis.compact, **style)
