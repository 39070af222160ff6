"""Point-estimate exponential growth fits by least squares.

Every fit describes the curve ``R(t) = a * (1 + g) ** (t - t_ref)``, where ``a``
is the value at the reference period ``t_ref`` and ``g`` the growth per period.
Four ways of fitting it are offered, the ones practitioners commonly use:

* :func:`fit_log_linear` -- ordinary least squares of ``log R`` on ``t``.
* :func:`~bayesgrowth.leastsq.revenue.fit_revenue_scale` -- nonlinear least
  squares on the original scale.
* :func:`fit_log_linear_anchored` -- ``a`` fixed to the observed value at
  ``t_ref``, slope through that point on the log scale.
* :func:`~bayesgrowth.leastsq.revenue.fit_revenue_scale_anchored` -- ``a`` fixed
  likewise, ``g`` fitted on the original scale.

This module holds the fit result and the log-scale fits;
:mod:`bayesgrowth.leastsq.revenue` the fits on the original scale.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from bayesgrowth.leastsq.line import MIN_POINTS, LineFit, fit_line

__all__ = [
    "GrowthFit",
    "LineFit",
    "LogScaleStats",
    "fit_line",
    "fit_log_linear",
    "fit_log_linear_anchored",
]


@dataclass(frozen=True)
class LogScaleStats:
    """Log-scale regression summary of a log-linear fit, for classical intervals.

    The fit is ``log R(t) = intercept + slope * (t - t_ref)``. For an anchored
    fit the intercept is fixed, so its variance and covariance are zero.

    Attributes
    ----------
    intercept, slope : float
        Log-scale coefficients; ``a = exp(intercept)``, ``g = exp(slope) - 1``.
    var_intercept, var_slope, cov_intercept_slope : float
        Estimated covariance matrix of the coefficients.
    residual_sd : float
        Residual standard deviation on the log scale, ``sqrt(SSE / dof)``.
    dof : int
        Residual degrees of freedom, ``n - 2`` (``n - 1`` when anchored).
    """

    intercept: float
    slope: float
    var_intercept: float
    var_slope: float
    cov_intercept_slope: float
    residual_sd: float
    dof: int


@dataclass(frozen=True)
class GrowthFit:
    """A fitted exponential growth curve ``R(t) = a * (1 + g) ** (t - t_ref)``.

    Attributes
    ----------
    variant : str
        Plain description of how the curve was fitted, e.g. ``"log-linear"``.
    n_points : int
        Number of observations used.
    initial_value : float
        ``a``, the fitted value at ``t_ref``.
    growth_per_period : float
        ``g``, the fitted growth rate per period (0.05 means 5 % per period).
    t_ref : float
        Reference period of ``initial_value``.
    t_last : float
        Last observed period of the series the fit was made for. Horizons are
        counted from here; for a fit that left out the final observations this
        is later than the last point it used.
    r_squared : float
        Coefficient of determination on the scale the curve was fitted on (log
        scale for log-linear fits, original scale otherwise), ``1 - SSE / SST``
        with ``SST`` about the mean. Anchored fits can give negative values.
    rmse : float
        Root mean squared error on the original scale, ``sqrt(mean((y - R(t))**2))``.
    t_used : tuple of float
        Periods of the observations used.
    log_scale : LogScaleStats or None
        Log-scale regression summary, for log-linear fits only.
    """

    variant: str
    n_points: int
    initial_value: float
    growth_per_period: float
    t_ref: float
    t_last: float
    r_squared: float
    rmse: float
    t_used: tuple[float, ...]
    log_scale: LogScaleStats | None = None

    def value_at(self, t: float | np.ndarray) -> float | np.ndarray:
        """Evaluate the fitted curve.

        Parameters
        ----------
        t : float or numpy.ndarray
            Period(s), on the same time index as the data.

        Returns
        -------
        float or numpy.ndarray
            ``a * (1 + g) ** (t - t_ref)``.
        """
        s = np.asarray(t, dtype=float) - self.t_ref
        value = self.initial_value * np.exp(np.log1p(self.growth_per_period) * s)
        return float(value) if np.ndim(value) == 0 else value

    def forecast(self, horizon: float) -> float:
        """Point forecast ``horizon`` periods after ``t_last``.

        Parameters
        ----------
        horizon : float
            Number of periods past the last observation.

        Returns
        -------
        float
            The fitted curve at ``t_last + horizon``.
        """
        return float(self.value_at(self.t_last + horizon))


def check_series(
    t: np.ndarray, y: np.ndarray, t_ref: float | None
) -> tuple[np.ndarray, np.ndarray, float]:
    """Validate a series and resolve the reference period.

    Parameters
    ----------
    t, y : numpy.ndarray
        Periods (strictly increasing, finite) and values (finite, > 0), at
        least 3 of each.
    t_ref : float or None
        Reference period; None means ``t[0]``.

    Returns
    -------
    tuple
        ``(t, y, t_ref)`` as float arrays and a float.
    """
    t = np.asarray(t, dtype=float)
    y = np.asarray(y, dtype=float)
    if t.ndim != 1 or t.shape != y.shape:
        raise ValueError("t and y must be one-dimensional arrays of the same length")
    if t.size < MIN_POINTS:
        raise ValueError(f"a growth fit needs at least {MIN_POINTS} observations, got {t.size}")
    if not (np.all(np.isfinite(t)) and np.all(np.isfinite(y))):
        raise ValueError("t and y must be finite numbers")
    if np.any(np.diff(t) <= 0):
        raise ValueError("t must be strictly increasing")
    if np.any(y <= 0):
        raise ValueError("all values must be greater than zero")
    t_ref = float(t[0]) if t_ref is None else float(t_ref)
    if not np.isfinite(t_ref):
        raise ValueError("t_ref must be a finite number")
    return t, y, t_ref


def _anchor_value(t: np.ndarray, y: np.ndarray, t_ref: float) -> float:
    """Observed value at the reference period."""
    hit = np.flatnonzero(t == t_ref)
    if hit.size == 0:
        raise ValueError(f"an anchored fit needs an observation at t_ref = {t_ref:g}")
    return float(y[hit[0]])


def _r_squared(observed: np.ndarray, fitted: np.ndarray) -> float:
    dev = observed - np.mean(observed)
    sst = float(dev @ dev)
    resid = observed - fitted
    return 1.0 - float(resid @ resid) / sst if sst > 0 else float("nan")


def _rmse(y: np.ndarray, fitted: np.ndarray) -> float:
    with np.errstate(over="ignore"):  # an overflowing curve gives rmse = inf
        return float(np.sqrt(np.mean((y - fitted) ** 2)))


def _resolve_t_last(t: np.ndarray, t_last: float | None) -> float:
    return float(t[-1]) if t_last is None else float(t_last)


def fit_log_linear(
    t: np.ndarray,
    y: np.ndarray,
    *,
    t_ref: float | None = None,
    t_last: float | None = None,
    variant: str = "log-linear",
) -> GrowthFit:
    """Fit the growth curve by ordinary least squares of ``log y`` on ``t``.

    This is the fit spreadsheets call exponential regression: the straight line
    ``log y = c + b (t - t_ref)`` gives ``a = exp(c)`` and ``g = exp(b) - 1``.

    Parameters
    ----------
    t : numpy.ndarray
        Periods of the observations, strictly increasing (gaps allowed).
    y : numpy.ndarray
        Observed values, all greater than zero; at least 3 of them.
    t_ref : float, optional
        Reference period of the initial value; default ``t[0]``.
    t_last : float, optional
        Period horizons are counted from; default ``t[-1]``.
    variant : str, optional
        Label stored in the result.

    Returns
    -------
    GrowthFit
        The fit, with its log-scale summary in ``log_scale``.
    """
    t, y, t_ref = check_series(t, y, t_ref)
    line = fit_line(t - t_ref, np.log(y))
    stats = LogScaleStats(
        intercept=line.intercept,
        slope=line.slope,
        var_intercept=line.intercept_se**2,
        var_slope=line.slope_se**2,
        cov_intercept_slope=line.covariance,
        residual_sd=line.residual_sd,
        dof=line.dof,
    )
    return _log_scale_fit(variant, t, y, t_ref, t_last, float(np.exp(line.intercept)), stats,
                          line.r_squared)


def fit_log_linear_anchored(
    t: np.ndarray,
    y: np.ndarray,
    *,
    t_ref: float | None = None,
    t_last: float | None = None,
    variant: str = "log-linear, anchored",
) -> GrowthFit:
    """Fit the growth rate on the log scale with the curve pinned to the value at ``t_ref``.

    The initial value is the observation at ``t_ref``; the log-scale slope is
    the least-squares line through that point,
    ``b = sum(s * (log y - log y_ref)) / sum(s**2)`` with ``s = t - t_ref``.

    Parameters
    ----------
    t : numpy.ndarray
        Periods of the observations, strictly increasing; one must equal ``t_ref``.
    y : numpy.ndarray
        Observed values, all greater than zero; at least 3 of them.
    t_ref : float, optional
        Reference (anchor) period; default ``t[0]``.
    t_last : float, optional
        Period horizons are counted from; default ``t[-1]``.
    variant : str, optional
        Label stored in the result.

    Returns
    -------
    GrowthFit
        The fit. ``log_scale`` holds the slope, its variance
        ``s_res**2 / sum(s**2)`` and ``dof = n - 1``; the intercept variance is 0.
    """
    t, y, t_ref = check_series(t, y, t_ref)
    y_ref = _anchor_value(t, y, t_ref)
    s = t - t_ref
    dz = np.log(y) - np.log(y_ref)
    sss = float(s @ s)
    slope = float(s @ dz) / sss
    resid = dz - slope * s
    dof = t.size - 1
    s2 = float(resid @ resid) / dof
    stats = LogScaleStats(
        intercept=float(np.log(y_ref)),
        slope=slope,
        var_intercept=0.0,
        var_slope=s2 / sss,
        cov_intercept_slope=0.0,
        residual_sd=float(np.sqrt(s2)),
        dof=dof,
    )
    return _log_scale_fit(variant, t, y, t_ref, t_last, y_ref, stats)


def _log_scale_fit(variant: str, t, y, t_ref: float, t_last, a: float, stats: LogScaleStats,
                   r_squared: float | None = None) -> GrowthFit:
    """The fit of a log-scale line with initial value ``a`` and the slope in ``stats``.

    ``r_squared`` defaults to that of the log values.
    """
    fitted = a * np.exp(stats.slope * (t - t_ref))
    return GrowthFit(
        variant=variant,
        n_points=int(t.size),
        initial_value=a,
        growth_per_period=float(np.expm1(stats.slope)),
        t_ref=t_ref,
        t_last=_resolve_t_last(t, t_last),
        r_squared=(_r_squared(np.log(y), np.log(fitted)) if r_squared is None
                   else r_squared),
        rmse=_rmse(y, fitted),
        t_used=tuple(float(v) for v in t),
        log_scale=stats,
    )
