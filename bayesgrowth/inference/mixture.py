"""Finite mixtures of normals on the log scale: the exact engine's predictive.

For log values the predictive is ``sum_g w_g Normal(m_g, s_g^2)``, so a value's
predictive is a mixture of log-normals. Its CDF is a weighted sum of normal CDFs;
quantiles come from safeguarded Newton steps on that CDF (monotone, so the
bracket always holds the root), to a tolerance far below any band's rounding.
"""

from __future__ import annotations

import numpy as np

from bayesgrowth.inference.normal import ndtr, ndtri

__all__ = ["heaviest", "mixture_cdf", "mixture_mean_exp", "mixture_quantiles"]

_ITER = 100


#: Components outside the heaviest ones holding all but this mass are dropped before
#: root-finding: a quantile then moves by less than this in probability (2e-5 of the 80%
#: band's width on a 40-point quarterly series), far below the grid's own error (about
#: 0.3% of that width on a typical series, tests/inference/test_statespace_grid_accuracy.py),
#: with a third to half of the components of a typical exact posterior left out.
_TAIL_MASS = 1e-5


def heaviest(weight: np.ndarray) -> np.ndarray:
    """Indices of the heaviest components, which hold all but ``1e-5`` of the weight."""
    order = np.argsort(weight)[::-1]
    cum = np.cumsum(weight[order])
    return order[: int(np.searchsorted(cum, 1.0 - _TAIL_MASS)) + 1]


def compact(weight: np.ndarray, mean: np.ndarray, sd: np.ndarray):
    """The heaviest components holding all but ``1e-5`` of the weight, renormalised."""
    keep = heaviest(weight)
    w = weight[keep]
    return w / w.sum(), mean[keep], sd[keep]


def mixture_cdf(weight: np.ndarray, mean: np.ndarray, sd: np.ndarray,
                x: np.ndarray) -> np.ndarray:
    """``P(X <= x)`` per column, for ``mean``/``sd`` ``(G, H)`` and ``x`` ``(..., H)``."""
    x = np.asarray(x, dtype=float)
    z = (x[..., None, :] - mean) / sd
    return np.einsum("g,...gh->...h", weight, ndtr(z))


def mixture_quantiles(weight: np.ndarray, mean: np.ndarray, sd: np.ndarray,
                      probs, tol: float = 1e-9) -> np.ndarray:
    """Quantiles ``(len(probs), H)`` of the mixture, per column.

    Newton steps on the CDF from the moment-matched normal's quantile, each kept
    inside a bracket that bisection would also keep (so the iteration cannot
    leave the root's bracket), until every step is below ``tol * max(1, |x|)``.

    Parameters
    ----------
    weight : numpy.ndarray, shape (G,)
        Mixture weights (sum to 1).
    mean, sd : numpy.ndarray, shape (G, H)
        Component means and standard deviations for each of ``H`` columns.
    probs : sequence of float
        Probabilities strictly between 0 and 1.
    tol : float
        Relative tolerance of the root (the default is far below any rounding; a
        convergence check needs less).
    """
    weight, mean, sd = compact(weight, mean, sd)
    p = np.asarray(probs, dtype=float)[:, None]
    sd = np.maximum(sd, 1e-300)
    lo = np.broadcast_to((mean - 40 * sd).min(axis=0), (p.size, mean.shape[1])).copy()
    hi = np.broadcast_to((mean + 40 * sd).max(axis=0), (p.size, mean.shape[1])).copy()
    m = weight @ mean
    s = np.sqrt(weight @ (sd**2 + mean**2) - m**2)
    x = np.clip(m + s * ndtri(p), lo, hi)
    for _ in range(_ITER):
        z = (x[..., None, :] - mean) / sd
        f = np.einsum("g,pgh->ph", weight, ndtr(z)) - p
        dens = np.einsum("g,pgh->ph", weight, np.exp(-0.5 * z**2) / sd) / np.sqrt(2 * np.pi)
        lo = np.where(f < 0, x, lo)
        hi = np.where(f < 0, hi, x)
        with np.errstate(divide="ignore", invalid="ignore"):
            step = np.where(dens > 0, f / dens, np.inf)
        new = x - step
        outside = ~((new >= lo) & (new <= hi))
        new = np.where(outside, 0.5 * (lo + hi), new)
        if np.all(np.abs(new - x) < tol * np.maximum(1.0, np.abs(x))):
            return new
        x = new
    return x


def mixture_mean_exp(weight: np.ndarray, mean: np.ndarray, sd: np.ndarray) -> np.ndarray:
    """``E[exp(X)]`` per column: the mean of the log-normal mixture."""
    with np.errstate(over="ignore"):  # a very wide component has an infinite mean, honestly
        return weight @ np.exp(mean + 0.5 * sd**2)
