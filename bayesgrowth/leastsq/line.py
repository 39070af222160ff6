"""The ordinary least-squares straight line under the log-scale growth fits."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["MIN_POINTS", "LineFit", "fit_line"]

#: Fewest points a line (and any growth fit) takes.
MIN_POINTS = 3


@dataclass(frozen=True)
class LineFit:
    """Ordinary least-squares straight line ``z = intercept + slope * x``.

    Attributes
    ----------
    intercept, slope : float
        Estimates.
    intercept_se, slope_se : float
        Their standard errors.
    covariance : float
        Estimated covariance of intercept and slope.
    residual_sd : float
        Residual standard deviation, ``sqrt(SSE / (n - 2))``.
    r_squared : float
        Coefficient of determination, ``1 - SSE / SST`` (NaN when ``z`` is constant).
    n : int
        Number of observations.
    dof : int
        Residual degrees of freedom, ``n - 2``.
    x_mean, sxx : float
        Mean of ``x`` and ``sum((x - x_mean)**2)``.
    """

    intercept: float
    slope: float
    intercept_se: float
    slope_se: float
    covariance: float
    residual_sd: float
    r_squared: float
    n: int
    dof: int
    x_mean: float
    sxx: float


def fit_line(x: np.ndarray, z: np.ndarray) -> LineFit:
    """Fit a straight line by ordinary least squares.

    Centred sums are used throughout, which keeps the result accurate when
    ``x`` sits far from zero.

    Parameters
    ----------
    x, z : numpy.ndarray
        Predictor and response, 1-D, same length, at least 3 points and at
        least two distinct ``x`` values.

    Returns
    -------
    LineFit
        Estimates, standard errors and residual statistics.
    """
    x = np.asarray(x, dtype=float)
    z = np.asarray(z, dtype=float)
    if x.ndim != 1 or x.shape != z.shape:
        raise ValueError("x and z must be one-dimensional arrays of the same length")
    n = x.size
    if n < MIN_POINTS:
        raise ValueError(f"a line fit needs at least {MIN_POINTS} points, got {n}")
    x_mean = float(np.mean(x))
    z_mean = float(np.mean(z))
    dx = x - x_mean
    dz = z - z_mean
    sxx = float(dx @ dx)
    if sxx == 0.0:
        raise ValueError("all x values are equal; the slope is not defined")
    slope = float(dx @ dz) / sxx
    intercept = z_mean - slope * x_mean
    resid = dz - slope * dx
    sse = float(resid @ resid)
    sst = float(dz @ dz)
    dof = n - 2
    s2 = sse / dof
    var_slope = s2 / sxx
    var_intercept = s2 * (1.0 / n + x_mean**2 / sxx)
    return LineFit(
        intercept=intercept,
        slope=slope,
        intercept_se=float(np.sqrt(var_intercept)),
        slope_se=float(np.sqrt(var_slope)),
        covariance=-x_mean * var_slope,
        residual_sd=float(np.sqrt(s2)),
        r_squared=1.0 - sse / sst if sst > 0 else float("nan"),
        n=n,
        dof=dof,
        x_mean=x_mean,
        sxx=sxx,
    )
