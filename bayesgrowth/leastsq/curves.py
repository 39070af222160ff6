"""Least-squares fits of the bending growth curves: logistic, Gompertz and damped.

The curves are those of the Bayesian models (:mod:`bayesgrowth.models.general`),
fitted on the data's own scale by :func:`~bayesgrowth.leastsq.nls.fit_nonlinear`:

* logistic ``R = K / (1 + ((K - a) / a) exp(-r (t - t_ref)))``;
* Gompertz ``R = K exp(-ln(K / a) exp(-r (t - t_ref)))``;
* damped ``R = a exp(b (1 - d^(t - t_ref)) / (1 - d))`` with ``d = exp(-r)``: the
  log growth ``b`` of the first period fades by the factor ``d`` every period.

Each is parameterised by ``(a, K, r)`` or ``(a, b, r)``; the half-life of growth is
``ln 2 / r`` periods. :func:`logistic_nist` evaluates the three-parameter logistic
in the form of NIST StRD's Rat42 problem, ``b1 / (1 + exp(b2 - b3 x))``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from bayesgrowth.leastsq.nls import LeastSquaresError, NonlinearFit, fit_nonlinear

__all__ = [
    "CurveFit",
    "fit_curve",
    "logistic_curve",
    "gompertz_curve",
    "damped_curve",
    "logistic_nist",
]

CURVE_NAMES = ("logistic", "gompertz", "damped")


def logistic_curve(t: np.ndarray, params: np.ndarray, t_ref: float = 0.0) -> np.ndarray:
    """Logistic curve with ``params = (a, K, r)``."""
    a, k, r = params
    return k / (1 + (k - a) / a * np.exp(-r * (np.asarray(t, dtype=float) - t_ref)))


def gompertz_curve(t: np.ndarray, params: np.ndarray, t_ref: float = 0.0) -> np.ndarray:
    """Gompertz curve with ``params = (a, K, r)``."""
    a, k, r = params
    return k * np.exp(-np.log(k / a) * np.exp(-r * (np.asarray(t, dtype=float) - t_ref)))


def damped_curve(t: np.ndarray, params: np.ndarray, t_ref: float = 0.0) -> np.ndarray:
    """Damped-growth curve with ``params = (a, b, r)`` (``b`` the first period's log growth)."""
    a, b, r = params
    dt = np.asarray(t, dtype=float) - t_ref
    return a * np.exp(b * np.expm1(-r * dt) / np.expm1(-r))


def logistic_nist(x: np.ndarray, params: np.ndarray) -> np.ndarray:
    """The logistic in NIST StRD's form ``b1 / (1 + exp(b2 - b3 x))``."""
    b1, b2, b3 = params
    return b1 / (1 + np.exp(b2 - b3 * np.asarray(x, dtype=float)))


_CURVES = {"logistic": logistic_curve, "gompertz": gompertz_curve, "damped": damped_curve}


@dataclass(frozen=True)
class CurveFit:
    """A least-squares fit of one growth curve.

    Attributes
    ----------
    curve : str
        ``"logistic"``, ``"gompertz"`` or ``"damped"``.
    params : dict of str to float
        ``a`` and ``K`` and ``r`` (logistic, Gompertz) or ``a``, ``b``, ``r`` (damped).
    std_errors : dict of str to float
    t_ref : float
        Time index that ``a`` refers to.
    half_life : float
        ``ln 2 / r``, periods over which growth (or the gap to the ceiling) halves.
    fit : NonlinearFit
        The underlying least-squares result.
    """

    curve: str
    params: dict
    std_errors: dict
    t_ref: float
    half_life: float
    fit: NonlinearFit

    def value_at(self, t) -> np.ndarray:
        """The fitted curve at times ``t``."""
        return _CURVES[self.curve](t, np.array(list(self.params.values())), self.t_ref)


def _start(curve: str, t: np.ndarray, y: np.ndarray, t_ref: float) -> np.ndarray:
    """Rough starting values from the data: first value, latest growth, a ceiling guess."""
    a0 = float(y[np.argmin(np.abs(t - t_ref))])
    slope = np.polyfit(t, np.log(y), 1)[0]
    b0 = max(float(slope), 1e-3)
    if curve == "damped":
        return np.array([a0, b0, 0.1])
    return np.array([a0, 2.0 * float(y.max()), max(2 * b0, 0.05)])


def fit_curve(
    curve: str,
    t: np.ndarray,
    y: np.ndarray,
    *,
    t_ref: float | None = None,
    p0: np.ndarray | None = None,
) -> CurveFit:
    """Fit a bending growth curve to ``(t, y)`` by least squares on the data's scale.

    Parameters
    ----------
    curve : {"logistic", "gompertz", "damped"}
    t, y : numpy.ndarray
        Time index and positive values.
    t_ref : float, optional
        Time index the initial value ``a`` refers to; default the first ``t``.
    p0 : numpy.ndarray, optional
        Starting values ``(a, K, r)`` or ``(a, b, r)``; default rough guesses.

    Returns
    -------
    CurveFit

    Raises
    ------
    LeastSquaresError
        If the curve is unknown, the data are too few or not positive, or the
        solver does not converge.
    """
    if curve not in _CURVES:
        raise LeastSquaresError(f"curve must be one of {', '.join(_CURVES)}, got {curve!r}")
    t = np.asarray(t, dtype=float)
    y = np.asarray(y, dtype=float)
    if y.size < 4:
        raise LeastSquaresError(f"a three-parameter curve needs at least 4 points, got {y.size}")
    if np.any(y <= 0):
        raise LeastSquaresError("growth curves need positive values")
    t_ref = float(t[0]) if t_ref is None else float(t_ref)
    start = _start(curve, t, y, t_ref) if p0 is None else np.asarray(p0, dtype=float)
    func = _CURVES[curve]
    result = fit_nonlinear(lambda x, p: func(x, p, t_ref), t, y, start)
    if not result.converged:
        raise LeastSquaresError(f"the {curve} fit did not converge: {result.message}")
    names = ("a", "b", "r") if curve == "damped" else ("a", "K", "r")
    r = float(result.params[2])
    return CurveFit(
        curve=curve,
        params=dict(zip(names, map(float, result.params), strict=True)),
        std_errors=dict(zip(names, map(float, result.std_errors), strict=True)),
        t_ref=t_ref,
        half_life=math.log(2) / r if r > 0 else math.inf,
        fit=result,
    )
