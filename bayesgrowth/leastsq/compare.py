"""Side-by-side table of least-squares growth fits and their forecasts."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
import pandas as pd

from bayesgrowth.leastsq.fits import (
    GrowthFit,
    check_series,
    fit_log_linear,
    fit_log_linear_anchored,
)
from bayesgrowth.leastsq.intervals import check_levels, level_name
from bayesgrowth.leastsq.revenue import fit_revenue_scale, fit_revenue_scale_anchored
from bayesgrowth.leastsq.windows import drop_first_fits, drop_last_fits, leave_one_out_fits

__all__ = ["TABLE_COLUMNS", "compare_fits", "fit_table", "fit_variants", "forecast_spread"]

TABLE_COLUMNS = (
    "variant",
    "n_points",
    "initial_value",
    "growth_per_period",
    "value_at_horizon",
    "r_squared",
    "rmse",
)


def fit_variants(
    t: np.ndarray,
    y: np.ndarray,
    *,
    t_ref: float | None = None,
    max_drop: int | None = None,
) -> list[GrowthFit]:
    """Fit every least-squares variant to one series.

    The variants, in order: log-linear, revenue-scale, the two anchored fits
    (only when some observation falls on ``t_ref``), log-linear with the last
    ``k`` observations dropped, with the first ``k`` dropped (``k = 1 ..
    max_drop``) and leaving out each observation in turn (series of 4 or more).

    Parameters
    ----------
    t : numpy.ndarray
        Periods of the observations, strictly increasing (gaps allowed).
    y : numpy.ndarray
        Observed values, all greater than zero; at least 3 of them.
    t_ref : float, optional
        Reference period of the initial value; default ``t[0]``.
    max_drop : int, optional
        Largest number of observations dropped from either end; default
        ``min(3, n - 3)``.

    Returns
    -------
    list of GrowthFit
        All fits; every ``t_last`` is the last period of the full series.

    Raises
    ------
    LeastSquaresError
        If a revenue-scale fit does not converge.
    """
    t, y, t_ref = check_series(t, y, t_ref)
    fits = [
        fit_log_linear(t, y, t_ref=t_ref),
        fit_revenue_scale(t, y, t_ref=t_ref),
    ]
    if np.any(t == t_ref):
        fits.append(fit_log_linear_anchored(t, y, t_ref=t_ref))
        fits.append(fit_revenue_scale_anchored(t, y, t_ref=t_ref))
    fits.extend(drop_last_fits(t, y, t_ref=t_ref, max_drop=max_drop))
    fits.extend(drop_first_fits(t, y, t_ref=t_ref, max_drop=max_drop))
    fits.extend(leave_one_out_fits(t, y, t_ref=t_ref))
    return fits


def forecast_spread(values: pd.DataFrame | Sequence[float] | np.ndarray) -> dict[str, float | str]:
    """Spread of the point forecasts across variants.

    Parameters
    ----------
    values : pandas.DataFrame or array_like
        A table from :func:`fit_table` / :func:`compare_fits` (its
        ``value_at_horizon`` column is used, and ``variant`` names the extremes)
        or the forecasts themselves.

    Returns
    -------
    dict
        ``min``, ``max``, ``max_over_min`` (the ratio of the two) and, when a
        table is given, ``lowest_variant`` and ``highest_variant``.
    """
    names = None
    if isinstance(values, pd.DataFrame):
        arr = values["value_at_horizon"].to_numpy(dtype=float)
        if "variant" in values:
            names = values["variant"].to_numpy()
    else:
        arr = np.asarray(values, dtype=float).ravel()
    if arr.size == 0 or not np.all(np.isfinite(arr)):
        raise ValueError("the forecasts must be a non-empty set of finite numbers")
    lo, hi = int(np.argmin(arr)), int(np.argmax(arr))
    out: dict[str, float | str] = {
        "min": float(arr[lo]),
        "max": float(arr[hi]),
        "max_over_min": float(arr[hi] / arr[lo]),
    }
    if names is not None:
        out["lowest_variant"] = str(names[lo])
        out["highest_variant"] = str(names[hi])
    return out


def fit_table(
    fits: Sequence[GrowthFit],
    horizon: float,
    *,
    predictive_draws: np.ndarray | None = None,
    levels: Sequence[float] = (50, 80, 95),
) -> pd.DataFrame:
    """Tabulate fits and their forecasts, optionally beside Bayesian predictive draws.

    Parameters
    ----------
    fits : sequence of GrowthFit
        Fits made for the same series (same ``t_last``).
    horizon : float
        Number of periods past the last observation to forecast.
    predictive_draws : numpy.ndarray, optional
        1-D posterior predictive draws of the value at period ``t_last + horizon``.
    levels : sequence of float, optional
        Central credible levels in percent for the Bayesian columns.

    Returns
    -------
    pandas.DataFrame
        One row per fit with the columns of ``TABLE_COLUMNS``. With draws, also
        ``bayes_median``, ``bayes_lower_L`` and ``bayes_upper_L`` per level
        (equal-tailed quantiles, the same on every row) and ``prob_at_least``,
        the fraction of draws at or above that row's ``value_at_horizon``.
        ``attrs`` holds ``horizon``, ``t_target`` and ``spread`` (see
        :func:`forecast_spread`).
    """
    if not fits:
        raise ValueError("no fits to tabulate")
    t_last = {f.t_last for f in fits}
    if len(t_last) != 1:
        raise ValueError("the fits do not share one last observed period")
    horizon = float(horizon)
    if not np.isfinite(horizon) or horizon < 0:
        raise ValueError("horizon must be a finite number, zero or more")
    t_target = t_last.pop() + horizon
    table = pd.DataFrame(
        {
            "variant": [f.variant for f in fits],
            "n_points": [f.n_points for f in fits],
            "initial_value": [f.initial_value for f in fits],
            "growth_per_period": [f.growth_per_period for f in fits],
            "value_at_horizon": [f.value_at(t_target) for f in fits],
            "r_squared": [f.r_squared for f in fits],
            "rmse": [f.rmse for f in fits],
        }
    )
    if predictive_draws is not None:
        _add_bayes_columns(table, predictive_draws, levels)
    table.attrs["horizon"] = horizon
    table.attrs["t_target"] = t_target
    table.attrs["spread"] = forecast_spread(table)
    return table


def _add_bayes_columns(table: pd.DataFrame, predictive_draws, levels) -> None:
    """The Bayesian median and bands (same on every row) and each row's ``prob_at_least``."""
    draws = np.asarray(predictive_draws, dtype=float)
    if draws.ndim != 1 or draws.size == 0 or not np.all(np.isfinite(draws)):
        raise ValueError("predictive_draws must be a non-empty 1-D array of finite numbers")
    lv = check_levels(levels)
    table["bayes_median"] = float(np.median(draws))
    for level in lv:
        lo, hi = np.quantile(draws, [(100.0 - level) / 200.0, (100.0 + level) / 200.0])
        table[f"bayes_lower_{level_name(level)}"] = float(lo)
        table[f"bayes_upper_{level_name(level)}"] = float(hi)
    sorted_draws = np.sort(draws)
    below = np.searchsorted(sorted_draws, table["value_at_horizon"].to_numpy(), side="left")
    table["prob_at_least"] = (draws.size - below) / draws.size


def compare_fits(
    t: np.ndarray,
    y: np.ndarray,
    horizon: float,
    *,
    t_ref: float | None = None,
    max_drop: int | None = None,
    predictive_draws: np.ndarray | None = None,
    levels: Sequence[float] = (50, 80, 95),
) -> pd.DataFrame:
    """Fit all least-squares variants to a series and tabulate their forecasts.

    Shorthand for ``fit_table(fit_variants(t, y, ...), horizon, ...)``.

    Parameters
    ----------
    t : numpy.ndarray
        Periods of the observations, strictly increasing (gaps allowed).
    y : numpy.ndarray
        Observed values, all greater than zero; at least 3 of them.
    horizon : float
        Number of periods past the last observation to forecast.
    t_ref : float, optional
        Reference period of the initial value; default ``t[0]``.
    max_drop : int, optional
        Largest number of observations dropped from either end; default
        ``min(3, n - 3)``.
    predictive_draws : numpy.ndarray, optional
        1-D posterior predictive draws of the value at period ``t[-1] + horizon``.
    levels : sequence of float, optional
        Central credible levels in percent for the Bayesian columns.

    Returns
    -------
    pandas.DataFrame
        See :func:`fit_table`.
    """
    fits = fit_variants(t, y, t_ref=t_ref, max_drop=max_drop)
    return fit_table(fits, horizon, predictive_draws=predictive_draws, levels=levels)
