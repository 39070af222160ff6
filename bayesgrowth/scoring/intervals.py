"""Central-interval scores, coverage and its binomial uncertainty.

References
----------
Gneiting, T. and Raftery, A. E. (2007). JASA 102:359-378, section 6.2
(interval score).
Clopper, C. J. and Pearson, E. S. (1934). Biometrika 26:404-413.
Wilson, E. B. (1927). JASA 22:209-212.
"""

from __future__ import annotations

from typing import Literal

import numpy as np
from numpy.typing import ArrayLike, NDArray

from bayesgrowth.scoring._checks import as_float

__all__ = ["abs_pct_error", "coverage", "coverage_counts", "coverage_interval", "interval_score"]


def interval_score(
    y: ArrayLike, lower: ArrayLike, upper: ArrayLike, alpha: ArrayLike
) -> NDArray[np.float64] | np.float64:
    """Interval score of a central ``(1 - alpha)`` prediction interval.

    ``(upper - lower) + (2 / alpha) (lower - y) 1{y < lower}
    + (2 / alpha) (y - upper) 1{y > upper}`` (Gneiting & Raftery 2007,
    section 6.2). Lower is better; for an 80% band use ``alpha = 0.2``.

    Parameters
    ----------
    y : array_like
        Observed values.
    lower, upper : array_like
        Band limits.
    alpha : array_like
        One minus the band level, in (0, 1).

    Returns
    -------
    ndarray or float
        Interval score, broadcast shape of the inputs.

    Raises
    ------
    ValueError
        If any alpha is outside (0, 1).
    """
    obs, lo, hi, a = np.broadcast_arrays(
        as_float(y), as_float(lower), as_float(upper), as_float(alpha)
    )
    if not np.all((a > 0) & (a < 1)):
        raise ValueError("alpha must lie in (0, 1), e.g. 0.2 for an 80% band")
    out = (
        (hi - lo)
        + (2.0 / a) * np.maximum(lo - obs, 0.0)
        + (2.0 / a) * np.maximum(obs - hi, 0.0)
    )
    return out[()] if out.ndim == 0 else out


def abs_pct_error(y: ArrayLike, median: ArrayLike) -> NDArray[np.float64] | np.float64:
    """Absolute percentage error of a point (median) forecast, in percent.

    ``100 * |y - median| / |y|``; ``inf`` where ``y`` is zero and the
    forecast is not, NaN where both are zero.

    Parameters
    ----------
    y : array_like
        Observed values.
    median : array_like
        Point forecasts (usually the predictive median).

    Returns
    -------
    ndarray or float
        Percentage error, e.g. 5.0 for a miss of 5%.
    """
    obs = as_float(y)
    with np.errstate(divide="ignore", invalid="ignore"):
        out = 100.0 * np.abs(obs - as_float(median)) / np.abs(obs)
    return out[()] if out.ndim == 0 else out


def coverage_counts(y: ArrayLike, lower: ArrayLike, upper: ArrayLike) -> tuple[int, int]:
    """Count outcomes inside their bands.

    An outcome on a band limit counts as inside. Entries where any of
    ``y``, ``lower`` or ``upper`` is NaN are left out.

    Parameters
    ----------
    y, lower, upper : array_like
        Outcomes and band limits (broadcast together).

    Returns
    -------
    k : int
        Outcomes inside their band.
    n : int
        Outcomes counted.
    """
    obs, lo, hi = np.broadcast_arrays(as_float(y), as_float(lower), as_float(upper))
    valid = ~(np.isnan(obs) | np.isnan(lo) | np.isnan(hi))
    inside = (lo <= obs) & (obs <= hi) & valid
    return int(inside.sum()), int(valid.sum())


def coverage(y: ArrayLike, lower: ArrayLike, upper: ArrayLike) -> float:
    """Share of outcomes inside their bands (limits count as inside).

    Parameters
    ----------
    y, lower, upper : array_like
        Outcomes and band limits (broadcast together); NaN entries are left
        out.

    Returns
    -------
    float
        Empirical coverage in [0, 1]; NaN when nothing is counted.
    """
    k, n = coverage_counts(y, lower, upper)
    return k / n if n else float("nan")


def coverage_interval(
    k: int,
    n: int,
    level: float = 0.95,
    method: Literal["clopper-pearson", "wilson"] = "clopper-pearson",
) -> tuple[float, float]:
    """Binomial confidence interval for a coverage of ``k`` hits in ``n``.

    The default is the Clopper-Pearson ("exact") interval from beta
    quantiles (Clopper & Pearson 1934): it never covers less than ``level``,
    so a calibrated method is called miscalibrated at most ``1 - level`` of
    the time. ``"wilson"`` gives the Wilson score interval (Wilson 1927),
    narrower on average.

    The interval assumes independent outcomes. Forecasts from overlapping
    origins and neighbouring steps share errors, so the effective number of
    outcomes is smaller than ``n`` and the interval is too narrow; read it
    as indicative.

    Parameters
    ----------
    k : int
        Hits, ``0 <= k <= n``.
    n : int
        Outcomes, positive.
    level : float, default 0.95
        Confidence level in (0, 1).
    method : {"clopper-pearson", "wilson"}
        Interval type.

    Returns
    -------
    tuple of float
        ``(low, high)`` within [0, 1].

    Raises
    ------
    ValueError
        If the counts, level or method are invalid.
    """
    from scipy import stats  # imported here: scipy.stats costs ~1 s to import
    if n <= 0 or k < 0 or k > n:
        raise ValueError(f"need 0 <= k <= n and n > 0, got k={k}, n={n}")
    if not 0 < level < 1:
        raise ValueError(f"level must lie in (0, 1), got {level}")
    a = 1.0 - level
    if method == "clopper-pearson":
        low = 0.0 if k == 0 else float(stats.beta.ppf(a / 2, k, n - k + 1))
        high = 1.0 if k == n else float(stats.beta.ppf(1 - a / 2, k + 1, n - k))
        return low, high
    if method == "wilson":
        z = float(stats.norm.ppf(1 - a / 2))
        p = k / n
        denom = 1.0 + z * z / n
        centre = (p + z * z / (2 * n)) / denom
        half = z * np.sqrt(p * (1 - p) / n + z * z / (4 * n * n)) / denom
        return max(0.0, centre - half), min(1.0, centre + half)
    raise ValueError(f"method must be 'clopper-pearson' or 'wilson', got {method!r}")
