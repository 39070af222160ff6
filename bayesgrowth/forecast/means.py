"""Predictive means a person can use: empty where they do not exist as numbers, and why.

The predictive of a growth forecast is log-normal or a mixture of log-normals, whose mean
is ``exp(m + s^2 / 2)`` of each component's log-scale mean ``m`` and spread ``s``. Far
ahead (a long horizon, a short or noisy history) the spread grows and the mean grows as the
exponential of its square: it is carried by ever smaller chances of ever more extreme
outcomes, first rises above the upper end of the widest band and then overflows the
largest number a computer holds. The median and the bands, quantiles on the log scale,
stay finite and are the figures to read. A mean that is not finite is left empty (NaN in a
table, ``null`` in JSON), and :func:`mean_caution` says once, from which period on and why.
"""

from __future__ import annotations

import numpy as np
import pandas as pd

__all__ = ["finite_means", "mean_caution", "mean_of_draws"]


def finite_means(mean) -> np.ndarray:
    """``mean`` as floats with every infinite or undefined value made NaN (an empty cell).

    Parameters
    ----------
    mean : array_like

    Returns
    -------
    numpy.ndarray

    Examples
    --------
    >>> finite_means([1.5, float("inf")]).tolist()
    [1.5, nan]
    """
    out = np.array(mean, dtype=float)
    out[~np.isfinite(out)] = np.nan
    return out


def mean_of_draws(draws: np.ndarray) -> np.ndarray:
    """The mean of each column of ``draws``, NaN where the sum overflows."""
    with np.errstate(over="ignore", invalid="ignore"):
        return finite_means(np.asarray(draws, dtype=float).mean(axis=0))


def mean_caution(table: pd.DataFrame, levels) -> str | None:
    """Say once from which period the mean stops being a useful figure, or ``None``.

    Parameters
    ----------
    table : pandas.DataFrame
        A forecast table: ``period``, ``mean`` (NaN where not finite) and
        ``upper_L`` for the band levels ``L``.
    levels : sequence of int
        The band levels; the widest band's upper end is the yardstick.

    Returns
    -------
    str or None
        ``None`` when every mean is finite and inside the widest band.

    Examples
    --------
    >>> t = pd.DataFrame({"period": ["1", "2", "3"], "mean": [10.0, 900.0, float("nan")],
    ...                   "upper_95": [20.0, 40.0, 80.0]})
    >>> mean_caution(t, (95,)).split(":")[0]
    "The predictive mean lies above the 95% band's upper end from period 2 and is too large \
to compute from period 3 on (left empty)"
    """
    if "mean" not in table.columns or len(table) == 0:
        return None
    top = max(levels)
    mean = table["mean"].to_numpy(dtype=float)
    missing = np.flatnonzero(np.isnan(mean))
    with np.errstate(invalid="ignore"):
        above = np.flatnonzero(np.isnan(mean) | (mean > table[f"upper_{top}"].to_numpy(float)))
    if not above.size:
        return None
    periods = table["period"].astype(str).tolist()
    first_above = periods[int(above[0])]
    if not missing.size:
        where = f"lies above the {top}% band's upper end from period {first_above} on"
    elif int(missing[0]) == int(above[0]):
        where = f"is too large to compute from period {first_above} on (left empty)"
    else:
        where = (f"lies above the {top}% band's upper end from period {first_above} and is "
                 f"too large to compute from period {periods[int(missing[0])]} on (left empty)")
    return (f"The predictive mean {where}: where the predictive is this wide, the mean is "
            "carried by very small chances of extreme outcomes and is not a typical value; read "
            "the median and the bands, which stay finite.")
