"""Continuous ranked probability score (CRPS).

All functions are vectorised and return arrays shaped like the broadcast of
their inputs (a 0-d result is returned as a numpy float). Lower is better.

References
----------
Gneiting, T. and Raftery, A. E. (2007). Strictly proper scoring rules,
prediction, and estimation. JASA 102:359-378 (kernel form of the CRPS).
Hersbach, H. (2000). Decomposition of the continuous ranked probability
score for ensemble prediction systems. Wea. Forecasting 15:559-570.
Jordan, A., Krüger, F. and Lerch, S. (2019). Evaluating probabilistic
forecasts with scoringRules. J. Stat. Softw. 90(12) (Student-t closed form).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy import special

from bayesgrowth.scoring._checks import as_draws, as_float, check_df, check_scale

__all__ = ["crps_ensemble", "crps_normal", "crps_point", "crps_t"]


def crps_ensemble(y: ArrayLike, draws: ArrayLike) -> NDArray[np.float64] | np.float64:
    """CRPS of an ensemble (sample) predictive, plain ECDF estimator.

    Uses the kernel form ``E|X - y| - 0.5 E|X - X'|`` with both expectations
    taken under the empirical distribution of the draws, which equals the
    integral of ``(ECDF(x) - 1{x >= y})**2``. The pairwise term is computed
    from sorted draws, ``sum_i (2i - m - 1) x_(i) / m**2``, so the cost is
    O(m log m) rather than O(m**2).

    This is the plain estimator, not the "fair" one with ``1/(m(m-1))``:
    for the ensemble {1, 2, 4} and y = 2.5 it gives 0.5 (the fair one 1/6).

    Parameters
    ----------
    y : array_like, shape (...)
        Observed values.
    draws : array_like, shape (..., m)
        Predictive draws, members on the last axis; leading axes broadcast
        against ``y``.

    Returns
    -------
    ndarray or float
        CRPS with shape ``broadcast(y, draws[..., 0])``. NaN wherever ``y``
        or any draw is NaN.
    """
    d = np.sort(as_draws(draws), axis=-1)
    obs = as_float(y)
    m = d.shape[-1]
    spread_w = (2.0 * np.arange(1, m + 1) - m - 1.0) / (m * m)
    term_obs = np.mean(np.abs(d - obs[..., None]), axis=-1)
    term_spread = d @ spread_w
    out = term_obs - term_spread
    return out[()] if out.ndim == 0 else out


def crps_point(y: ArrayLike, forecast: ArrayLike) -> NDArray[np.float64] | np.float64:
    """CRPS of a point forecast, which reduces to the absolute error.

    Parameters
    ----------
    y : array_like
        Observed values.
    forecast : array_like
        Point forecasts, broadcast against ``y``.

    Returns
    -------
    ndarray or float
        ``|y - forecast|``.
    """
    out = np.abs(as_float(y) - as_float(forecast))
    return out[()] if out.ndim == 0 else out


def _std_normal_crps(z: NDArray[np.float64]) -> NDArray[np.float64]:
    pdf = np.exp(-0.5 * z * z) / np.sqrt(2.0 * np.pi)
    return z * (2.0 * special.ndtr(z) - 1.0) + 2.0 * pdf - 1.0 / np.sqrt(np.pi)


def crps_normal(
    y: ArrayLike, loc: ArrayLike, scale: ArrayLike
) -> NDArray[np.float64] | np.float64:
    """Closed-form CRPS of a normal predictive ``N(loc, scale**2)``.

    ``scale * [z (2 Phi(z) - 1) + 2 phi(z) - 1/sqrt(pi)]`` with
    ``z = (y - loc) / scale`` (Gneiting & Raftery 2007). A zero scale is a
    point forecast and gives ``|y - loc|``.

    Parameters
    ----------
    y : array_like
        Observed values.
    loc : array_like
        Predictive means.
    scale : array_like
        Predictive standard deviations, non-negative.

    Returns
    -------
    ndarray or float
        CRPS, broadcast shape of the inputs.

    Raises
    ------
    ValueError
        If any scale is negative.
    """
    obs, mu, s = np.broadcast_arrays(as_float(y), as_float(loc), as_float(scale))
    check_scale(s)
    point = s == 0
    safe = np.where(point, 1.0, s)
    out = np.where(point, np.abs(obs - mu), safe * _std_normal_crps((obs - mu) / safe))
    return out[()] if out.ndim == 0 else out


def crps_t(
    y: ArrayLike, loc: ArrayLike, scale: ArrayLike, df: ArrayLike
) -> NDArray[np.float64] | np.float64:
    """Closed-form CRPS of a location-scale Student-t predictive.

    For the standard t with ``nu`` degrees of freedom at ``z``::

        z (2 F(z) - 1) + 2 f(z) (nu + z**2) / (nu - 1)
            - 2 sqrt(nu) B(1/2, nu - 1/2) / ((nu - 1) B(1/2, nu/2)**2)

    multiplied by ``scale`` with ``z = (y - loc) / scale`` (Jordan, Krüger &
    Lerch 2019). The CRPS needs a finite mean, so ``df <= 1`` gives ``inf``;
    ``df = inf`` gives the normal CRPS; ``scale = 0`` gives ``|y - loc|``.

    Note this scores on the scale the t lives on. A t on the log of revenue
    is a log-t on revenue, whose CRPS on the revenue scale is infinite (the
    log-t has no finite mean); see
    :func:`bayesgrowth.scoring.draws.draws_from_log_t` for how the backtest
    scores such forecasts on the revenue scale.

    Parameters
    ----------
    y : array_like
        Observed values.
    loc : array_like
        Location of the t.
    scale : array_like
        Scale of the t, non-negative.
    df : array_like
        Degrees of freedom, positive (``np.inf`` allowed).

    Returns
    -------
    ndarray or float
        CRPS, broadcast shape of the inputs.

    Raises
    ------
    ValueError
        If any scale is negative or any df is not positive.
    """
    obs, mu, s, nu = np.broadcast_arrays(
        as_float(y), as_float(loc), as_float(scale), as_float(df)
    )
    check_scale(s)
    check_df(nu)
    point = s == 0
    safe_s = np.where(point, 1.0, s)
    z = (obs - mu) / safe_s
    finite = np.isfinite(nu) & (nu > 1)
    nu_f = np.where(finite, nu, 2.0)
    from scipy import stats  # imported here: scipy.stats costs ~1 s to import
    log_ratio = special.betaln(0.5, nu_f - 0.5) - 2.0 * special.betaln(0.5, nu_f / 2.0)
    std_t = (
        z * (2.0 * stats.t.cdf(z, nu_f) - 1.0)
        + 2.0 * stats.t.pdf(z, nu_f) * (nu_f + z * z) / (nu_f - 1.0)
        - 2.0 * np.sqrt(nu_f) * np.exp(log_ratio) / (nu_f - 1.0)
    )
    std = np.where(finite, std_t, np.where(np.isinf(nu), _std_normal_crps(z), np.inf))
    out = np.where(point, np.abs(obs - mu), safe_s * std)
    return out[()] if out.ndim == 0 else out
