"""User text on charts: drawn as typed, never read as matplotlib's mathtext."""

from __future__ import annotations

__all__ = ["literal"]


def literal(text: object) -> str:
    r"""``text`` with its dollar signs escaped, so that a chart shows it as typed.

    Matplotlib reads text between two ``$`` as mathtext and fails on a file name
    such as ``sales$q$.csv``; an escaped ``\$`` is drawn as a plain dollar sign.

    Examples
    --------
    >>> print(literal("US$ and $"))
    US\$ and \$
    """
    return str(text).replace("$", r"\$")
