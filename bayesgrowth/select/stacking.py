"""Stacking of predictive distributions (Yao, Vehtari, Simpson & Gelman 2018).

Given the pointwise leave-one-out log predictive densities ``lpd[i, k]`` of
observation ``i`` under model ``k``, stacking chooses the weights on the simplex
that maximise the leave-one-out log score of the mixture (their eq. 4):

``max_w  (1/n) sum_i log( sum_k w_k exp(lpd[i, k]) )``,  ``w_k >= 0``, ``sum_k w_k = 1``.

The objective is concave in ``w``, so a point satisfying the Karush-Kuhn-Tucker
conditions is the optimum: with ``G_k = (1/n) sum_i p_ik / sum_j w_j p_ij`` the
gradient (``p_ik = exp(lpd[i, k])``), every model with positive weight has
``G_k = 1`` and every model with zero weight has ``G_k <= 1``.
:func:`kkt_gap` measures how far a weight vector is from satisfying them.
"""

from __future__ import annotations

import numpy as np

__all__ = ["bootstrap_stacking_weights", "kkt_gap", "stacking_gradient", "stacking_objective",
           "stacking_weights"]


def _densities(lpd: np.ndarray) -> np.ndarray:
    """``exp(lpd)`` scaled per observation by its largest entry (the optimum is unchanged)."""
    lpd = np.asarray(lpd, dtype=float)
    if lpd.ndim != 2 or lpd.shape[0] < 1 or lpd.shape[1] < 1:
        raise ValueError(
            f"pointwise log densities must be a 2-D array (observations, models), "
            f"got shape {lpd.shape}"
        )
    if not np.all(np.isfinite(lpd)):
        raise ValueError("pointwise log densities must all be finite")
    return np.exp(lpd - lpd.max(axis=1, keepdims=True))


def stacking_objective(weights, lpd) -> float:
    """The stacking objective of Yao et al. (2018), eq. 4: mean log score of the mixture.

    Parameters
    ----------
    weights : array_like, shape (n_models,)
    lpd : array_like, shape (n_obs, n_models)
        Pointwise leave-one-out log predictive densities.

    Returns
    -------
    float
        ``(1/n) sum_i log sum_k w_k exp(lpd[i, k])``.
    """
    lpd = np.asarray(lpd, dtype=float)
    w = np.asarray(weights, dtype=float)
    top = lpd.max(axis=1)
    with np.errstate(divide="ignore"):
        return float(np.mean(np.log(_densities(lpd) @ w) + top))


def stacking_gradient(weights, lpd) -> np.ndarray:
    """Gradient of :func:`stacking_objective` with respect to the weights."""
    p = _densities(lpd)
    mix = p @ np.asarray(weights, dtype=float)
    return (p / mix[:, None]).mean(axis=0)


def kkt_gap(weights, lpd) -> float:
    """Largest violation of the optimality conditions of the stacking problem.

    At the optimum the gradient equals 1 for every model with positive weight
    and is at most 1 for models with zero weight (the multiplier of the sum
    constraint is 1 because ``sum_k w_k G_k = 1``). Returns the largest of
    ``|G_k - 1|`` over weighted models and ``G_k - 1`` over the others (0 when met).
    """
    w = np.asarray(weights, dtype=float)
    g = stacking_gradient(w, lpd)
    active = w > 1e-9
    gaps = np.concatenate([np.abs(g[active] - 1), np.maximum(g[~active] - 1, 0)])
    return float(gaps.max())


def stacking_weights(lpd, *, tol: float = 1e-10, max_iter: int = 500) -> np.ndarray:
    """Stacking weights from pointwise leave-one-out log predictive densities.

    Sequential quadratic programming on the simplex (SciPy's SLSQP) with the
    analytic gradient, followed by multiplicative fixed-point steps
    ``w_k <- w_k G_k`` (each one raises the concave objective; Cover 1984) to
    polish the result.

    Parameters
    ----------
    lpd : array_like, shape (n_obs, n_models)
        Pointwise LOO log predictive densities (ArviZ's ``loo_i``).
    tol : float
        Target for :func:`kkt_gap`.
    max_iter : int
        Iterations of the optimiser.

    Returns
    -------
    numpy.ndarray, shape (n_models,)
        Non-negative weights summing to 1.
    """
    from scipy.optimize import minimize

    p = _densities(lpd)
    k = p.shape[1]
    if k == 1:
        return np.ones(1)

    def neg(w):
        return -float(np.mean(np.log(np.maximum(p @ w, 1e-300))))

    def neg_grad(w):
        return -(p / np.maximum(p @ w, 1e-300)[:, None]).mean(axis=0)

    res = minimize(
        neg, np.full(k, 1.0 / k), jac=neg_grad, method="SLSQP",
        bounds=[(0.0, 1.0)] * k,
        constraints=[{"type": "eq", "fun": lambda w: w.sum() - 1.0,
                      "jac": lambda w: np.ones_like(w)}],
        options={"ftol": 1e-14, "maxiter": max_iter},
    )
    w = np.clip(res.x, 0.0, None)
    w = w / w.sum()
    # Models the optimiser left at a sliver of weight: let the fixed point decide.
    w = np.where(w < 1e-12, 0.0, w)
    w = w / w.sum()
    for _ in range(10 * max_iter):
        if kkt_gap(w, lpd) <= tol:
            break
        g = (p / (p @ w)[:, None]).mean(axis=0)
        revive = (w == 0) & (g > 1 + tol)  # a dropped model that would raise the score
        if revive.any():
            w = np.where(revive, 1e-3, w)
            w = w / w.sum()
            g = (p / (p @ w)[:, None]).mean(axis=0)
        w = w * g
        w = w / w.sum()
    return w


def bootstrap_stacking_weights(lpd, *, n_boot: int = 400, seed: int = 0,
                               iterations: int = 3000) -> np.ndarray:
    """Stacking weights under a Bayesian bootstrap of the observations: their uncertainty.

    Each replicate draws observation weights ``alpha ~ Dirichlet(1, ..., 1)`` (the
    Bayesian bootstrap, Rubin 1981, *Annals of Statistics* 9) and maximises
    ``sum_i alpha_i log sum_k w_k exp(lpd[i, k])`` on the simplex, the stacking
    objective of Yao et al. (2018) with the observations reweighted (they use the
    same bootstrap for their "pseudo-BMA+" weights). The maximiser is found by the
    multiplicative fixed point ``w_k <- w_k sum_i alpha_i p_ik / sum_j w_j p_ij``,
    which raises the concave objective at every step (Cover 1984), started from
    equal weights: when models predict every observation alike, the weights stay
    where they started, and their spread shows that the data cannot choose.

    Parameters
    ----------
    lpd : array_like, shape (n_obs, n_models)
        Pointwise leave-one-out log predictive densities.
    n_boot : int
        Replicates.
    seed : int
    iterations : int
        Fixed-point steps per replicate (all replicates at once).

    Returns
    -------
    numpy.ndarray, shape (n_boot, n_models)
        One weight vector per replicate, each on the simplex.
    """
    p = _densities(lpd)
    rng = np.random.default_rng([int(seed), 5])
    alpha = rng.dirichlet(np.ones(p.shape[0]), size=int(n_boot))
    return weighted_stacking(p, alpha, iterations)


def weighted_stacking(p: np.ndarray, alpha: np.ndarray, iterations: int = 3000) -> np.ndarray:
    """Stacking weights for each row of observation weights ``alpha`` (fixed point, see above).

    Parameters
    ----------
    p : numpy.ndarray, shape (n_obs, n_models)
        Predictive densities (scaled per observation as by ``_densities``).
    alpha : numpy.ndarray, shape (n_sets, n_obs)
        Observation weights, each row summing to 1.
    iterations : int

    Returns
    -------
    numpy.ndarray, shape (n_sets, n_models)
    """
    w = np.full((alpha.shape[0], p.shape[1]), 1.0 / p.shape[1])
    if p.shape[1] == 1:
        return w
    for _ in range(int(iterations)):
        mix = w @ p.T  # (n_sets, n_obs)
        w = w * ((alpha / mix) @ p)
        w = w / w.sum(axis=1, keepdims=True)
    return w
