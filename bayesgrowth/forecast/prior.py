"""Prior predictive bands: what the priors imply about the series before fitting.

Parameters are drawn from the priors alone and pushed through the model's
simulation of the data over the history and the forecast horizon. Bands that
are absurdly wide or that miss the data by orders of magnitude show priors that
say something the analyst does not believe (Gabry, Simpson, Vehtari,
Betancourt & Gelman 2019, "Visualization in Bayesian workflow", *JRSS A* 182).

Parameter draws come from the PyMC model of the chosen specification
(:func:`pymc.sample_prior_predictive` on the model of
:func:`bayesgrowth.models.general.build_pymc_model`, whose likelihood is a
potential that prior sampling leaves out), so they are the very priors the
fit uses. The plain exponential model and the local trend (the default) have
their own sampler in NumPy, which needs no PyMC and draws the same priors: normal
``log a`` and ``log(1+g)``, half-normal ``sigma``, and for the local trend Gamma(2)
level-shock and growth-drift scales, a log-normal half-life and, with AR(1) errors, a
Beta ``phi`` (checked against PyMC's prior sampler in the tests).
"""

from __future__ import annotations

import logging
import secrets
import warnings
from dataclasses import dataclass

import numpy as np
import pandas as pd

from bayesgrowth.config import DEFAULT_LEVELS, PREDICTIVE_DRAWS, check_levels
from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.forecast.bands import band_columns
from bayesgrowth.models import exponential, general, linear
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.priors import Priors, ResolvedPriors
from bayesgrowth.seeds import stream

__all__ = ["PriorPredictive", "band_columns", "prior_predictive", "sample_prior"]

SAMPLERS = ("auto", "numpy", "pymc")


@dataclass
class PriorPredictive:
    """Prior predictive draws over the history and the horizon.

    Attributes
    ----------
    series : GrowthSeries
        The series whose calendar, reference period and anchors the priors use.
    spec : ModelSpec
    priors : ResolvedPriors
    horizon : int
    levels : tuple of int
    t : numpy.ndarray
        Every period from the first observation to the end of the horizon.
    periods : list of str
        Their labels.
    draws : numpy.ndarray, shape (n_draws, len(t))
        Prior predictive draws of the value (curve, errors and noise).
    curve_draws : numpy.ndarray, shape (n_draws, len(t))
        Draws of the curve alone.
    parameters : dict of str to numpy.ndarray
        The parameter draws from the priors (flat).
    seed : int
    sampler : str
        ``"numpy"`` or ``"pymc"``: where the parameter draws came from.
    """

    series: GrowthSeries
    spec: ModelSpec
    priors: ResolvedPriors
    horizon: int
    levels: tuple[int, ...]
    t: np.ndarray
    periods: list[str]
    draws: np.ndarray
    curve_draws: np.ndarray
    parameters: dict
    seed: int
    sampler: str

    @property
    def in_history(self) -> np.ndarray:
        """Whether each period of :attr:`t` lies within the observed history."""
        return self.t <= self.series.t_last

    @property
    def table(self) -> pd.DataFrame:
        """One row per period: ``period``, ``t``, ``part``, ``observed``, ``mean``, bands.

        The band columns are those of :attr:`Forecast.table
        <bayesgrowth.forecast.Forecast.table>` (``lower_L``/``upper_L``,
        ``curve_median``, ``curve_lower_L``/``curve_upper_L``); ``part`` is
        ``history`` or ``forecast`` and ``observed`` the value where there is one.
        """
        observed = pd.Series(self.series.values, index=self.series.t).reindex(self.t)
        with np.errstate(over="ignore"):
            mean = self.draws.mean(axis=0)
        return pd.DataFrame({
            "period": self.periods,
            "t": self.t,
            "part": np.where(self.in_history, "history", "forecast"),
            "observed": observed.to_numpy(),
            "mean": mean,
            "median": np.median(self.draws, axis=0),
            **band_columns(self.draws, self.levels),
            "curve_median": np.median(self.curve_draws, axis=0),
            **band_columns(self.curve_draws, self.levels, prefix="curve_"),
        })

    def coverage(self, level: int | None = None) -> float:
        """Share of the observed values inside the prior predictive band of ``level``.

        Parameters
        ----------
        level : int, optional
            Default the widest level.
        """
        level = max(self.levels) if level is None else int(level)
        if level not in self.levels:
            raise ValueError(f"level {level} is not one of the bands {list(self.levels)}")
        tab = self.table.dropna(subset=["observed"])
        inside = (tab["observed"] >= tab[f"lower_{level}"]) & (
            tab["observed"] <= tab[f"upper_{level}"]
        )
        return float(inside.mean())

    def value_draws(self, period: str | int) -> np.ndarray:
        """Draws of the value in one period (a label, or a time index of :attr:`t`)."""
        if isinstance(period, str):
            if period not in self.periods:
                raise ValueError(
                    f"period {period!r} is not covered ({self.periods[0]} to {self.periods[-1]})"
                )
            return self.draws[:, self.periods.index(period)]
        hits = np.flatnonzero(self.t == int(period))
        if not hits.size:
            raise ValueError(f"time index {period} is not covered ({self.t[0]} to {self.t[-1]})")
        return self.draws[:, int(hits[0])]


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


def _prior_errors(spec: ModelSpec, p: dict, shape: tuple[int, int],
                  rng: np.random.Generator) -> np.ndarray:
    """Errors on the log scale over consecutive periods; AR(1) starts from its stationary law."""
    sigma = np.asarray(p["sigma"], dtype=float)[:, None]
    if spec.noise == "normal":
        eps = rng.standard_normal(shape)
    else:
        eps = rng.standard_t(np.broadcast_to(np.asarray(p["nu"], dtype=float)[:, None], shape))
    eps = sigma * eps
    if spec.errors == "independent":
        return eps
    phi = np.asarray(p["phi"], dtype=float)
    e = np.empty(shape)
    e[:, 0] = eps[:, 0] / np.sqrt(1 - phi**2)
    for j in range(1, shape[1]):
        e[:, j] = phi * e[:, j - 1] + eps[:, j]
    return e


def _local_trend_shocks(spec: ModelSpec, p: dict, n_grid: int,
                        rng: np.random.Generator) -> np.ndarray:
    """Deviations of the local trend's level from its mean path, drawn forward from zero.

    ``d_growth_j = rho d_growth_{j-1} + sigma_growth u_j`` (``rho = 1`` for the
    random walk) and ``d_level_j = d_level_{j-1} + d_growth_j + sigma_level z_j``,
    the recursions of :mod:`bayesgrowth.models.local_trend` less their means.
    """
    s_g = np.asarray(p["sigma_growth"], dtype=float)
    s_l = np.asarray(p["sigma_level"], dtype=float)
    rho = np.asarray(p["rho"], dtype=float) if spec.mean_reverting else np.ones_like(s_g)
    d_growth = np.zeros_like(s_g)
    out = np.zeros((s_g.size, n_grid))
    for j in range(1, n_grid):
        d_growth = rho * d_growth + s_g * rng.standard_normal(s_g.size)
        out[:, j] = out[:, j - 1] + d_growth + s_l * rng.standard_normal(s_g.size)
    return out


def prior_predictive(
    series: GrowthSeries,
    horizon: int = 8,
    *,
    priors: Priors | None = None,
    model: str = "exponential",
    errors: str = "independent",
    noise: str = "normal",
    seasonal: bool = False,
    drift: str = "random-walk",
    levels=DEFAULT_LEVELS,
    draws: int = PREDICTIVE_DRAWS,
    seed: int | None = None,
    sampler: str = "auto",
) -> PriorPredictive:
    """Prior predictive bands of a model over the history of ``series`` and ``horizon`` periods.

    Parameters
    ----------
    series : GrowthSeries
        Only its calendar, length and the values the default priors anchor on are
        used; the fit's data do not enter the draws.
    horizon : int
        Periods after the last observation (0 for the history alone).
    priors : Priors, optional
        Defaults documented in :mod:`bayesgrowth.priors`.
    model, errors, noise, seasonal, drift
        The model, as in :func:`bayesgrowth.inference.fit_series`.
    levels : sequence of int
        Band levels in percent.
    draws : int
        Number of prior draws.
    seed : int, optional
        Drawn and recorded when omitted.
    sampler : {"auto", "numpy", "pymc"}
        See :func:`sample_prior`.

    Returns
    -------
    PriorPredictive

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> prior = bg.prior_predictive(bg.load_demo(), 4, seed=1)
    >>> prior.draws.shape[0], prior.levels
    (4000, (50, 80, 95))
    """
    horizon, draws = _check_sizes(horizon, draws)
    levels = check_levels(levels)
    spec = ModelSpec(model=model, errors=errors, noise=noise, seasonal=seasonal, drift=drift)
    if spec.seasonal:
        from bayesgrowth.models.spec import season_index

        season_index(series.axis, series.t)
    seed = secrets.randbits(32) if seed is None else int(seed)
    resolved = (priors or Priors()).resolve(series)
    if spec.family.states and resolved.t_ref != int(series.t[0]):
        raise ValueError(
            f"the {spec.model} model anchors its level at the first observation; "
            "leave the reference period unset"
        )
    params, used = sample_prior(spec, resolved, series, draws=draws, seed=seed, sampler=sampler)
    t = np.arange(int(series.t[0]), series.t_last + horizon + 1)
    log_values, curve = _prior_paths(spec, params, t, resolved.t_ref, series.axis,
                                     stream(seed, "prior_paths"))
    with np.errstate(over="ignore"):
        values, curve_values = np.exp(log_values), np.exp(curve)
    return PriorPredictive(
        series=series,
        spec=spec,
        priors=resolved,
        horizon=horizon,
        levels=levels,
        t=t,
        periods=series.axis.labels(t),
        draws=values,
        curve_draws=curve_values,
        parameters=params,
        seed=seed,
        sampler=used,
    )


def _check_sizes(horizon, draws) -> tuple[int, int]:
    if int(horizon) != horizon or horizon < 0:
        raise ValueError(f"horizon must be a whole number of periods >= 0, got {horizon}")
    if int(draws) != draws or draws < 1:
        raise ValueError(f"draws must be a whole number >= 1, got {draws}")
    return int(horizon), int(draws)


def _prior_paths(spec: ModelSpec, params: dict, t: np.ndarray, t_ref: int, axis,
                 rng: np.random.Generator) -> tuple[np.ndarray, np.ndarray]:
    """Log value paths and log curves over ``t`` of the parameter draws ``params``."""
    if spec.is_plain_exponential:
        return exponential.simulate_log(params, t, t_ref, rng), exponential.log_mean(
            params, t, t_ref)
    curve = general.log_trend(spec, params, t, t_ref, axis)
    if spec.family.states:
        curve = curve + _local_trend_shocks(spec, params, t.size, rng)
    return curve + _prior_errors(spec, params, curve.shape, rng), curve
