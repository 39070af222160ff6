"""Products of AR(1)-whitened columns for many ``(sigma, phi)`` at once, from row statistics.

The innovation transform ``T`` of AR(1) errors (:mod:`bayesgrowth.models.general`) turns
row 0 of a column ``c`` into ``c_0 sqrt(1 - phi^2) / sigma`` and row ``i``, ``k`` periods
after the row before, into ``(c_i - phi^k c_{i-1}) / (sigma sqrt((1 - phi^(2k)) / (1 -
phi^2)))``. So the products of whitened columns are, grouping the rows by their gap ``k``
and writing ``d_k = 1 - phi^k`` and ``D_i = c_i - c_{i-1}``,

``(Tc)'(Tc) = (1 - phi^2) / sigma^2 [c_0 c_0' + sum_k (S_DD + d_k (S_DC + S_DC') + d_k^2 S_CC)
/ (d_k (1 + phi^k))]``

with ``S_DD = sum D_i D_i'``, ``S_DC = sum D_i c_{i-1}'`` and ``S_CC = sum c_{i-1} c_{i-1}'``
over the rows of gap ``k``; and ``log det T^-1 = n log sigma - n/2 log(1 - phi^2) + 1/2
sum_i log(1 - phi^(2 k_i))``. The sums are taken once, in ``O(n q^2)`` for ``q`` columns;
each ``(sigma, phi)`` then costs ``O(K q^2)`` for ``K`` distinct gaps (one for most series),
whatever the length of the series. Writing the innovation as ``D_i + d_k c_{i-1}`` keeps
the products accurate as ``phi`` nears 1 (expanding ``c_i - phi^k c_{i-1}`` would subtract
nearly equal sums). Independent errors are the case ``phi = 0`` without the gap terms:
``c'c / sigma^2`` and ``n log sigma``.

The PyMC model whitens rows instead (:func:`bayesgrowth.models.linear.marginal_loglik` with
PyTensor); the tests hold the two to the same numbers and to statsmodels' Kalman filter.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["GapStatistics", "gap_statistics", "whitened_gram"]


@dataclass(frozen=True)
class GapStatistics:
    """Sums over the rows of columns ``c`` (``(n, q)``, or ``(S, n, q)`` per draw).

    Attributes
    ----------
    n : int
        Rows.
    gaps : numpy.ndarray, shape (K,)
        The distinct gaps between consecutive rows, and ``counts`` the rows with each.
    first, total : numpy.ndarray, shape (..., q, q)
        ``c_0 c_0'`` and ``sum_i c_i c_i'``.
    dd, dc, cc : numpy.ndarray, shape (..., K, q, q)
        ``S_DD``, ``S_DC`` and ``S_CC`` of each gap.
    """

    n: int
    gaps: np.ndarray
    counts: np.ndarray
    first: np.ndarray
    total: np.ndarray
    dd: np.ndarray
    dc: np.ndarray
    cc: np.ndarray


def _sums(a, b, pick) -> np.ndarray:
    """``sum_i a_i b_i'`` over the rows of each gap, shape ``(..., K, q, q)``."""
    return np.stack([np.swapaxes(a[..., rows, :], -1, -2) @ b[..., rows, :] for rows in pick],
                    axis=-3)


def gap_statistics(c: np.ndarray, lag: np.ndarray) -> GapStatistics:
    """The row sums of columns ``c`` that :func:`whitened_gram` needs.

    Parameters
    ----------
    c : numpy.ndarray, shape (n, q) or (S, n, q)
    lag : numpy.ndarray, shape (n,)
        ``lag[i]`` is the gap between rows ``i - 1`` and ``i`` (``lag[0]`` is unused).
    """
    c = np.asarray(c, dtype=float)
    gaps, which = np.unique(np.asarray(lag, dtype=float)[1:], return_inverse=True)
    pick = [np.flatnonzero(which == k) for k in range(gaps.size)]
    cur, prev = c[..., 1:, :], c[..., :-1, :]
    diff = cur - prev
    return GapStatistics(
        n=c.shape[-2], gaps=gaps, counts=np.array([rows.size for rows in pick], dtype=float),
        first=c[..., :1, :].swapaxes(-1, -2) @ c[..., :1, :],
        total=np.swapaxes(c, -1, -2) @ c,
        dd=_sums(diff, diff, pick), dc=_sums(diff, prev, pick), cc=_sums(prev, prev, pick),
    )


def whitened_gram(stats: GapStatistics, sigma: np.ndarray,
                  phi: np.ndarray | None = None) -> tuple[np.ndarray, np.ndarray]:
    """``log det T^-1`` and ``(Tc)'(Tc)`` for each of ``S`` values of ``sigma`` (and ``phi``).

    Parameters
    ----------
    stats : GapStatistics
        Of the columns ``c``; per-draw statistics (``(S, n, q)`` columns) pair with the
        values of the same index.
    sigma : numpy.ndarray, shape (S,)
    phi : numpy.ndarray, shape (S,), optional
        AR(1) persistence in ``[0, 1)``; ``None`` for independent errors.

    Returns
    -------
    log_det : numpy.ndarray, shape (S,)
    gram : numpy.ndarray, shape (S, q, q)
    """
    sigma = np.asarray(sigma, dtype=float)
    s2 = sigma[:, None, None] ** 2
    if phi is None:
        return stats.n * np.log(sigma), stats.total / s2
    phi = np.asarray(phi, dtype=float)
    phik = phi[:, None] ** stats.gaps  # (S, K)
    d = -np.expm1(stats.gaps * np.log(phi)[:, None])  # 1 - phi^k, accurate near phi = 1
    one_m_phi2 = (1 - phi) * (1 + phi)
    dk = d[..., None, None]
    sym = stats.dc + np.swapaxes(stats.dc, -1, -2)
    terms = (stats.dd + dk * sym + dk**2 * stats.cc) / (dk * (1 + phik[..., None, None]))
    gram = one_m_phi2[:, None, None] / s2 * (stats.first + terms.sum(axis=-3))
    log_det = (stats.n * np.log(sigma) - 0.5 * stats.n * np.log(one_m_phi2)
               + 0.5 * (np.log(d * (1 + phik)) @ stats.counts))
    return log_det, gram
