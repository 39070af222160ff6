"""The exact engine: the posterior of the log-linear model by quadrature over ``sigma``.

It uses the very same priors as the NUTS engine (independent normal priors on
``log a`` and ``log(1+g)``, half-normal on ``sigma``), so the engine a user
picks does not change the question answered. Given ``sigma`` the coefficients'
posterior is Gaussian in closed form; a 2,000-point grid over ``log sigma``
integrates ``sigma`` out (see :mod:`bayesgrowth.inference.gaussian_grid`).
Draws are independent, so there are no chains to diagnose.
"""

from __future__ import annotations

import numpy as np

from bayesgrowth.config import DEFAULT_CHAINS, DEFAULT_DRAWS
from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.inference.diagnostics import Diagnostics
from bayesgrowth.inference.fit import Fit
from bayesgrowth.inference.gaussian_grid import SigmaGridPosterior, linear_gaussian_posterior
from bayesgrowth.models import exponential
from bayesgrowth.priors import ResolvedPriors

__all__ = ["exact_posterior", "fit_exact"]


def _half_normal_logpdf(scale: float):
    def logpdf(sigma: np.ndarray) -> np.ndarray:
        return np.log(2.0) - 0.5 * np.log(2 * np.pi) - np.log(scale) - 0.5 * (sigma / scale) ** 2

    return logpdf


def exact_posterior(series: GrowthSeries, priors: ResolvedPriors) -> SigmaGridPosterior:
    """Grid posterior of the coefficients ``(log a, log(1+g))`` and ``sigma``.

    With a fixed initial value the only coefficient is ``log(1+g)``.
    """
    X = exponential.design_matrix(series.t, priors.t_ref)
    y = series.log_values
    if priors.fixed_initial:
        return linear_gaussian_posterior(
            X[:, 1:],
            y - priors.log_a_mu,
            np.array([priors.log1p_g_mu]),
            np.array([[priors.log1p_g_sd**-2]]),
            _half_normal_logpdf(priors.sigma_scale),
        )
    return linear_gaussian_posterior(
        X,
        y,
        np.array([priors.log_a_mu, priors.log1p_g_mu]),
        np.diag([priors.log_a_sd**-2, priors.log1p_g_sd**-2]),
        _half_normal_logpdf(priors.sigma_scale),
    )


def fit_exact(
    series: GrowthSeries,
    priors: ResolvedPriors,
    *,
    seed: int,
    draws: int = DEFAULT_DRAWS,
    chains: int = DEFAULT_CHAINS,
) -> Fit:
    """Fit by the exact engine and return ``chains * draws`` independent posterior draws.

    The draws are arranged as ``chains`` blocks only so that results have the same
    shape as the NUTS engine's.
    """
    post = exact_posterior(series, priors)
    rng = np.random.default_rng(seed)
    beta, sigma = post.sample(chains * draws, rng)
    if priors.fixed_initial:
        log_a = np.full(sigma.shape, priors.log_a_mu)
        b = beta[:, 0]
    else:
        log_a, b = beta[:, 0], beta[:, 1]
    shape = (chains, draws)
    posterior = {"log_a": log_a.reshape(shape), "log1p_g": b.reshape(shape),
                 "sigma": sigma.reshape(shape)}
    n = chains * draws
    diagnostics = Diagnostics.from_values(
        1.0, n, n, 0, method="exact posterior, independent draws: no chains to check"
    )
    return Fit(
        series=series,
        priors=priors,
        engine="exact",
        seed=seed,
        posterior=posterior,
        diagnostics=diagnostics,
        settings={"draws": draws, "chains": chains, "sigma_grid_points": int(post.sigma.size)},
    )
