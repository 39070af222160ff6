"""Log score: the negative log predictive density at the outcome.

Lower is better. Revenue-type outcomes are positive, so the sample version
smooths the draws on the log scale, where growth forecasts are close to
symmetric, and converts back to a density for the outcome itself.

References
----------
Good, I. J. (1952). Rational decisions. JRSS B 14:107-114 (log score).
Gneiting, T. and Raftery, A. E. (2007). JASA 102:359-378, section 4.
Silverman, B. W. (1986). Density Estimation for Statistics and Data
Analysis, eq. (3.31) (rule-of-thumb bandwidth).
"""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray
from scipy import special

from bayesgrowth.scoring._checks import as_draws, as_float, check_df

__all__ = ["kde_bandwidth", "log_score", "log_score_log_t", "log_score_t"]


def kde_bandwidth(values: ArrayLike) -> NDArray[np.float64] | np.float64:
    """Rule-of-thumb Gaussian-kernel bandwidth along the last axis.

    ``0.9 * min(sd, IQR / 1.34) * m**(-1/5)`` (Silverman 1986, eq. 3.31).
    When the IQR is zero but the standard deviation is not, the standard
    deviation is used alone.

    Parameters
    ----------
    values : array_like, shape (..., m)
        Sample, members on the last axis.

    Returns
    -------
    ndarray or float, shape (...)
        Bandwidth; zero for a sample with no spread.
    """
    v = as_draws(values)
    m = v.shape[-1]
    sd = np.std(v, axis=-1, ddof=1) if m > 1 else np.zeros(v.shape[:-1])
    q75, q25 = np.percentile(v, [75.0, 25.0], axis=-1)
    iqr = (q75 - q25) / 1.34
    spread = np.where(iqr > 0, np.minimum(sd, iqr), sd)
    out = 0.9 * spread * m ** (-0.2)
    return out[()] if np.ndim(out) == 0 else out


def log_score(y: ArrayLike, draws: ArrayLike) -> NDArray[np.float64] | np.float64:
    """Negative log predictive density of ``y`` estimated from positive draws.

    A Gaussian kernel density estimate is fitted to ``log(draws)`` (bandwidth
    from :func:`kde_bandwidth`), giving a density ``g`` for ``log Y``. The
    density of ``Y`` itself is ``g(log y) / y`` (the Jacobian of the log), so
    the score is ``-log g(log y) + log y``. This makes it comparable with
    :func:`log_score_log_t`, which is also a density of ``y``.

    Parameters
    ----------
    y : array_like, shape (...)
        Observed values. A non-positive value gets ``inf`` (a predictive on
        the positive numbers gives it zero density).
    draws : array_like, shape (..., m)
        Positive predictive draws, members on the last axis.

    Returns
    -------
    ndarray or float, shape ``broadcast(y, draws[..., 0])``
        Log score. ``inf`` where the draws have no spread (no density).

    Raises
    ------
    ValueError
        If any draw is zero or negative.
    """
    d = as_draws(draws)
    if np.any(d <= 0):
        raise ValueError("log_score needs positive draws (it smooths them on the log scale)")
    obs = as_float(y)
    log_d = np.log(d)
    h = np.asarray(kde_bandwidth(log_d))
    positive = obs > 0
    log_y = np.log(np.where(positive, obs, 1.0))
    safe_h = np.where(h > 0, h, 1.0)
    z = (log_y[..., None] - log_d) / safe_h[..., None]
    m = d.shape[-1]
    log_g = special.logsumexp(-0.5 * z * z, axis=-1) - np.log(m * safe_h * np.sqrt(2 * np.pi))
    out = np.where(positive & (h > 0), -log_g + log_y, np.inf)
    return out[()] if out.ndim == 0 else out


def log_score_t(
    y: ArrayLike, loc: ArrayLike, scale: ArrayLike, df: ArrayLike
) -> NDArray[np.float64] | np.float64:
    """Log score of a location-scale Student-t predictive, in closed form.

    Parameters
    ----------
    y : array_like
        Observed values.
    loc, scale : array_like
        Location and (positive) scale of the t.
    df : array_like
        Degrees of freedom, positive (``np.inf`` gives a normal).

    Returns
    -------
    ndarray or float
        ``-log f(y)``.

    Raises
    ------
    ValueError
        If any scale is not positive or any df is not positive.
    """
    obs, mu, s, nu = np.broadcast_arrays(
        as_float(y), as_float(loc), as_float(scale), as_float(df)
    )
    if not np.all(s > 0):
        raise ValueError("scale must be positive for a density")
    check_df(nu)
    from scipy import stats  # imported here: scipy.stats costs ~1 s to import
    out = -(stats.t.logpdf((obs - mu) / s, nu) - np.log(s))
    return out[()] if out.ndim == 0 else out


def log_score_log_t(
    y: ArrayLike, loc: ArrayLike, scale: ArrayLike, df: ArrayLike
) -> NDArray[np.float64] | np.float64:
    """Log score of a log-t predictive (a Student-t for ``log Y``), for ``y``.

    ``-log f_Y(y) = -log f_t((log y - loc) / scale; df) + log scale + log y``,
    the last term being the Jacobian of the log.

    Parameters
    ----------
    y : array_like
        Observed values; non-positive values get ``inf``.
    loc, scale : array_like
        Location and (positive) scale of the t on the log scale.
    df : array_like
        Degrees of freedom, positive (``np.inf`` gives a log-normal).

    Returns
    -------
    ndarray or float
        ``-log f_Y(y)``.

    Raises
    ------
    ValueError
        If any scale is not positive or any df is not positive.
    """
    obs = as_float(y)
    positive = obs > 0
    log_y = np.log(np.where(positive, obs, 1.0))
    out = np.where(positive, np.asarray(log_score_t(log_y, loc, scale, df)) + log_y, np.inf)
    return out[()] if out.ndim == 0 else out
