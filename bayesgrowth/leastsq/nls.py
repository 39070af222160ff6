"""Generic nonlinear least squares with standard errors.

The revenue-scale growth fits are built on :func:`fit_nonlinear`, which wraps
:func:`scipy.optimize.least_squares` (Levenberg-Marquardt) and adds the usual
summary statistics: parameter standard errors from the Jacobian at the
solution, the residual sum of squares, the residual standard deviation and the
residual degrees of freedom.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np
from scipy.optimize import least_squares

__all__ = ["LeastSquaresError", "NonlinearFit", "fit_nonlinear"]

Model = Callable[[np.ndarray, np.ndarray], np.ndarray]


class LeastSquaresError(ValueError):
    """A least-squares fit could not be carried out or did not converge."""


@dataclass(frozen=True)
class NonlinearFit:
    """Result of a nonlinear least-squares fit.

    Attributes
    ----------
    params : numpy.ndarray
        Parameter estimates.
    std_errors : numpy.ndarray
        Standard errors of the estimates, ``sqrt(diag(s**2 (J'J)^-1))`` with
        ``J`` the Jacobian of the model at the estimates and ``s`` the residual
        standard deviation. NaN when ``dof`` is 0, the fit did not converge or
        the Jacobian is rank deficient.
    rss : float
        Residual sum of squares.
    residual_sd : float
        Residual standard deviation, ``sqrt(rss / dof)``. NaN when ``dof`` is 0.
    dof : int
        Residual degrees of freedom, number of observations minus number of
        parameters.
    converged : bool
        True when the solver stopped on one of its tolerances at a finite
        solution; False when it ran out of function evaluations or the model
        values overflowed.
    n_evaluations : int
        Number of model evaluations used by the solver.
    message : str
        The solver's own description of why it stopped.
    """

    params: np.ndarray
    std_errors: np.ndarray
    rss: float
    residual_sd: float
    dof: int
    converged: bool
    n_evaluations: int
    message: str


def _central_jacobian(model: Model, x: np.ndarray, params: np.ndarray) -> np.ndarray:
    """Jacobian of ``model(x, params)`` with respect to ``params`` by central differences."""
    jac = np.empty((x.shape[0], params.size))
    for j in range(params.size):
        step = np.cbrt(np.finfo(float).eps) * (abs(params[j]) if params[j] != 0 else 1.0)
        up = params.copy()
        down = params.copy()
        up[j] += step
        down[j] -= step
        jac[:, j] = (model(x, up) - model(x, down)) / (up[j] - down[j])
    return jac


def fit_nonlinear(
    model: Model,
    x: np.ndarray,
    y: np.ndarray,
    p0: np.ndarray,
    *,
    jac: Model | None = None,
    max_nfev: int | None = None,
    xtol: float = 1e-15,
    ftol: float = 1e-15,
    gtol: float = 1e-15,
) -> NonlinearFit:
    """Minimise ``sum((y - model(x, params))**2)`` over ``params``.

    Parameters
    ----------
    model : callable
        ``model(x, params)`` returning the fitted values, an array shaped like
        ``y``.
    x : numpy.ndarray
        Predictor values, passed to ``model`` unchanged.
    y : numpy.ndarray
        Observed responses, 1-D.
    p0 : numpy.ndarray
        Starting values of the parameters.
    jac : callable, optional
        ``jac(x, params)`` returning the ``(n, p)`` Jacobian of the model. When
        omitted the solver uses forward differences and the standard errors use
        central differences at the solution.
    max_nfev : int, optional
        Largest number of model evaluations the solver may use. The default is
        the solver's own (``100 * (p + 1)``).
    xtol, ftol, gtol : float, optional
        Stopping tolerances of the Levenberg-Marquardt solver.

    Returns
    -------
    NonlinearFit
        Estimates, standard errors and residual statistics. ``converged`` is
        False when the evaluation budget ran out or the result is not finite.

    Raises
    ------
    LeastSquaresError
        If the inputs or the model values at the start are not finite, there
        are fewer observations than parameters, or the solver fails outright.
    """
    x, y, p0 = _checked_inputs(x, y, p0)

    def residuals(params: np.ndarray) -> np.ndarray:
        return model(x, params) - y

    with np.errstate(over="ignore", invalid="ignore"):
        start = residuals(p0)
    if start.shape != y.shape or not np.all(np.isfinite(start)):
        raise LeastSquaresError("the model does not give finite values at the starting point")
    solver_jac: str | Callable[[np.ndarray], np.ndarray] = (
        "2-point" if jac is None else (lambda params: jac(x, params)))
    result = _solve(residuals, p0, solver_jac, xtol=xtol, ftol=ftol, gtol=gtol,
                    max_nfev=max_nfev)
    return _finish(result, residuals, model, jac, x, y.size)


def _solve(residuals, p0: np.ndarray, jac, **options):
    """Levenberg-Marquardt from ``p0``; solver failures become :class:`LeastSquaresError`."""
    try:
        with np.errstate(over="ignore", invalid="ignore"):
            return least_squares(residuals, p0, jac=jac, method="lm", **options)
    except ValueError as exc:  # scipy reports bad input and non-finite steps this way
        raise LeastSquaresError(f"the least-squares solver failed: {exc}") from exc


def _checked_inputs(x, y, p0) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Float arrays of the data and starting values; refuses what cannot be fitted."""
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    p0 = np.atleast_1d(np.asarray(p0, dtype=float))
    if y.ndim != 1:
        raise LeastSquaresError("y must be a one-dimensional array")
    n, p = y.size, p0.size
    if n < p:
        raise LeastSquaresError(f"{n} observations cannot determine {p} parameters")
    if not (np.all(np.isfinite(x)) and np.all(np.isfinite(y)) and np.all(np.isfinite(p0))):
        raise LeastSquaresError("the data and starting values must all be finite numbers")
    return x, y, p0


def _finish(result, residuals, model, jac, x, n: int) -> NonlinearFit:
    """The fit from the solver's result: residual statistics and standard errors."""
    params = np.asarray(result.x, dtype=float)
    p = params.size
    with np.errstate(over="ignore", invalid="ignore"):
        resid = residuals(params)
        rss = float(resid @ resid)
    dof = n - p
    residual_sd = float(np.sqrt(rss / dof)) if dof > 0 else float("nan")
    message = str(result.message)
    finite = bool(np.all(np.isfinite(params)) and np.isfinite(rss))
    if not finite:
        message = "the model values or the residual sum of squares are not finite numbers"
    converged = bool(result.status > 0) and finite

    std_errors = np.full(p, np.nan)
    if dof > 0 and converged:
        jmat = jac(x, params) if jac is not None else _central_jacobian(model, x, params)
        # (J'J)^-1 from the SVD of J itself, which avoids squaring its condition number.
        _, sing, vt = np.linalg.svd(jmat, full_matrices=False)
        keep = sing > np.finfo(float).eps * max(jmat.shape) * sing[0]
        if np.all(keep):  # otherwise some parameter is not identified: leave NaN
            vs = vt.T / sing
            std_errors = residual_sd * np.sqrt(np.sum(vs**2, axis=1))

    return NonlinearFit(
        params=params,
        std_errors=std_errors,
        rss=rss,
        residual_sd=residual_sd,
        dof=dof,
        converged=converged,
        n_evaluations=int(result.nfev),
        message=message,
    )
