"""Exponential growth on the log scale: ``log R_t = log a + (t - t_ref) log(1+g) + e_t``.

The curve is linear in its two coefficients ``(log a, log(1+g))``, which is what
lets the exact engine integrate the posterior in closed form given ``sigma``.
:data:`FAMILY` declares the model to the registry; the functions below serve the
exact engine and the plain model's NUTS fit. PyMC is imported only inside
:func:`build_pymc_model`.
"""

from __future__ import annotations

import numpy as np

from bayesgrowth.models.parameters import GROWTH
from bayesgrowth.models.registry import ModelFamily, register
from bayesgrowth.priors import ResolvedPriors

__all__ = [
    "FAMILY",
    "PARAMETERS",
    "curve",
    "design_matrix",
    "log_mean",
    "simulate_log",
    "log_likelihood",
    "build_pymc_model",
]

#: Parameter names, as they appear in the posterior.
PARAMETERS = ("log_a", "log1p_g", "sigma")


def curve(p: dict, dt, xp=np):
    """Log of the curve at offsets ``dt`` from the reference period, NumPy or PyTensor ``xp``."""
    return p["log_a"] + p["log1p_g"] * dt


def design(dt, half_life=None, xp=np):
    """Columns ``1`` (log a) and ``dt`` (log(1+g)) of the curve's linear coefficients."""
    if xp is np:
        dt = np.asarray(dt, dtype=float)
        return np.column_stack([np.ones_like(dt), dt])
    return xp.stack([xp.ones_like(dt), dt], axis=1)


FAMILY = register(ModelFamily(
    name="exponential",
    summary="one fixed curve growing by the same percentage every period",
    parameters=(GROWTH,),
    log_mean=curve,
    engines=("gaussian", "nuts"),
    leastsq_curve=None,
    linear="growth",
    design=design,
))


def design_matrix(t: np.ndarray, t_ref: int) -> np.ndarray:
    """Columns ``[1, t - t_ref]`` of the log-linear model (:func:`design`), for the exact engine."""
    return design(np.asarray(t, dtype=float) - t_ref)


def log_mean(draws: dict[str, np.ndarray], t: np.ndarray, t_ref: int) -> np.ndarray:
    """Log of the mean curve at times ``t`` for every draw, shape ``(n_draws, len(t))``."""
    dt = np.asarray(t, dtype=float) - t_ref
    return curve({k: draws[k][:, None] for k in ("log_a", "log1p_g")}, dt[None, :])


def simulate_log(
    draws: dict[str, np.ndarray], t: np.ndarray, t_ref: int, rng: np.random.Generator
) -> np.ndarray:
    """Posterior predictive draws of ``log R`` at times ``t``: curve plus fresh noise."""
    mean = log_mean(draws, t, t_ref)
    return mean + draws["sigma"][:, None] * rng.standard_normal(mean.shape)


def log_likelihood(
    draws: dict[str, np.ndarray], t: np.ndarray, values: np.ndarray, t_ref: int
) -> np.ndarray:
    """Pointwise log density of the observed values (revenue scale), ``(n_draws, n_obs)``.

    The density of ``R`` is that of ``log R`` times the Jacobian ``1/R``.
    """
    z = (np.log(values)[None, :] - log_mean(draws, t, t_ref)) / draws["sigma"][:, None]
    return (
        -0.5 * z**2
        - np.log(draws["sigma"])[:, None]
        - 0.5 * np.log(2 * np.pi)
        - np.log(values)[None, :]
    )


def build_pymc_model(priors: ResolvedPriors, t: np.ndarray, log_y: np.ndarray, weights=None):
    """Build the PyMC model with the data as ``pm.Data`` so it can be refitted without a rebuild.

    Parameters
    ----------
    priors : ResolvedPriors
        Log-scale priors (see :mod:`bayesgrowth.priors`).
    t, log_y : numpy.ndarray
        Time index and log values of the observations.
    weights : numpy.ndarray, optional
        0/1 weight of each observation in the likelihood (default all 1). Backtests
        keep the full-length data and switch rows off, so shapes never change.

    Returns
    -------
    pymc.Model
    """
    import pymc as pm

    t = np.asarray(t, dtype=float)
    weights = np.ones_like(t) if weights is None else np.asarray(weights, dtype=float)
    # Sample the level at the data's centre instead of at t_ref: the prior is
    # unchanged (log_a = level - b * centre keeps its Normal prior, independent of
    # b) but level and slope are nearly uncorrelated in the posterior, which NUTS
    # samples far more efficiently than the raw (log_a, b) pair on short series. The
    # centre is data, so a refit on other rows can move it with them.
    centre = float(np.average(t - priors.t_ref, weights=weights)) if weights.any() else 0.0
    with pm.Model() as model:
        dt = pm.Data("dt", t - priors.t_ref)
        y = pm.Data("log_y", np.asarray(log_y, dtype=float))
        w = pm.Data("weight", weights)
        b = pm.Normal("log1p_g", mu=priors.log1p_g_mu, sigma=priors.log1p_g_sd)
        if priors.fixed_initial:
            log_a = pm.Deterministic("log_a", pm.math.constant(priors.log_a_mu))
        else:
            c = pm.Data("centre", centre)
            level = pm.Normal("level", mu=priors.log_a_mu + b * c, sigma=priors.log_a_sd)
            log_a = pm.Deterministic("log_a", level - b * c)
        sigma = pm.HalfNormal("sigma", sigma=priors.sigma_scale)
        mu = log_a + b * dt
        pm.Potential("loglik", (w * pm.logp(pm.Normal.dist(mu=mu, sigma=sigma), y)).sum())
    return model
