"""The NUTS engine: PyMC's No-U-Turn sampler on CPU, with diagnostics on every fit."""

from __future__ import annotations

import logging
import warnings

import numpy as np

from bayesgrowth.config import DEFAULT_CHAINS, DEFAULT_DRAWS, DEFAULT_TUNE
from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.inference.diagnostics import Diagnostics
from bayesgrowth.inference.fit import Fit
from bayesgrowth.inference.interrupt import check_complete, stoppable
from bayesgrowth.models import exponential, general, linear
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.priors import ResolvedPriors
from bayesgrowth.seeds import stream

__all__ = ["complete_posterior", "default_target_accept", "fit_nuts"]

#: Series this short diverged at the default target_accept when measured; 0.95 was clean.
SHORT_SERIES = 6


def default_target_accept(n_obs: int, spec: ModelSpec | None = None) -> float:
    """Step-size target: 0.95 for short series, else the family's (0.95 for ceiling curves).

    Series of ``SHORT_SERIES`` points or fewer diverged at 0.9 when measured, and
    so did the Gompertz curve with AR(1) errors on the demo series (3 and 2
    divergent transitions in 3 seeds at 0.9, none at 0.95, no slower): the
    families declare their target (``ModelFamily.target_accept``).
    """
    if n_obs <= SHORT_SERIES:
        return 0.95
    return 0.9 if spec is None else spec.family.target_accept


def diagnose(posterior_ds, divergences: int) -> Diagnostics:
    """R-hat, ESS (ArviZ, rank-normalised) and divergences of a posterior dataset."""
    import arviz as az

    names = [v for v in posterior_ds.data_vars if posterior_ds[v].std() > 0]
    ds = posterior_ds[names]
    rhat = float(az.rhat(ds).to_array().max())
    ess_bulk = float(az.ess(ds, method="bulk").to_array().min())
    ess_tail = float(az.ess(ds, method="tail").to_array().min())
    return Diagnostics.from_values(rhat, ess_bulk, ess_tail, divergences, method="NUTS (PyMC)")


def sample_pymc(model, *, seed: int, draws: int, tune: int, chains: int, cores: int,
                target_accept: float, progressbar: bool):
    """Run PyMC's NUTS on ``model``; quiet unless ``progressbar``. Returns InferenceData.

    Early tuning steps can overflow the kinetic-energy dot product before the step
    size adapts: that warning is silenced, since the diagnostics judge the result.
    """
    import pymc as pm

    logger = logging.getLogger("pymc")
    level = logger.level
    if not progressbar:
        logger.setLevel(logging.WARNING)  # quiet runs: no sampler chatter
    try:
        with model, warnings.catch_warnings(), stoppable():
            warnings.filterwarnings("ignore", "overflow encountered", RuntimeWarning)
            idata = pm.sample(
                draws=draws, tune=tune, chains=chains, cores=cores, random_seed=seed,
                target_accept=target_accept, progressbar=progressbar,
                compute_convergence_checks=False, mp_ctx="fork" if cores > 1 else None,
            )
    finally:
        logger.setLevel(level)
    check_complete(idata, chains, draws)  # PyMC returns the draws so far when interrupted
    return idata


def fit_nuts(
    series: GrowthSeries,
    priors: ResolvedPriors,
    *,
    seed: int,
    draws: int = DEFAULT_DRAWS,
    tune: int = DEFAULT_TUNE,
    chains: int = DEFAULT_CHAINS,
    target_accept: float | None = None,
    cores: int = 1,
    progressbar: bool = False,
    spec: ModelSpec | None = None,
) -> Fit:
    """Sample the posterior with PyMC NUTS.

    Parameters
    ----------
    series : GrowthSeries
    priors : ResolvedPriors
    seed : int
        Seed for the sampler; the same seed gives identical draws.
    draws, tune, chains : int
        Draws kept per chain, tuning steps per chain, number of chains.
    target_accept : float, optional
        Default from :func:`default_target_accept`.
    cores : int
        Processes. The default 1 runs chains one after another: on two cores a
        second process barely pays for its start-up with a model this small.
    progressbar : bool
        Show PyMC's progress bar.
    spec : ModelSpec, optional
        The model; default the exponential curve with independent normal errors.
        Diagnostics cover every parameter, seasonal factor and local-trend state.
    """
    spec = spec or ModelSpec()
    target_accept = target_accept or default_target_accept(series.n, spec)
    if spec.is_plain_exponential:
        model = exponential.build_pymc_model(priors, series.t, series.log_values)
    else:
        model = general.build_pymc_model(
            spec, priors, series.t, series.log_values, axis=series.axis
        )
    idata = sample_pymc(model, seed=seed, draws=draws, tune=tune, chains=chains, cores=cores,
                        target_accept=target_accept, progressbar=progressbar)
    post = idata.posterior
    names = [k for k in spec.parameters() + spec.vector_parameters() + linear.STAND_INS
             if k in post]
    posterior = {k: np.asarray(post[k].values, dtype=float) for k in names}
    posterior = complete_posterior(spec, priors, series, posterior, seed)
    for k in ("log_a", "long_run", "sigma_level"):  # fixed values are scalar Deterministics
        if k in posterior and posterior[k].shape != posterior["sigma"].shape:
            posterior[k] = np.broadcast_to(posterior[k], posterior["sigma"].shape).copy()
    if priors.fixed_initial:
        posterior["log_a"] = np.full_like(posterior["sigma"], priors.log_a_mu)
    divergences = int(idata.sample_stats["diverging"].sum())
    diagnostics = diagnose(post[names], divergences)
    return Fit(
        series=series,
        priors=priors,
        engine="nuts",
        seed=seed,
        posterior=posterior,
        diagnostics=diagnostics,
        settings={"draws": draws, "tune": tune, "chains": chains,
                  "target_accept": target_accept, "cores": cores},
        model=spec.model,
        spec=spec,
    )


def complete_posterior(spec, priors, series, posterior: dict, seed: int) -> dict:
    """Add the linear coefficients the model integrated out, drawn given each draw.

    Fixed values kept as scalars are broadcast to the draws' ``(chain, draw)`` shape.
    """
    shape = posterior["sigma"].shape
    flat = {k: np.broadcast_to(v, shape + np.shape(v)[len(shape):]).reshape(-1, *np.shape(v)[2:])
            for k, v in posterior.items()}
    done = general.complete_draws(spec, priors, flat, series.t, series.log_values, series.axis,
                                  stream(seed, "posterior_completion"))
    return {k: np.asarray(v).reshape(*shape, *np.shape(v)[1:]) for k, v in done.items()}
