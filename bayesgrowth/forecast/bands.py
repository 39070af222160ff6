"""Bands from predictive draws, shared by every kind of forecast.

:func:`band_probabilities` gives the two probabilities of a central band;
:func:`band_columns` and :func:`draws_table` make the forecast table's columns from
draws (a forecast of the exact engine takes its bands from the mixture instead).
"""

from __future__ import annotations

import math
import numbers
from collections.abc import Sequence

import numpy as np
import pandas as pd

from bayesgrowth.config import check_count
from bayesgrowth.forecast.means import mean_of_draws

__all__ = ["band_columns", "band_probabilities", "check_horizon", "check_target", "draws_table",
           "interval_summary", "prob_at_least"]


def band_probabilities(level: float) -> list[float]:
    """The lower and upper probabilities of the central ``level``% band.

    Examples
    --------
    >>> band_probabilities(80)
    [0.1, 0.9]
    """
    tail = (100 - level) / 200
    return [tail, 1 - tail]


def check_horizon(horizon) -> int:
    """Validate a horizon: a whole number of periods >= 1 (``4.0`` is taken; ``"4"`` is not).

    Examples
    --------
    >>> check_horizon(4.0)
    4
    """
    try:
        return check_count(horizon, "horizon", 1)
    except ValueError:
        raise ValueError(
            f"horizon must be a whole number of periods >= 1, got {horizon!r}") from None


def band_columns(draws: np.ndarray, levels, prefix: str = "") -> dict:
    """Central bands of ``draws`` per column: ``{prefix}lower_L`` and ``{prefix}upper_L``."""
    cols = {}
    for level in levels:
        q = np.quantile(draws, band_probabilities(level), axis=0)
        cols[f"{prefix}lower_{level}"] = q[0]
        cols[f"{prefix}upper_{level}"] = q[1]
    return cols


def draws_table(periods: Sequence[str], draws: np.ndarray, curve_draws: np.ndarray,
                levels) -> pd.DataFrame:
    """The forecast table from draws: ``period``, ``step``, ``mean``, ``median``, bands.

    Parameters
    ----------
    periods : sequence of str
        Labels of the future periods.
    draws, curve_draws : numpy.ndarray, shape (n_draws, horizon)
        Predictive draws of the value and of the mean curve.
    levels : sequence of int
        Band levels in percent.

    Returns
    -------
    pandas.DataFrame
        As :attr:`bayesgrowth.forecast.Forecast.table`.

    Examples
    --------
    >>> draws = np.arange(1.0, 101.0)[:, None]
    >>> draws_table(["2026Q1"], draws, draws, (80,))[["median", "lower_80", "upper_80"]]
       median  lower_80  upper_80
    0    50.5      10.9      90.1
    """
    return pd.DataFrame({
        "period": list(periods),
        "step": np.arange(1, len(periods) + 1),
        "mean": mean_of_draws(draws),
        "median": np.median(draws, axis=0),
        **band_columns(draws, levels),
        "curve_median": np.median(curve_draws, axis=0),
        **band_columns(curve_draws, levels, prefix="curve_"),
    })


def check_target(target) -> float:
    """Validate a target: a finite number above 0, in the series' units.

    Raises
    ------
    ValueError
        For zero, a negative number, ``nan``, infinity, a string or ``None``.
    """
    if not (isinstance(target, numbers.Real) and not isinstance(target, bool)
            and math.isfinite(target) and target > 0):
        raise ValueError(f"target must be a finite value above 0, in the series' units, got "
                         f"{target!r}")
    return float(target)


def prob_at_least(periods: Sequence[str], draws: np.ndarray, target: float) -> pd.Series:
    """Share of the draws of each period at least ``target``, indexed by period.

    ``target`` is checked by :func:`check_target`.
    """
    target = check_target(target)
    return pd.Series((draws >= target).mean(axis=0),
                     index=pd.Index(list(periods), name="period"), name="probability")


def interval_summary(x: np.ndarray, levels=(80, 95)) -> dict:
    """Median, mean and central bands of draws ``x``, as floats (JSON-ready)."""
    # draws may be infinite (a doubling time where growth is not positive): the quantiles
    # then are too, and numpy's interpolation between two infinities warns; say it in JSON
    with np.errstate(invalid="ignore"):
        out = {"median": float(np.median(x)), "mean": float(np.mean(x))}
        for level in levels:
            lo, hi = np.quantile(x, band_probabilities(level))
            out[f"lower_{level}"] = float(lo)
            out[f"upper_{level}"] = float(hi)
    return out
