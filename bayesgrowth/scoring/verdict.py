"""Plain-word calibration verdicts from band coverage counts."""

from __future__ import annotations

from collections.abc import Iterable
from typing import Literal

from bayesgrowth.scoring.intervals import coverage_interval

__all__ = [
    "CALIBRATED",
    "MIXED",
    "TOO_FEW",
    "TOO_NARROW",
    "TOO_WIDE",
    "calibration_verdict",
    "combine_verdicts",
]

CALIBRATED = "calibrated"
TOO_NARROW = "bands too narrow"
TOO_WIDE = "bands too wide"
TOO_FEW = "too few outcomes"
MIXED = "mixed"


def calibration_verdict(
    k: int,
    n: int,
    nominal: float,
    level: float = 0.95,
    min_n: int = 10,
    method: Literal["clopper-pearson", "wilson"] = "clopper-pearson",
) -> str:
    """Say whether ``k`` hits in ``n`` fit a band of stated level ``nominal``.

    The stated level is compared with the binomial confidence interval of
    the observed coverage (:func:`bayesgrowth.scoring.intervals.coverage_interval`):
    inside it, ``"calibrated"``; above it (too few outcomes inside),
    ``"bands too narrow"``; below it, ``"bands too wide"``. With fewer than
    ``min_n`` outcomes the answer is ``"too few outcomes"``.

    Parameters
    ----------
    k : int
        Outcomes inside their band.
    n : int
        Outcomes counted.
    nominal : float
        Stated band level as a fraction in (0, 1), e.g. 0.8 for an 80% band.
    level : float, default 0.95
        Confidence level of the binomial interval.
    min_n : int, default 10
        Fewest outcomes for which a verdict is given.
    method : {"clopper-pearson", "wilson"}
        Binomial interval type.

    Returns
    -------
    str
        One of ``"calibrated"``, ``"bands too narrow"``, ``"bands too wide"``,
        ``"too few outcomes"``.

    Raises
    ------
    ValueError
        If ``nominal`` is not a fraction in (0, 1) or the counts are invalid.
    """
    if not 0 < nominal < 1:
        raise ValueError(
            f"nominal must be a fraction in (0, 1), e.g. 0.8 for an 80% band; got {nominal}"
        )
    if n < min_n:
        return TOO_FEW
    low, high = coverage_interval(k, n, level=level, method=method)
    if nominal > high:
        return TOO_NARROW
    if nominal < low:
        return TOO_WIDE
    return CALIBRATED


def combine_verdicts(verdicts: Iterable[str]) -> str:
    """One verdict across several band levels.

    ``"too few outcomes"`` entries are set aside. Then: any "too narrow" and
    any "too wide" gives ``"mixed"``; otherwise any "too narrow" gives
    ``"bands too narrow"`` and any "too wide" ``"bands too wide"``; otherwise
    ``"calibrated"``. If nothing is left (or nothing was given) the answer is
    ``"too few outcomes"``.

    Parameters
    ----------
    verdicts : iterable of str
        Verdicts from :func:`calibration_verdict`.

    Returns
    -------
    str
        Combined verdict.

    Raises
    ------
    ValueError
        If an entry is not a known verdict.
    """
    known = {CALIBRATED, TOO_NARROW, TOO_WIDE, TOO_FEW}
    kept = []
    for v in verdicts:
        if v not in known:
            raise ValueError(f"unknown verdict {v!r}")
        if v != TOO_FEW:
            kept.append(v)
    if not kept:
        return TOO_FEW
    narrow, wide = TOO_NARROW in kept, TOO_WIDE in kept
    if narrow and wide:
        return MIXED
    if narrow:
        return TOO_NARROW
    if wide:
        return TOO_WIDE
    return CALIBRATED
