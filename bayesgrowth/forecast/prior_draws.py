"""Parameter draws from a model's priors, for the prior predictive.

Draws come from the PyMC model of the chosen specification
(:func:`pymc.sample_prior_predictive` on the model of
:func:`bayesgrowth.models.general.build_pymc_model`, whose likelihood is a potential that
prior sampling leaves out), so they are the very priors the fit uses. The plain exponential
model and the local trend (the default) have their own sampler in NumPy, which needs no
PyMC and draws the same priors: normal ``log a`` and ``log(1+g)``, half-normal ``sigma``,
and for the local trend Gamma(2) level-shock and growth-drift scales, a log-normal half-life
and, with AR(1) errors, a Beta ``phi`` (checked against PyMC's prior sampler in the tests).
"""

from __future__ import annotations

import logging
import warnings

import numpy as np

from bayesgrowth.config import PREDICTIVE_DRAWS
from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.models import exponential, general, linear
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.priors import ResolvedPriors
from bayesgrowth.seeds import stream

__all__ = ["SAMPLERS", "sample_prior"]

SAMPLERS = ("auto", "numpy", "pymc")


def _quiet_pymc():
    logger = logging.getLogger("pymc")
    level = logger.level
    logger.setLevel(logging.WARNING)
    return logger, level


def _pymc_prior(spec: ModelSpec, priors: ResolvedPriors, series: GrowthSeries, draws: int,
                seed: int) -> dict:
    import pymc as pm

    if spec.is_plain_exponential:
        model = exponential.build_pymc_model(priors, series.t, series.log_values)
    else:
        model = general.build_pymc_model(
            spec, priors, series.t, series.log_values, axis=series.axis
        )
    logger, level = _quiet_pymc()
    try:
        with model, warnings.catch_warnings():
            # The likelihood is a potential: prior sampling must leave it out, as it does.
            warnings.filterwarnings("ignore", ".*Potential.*", UserWarning)
            idata = pm.sample_prior_predictive(draws=draws, random_seed=seed)
    finally:
        logger.setLevel(level)
    prior = idata.prior
    out = {}
    names = spec.parameters() + spec.vector_parameters() + linear.STAND_INS
    for name in [k for k in names if k in prior]:
        v = np.asarray(prior[name].values, dtype=float)
        v = v.reshape(-1, *v.shape[2:]) if v.ndim >= 2 else v
        if v.shape[0] != draws:  # a fixed value kept as a scalar
            v = np.broadcast_to(v.reshape(-1)[:1], (draws,)).copy()
        out[name] = v
    # coefficients the PyMC model integrates out come from their prior here
    return general.complete_draws(spec, priors, out, np.array([], dtype=int), np.array([]),
                                  series.axis, stream(seed, "prior_completion"))


def _numpy_prior(priors: ResolvedPriors, draws: int, seed: int) -> dict:
    rng = stream(seed, "prior_parameters")
    log_a = (
        np.full(draws, priors.log_a_mu) if priors.fixed_initial
        else rng.normal(priors.log_a_mu, priors.log_a_sd, draws)
    )
    return {
        "log_a": log_a,
        "log1p_g": rng.normal(priors.log1p_g_mu, priors.log1p_g_sd, draws),
        "sigma": np.abs(rng.normal(0.0, priors.sigma_scale, draws)),
    }


def _numpy_local_trend_prior(spec: ModelSpec, priors: ResolvedPriors, series: GrowthSeries,
                              draws: int, seed: int) -> dict:
    """The local trend's parameters from their priors, as its PyMC model states them.

    See ``_local_trend_likelihood`` in :mod:`bayesgrowth.models.pymc_build`; the
    coefficients it integrates out come from their prior (as for the PyMC sampler).
    """
    rng = stream(seed, "prior_parameters")
    out = {"sigma": np.abs(rng.normal(0.0, priors.sigma_scale, draws))}
    out["sigma_level"] = (rng.gamma(2.0, priors.level_shock_scale / 2.0, draws)
                          if priors.level_shock_scale > 0 else np.zeros(draws))
    out["sigma_growth"] = rng.gamma(2.0, priors.growth_drift_scale / 2.0, draws)
    if spec.mean_reverting:
        out["half_life"] = np.exp(rng.normal(priors.log_h_mu, priors.log_h_sd, draws))
        out["rho"] = np.exp(-np.log(2.0) / out["half_life"])
    if spec.errors == "ar1":
        out["phi"] = rng.beta(priors.phi_alpha, priors.phi_beta, draws)
    return general.complete_draws(spec, priors, out, np.array([], dtype=int), np.array([]),
                                  series.axis, stream(seed, "prior_completion"))


def _numpy_covers(spec: ModelSpec) -> bool:
    return spec.is_plain_exponential or (spec.family.states and not spec.season_drift)


def sample_prior(
    spec: ModelSpec,
    priors: ResolvedPriors,
    series: GrowthSeries,
    *,
    draws: int = PREDICTIVE_DRAWS,
    seed: int = 1,
    sampler: str = "auto",
) -> tuple[dict, str]:
    """Draw the parameters of ``spec`` from its priors.

    Parameters
    ----------
    spec : ModelSpec
    priors : ResolvedPriors
    series : GrowthSeries
        Sets the shapes of the PyMC model (local-trend paths, seasons).
    draws : int
    seed : int
    sampler : {"auto", "numpy", "pymc"}
        ``auto`` uses NumPy for the plain exponential model and the local trend, and
        PyMC otherwise; ``numpy`` exists only for those two.

    Returns
    -------
    parameters : dict of str to numpy.ndarray
        Flat draws, scalars ``(draws,)`` and vectors ``(draws, k)``.
    sampler : str
        The sampler used.
    """
    if sampler not in SAMPLERS:
        raise ValueError(f"sampler must be one of {', '.join(SAMPLERS)}, got {sampler!r}")
    if sampler == "numpy" and not _numpy_covers(spec):
        raise ValueError(
            f"the NumPy prior sampler covers only the plain exponential model and the local "
            f"trend, not {spec.label()}; use sampler='pymc'"
        )
    if sampler == "pymc" or not _numpy_covers(spec):
        return _pymc_prior(spec, priors, series, draws, seed), "pymc"
    if spec.is_plain_exponential:
        return _numpy_prior(priors, draws, seed), "numpy"
    return _numpy_local_trend_prior(spec, priors, series, draws, seed), "numpy"
