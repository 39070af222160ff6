"""The exact engine: the posterior of the log-linear model by quadrature over ``sigma``.

It uses the very same priors as the NUTS engine (independent normal priors on
``log a`` and ``log(1+g)``, half-normal on ``sigma``, and for seasonal factors the
``ZeroSumNormal`` of fixed scale, which is normal on the coordinates ``eta`` of
``season = Q eta`` in an orthonormal zero-sum basis ``Q``), so the engine a user
picks does not change the question answered. Given ``sigma`` the coefficients
(level, growth and seasonal coordinates, design ``[1, dt, D Q]``) have a Gaussian
posterior in closed form; a 2,000-point grid over ``log sigma`` integrates ``sigma``
out (see :mod:`bayesgrowth.inference.gaussian_grid`). Draws are independent, so
there are no chains to diagnose.
"""

from __future__ import annotations

import numpy as np

from bayesgrowth.config import DEFAULT_CHAINS, DEFAULT_DRAWS
from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.inference.diagnostics import Diagnostics
from bayesgrowth.inference.fit import Fit, as_chains
from bayesgrowth.inference.gaussian_grid import SigmaGridPosterior, linear_gaussian_posterior
from bayesgrowth.models import linear
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.priors import ResolvedPriors

__all__ = ["exact_posterior", "fit_exact"]


def _half_normal_logpdf(scale: float):
    def logpdf(sigma: np.ndarray) -> np.ndarray:
        return np.log(2.0) - 0.5 * np.log(2 * np.pi) - np.log(scale) - 0.5 * (sigma / scale) ** 2

    return logpdf


def _pieces(series: GrowthSeries, priors: ResolvedPriors, spec: ModelSpec):
    """Design, prior means and variances of the coefficients, and the number of seasons."""
    _, x, mu0, var0 = linear.curve_pieces(spec, priors, series.t - priors.t_ref, {})
    if not spec.seasonal:
        return x, mu0, var0, 0
    return linear.with_season_columns(spec, priors, x, series.axis, series.t)


def exact_posterior(series: GrowthSeries, priors: ResolvedPriors,
                    spec: ModelSpec | None = None) -> SigmaGridPosterior:
    """Grid posterior of the coefficients and ``sigma``.

    The coefficients are ``(log a, log(1+g))`` followed, for a seasonal ``spec``, by the
    ``m - 1`` seasonal coordinates; with a fixed initial value ``log a`` is left out.

    Parameters
    ----------
    series : GrowthSeries
    priors : ResolvedPriors
    spec : ModelSpec, optional
        The exponential curve with normal noise and independent errors, seasonal
        factors or not; default without.
    """
    spec = spec or ModelSpec()
    x, mu0, var0, _ = _pieces(series, priors, spec)
    free = var0 > 0
    return linear_gaussian_posterior(
        x[:, free],
        series.log_values - x[:, ~free] @ mu0[~free],
        mu0[free],
        np.diag(1.0 / var0[free]),
        _half_normal_logpdf(priors.sigma_scale),
    )


def fit_exact(
    series: GrowthSeries,
    priors: ResolvedPriors,
    *,
    seed: int,
    draws: int = DEFAULT_DRAWS,
    chains: int = DEFAULT_CHAINS,
    spec: ModelSpec | None = None,
) -> Fit:
    """Fit by the exact engine and return ``chains * draws`` independent posterior draws.

    The draws are arranged as ``chains`` blocks only so that results have the same
    shape as the NUTS engine's; seasonal factors are ``season``, ``(chains, draws, m)``.
    """
    spec = spec or ModelSpec()
    post = exact_posterior(series, priors, spec)
    _, mu0, var0, m = _pieces(series, priors, spec)
    rng = np.random.default_rng(seed)
    n = chains * draws
    free, sigma = post.sample(n, rng)
    beta = np.tile(mu0, (n, 1))
    beta[:, var0 > 0] = free
    flat = linear.split_coefficients(spec, beta, m, priors.fixed_initial, priors.log_a_mu)
    flat["sigma"] = sigma
    posterior = as_chains(flat, spec.parameters() + spec.vector_parameters(), chains, draws)
    diagnostics = Diagnostics.independent(
        n, "exact posterior, independent draws: no chains to check")
    return Fit(
        series=series,
        priors=priors,
        engine="exact",
        seed=seed,
        posterior=posterior,
        diagnostics=diagnostics,
        spec=spec,
        settings={"draws": draws, "chains": chains, "sigma_grid_points": int(post.sigma.size)},
    )
