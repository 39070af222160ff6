"""How numbers and probabilities are written for people: in the CLI, the report and the charts.

One helper per kind of number, so that a value prints the same way wherever it
appears: :func:`fmt_number` for values (significant figures with thousands
separators), :func:`fmt_interval` for intervals (rounded outward),
:func:`fmt_probability` for probabilities ("> 99%" rather than a rounded 100%)
and :func:`fmt_percent` for growth rates. It imports nothing of the package, so
every layer that writes for people can use it.
"""

from __future__ import annotations

import html
import math
import numbers
from collections.abc import Sequence
from decimal import ROUND_CEILING, ROUND_FLOOR, ROUND_HALF_UP, Decimal

__all__ = ["MISSING", "SIGNIFICANT", "fmt_interval", "fmt_number", "fmt_percent",
           "fmt_probability", "fmt_weight", "html_summary", "observations", "text_summary"]

#: Most table rows an HTML summary shows; longer tables show their first and last rows.
HTML_ROWS = 12

#: Significant figures of every value printed for people.
SIGNIFICANT = 3

#: Written for a value that is missing or not finite.
MISSING = "–"

def _missing(v) -> bool:
    if v is None:
        return True
    try:
        return not math.isfinite(float(v))
    except (TypeError, ValueError):
        return True


_ROUNDING = {"nearest": ROUND_HALF_UP, "down": ROUND_FLOOR, "up": ROUND_CEILING}


def _round_sig(v: float, sig: int, direction: str = "nearest") -> Decimal:
    """``v`` rounded to ``sig`` significant figures of its shortest decimal form."""
    d = Decimal(repr(float(v)))
    if d == 0:
        return Decimal(0)
    quantum = Decimal(1).scaleb(d.adjusted() - sig + 1)
    return d.quantize(quantum, rounding=_ROUNDING[direction])


#: From this size on, numbers are written with a power of ten (a thousand trillion).
HUGE = 1e15


def fmt_number(v, sig: int = SIGNIFICANT, *, direction: str = "nearest") -> str:
    """A value for people: ``sig`` significant figures with thousands separators.

    Parameters
    ----------
    v : float or None
        The value; ``None``, NaN and infinities print as "–".
    sig : int, default 3
        Significant figures.
    direction : {"nearest", "down", "up"}
        Rounding of the value's shortest decimal form: "nearest" rounds half up
        (2.675 prints as 2.68, as a reader rounding the digits would);
        :func:`fmt_interval` rounds a lower bound down and an upper bound up so
        that the printed interval contains the computed one.

    Returns
    -------
    str
        For example ``9,800``, ``10,600``, ``123,000``, ``4.57``, ``0.0123``, ``42``
        (at most ``sig`` figures: trailing zeros after the point are dropped);
        ``3.01e288`` from :data:`HUGE` on.

    Examples
    --------
    >>> fmt_number(9797.6)
    '9,800'
    >>> fmt_number(0.012345)
    '0.0123'
    >>> fmt_number(3.006e288)
    '3.01e288'
    """
    if _missing(v):
        return MISSING
    if sig < 1:
        raise ValueError(f"sig must be at least 1, got {sig}")
    if direction not in ("nearest", "down", "up"):
        raise ValueError(f"direction must be nearest, down or up, got {direction!r}")
    rounded = _round_sig(float(v), sig, direction)
    if abs(rounded) >= HUGE:  # "3.01e288", not 289 digits with 95 separators
        mantissa, exponent = f"{rounded:.{sig - 1}e}".split("e")
        if "." in mantissa:
            mantissa = mantissa.rstrip("0").rstrip(".")
        return f"{mantissa}e{int(exponent)}"
    text = f"{rounded:,f}"
    if "." in text:  # at most ``sig`` figures: 42, not 42.0
        text = text.rstrip("0").rstrip(".")
    return "0" if text in ("-0", "0") else text


def fmt_interval(lower, upper, sig: int = SIGNIFICANT, joiner: str = " to ") -> str:
    """An interval rounded outward (lower bound down, upper bound up).

    The printed interval always contains the computed one, so a value that
    lies outside the computed interval is never shown inside the printed one.

    Examples
    --------
    >>> fmt_interval(9054.2, 10598.0)
    '9,050 to 10,600'
    """
    return (fmt_number(lower, sig, direction="down") + joiner
            + fmt_number(upper, sig, direction="up"))


def fmt_probability(p) -> str:
    """A probability in whole percent, never a rounded 0% or 100%.

    Below 0.5% prints as "< 1%" and from 99.5% up as "> 99%": a probability
    estimated from a finite number of draws is never certain.

    Examples
    --------
    >>> fmt_probability(1.0), fmt_probability(0.0), fmt_probability(0.914)
    ('> 99%', '< 1%', '91%')
    """
    if _missing(p):
        return MISSING
    p = float(p)
    if not -1e-12 <= p <= 1 + 1e-12:
        raise ValueError(f"a probability lies between 0 and 1, got {p}")
    if p >= 0.995:
        return "> 99%"
    if p < 0.005:
        return "< 1%"
    return f"{min(99, max(1, math.floor(100 * p + 0.5)))}%"


def fmt_weight(w) -> str:
    """A weight between 0 and 1 (a model's stacking weight) in two decimals, never a rounded 0 or 1.

    An optimiser leaves a weight it drives to zero at 1e-17 or so: that prints as "< 0.01",
    as a weight just short of one prints "> 0.99"; exactly 0 and 1 print as "0.00" and "1.00".

    Examples
    --------
    >>> fmt_weight(1.3e-17), fmt_weight(0.4567), fmt_weight(0.9999), fmt_weight(1.0)
    ('< 0.01', '0.46', '> 0.99', '1.00')
    """
    if _missing(w):
        return MISSING
    w = float(w)
    if w <= 0 or w >= 1:
        return "0.00" if w <= 0 else "1.00"
    return "< 0.01" if w < 0.005 else "> 0.99" if w >= 0.995 else f"{w:.2f}"


def observations(n: int, frequency: str) -> str:
    """``n`` observations with their frequency: "20 quarterly observations", "20 observations".

    Plain numbered periods have no calendar frequency ("per period"), so none is named.

    Examples
    --------
    >>> observations(20, "quarterly"), observations(20, "per period")
    ('20 quarterly observations', '20 observations')
    """
    return f"{n} {frequency} observations" if frequency != "per period" else f"{n} observations"


def fmt_given(x) -> str:
    """A value as a person typed it, for an error message: ``-4`` for -4.0, ``0.5``, ``None``.

    Examples
    --------
    >>> fmt_given(-4.0), fmt_given(0.25), fmt_given(None)
    ('-4', '0.25', 'None')
    """
    if isinstance(x, numbers.Real) and not isinstance(x, bool):
        return f"{x:.15g}"
    return str(x)


def fmt_percent(x, decimals: int = 1) -> str:
    """A rate such as growth (0.366 is 36.6%); "–" when missing.

    From a thousand times (100,000%) on, three significant figures: ``538,000,000%``, not
    ``538,079,768.6%`` (and a power of ten as :func:`fmt_number` writes it).

    Examples
    --------
    >>> fmt_percent(0.366), fmt_percent(5380797.686)
    ('36.6%', '538,000,000%')
    """
    if _missing(x):
        return MISSING
    if abs(float(x)) >= 1000:
        return f"{fmt_number(100 * float(x))}%"
    return f"{100 * float(x):,.{decimals}f}%"


def text_summary(title: str, lines: Sequence[str]) -> str:
    """A result in a few lines, for its ``repr``: the title, then indented lines.

    Examples
    --------
    >>> print(text_summary("Fit of 'north'", ["growth 12% per quarter"]))
    Fit of 'north'
      growth 12% per quarter
    """
    return "\n".join([title, *(f"  {line}" for line in lines)])


def html_summary(title: str, headline: str, columns: Sequence[str],
                 rows: Sequence[Sequence[str]]) -> str:
    """A result for a notebook (``_repr_html_``): title, headline and a compact table.

    Every text is escaped. A table of more than :data:`HTML_ROWS` rows shows its
    first and last rows, with a row of "…" between them.

    Parameters
    ----------
    title, headline : str
    columns : sequence of str
        Column headers.
    rows : sequence of sequence of str
        The cells, already written for people.

    Returns
    -------
    str

    Examples
    --------
    >>> html_summary("Fit", "growth 12%", ["a"], [["1 < 2"]]).count("&lt;")
    1
    """
    rows = [list(r) for r in rows]
    if len(rows) > HTML_ROWS:
        half = HTML_ROWS // 2
        rows = rows[:half] + [["…"] * len(columns)] + rows[-half:]
    head = "".join(f"<th>{html.escape(str(c))}</th>" for c in columns)
    body = "".join(
        "<tr>" + "".join(f"<td>{html.escape(str(c))}</td>" for c in r) + "</tr>" for r in rows
    )
    return (f"<div><p><strong>{html.escape(title)}</strong><br>{html.escape(headline)}</p>"
            f"<table><thead><tr>{head}</tr></thead><tbody>{body}</tbody></table></div>")
