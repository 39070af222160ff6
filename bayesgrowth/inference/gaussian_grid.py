"""Exact posterior of a Gaussian linear model whose noise sd has any 1-D prior.

Model: ``y ~ Normal(X beta, sigma^2 I)``, ``beta ~ Normal(m0, P0^-1)`` (``P0`` a
precision matrix, zeros allowed for flat directions) and ``sigma ~ p(sigma)``
with an arbitrary log density. Given ``sigma`` the posterior of ``beta`` is
Gaussian in closed form (the standard linear-Gaussian update, e.g. Bishop 2006,
*Pattern Recognition and Machine Learning*, eq. 3.50-3.51), and the marginal
posterior of ``sigma`` is known up to a constant:

``log p(sigma | y) = log p(sigma) - n log sigma - 1/2 log|P(sigma)|
                     - 1/2 (y'y / sigma^2 + m0' P0 m0 - h' P(sigma)^-1 h) + const``

with ``P(sigma) = P0 + X'X / sigma^2`` and ``h = P0 m0 + X'y / sigma^2``. A fine
grid over ``log sigma`` then gives the joint posterior to quadrature accuracy.

With ``conditional=True`` the prior precision scales as ``P0 / sigma^2`` (the
normal-inverse-gamma family), which lets tests compare against the textbook
closed forms.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from bayesgrowth.inference.normal import ndtr

__all__ = ["SigmaGridPosterior", "linear_gaussian_posterior"]

_COARSE = 600
_FINE = 2000
_DROP = 40.0  # keep log-density within this of the maximum (e^-40 is negligible)


@dataclass(frozen=True)
class SigmaGridPosterior:
    """Joint posterior of ``(beta, sigma)`` as a mixture over a grid of ``sigma``.

    Attributes
    ----------
    sigma : numpy.ndarray, shape (G,)
        Grid of ``sigma`` values, equally spaced in ``log sigma``.
    weight : numpy.ndarray, shape (G,)
        Posterior probability of each grid cell (sums to 1).
    mean : numpy.ndarray, shape (G, k)
        Posterior mean of ``beta`` given each ``sigma``.
    cov : numpy.ndarray, shape (G, k, k)
        Posterior covariance of ``beta`` given each ``sigma``.
    log_norm : float
        Log of the normalising integral ``∫ p(sigma) p(y | sigma) dsigma``, which is the
        log evidence when every prior is proper.
    """

    sigma: np.ndarray
    weight: np.ndarray
    mean: np.ndarray
    cov: np.ndarray
    log_norm: float
    cell: float

    def beta_mean(self) -> np.ndarray:
        """Posterior mean of ``beta``."""
        return self.weight @ self.mean

    def beta_cov(self) -> np.ndarray:
        """Posterior covariance of ``beta`` (law of total covariance)."""
        m = self.beta_mean()
        d = self.mean - m
        return np.einsum("g,gij->ij", self.weight, self.cov) + np.einsum(
            "g,gi,gj->ij", self.weight, d, d
        )

    def sigma_moment(self, power: float) -> float:
        """Posterior ``E[sigma^power]``."""
        return float(self.weight @ self.sigma**power)

    def linear_cdf(self, c: np.ndarray, value: float, noise: bool = False) -> float:
        """``P(c' beta (+ noise) <= value)``; ``noise`` adds a fresh Normal(0, sigma) draw."""
        loc = self.mean @ c
        var = np.einsum("i,gij,j->g", c, self.cov, c)
        if noise:
            var = var + self.sigma**2
        return float(self.weight @ ndtr((value - loc) / np.sqrt(var)))

    def linear_quantile(self, c: np.ndarray, q: float, noise: bool = False) -> float:
        """Quantile of ``c' beta`` (plus noise if asked), by bisection on the mixture CDF."""
        loc = self.mean @ c
        sd = np.sqrt(np.einsum("i,gij,j->g", c, self.cov, c) + (self.sigma**2 if noise else 0))
        lo, hi = float(np.min(loc - 12 * sd)), float(np.max(loc + 12 * sd))
        for _ in range(200):
            mid = 0.5 * (lo + hi)
            if float(self.weight @ ndtr((mid - loc) / sd)) < q:
                lo = mid
            else:
                hi = mid
            if hi - lo <= 1e-13 * max(1.0, abs(mid)):
                break
        return 0.5 * (lo + hi)

    def sigma_quantile(self, q: float) -> float:
        """Quantile of ``sigma``, interpolating the CDF across each cell in ``log sigma``."""
        edges = np.concatenate([[0.0], np.cumsum(self.weight)])
        log_edges = np.concatenate(
            [np.log(self.sigma) - self.cell / 2, [np.log(self.sigma[-1]) + self.cell / 2]]
        )
        return float(np.exp(np.interp(q, edges, log_edges)))

    def sample(self, n: int, rng: np.random.Generator) -> tuple[np.ndarray, np.ndarray]:
        """Independent draws ``(beta (n, k), sigma (n,))`` from the posterior.

        A cell is picked by its weight and ``log sigma`` is spread uniformly within
        it; ``beta`` is then drawn from its Gaussian given that cell's ``sigma``.
        """
        idx = rng.choice(self.sigma.size, size=n, p=self.weight)
        jitter = (rng.random(n) - 0.5) * self.cell
        sigma = self.sigma[idx] * np.exp(jitter)
        used, inverse = np.unique(idx, return_inverse=True)
        root = _roots(self.cov[used])[inverse]
        z = rng.standard_normal((n, self.cov.shape[1]))
        beta = self.mean[idx] + np.einsum("nij,nj->ni", root, z)
        return beta, sigma


def _roots(cov: np.ndarray) -> np.ndarray:
    """Matrices ``R`` with ``R R' = cov`` for a stack of covariances: Cholesky factors.

    With more coefficients than observations and a tiny ``sigma`` a covariance is
    singular to rounding (its eigenvalues span more than the 16 digits of a double), and
    Cholesky may meet a pivot rounded below zero; then ``V diag(sqrt(l))`` from the
    eigendecompositions ``V diag(l) V'``, with eigenvalues rounded below zero set to zero.
    """
    try:
        return np.linalg.cholesky(cov + 1e-300 * np.eye(cov.shape[-1]))
    except np.linalg.LinAlgError:
        ev, evec = np.linalg.eigh(0.5 * (cov + np.swapaxes(cov, -1, -2)))
        return evec * np.sqrt(np.clip(ev, 0.0, None))[..., None, :]


def _log_post(
    log_sigma: np.ndarray,
    XtX: np.ndarray,
    Xty: np.ndarray,
    yty: float,
    n: int,
    m0: np.ndarray,
    P0: np.ndarray,
    log_prior: Callable[[np.ndarray], np.ndarray],
    conditional: bool,
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Unnormalised log posterior of sigma on a grid, with conditional means and covs."""
    s2 = np.exp(2 * log_sigma)[:, None, None]
    prior_prec = P0[None] / s2 if conditional else np.broadcast_to(P0, (s2.shape[0],) + P0.shape)
    prec = prior_prec + XtX[None] / s2
    h = prior_prec @ m0 + Xty[None] / s2[:, :, 0]
    cov = np.linalg.inv(prec)
    mean = np.einsum("gij,gj->gi", cov, h)
    quad = yty / s2[:, 0, 0] + np.einsum("gi,gij,j->g", np.broadcast_to(m0, h.shape), prior_prec,
                                         m0) - np.einsum("gi,gi->g", h, mean)
    _, logdet_prec = np.linalg.slogdet(prec)
    if conditional:
        # log|P0/s2| = log|P0| - k log s2: part of the prior's normalising constant.
        k = P0.shape[0]
        _, logdet_p0 = np.linalg.slogdet(P0)
        prior_logdet = logdet_p0 - k * 2 * log_sigma
    else:
        _, logdet_p0 = np.linalg.slogdet(P0) if np.all(np.linalg.eigvalsh(P0) > 0) else (1, 0.0)
        prior_logdet = np.full_like(log_sigma, logdet_p0)
    logp = (
        log_prior(np.exp(log_sigma))
        - n * log_sigma
        - 0.5 * n * np.log(2 * np.pi)
        + 0.5 * prior_logdet
        - 0.5 * logdet_prec
        - 0.5 * quad
    )
    return logp, mean, cov


def _dual_form(X, y, m0, P0, conditional: bool):
    """Eigendecomposition of ``X V0 X'`` and the residual in its basis (proper priors only).

    With no more observations than coefficients the data can be fitted exactly, and the
    posterior of ``sigma`` near zero is a difference of terms of size ``1/sigma^2`` that
    rounding destroys. In data space nothing cancels: the log values are ``N(X m0,
    sigma^2 I + X V0 X')`` (or ``sigma^2 (I + X V0 X')`` with ``conditional``), and ``X V0
    X'`` is of full rank when ``X`` has at least as many columns as rows. ``None`` when
    the prior is improper (flat directions).
    """
    if not np.all(np.linalg.eigvalsh(P0) > 0):
        return None
    d, u = np.linalg.eigh(X @ np.linalg.solve(P0, X.T))
    return np.clip(d, 0.0, None), u.T @ (y - X @ m0), conditional


def _log_marginal_dual(log_sigma: np.ndarray, dual, log_prior) -> np.ndarray:
    """``log p(sigma) + log p(y | sigma)`` from :func:`_dual_form` (same as :func:`_log_post`)."""
    d, z, conditional = dual
    s2 = np.exp(2 * log_sigma)[:, None]
    var = s2 * (1 + d) if conditional else s2 + d
    return (log_prior(np.exp(log_sigma)) - 0.5 * d.size * np.log(2 * np.pi)
            - 0.5 * np.log(var).sum(axis=1) - 0.5 * (z**2 / var).sum(axis=1))


def linear_gaussian_posterior(
    X: np.ndarray,
    y: np.ndarray,
    m0: np.ndarray,
    P0: np.ndarray,
    log_prior_sigma: Callable[[np.ndarray], np.ndarray],
    *,
    conditional: bool = False,
    sigma_bounds: tuple[float, float] = (1e-6, 1e3),
) -> SigmaGridPosterior:
    """Exact posterior of a Gaussian linear model with a 1-D prior on the noise sd.

    Parameters
    ----------
    X : numpy.ndarray, shape (n, k)
        Design matrix.
    y : numpy.ndarray, shape (n,)
        Responses.
    m0 : numpy.ndarray, shape (k,)
        Prior mean of the coefficients.
    P0 : numpy.ndarray, shape (k, k)
        Prior precision of the coefficients; zero rows/columns give flat priors.
    log_prior_sigma : callable
        Log prior density of ``sigma`` (vectorised, up to a constant if improper).
    conditional : bool
        If True, the coefficient prior precision is ``P0 / sigma^2``.
    sigma_bounds : tuple of float
        Range searched for the posterior mass of ``sigma``.

    Returns
    -------
    SigmaGridPosterior
    """
    X = np.asarray(X, dtype=float)
    y = np.asarray(y, dtype=float)
    m0 = np.asarray(m0, dtype=float)
    P0 = np.asarray(P0, dtype=float)
    n = y.size
    XtX, Xty, yty = X.T @ X, X.T @ y, float(y @ y)
    args = (XtX, Xty, yty, n, m0, P0, log_prior_sigma, conditional)
    dual = _dual_form(X, y, m0, P0, conditional) if n <= X.shape[1] else None

    lo, hi = np.log(sigma_bounds[0]), np.log(sigma_bounds[1])
    coarse = np.linspace(lo, hi, _COARSE)
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        lp, _, _ = _log_post(coarse, *args)
        if dual is not None:
            lp = _log_marginal_dual(coarse, dual, log_prior_sigma)
    lp = np.where(np.isfinite(lp), lp, -np.inf)
    keep = np.flatnonzero(lp > lp.max() - _DROP)
    step = coarse[1] - coarse[0]
    a = max(lo, coarse[keep[0]] - step)
    b = min(hi, coarse[keep[-1]] + step)
    fine = np.linspace(a, b, _FINE)
    cell = fine[1] - fine[0]
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        lp, mean, cov = _log_post(fine, *args)
        if dual is not None:
            lp = _log_marginal_dual(fine, dual, log_prior_sigma)
    lp = np.where(np.isfinite(lp), lp, -np.inf)
    # Density in log sigma carries the Jacobian sigma.
    lw = lp + fine
    top = lw.max()
    w = np.exp(lw - top)
    total = w.sum()
    log_norm = float(top + np.log(total * cell))
    return SigmaGridPosterior(
        sigma=np.exp(fine), weight=w / total, mean=mean, cov=cov, log_norm=log_norm, cell=cell
    )
