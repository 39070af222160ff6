"""Classical intervals for log-linear growth fits.

On the log scale the fit is a linear regression, so at a period ``t`` with
design row ``x = (1, t - t_ref)`` (``(0, t - t_ref)`` for an anchored fit):

* the fitted mean is ``m = x @ beta`` with standard error
  ``se_mean = sqrt(x @ V @ x)``, ``V`` the estimated coefficient covariance;
* a future log value has predictive distribution ``m + scale * T_df`` with
  ``scale = sqrt(s**2 + se_mean**2)``, ``s`` the residual standard deviation and
  ``T_df`` Student's t with the residual degrees of freedom.

Intervals are formed on the log scale and back-transformed with ``exp``; the
back-transformed centre ``exp(m)`` is the median of the predictive distribution.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
import pandas as pd

from bayesgrowth.leastsq.fits import GrowthFit, LogScaleStats

__all__ = ["log_linear_intervals", "log_linear_predictive"]


def _log_stats(fit: GrowthFit) -> LogScaleStats:
    if fit.log_scale is None:
        raise ValueError(
            f"the {fit.variant!r} fit has no log-scale regression; "
            "classical intervals are available for log-linear fits only"
        )
    return fit.log_scale


def _mean_and_se(st: LogScaleStats, s: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    mean = st.intercept + st.slope * s
    var = st.var_intercept + 2.0 * s * st.cov_intercept_slope + s**2 * st.var_slope
    return mean, np.sqrt(np.maximum(var, 0.0))


def check_levels(levels: Sequence[float]) -> list[float]:
    """Validate interval levels given in percent.

    Parameters
    ----------
    levels : sequence of float
        Levels strictly between 0 and 100.

    Returns
    -------
    list of float
        The levels.
    """
    out = [float(v) for v in levels]
    if not out or any(not 0 < v < 100 for v in out):
        raise ValueError("levels must be percentages strictly between 0 and 100")
    return out


def level_name(level: float) -> str:
    """Column suffix for a level: ``95`` for 95.0, ``97.5`` for 97.5.

    Parameters
    ----------
    level : float
        Level in percent.

    Returns
    -------
    str
        The suffix.
    """
    return f"{level:g}"


def log_linear_predictive(fit: GrowthFit, t: float | np.ndarray) -> pd.DataFrame:
    """Predictive distribution of future log values under a log-linear fit.

    Parameters
    ----------
    fit : GrowthFit
        A log-linear fit (plain, anchored or on a data window).
    t : float or numpy.ndarray
        Future period(s).

    Returns
    -------
    pandas.DataFrame
        One row per period with columns ``t``, ``loc``, ``scale`` and ``df``:
        ``log R(t)`` is distributed as ``loc + scale * T`` with ``T`` Student's
        t with ``df`` degrees of freedom.
    """
    st = _log_stats(fit)
    t_arr = np.atleast_1d(np.asarray(t, dtype=float))
    loc, se_mean = _mean_and_se(st, t_arr - fit.t_ref)
    scale = np.sqrt(st.residual_sd**2 + se_mean**2)
    return pd.DataFrame({"t": t_arr, "loc": loc, "scale": scale, "df": np.full(t_arr.size, st.dof)})


def log_linear_intervals(
    fit: GrowthFit, t: float | np.ndarray, levels: Sequence[float] = (50, 80, 95)
) -> pd.DataFrame:
    """Confidence intervals of the curve and prediction intervals of future values.

    Parameters
    ----------
    fit : GrowthFit
        A log-linear fit (plain, anchored or on a data window).
    t : float or numpy.ndarray
        Period(s) at which to evaluate.
    levels : sequence of float, optional
        Central interval levels in percent.

    Returns
    -------
    pandas.DataFrame
        One row per period with columns ``t``, ``fitted`` (the back-transformed
        fitted log mean, i.e. the curve), and for each level ``L`` the columns
        ``confidence_lower_L``, ``confidence_upper_L`` (interval for the curve
        itself) and ``prediction_lower_L``, ``prediction_upper_L`` (interval for
        a new observation), all on the original scale.
    """
    from scipy import stats  # imported here: scipy.stats costs ~1 s to import
    st = _log_stats(fit)
    lv = check_levels(levels)
    t_arr = np.atleast_1d(np.asarray(t, dtype=float))
    mean, se_mean = _mean_and_se(st, t_arr - fit.t_ref)
    se_pred = np.sqrt(st.residual_sd**2 + se_mean**2)
    out = {"t": t_arr, "fitted": np.exp(mean)}
    for level in lv:
        q = stats.t.ppf((100.0 + level) / 200.0, st.dof)
        name = level_name(level)
        out[f"confidence_lower_{name}"] = np.exp(mean - q * se_mean)
        out[f"confidence_upper_{name}"] = np.exp(mean + q * se_mean)
        out[f"prediction_lower_{name}"] = np.exp(mean - q * se_pred)
        out[f"prediction_upper_{name}"] = np.exp(mean + q * se_pred)
    return pd.DataFrame(out)
