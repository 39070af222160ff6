"""Probability integral transform (PIT) values and their uniformity.

If forecasts are calibrated, the predictive CDF evaluated at the outcome is
Uniform(0, 1) (Dawid 1984, JRSS A 147:278-292; Gneiting, Balabdaoui &
Raftery 2007, JRSS B 69:243-268). A U-shaped histogram means bands too
narrow, a hump means bands too wide, a slope means bias.
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

from bayesgrowth.scoring._checks import as_draws, as_float, check_df

__all__ = ["pit", "pit_histogram", "pit_log_t", "pit_t", "pit_uniformity"]


def pit(y: ArrayLike, draws: ArrayLike) -> NDArray[np.float64] | np.float64:
    """PIT value from predictive draws: the share of draws below ``y``.

    Draws equal to ``y`` count one half, so a tie does not push the value
    to either end.

    Parameters
    ----------
    y : array_like, shape (...)
        Observed values.
    draws : array_like, shape (..., m)
        Predictive draws, members on the last axis.

    Returns
    -------
    ndarray or float, shape ``broadcast(y, draws[..., 0])``
        PIT values in [0, 1]; NaN where ``y`` is NaN.
    """
    d = as_draws(draws)
    obs = as_float(y)[..., None]
    below = np.mean(d < obs, axis=-1)
    ties = np.mean(d == obs, axis=-1)
    out = np.where(np.isnan(obs[..., 0]), np.nan, below + 0.5 * ties)
    return out[()] if out.ndim == 0 else out


def pit_t(
    y: ArrayLike, loc: ArrayLike, scale: ArrayLike, df: ArrayLike
) -> NDArray[np.float64] | np.float64:
    """PIT value of a location-scale Student-t predictive.

    Parameters
    ----------
    y : array_like
        Observed values.
    loc, scale : array_like
        Location and (positive) scale of the t.
    df : array_like
        Degrees of freedom, positive (``np.inf`` gives a normal).

    Returns
    -------
    ndarray or float
        ``F_t((y - loc) / scale; df)``.

    Raises
    ------
    ValueError
        If any scale or df is not positive.
    """
    from scipy import stats  # imported here: scipy.stats costs ~1 s to import
    obs, mu, s, nu = np.broadcast_arrays(
        as_float(y), as_float(loc), as_float(scale), as_float(df)
    )
    if not np.all(s > 0):
        raise ValueError("scale must be positive")
    check_df(nu)
    out = stats.t.cdf((obs - mu) / s, nu)
    return out[()] if out.ndim == 0 else out


def pit_log_t(
    y: ArrayLike, loc: ArrayLike, scale: ArrayLike, df: ArrayLike
) -> NDArray[np.float64] | np.float64:
    """PIT value of a log-t predictive (a Student-t for ``log Y``).

    The log is monotone, so this is :func:`pit_t` at ``log y``; a
    non-positive ``y`` gives 0.

    Parameters
    ----------
    y : array_like
        Observed values.
    loc, scale : array_like
        Location and (positive) scale of the t on the log scale.
    df : array_like
        Degrees of freedom, positive.

    Returns
    -------
    ndarray or float
        PIT values in [0, 1].
    """
    obs = as_float(y)
    positive = obs > 0
    log_y = np.log(np.where(positive, obs, 1.0))
    out = np.where(positive, np.asarray(pit_t(log_y, loc, scale, df)), 0.0)
    out = np.where(np.isnan(obs), np.nan, out)
    return out[()] if out.ndim == 0 else out


def pit_histogram(pit_values: ArrayLike, bins: int = 10) -> NDArray[np.int64]:
    """Counts of PIT values in ``bins`` equal-width bins on [0, 1].

    Parameters
    ----------
    pit_values : array_like
        PIT values; NaN entries are left out.
    bins : int, default 10
        Number of bins, at least 1. The edges are
        ``numpy.linspace(0, 1, bins + 1)``; the last bin includes 1.

    Returns
    -------
    ndarray of int, shape (bins,)
        Counts per bin.

    Raises
    ------
    ValueError
        If ``bins`` is not a positive integer or a value lies outside [0, 1].
    """
    if isinstance(bins, bool) or not isinstance(bins, (int, np.integer)) or bins < 1:
        raise ValueError(f"bins must be a positive integer, got {bins!r}")
    v = as_float(pit_values).ravel()
    v = v[~np.isnan(v)]
    if np.any((v < 0) | (v > 1)):
        raise ValueError("PIT values must lie in [0, 1]")
    counts, _ = np.histogram(v, bins=bins, range=(0.0, 1.0))
    return counts.astype(np.int64)


def pit_uniformity(pit_values: ArrayLike) -> float:
    """Kolmogorov-Smirnov p-value of PIT values against Uniform(0, 1).

    Uses :func:`scipy.stats.kstest`. A small p-value is evidence against
    calibration. PIT values from overlapping origins and from several steps
    of one origin are dependent, which the test does not allow for, so the
    p-value is indicative rather than exact (it tends to be too small).

    Parameters
    ----------
    pit_values : array_like
        PIT values; NaN entries are left out.

    Returns
    -------
    float
        p-value; NaN when there are no values.
    """
    from scipy import stats  # imported here: scipy.stats costs ~1 s to import
    v = as_float(pit_values).ravel()
    v = v[~np.isnan(v)]
    if v.size == 0:
        return float("nan")
    return float(stats.kstest(v, "uniform").pvalue)
