"""The exact engine for a linear curve with AR(1) errors: quadrature over ``(sigma, phi)``.

The model is the exponential curve of :mod:`bayesgrowth.models.exponential` with AR(1)
errors and normal noise (see :mod:`bayesgrowth.models.general`), with the very priors
of the NUTS engine (:mod:`bayesgrowth.models.pymc_build`): normal on ``log a`` (or fixed)
and ``b = log(1+g)``, half-normal on ``sigma``, ``Beta(phi_alpha, phi_beta)`` on ``phi``.
Given ``(sigma, phi)`` the log values are normal and the coefficients enter linearly
(with seasonal factors, their coordinates in the zero-sum basis too, with the NUTS
model's ``ZeroSumNormal`` prior: design ``[1, dt, D Q]``, see
:func:`bayesgrowth.models.linear.with_season_columns`), so they are integrated out in
closed form (:func:`bayesgrowth.models.linear.marginal_loglik`,
the formula the PyMC model uses, here with the products of whitened columns taken from row
sums for every node at once: :mod:`bayesgrowth.models.ar1_products`). What is left is a
2-D integral, done on a grid in ``u = log sigma`` and ``v = atanh phi`` (Fisher's z, which
makes the sampling variance of an AR(1) coefficient about ``1/n`` wherever it lies) with
the weights

``log w(u, v) = log p(sigma) + u + log p(phi) + log(1 - phi^2) + log p(y | sigma, phi)``

(``u`` and ``log(1 - phi^2)`` are the Jacobians). On ``phi`` itself the density has a
square-root edge at ``phi = 1`` that slows the grid's convergence, and in ``logit phi`` the
default flat prior leaves exponential tails that need wide cells; the flat prior's edge at
``phi = 0`` still makes the rule converge like ``h^2`` (docs/method.md gives the measured
error). A locating pass over a wide box finds where the mass is; a fine pass spreads its
nodes over the box that leaves out at most ``_TAIL`` of the locating pass's mass on either
side of each axis, one and a half locating steps wider.
Draws are independent: a cell is picked by its weight, ``(u, v)`` spread uniformly
within it, and the coefficients drawn from their exact normal conditional given that
``(sigma, phi)`` (:func:`bayesgrowth.models.linear.draw_curve_coefficients`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from bayesgrowth.config import DEFAULT_CHAINS, DEFAULT_DRAWS
from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.inference.diagnostics import Diagnostics
from bayesgrowth.inference.fit import Fit, as_chains
from bayesgrowth.models import linear
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.priors import ResolvedPriors
from bayesgrowth.seeds import stream

__all__ = ["Ar1GridPosterior", "ar1_posterior", "fit_ar1_exact", "grid_log_weight"]

#: Locating pass: nodes in ``log sigma`` and ``atanh phi`` over :data:`_BOX`.
_COARSE = (48, 32)
#: Fine pass: nodes in ``log sigma`` and ``atanh phi`` over the box that holds the mass.
_FINE = (96, 96)
#: The locating pass's box: ``sigma`` from 1e-6 to 1e3, ``phi`` from 0 to ``tanh 10``
#: (``1 - phi`` about 4e-9).
_BOX = ((np.log(1e-6), np.log(1e3)), (0.0, 10.0))
_TAIL = 1e-9  # the fine box leaves out at most this much of the mass on each side


@dataclass(frozen=True)
class Ar1GridPosterior:
    """Posterior of ``(sigma, phi)`` on a grid of cells in ``(log sigma, atanh phi)``.

    Attributes
    ----------
    log_sigma, atanh_phi : numpy.ndarray, shape (G,)
        Centres of the grid cells.
    weight : numpy.ndarray, shape (G,)
        Posterior probability of each cell (sums to 1).
    cell : tuple of float
        Widths of a cell in ``log sigma`` and ``atanh phi``.
    log_norm : float
        Log of ``∫∫ p(sigma) p(phi) p(y | sigma, phi)``: the log evidence of the log
        values when every prior is proper.
    """

    log_sigma: np.ndarray
    atanh_phi: np.ndarray
    weight: np.ndarray
    cell: tuple[float, float]
    log_norm: float

    @property
    def sigma(self) -> np.ndarray:
        """``sigma`` at the cell centres."""
        return np.exp(self.log_sigma)

    @property
    def phi(self) -> np.ndarray:
        """``phi`` at the cell centres."""
        return np.tanh(self.atanh_phi)

    def sample(self, n: int, rng: np.random.Generator) -> tuple[np.ndarray, np.ndarray]:
        """Independent draws ``(sigma (n,), phi (n,))``, spread uniformly within their cells."""
        idx = rng.choice(self.weight.size, size=n, p=self.weight)
        jitter = rng.random((2, n)) - 0.5
        u = self.log_sigma[idx] + jitter[0] * self.cell[0]
        return np.exp(u), np.tanh(self.atanh_phi[idx] + jitter[1] * self.cell[1])


def grid_log_weight(spec: ModelSpec, series: GrowthSeries, priors: ResolvedPriors,
                    u: np.ndarray, v: np.ndarray) -> np.ndarray:
    """Log posterior density of ``(log sigma, atanh phi)`` at the nodes ``(u, v)``, unnormalised.

    It is the priors (with their constants) times the marginal likelihood of the log
    values, the linear coefficients integrated out.
    """
    sigma, phi = np.exp(u), np.tanh(v)
    log_1m_phi2 = np.log(4.0) - 2 * np.logaddexp(v, -v)  # 1 - tanh(v)^2 = 4 / (e^v + e^-v)^2
    t = np.asarray(series.t, dtype=float)
    _, x, mu0, var0 = linear.curve_pieces(spec, priors, t - priors.t_ref, {})
    if spec.seasonal:
        x, mu0, var0, _ = linear.with_season_columns(spec, priors, x, series.axis, t)
    lag = np.concatenate([[1.0], np.diff(t)])
    loglik = linear.marginal_loglik(spec, series.log_values, np.ones(t.size), x, mu0, var0,
                                    lag, sigma, phi, xp=np)
    s = priors.sigma_scale
    log_p_sigma = 0.5 * np.log(2 / np.pi) - np.log(s) - 0.5 * (sigma / s) ** 2
    a, b = priors.phi_alpha, priors.phi_beta
    log_p_phi = (a - 1) * np.log(phi) + (b - 1) * np.log1p(-phi) - _log_beta(a, b)
    return loglik + log_p_sigma + u + log_p_phi + log_1m_phi2


def _log_beta(a: float, b: float) -> float:
    """``log B(a, b)`` from the standard library's log-gamma (scipy's import skipped)."""
    return math.lgamma(a) + math.lgamma(b) - math.lgamma(a + b)


def _nodes(box, points) -> tuple[np.ndarray, np.ndarray, tuple[float, float]]:
    """Cell centres of a regular grid over ``box``, flattened, and the cell widths."""
    u, v = np.meshgrid(*_axis_centres(box, points), indexing="ij")
    return u.ravel(), v.ravel(), tuple((hi - lo) / k for (lo, hi), k in zip(box, points,
                                                                           strict=True))


def _axis_centres(box, points) -> list[np.ndarray]:
    """Cell centres along each axis of a regular grid over ``box``."""
    return [lo + (np.arange(k) + 0.5) * (hi - lo) / k for (lo, hi), k in zip(box, points,
                                                                             strict=True)]


def _mass_range(marginal, centres, step, bounds) -> tuple[float, float]:
    """The range of the cells that hold all but ``_TAIL`` of the mass on either side.

    One locating step wider on each side (the mass may sit anywhere within a cell),
    within ``bounds``.
    """
    cdf = np.cumsum(marginal) / marginal.sum()
    lo = centres[np.searchsorted(cdf, _TAIL)]
    hi = centres[min(np.searchsorted(cdf, 1 - _TAIL), centres.size - 1)]
    return max(bounds[0], lo - 1.5 * step), min(bounds[1], hi + 1.5 * step)


def _weights(spec, series, priors, u, v) -> np.ndarray:
    with np.errstate(divide="ignore", invalid="ignore", over="ignore", under="ignore"):
        lw = grid_log_weight(spec, series, priors, u, v)
    return np.where(np.isfinite(lw), lw, -np.inf)


def ar1_posterior(series: GrowthSeries, priors: ResolvedPriors, spec: ModelSpec,
                  *, coarse=_COARSE, fine=_FINE) -> Ar1GridPosterior:
    """The grid posterior of ``(sigma, phi)`` for ``spec`` (a curve with AR(1) errors).

    Parameters
    ----------
    series : GrowthSeries
    priors : ResolvedPriors
    spec : ModelSpec
        A family with a ``"growth"`` linear scheme and nothing else to sample (the
        exponential curve), AR(1) errors, normal noise, seasonal factors or not.
    coarse, fine : tuple of int
        Nodes per dimension (``log sigma``, ``atanh phi``) of the locating and fine passes.

    Returns
    -------
    Ar1GridPosterior
    """
    u, v, step = _nodes(_BOX, coarse)
    lw = _weights(spec, series, priors, u, v)
    if not np.isfinite(lw).any():
        raise ValueError("the AR(1) grid found no posterior mass; check the series")
    w = np.exp(lw - lw.max()).reshape(coarse)
    box = tuple(_mass_range(w.sum(axis=1 - d), c, s, _BOX[d])
                for d, (c, s) in enumerate(zip(_axis_centres(_BOX, coarse), step, strict=True)))
    u, v, cell = _nodes(box, fine)
    lw = _weights(spec, series, priors, u, v)
    top = lw.max()
    w = np.exp(lw - top)
    total = w.sum()
    return Ar1GridPosterior(log_sigma=u, atanh_phi=v, weight=w / total, cell=cell,
                            log_norm=float(top + np.log(total * cell[0] * cell[1])))


def fit_ar1_exact(series: GrowthSeries, priors: ResolvedPriors, spec: ModelSpec, *,
                  seed: int, draws: int = DEFAULT_DRAWS, chains: int = DEFAULT_CHAINS) -> Fit:
    """Fit a curve with AR(1) errors by the exact engine: ``chains * draws`` independent draws.

    The draws are arranged as ``chains`` blocks only so that results have the same
    shape as the NUTS engine's.

    Returns
    -------
    Fit
    """
    post = ar1_posterior(series, priors, spec)
    rng = stream(seed, "posterior_completion")
    n = chains * draws
    sigma, phi = post.sample(n, rng)
    flat = linear.draw_curve_coefficients(spec, priors, {"sigma": sigma, "phi": phi}, series.t,
                                          series.log_values, series.axis, rng, seasons=True)
    posterior = as_chains(flat, spec.parameters() + spec.vector_parameters(), chains, draws)
    nodes = int(post.weight.size)
    diagnostics = Diagnostics.independent(
        n, f"exact posterior on a {nodes}-node grid over the noise scale and the persistence, "
        "independent draws: no chains to check")
    return Fit(series=series, priors=priors, engine="exact", seed=seed, posterior=posterior,
               diagnostics=diagnostics, spec=spec,
               settings={"draws": draws, "chains": chains, "grid_nodes": nodes})
