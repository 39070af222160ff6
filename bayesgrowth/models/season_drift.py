"""Drifting seasonal factors of the local trend: the deviations' loadings on their shocks.

With drifting seasons the seasonal factors are the fixed ones (linear coefficients) plus
a deviation that follows the dummy seasonal random walk (Harvey 1989, *Forecasting,
Structural Time Series Models and the Kalman Filter*, sec. 2.3.4; Durbin & Koopman 2012,
*Time Series Analysis by State Space Methods*, 2nd ed., sec. 3.2.1)

``s_j = -(s_{j-1} + ... + s_{j-m+1}) + omega_j``,  ``omega_j ~ Normal(0, sigma_season^2)``,

from ``s_0 = s_{-1} = ... = 0``, with the first shock at ``j = 1`` like the level's and
growth's. Every ``s_j`` is linear in the shocks, so its covariance joins the level's in
the closed-form Gaussian process of :mod:`bayesgrowth.models.local_trend`.
"""

from __future__ import annotations

import numpy as np

__all__ = ["drift_cov", "drift_loadings", "impulse", "season_coefficients"]


def impulse(m: int, n: int) -> np.ndarray:
    """The response of ``s`` to a unit shock ``d`` periods earlier, ``d = 0 .. n - 1``.

    ``1 / (1 + L + ... + L^(m-1)) = (1 - L) / (1 - L^m)``: ``1`` at ``d = 0 mod m``,
    ``-1`` at ``d = 1 mod m``, else ``0``.
    """
    d = np.arange(n)
    return np.where(d % m == 0, 1.0, np.where(d % m == 1, -1.0, 0.0))


def season_coefficients(m: int, n_grid: int) -> np.ndarray:
    """Loadings ``(n_grid, n_grid - 1)`` of the deviations on the shocks at ``1 .. n_grid-1``.

    ``s_j = sum_k psi_{j-k} omega_k`` with ``psi`` the :func:`impulse` response.
    """
    d = np.arange(n_grid)[:, None] - np.arange(1, n_grid)[None, :]
    return np.where(d >= 0, impulse(m, n_grid)[np.maximum(d, 0)], 0.0)


def _count(draws: dict, m: int | None) -> int:
    """The number of seasons: ``m``, or as many as the draws' seasonal factors."""
    return int(m) if m is not None else int(np.shape(draws["season"])[-1])


def drift_cov(draws: dict, n_grid: int, rows_a, rows_b, m: int | None = None) -> np.ndarray:
    """``sigma_season^2 D_r D_s'`` per draw, ``(S, len(rows_a), len(rows_b))``."""
    dm = season_coefficients(_count(draws, m), n_grid)
    ss2 = np.asarray(draws["sigma_season"], dtype=float)[:, None, None] ** 2
    return ss2 * (dm[rows_a] @ dm[rows_b].T)[None]


def drift_loadings(draws: dict, n_grid: int, rows, extra: int = 0) -> np.ndarray:
    """``sigma_season D_r`` per draw, with ``extra`` zero rows below (quantities they miss)."""
    dm = season_coefficients(_count(draws, None), n_grid)
    load = np.concatenate([dm[rows], np.zeros((extra, n_grid - 1))])
    return load[None] * np.asarray(draws["sigma_season"], dtype=float)[:, None, None]
