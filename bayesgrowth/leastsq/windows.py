"""Log-linear refits on shortened data windows.

Each variant leaves out some observations and refits the log-linear curve on
the rest, keeping the reference period and the forecast origin of the full
series so that the forecasts of all variants refer to the same target period.
"""

from __future__ import annotations

import numpy as np

from bayesgrowth.leastsq.fits import MIN_POINTS, GrowthFit, check_series, fit_log_linear

__all__ = ["default_max_drop", "drop_first_fits", "drop_last_fits", "leave_one_out_fits"]


def default_max_drop(n: int) -> int:
    """Default largest number of observations to drop: ``min(3, n - 3)``, at least 0.

    Parameters
    ----------
    n : int
        Number of observations in the series.

    Returns
    -------
    int
        The default ``max_drop``.
    """
    return max(0, min(3, n - MIN_POINTS))


def _resolve_max_drop(n: int, max_drop: int | None) -> int:
    if max_drop is None:
        return default_max_drop(n)
    max_drop = int(max_drop)
    if max_drop < 0:
        raise ValueError("max_drop must be zero or more")
    if n - max_drop < MIN_POINTS:
        raise ValueError(
            f"dropping {max_drop} of {n} observations would leave fewer than {MIN_POINTS}"
        )
    return max_drop


def drop_last_fits(
    t: np.ndarray, y: np.ndarray, *, t_ref: float | None = None, max_drop: int | None = None
) -> list[GrowthFit]:
    """Log-linear fits with the last ``k`` observations left out, ``k = 1 .. max_drop``.

    Parameters
    ----------
    t : numpy.ndarray
        Periods of the observations, strictly increasing.
    y : numpy.ndarray
        Observed values, all greater than zero.
    t_ref : float, optional
        Reference period of the initial value; default ``t[0]`` of the full series.
    max_drop : int, optional
        Largest ``k``; default ``min(3, n - 3)``. At least 3 points must remain.

    Returns
    -------
    list of GrowthFit
        One fit per ``k``, labelled ``"log-linear, drop last k"``; ``t_last`` is
        the last period of the full series.
    """
    t, y, t_ref = check_series(t, y, t_ref)
    k_max = _resolve_max_drop(t.size, max_drop)
    return [
        fit_log_linear(
            t[:-k], y[:-k], t_ref=t_ref, t_last=float(t[-1]), variant=f"log-linear, drop last {k}"
        )
        for k in range(1, k_max + 1)
    ]


def drop_first_fits(
    t: np.ndarray, y: np.ndarray, *, t_ref: float | None = None, max_drop: int | None = None
) -> list[GrowthFit]:
    """Log-linear fits with the first ``k`` observations left out, ``k = 1 .. max_drop``.

    Parameters
    ----------
    t : numpy.ndarray
        Periods of the observations, strictly increasing.
    y : numpy.ndarray
        Observed values, all greater than zero.
    t_ref : float, optional
        Reference period of the initial value; default ``t[0]`` of the full
        series, so ``initial_value`` stays comparable across variants.
    max_drop : int, optional
        Largest ``k``; default ``min(3, n - 3)``. At least 3 points must remain.

    Returns
    -------
    list of GrowthFit
        One fit per ``k``, labelled ``"log-linear, drop first k"``.
    """
    t, y, t_ref = check_series(t, y, t_ref)
    k_max = _resolve_max_drop(t.size, max_drop)
    return [
        fit_log_linear(
            t[k:], y[k:], t_ref=t_ref, t_last=float(t[-1]), variant=f"log-linear, drop first {k}"
        )
        for k in range(1, k_max + 1)
    ]


def leave_one_out_fits(
    t: np.ndarray, y: np.ndarray, *, t_ref: float | None = None
) -> list[GrowthFit]:
    """Log-linear fits leaving out one observation at a time.

    Parameters
    ----------
    t : numpy.ndarray
        Periods of the observations, strictly increasing.
    y : numpy.ndarray
        Observed values, all greater than zero.
    t_ref : float, optional
        Reference period of the initial value; default ``t[0]`` of the full series.

    Returns
    -------
    list of GrowthFit
        One fit per observation, labelled ``"log-linear, leave out t=<t>"``;
        empty when the series has fewer than 4 observations.
    """
    t, y, t_ref = check_series(t, y, t_ref)
    if t.size - 1 < MIN_POINTS:
        return []
    fits = []
    for i in range(t.size):
        keep = np.arange(t.size) != i
        fits.append(
            fit_log_linear(
                t[keep],
                y[keep],
                t_ref=t_ref,
                t_last=float(t[-1]),
                variant=f"log-linear, leave out t={t[i]:g}",
            )
        )
    return fits
