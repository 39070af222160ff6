"""Prior predictive bands: what the priors imply about the series before fitting.

Parameters are drawn from the priors alone (:mod:`bayesgrowth.forecast.prior_draws`: NumPy
for the plain exponential model and the local trend, PyMC's prior sampler on the model of
:func:`bayesgrowth.models.general.build_pymc_model` otherwise, the very priors the fit uses)
and pushed through the model's simulation of the data over the history and the forecast
horizon. Bands that are absurdly wide or that miss the data by orders of magnitude show
priors that say something the analyst does not believe (Gabry, Simpson, Vehtari, Betancourt &
Gelman 2019, "Visualization in Bayesian workflow", *JRSS A* 182).
"""

from __future__ import annotations

import secrets
from dataclasses import dataclass

import numpy as np
import pandas as pd

from bayesgrowth.config import DEFAULT_LEVELS, DEFAULT_MODEL, PREDICTIVE_DRAWS, check_levels
from bayesgrowth.data.series import GrowthSeries, as_series
from bayesgrowth.display import fmt_percent, text_summary
from bayesgrowth.forecast.bands import band_columns
from bayesgrowth.forecast.means import mean_of_draws
from bayesgrowth.forecast.prior_draws import sample_prior
from bayesgrowth.models import exponential, general
from bayesgrowth.models.spec import ModelSpec, resolve_seasonal, season_index
from bayesgrowth.priors import Priors, ResolvedPriors
from bayesgrowth.seeds import stream

__all__ = ["PriorPredictive", "band_columns", "prior_predictive", "sample_prior"]


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

    def __repr__(self) -> str:
        level = max(self.levels)
        title = (f"Prior predictive of {self.series.name!r} ({self.spec.label()}), "
                 f"{self.draws.shape[0]} draws")
        return text_summary(title, [
            f"{self.periods[0]} to {self.periods[-1]}: the history and {self.horizon} periods "
            "past it",
            f"{fmt_percent(self.coverage(level), 0)} of the observed values inside the "
            f"{level}% prior band",
        ])

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
        mean = mean_of_draws(self.draws)
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
    model: str = DEFAULT_MODEL["model"],
    errors: str = "independent",
    noise: str = "normal",
    seasonal: bool | str = DEFAULT_MODEL["seasonal"],
    drift: str = DEFAULT_MODEL["drift"],
    levels=DEFAULT_LEVELS,
    draws: int = PREDICTIVE_DRAWS,
    seed: int | None = None,
    sampler: str = "auto",
) -> PriorPredictive:
    """Prior predictive bands of a model over the history of ``series`` and ``horizon`` periods.

    Parameters
    ----------
    series : GrowthSeries
        Or what :func:`~bayesgrowth.data.series.read_series` reads. Only its
        calendar, length and the values the default priors anchor on are used; the
        fit's data do not enter the draws.
    horizon : int
        Periods after the last observation (0 for the history alone).
    priors : Priors, optional
        Defaults documented in :mod:`bayesgrowth.priors`.
    model, errors, noise, seasonal, drift
        The model, as in :func:`bayesgrowth.inference.fit_series`; by default the
        recommended model (:data:`bayesgrowth.config.DEFAULT_MODEL`), seasonal factors
        decided from the calendar.
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
    series = as_series(series, "series")
    horizon, draws = _check_sizes(horizon, draws)
    levels = check_levels(levels)
    seasonal = resolve_seasonal(seasonal, series.axis, series.t, model)
    spec = ModelSpec(model=model, errors=errors, noise=noise, seasonal=seasonal, drift=drift)
    if spec.seasonal:

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
