"""Exponential growth fitted by nonlinear least squares on the original (revenue) scale.

The curve is ``R(t) = a * (1 + g) ** (t - t_ref)`` as in
:mod:`bayesgrowth.leastsq.fits`, fitted to the values themselves, so the large
late values weigh most (which is how a spreadsheet trendline on the values fits).
"""

from __future__ import annotations

import numpy as np

from bayesgrowth.leastsq.fits import (
    GrowthFit,
    _anchor_value,
    _r_squared,
    _resolve_t_last,
    _rmse,
    check_series,
    fit_log_linear,
    fit_log_linear_anchored,
)
from bayesgrowth.leastsq.nls import LeastSquaresError, fit_nonlinear

__all__ = ["fit_revenue_scale", "fit_revenue_scale_anchored"]


def _curve(s: np.ndarray, params: np.ndarray) -> np.ndarray:
    return params[0] * np.exp(params[1] * s)


def _curve_jac(s: np.ndarray, params: np.ndarray) -> np.ndarray:
    e = np.exp(params[1] * s)
    return np.column_stack([e, params[0] * s * e])


def _finish_revenue_fit(
    t: np.ndarray,
    y: np.ndarray,
    t_ref: float,
    t_last: float | None,
    variant: str,
    a: float,
    log_growth: float,
    converged: bool,
    message: str,
) -> GrowthFit:
    if not converged or not (np.isfinite(a) and np.isfinite(log_growth)):
        raise LeastSquaresError(
            f"the {variant} fit did not converge ({message}); "
            "try more function evaluations or check the data"
        )
    fitted = a * np.exp(log_growth * (t - t_ref))
    return GrowthFit(
        variant=variant,
        n_points=int(t.size),
        initial_value=float(a),
        growth_per_period=float(np.expm1(log_growth)),
        t_ref=t_ref,
        t_last=_resolve_t_last(t, t_last),
        r_squared=_r_squared(y, fitted),
        rmse=_rmse(y, fitted),
        t_used=tuple(float(v) for v in t),
    )


def fit_revenue_scale(
    t: np.ndarray,
    y: np.ndarray,
    *,
    t_ref: float | None = None,
    t_last: float | None = None,
    max_nfev: int | None = None,
    variant: str = "revenue-scale",
) -> GrowthFit:
    """Fit the growth curve by nonlinear least squares on the original scale.

    Minimises ``sum((y - a * (1 + g) ** (t - t_ref))**2)``, starting from the
    log-linear solution. Internally the curve is written ``a * exp(b s)`` with
    ``b = log(1 + g)``, which keeps ``g > -1``.

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
    max_nfev : int, optional
        Largest number of model evaluations the solver may use.
    variant : str, optional
        Label stored in the result.

    Returns
    -------
    GrowthFit
        The fit (``log_scale`` is None).

    Raises
    ------
    LeastSquaresError
        If the solver fails or does not converge.
    """
    t, y, t_ref = check_series(t, y, t_ref)
    start = fit_log_linear(t, y, t_ref=t_ref)
    p0 = np.array([start.initial_value, np.log1p(start.growth_per_period)])
    result = fit_nonlinear(_curve, t - t_ref, y, p0, jac=_curve_jac, max_nfev=max_nfev)
    a, b = result.params
    return _finish_revenue_fit(t, y, t_ref, t_last, variant, a, b, result.converged, result.message)


def fit_revenue_scale_anchored(
    t: np.ndarray,
    y: np.ndarray,
    *,
    t_ref: float | None = None,
    t_last: float | None = None,
    max_nfev: int | None = None,
    variant: str = "revenue-scale, anchored",
) -> GrowthFit:
    """Fit the growth rate on the original scale with ``a`` fixed to the value at ``t_ref``.

    Minimises ``sum((y - y_ref * (1 + g) ** (t - t_ref))**2)`` over ``g``,
    starting from the anchored log-linear slope.

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
    max_nfev : int, optional
        Largest number of model evaluations the solver may use.
    variant : str, optional
        Label stored in the result.

    Returns
    -------
    GrowthFit
        The fit (``log_scale`` is None).

    Raises
    ------
    LeastSquaresError
        If the solver fails or does not converge.
    """
    t, y, t_ref = check_series(t, y, t_ref)
    y_ref = _anchor_value(t, y, t_ref)
    start = fit_log_linear_anchored(t, y, t_ref=t_ref)

    def model(s: np.ndarray, params: np.ndarray) -> np.ndarray:
        return y_ref * np.exp(params[0] * s)

    def jac(s: np.ndarray, params: np.ndarray) -> np.ndarray:
        return (y_ref * s * np.exp(params[0] * s))[:, None]

    p0 = np.array([np.log1p(start.growth_per_period)])
    result = fit_nonlinear(model, t - t_ref, y, p0, jac=jac, max_nfev=max_nfev)
    return _finish_revenue_fit(
        t, y, t_ref, t_last, variant, y_ref, result.params[0], result.converged, result.message
    )
