"""Posterior predictive forecasts: bands, probabilities of targets, growth summaries."""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass

import numpy as np
import pandas as pd

from bayesgrowth.config import DEFAULT_LEVELS, check_count, check_levels
from bayesgrowth.forecast.bands import (
    band_probabilities,
    check_horizon,
    check_target,
    draws_table,
    interval_summary,
    prob_at_least,
)
from bayesgrowth.forecast.means import finite_means
from bayesgrowth.forecast.summaries import forecast_html, forecast_summary, forecast_text
from bayesgrowth.inference.fit import Fit
from bayesgrowth.inference.mixture import mixture_cdf, mixture_mean_exp, mixture_quantiles
from bayesgrowth.lazy import Deferred, LazyField
from bayesgrowth.models import exponential, general
from bayesgrowth.seeds import stream

__all__ = ["Forecast", "forecast", "extrapolation_caution", "model_caution", "CAUTION",
           "FIXED_CURVE_CAUTION", "fixed_curve_caution"]

#: The standing caution printed with every forecast.
CAUTION = (
    "A forecast extrapolates past growth; it is not investment advice. The bands describe "
    "uncertainty under the model's assumptions, and real outcomes fall outside them more often "
    "when the business changes: check calibration with a backtest."
)

#: Said of every forecast from one fixed curve with independent errors: on 1,905 real growing
#: series the exponential curve's 80% bands held 64% of outcomes (docs/benchmark.md).
FIXED_CURVE_CAUTION = (
    "This model assumes that deviations from one fixed curve do not persist (independent "
    "errors); on real growing series such bands held far fewer outcomes than they state "
    "(docs/benchmark.md). The default local trend's bands held close to what they state."
)

#: A horizon longer than this share of the history gets an explicit caution
#: (a common rule of thumb, with no single published source).
HORIZON_SHARE = 0.5


def extrapolation_caution(
    n_history_periods: int, horizon: int, *, saturates: bool = False
) -> str | None:
    """Explain the extra risk of a horizon long relative to the history, or ``None``.

    ``saturates``: the model has a ceiling (``ModelFamily.ceiling`` in the model
    registry), so the caution does not say it ignores saturation.
    """
    if horizon > HORIZON_SHARE * n_history_periods:
        ignored = ("competition and shocks" if saturates
                   else "saturation, competition and shocks")
        return (
            f"The horizon ({horizon} periods) is more than half the history "
            f"({n_history_periods} periods). The growth curve is extrapolated far beyond the "
            f"data: the bands assume growth continues on the same curve, which ignores "
            f"{ignored}, so treat the later periods as scenarios."
        )
    return None


def fixed_curve_caution(family, errors: str) -> str | None:
    """:data:`FIXED_CURVE_CAUTION` for a fixed curve (no states) with independent errors."""
    return FIXED_CURVE_CAUTION if not family.states and errors == "independent" else None


def model_caution(fit) -> str | None:
    """:data:`FIXED_CURVE_CAUTION` for a fixed curve with independent errors, else ``None``."""
    spec = getattr(fit, "spec", None)
    return None if spec is None else fixed_curve_caution(spec.family, spec.errors)


def saturates(fit) -> bool:
    """Whether the fit's model family has a ceiling (declared in the model registry)."""
    spec = getattr(fit, "spec", None)
    return bool(spec is not None and spec.family.ceiling)


@dataclass
class Forecast:
    """A posterior predictive forecast for ``horizon`` periods after the last observation.

    Attributes
    ----------
    fit : Fit
        The fitted model the forecast comes from.
    horizon : int
    levels : tuple of int
        Band levels in percent.
    periods : list of str
        Labels of the future periods, in the input's style.
    t : numpy.ndarray
        Time indices of the future periods.
    draws : numpy.ndarray, shape (n_draws, horizon)
        Posterior predictive draws of the value (parameter and noise uncertainty).
        For the exact engine they are simulated when first read.
    curve_draws : numpy.ndarray, shape (n_draws, horizon)
        Draws of the mean curve alone (parameter uncertainty only).
    seed : int
        Seed of the predictive noise.
    exact : dict, optional
        For fits by the exact state-space engine: the predictive as a mixture of
        normals on the log scale (``weight`` ``(G,)``, ``mean``, ``value_sd``,
        ``curve_sd`` ``(G, H)``). Bands, medians, means and probabilities then come
        from the mixture itself (:mod:`bayesgrowth.inference.mixture`), not the draws.
    """

    fit: Fit
    horizon: int
    levels: tuple[int, ...]
    periods: list[str]
    t: np.ndarray
    draws: np.ndarray = LazyField(0)
    curve_draws: np.ndarray = LazyField(1)
    seed: int
    exact: dict | None = None

    def __repr__(self) -> str:
        return forecast_text(self)

    def _repr_html_(self) -> str:
        return forecast_html(self)

    def _mixture_bands(self, sd_key: str, prefix: str = "") -> dict:
        e = self.exact
        probs = [0.5]
        for level in self.levels:
            probs += band_probabilities(level)
        with np.errstate(over="ignore"):  # beyond 1.8e308 a band's end is inf: the writers
            # leave it out and say so
            q = np.exp(mixture_quantiles(e["weight"], e["mean"], e[sd_key], probs))
        cols = {f"{prefix}median": q[0]}
        for i, level in enumerate(self.levels):
            cols[f"{prefix}lower_{level}"] = q[1 + 2 * i]
            cols[f"{prefix}upper_{level}"] = q[2 + 2 * i]
        return cols

    @functools.cached_property
    def table(self) -> pd.DataFrame:
        """One row per future period: ``period``, ``step``, ``mean``, ``median``, bands.

        Columns ``lower_L``/``upper_L`` are the central ``L``% credible band of the
        value; ``curve_median``, ``curve_lower_L``/``curve_upper_L`` the band of
        the mean curve alone.
        """
        frame = {"period": self.periods, "step": np.arange(1, self.horizon + 1)}
        if self.exact is not None:
            e = self.exact
            value = self._mixture_bands("value_sd")
            curve = self._mixture_bands("curve_sd", prefix="curve_")
            frame["mean"] = finite_means(mixture_mean_exp(e["weight"], e["mean"], e["value_sd"]))
            frame["median"] = value.pop("median")
            frame.update(value)
            frame.update(curve)
            return pd.DataFrame(frame)
        return draws_table(self.periods, self.draws, self.curve_draws, self.levels)

    def _column(self, period: str | int | None) -> int:
        if period is None:
            return self.horizon - 1
        if isinstance(period, float | np.floating) and float(period).is_integer():
            period = int(period)  # a step written 2.0
        if isinstance(period, int | np.integer) and not isinstance(period, bool):
            if not 1 <= period <= self.horizon:
                raise ValueError(f"step must be between 1 and {self.horizon}, got {period}")
            return int(period) - 1
        if period not in self.periods:
            raise ValueError(
                f"period {period!r} is not in the forecast: give a label from "
                f"{self.periods[0]!r} to {self.periods[-1]!r} or a step from 1 to {self.horizon}"
            )
        return self.periods.index(period)

    def prob_exceeds(self, target: float) -> pd.Series:
        """Posterior probability that the value in each future period is at least ``target``.

        ``target`` is a finite value above 0, in the series' units.
        """
        if self.exact is not None:
            e = self.exact
            log_target = np.full(self.horizon, np.log(check_target(target)))
            prob = 1.0 - mixture_cdf(e["weight"], e["mean"], e["value_sd"], log_target)
            return pd.Series(prob, index=pd.Index(self.periods, name="period"),
                             name="probability")
        return prob_at_least(self.periods, self.draws, target)

    def first_period_reaching(self, target: float, probability: float = 0.5) -> str | None:
        """First future period whose value is at least ``target`` with ``probability``.

        Returns ``None`` if no period within the horizon reaches it.
        """
        if not 0 < probability < 1:
            raise ValueError(f"probability must be between 0 and 1, got {probability}")
        p = self.prob_exceeds(target).to_numpy()
        hits = np.flatnonzero(p >= probability)
        return self.periods[int(hits[0])] if hits.size else None

    def time_to_target(self, target: float):
        """When the value first reaches ``target``: probability by each period, from paths.

        See :mod:`bayesgrowth.forecast.target` (first passage needs the joint paths,
        not the per-period bands).

        Returns
        -------
        TimeToTarget
        """
        from bayesgrowth.forecast.target import time_to_target

        return time_to_target(self, target)

    def value_draws(self, period: str | int | None = None) -> np.ndarray:
        """Predictive draws for one future period (a label or a step; default the last)."""
        return self.draws[:, self._column(period)]

    def growth(self) -> pd.DataFrame:
        """Growth per period, per year and doubling time, with 80% and 95% credible intervals.

        Doubling time (periods) is ``ln 2 / ln(1+g)``; draws with ``g <= 0`` never
        double and count as infinite, so its upper bounds and its mean can be ``inf``
        (read the median).
        """
        g = self.fit.derived()["growth_per_period"]
        rows = {"growth_per_period": interval_summary(g)}
        ppy = self.fit.series.axis.periods_per_year
        if ppy is not None and ppy != 1:
            rows["growth_per_year"] = interval_summary((1 + g) ** ppy - 1)
        with np.errstate(divide="ignore"):
            log_growth = np.log1p(g)
            doubling = np.where(log_growth > 0, math.log(2) / log_growth, np.inf)
        rows["doubling_time_periods"] = interval_summary(doubling)
        rows["prob_growth_positive"] = {"median": float((g > 0).mean())}
        return pd.DataFrame(rows).T

    @property
    def caution(self) -> str | None:
        """The extrapolation caution for this horizon, if it applies."""
        s = self.fit.series
        return extrapolation_caution(s.t_last - int(s.t[0]) + 1, self.horizon,
                                     saturates=saturates(self.fit))

    def summary(self, target: float | None = None, target_probability: float = 0.5) -> dict:
        """A JSON-ready summary: parameters, growth, diagnostics, provenance, cautions.

        See :func:`bayesgrowth.forecast.summaries.forecast_summary`.
        """
        return forecast_summary(self, target, target_probability)

    def predictive_groups(self) -> dict:
        """The draws in the form :meth:`Fit.to_inference_data` takes."""
        return {"periods": self.periods, "draws": {"value": self.draws, "curve": self.curve_draws}}

    def to_inference_data(self):
        """InferenceData with posterior, posterior predictive, log likelihood and observed data."""
        return self.fit.to_inference_data(self.predictive_groups())


def forecast(
    fit: Fit,
    horizon: int,
    *,
    levels=DEFAULT_LEVELS,
    seed: int | None = None,
) -> Forecast:
    """Posterior predictive forecast ``horizon`` periods past the last observation.

    Parameters
    ----------
    fit : Fit
    horizon : int
        Number of future periods (>= 1).
    levels : sequence of int
        Central band levels in percent.
    seed : int, optional
        Seed of the predictive noise; defaults to the fit's seed, so one seed
        reproduces the whole forecast.

    Returns
    -------
    Forecast
        Or, for a :class:`~bayesgrowth.inference.pooled.PooledFit`, a
        :class:`~bayesgrowth.forecast.pooled.PooledForecast` of every series and
        their total (:func:`~bayesgrowth.forecast.pooled.forecast_pooled`).

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> fc = bg.forecast(bg.fit_series(bg.load_demo(), seed=1), 4)
    >>> fc.periods
    ['2026Q1', '2026Q2', '2026Q3', '2026Q4']
    >>> fc.table.columns[:4].tolist()
    ['period', 'step', 'mean', 'median']
    """
    if not isinstance(fit, Fit):  # a pooled fit (its module, and PyMC's, load only then)
        from bayesgrowth.forecast.pooled import forecast_pooled
        from bayesgrowth.inference.pooled import PooledFit

        if isinstance(fit, PooledFit):
            return forecast_pooled(fit, horizon, levels=levels, seed=seed)
    horizon = check_horizon(horizon)
    fit.series.check_horizon(horizon, "horizon=")  # a calendar past 9999, before any work
    levels = check_levels(levels)
    seed = fit.seed if seed is None else check_count(seed, "seed", 0)
    t = fit.series.future_t(horizon)
    exact = None
    if fit.state_space is not None:
        exact = _state_space_mixture(fit, t)
        # a stream of its own, made when the paths are: the same numbers whenever they are
        draws = curve_draws = Deferred(
            lambda: _state_space_draws(fit, t, stream(seed, "forecast")))
    else:
        rng = stream(seed, "forecast")
        if fit.spec.is_plain_exponential:
            params = fit.flat()
            log_draws = exponential.simulate_log(params, t, fit.priors.t_ref, rng)
            curve = exponential.log_mean(params, t, fit.priors.t_ref)
        else:
            s = fit.series
            log_draws, curve = general.simulate_log(
                fit.spec, fit.flat(), s.t, s.log_values, t, fit.priors.t_ref, rng, s.axis
            )
        draws, curve_draws = np.exp(log_draws), np.exp(curve)
    return Forecast(
        fit=fit,
        horizon=horizon,
        levels=levels,
        periods=fit.series.future_labels(horizon),
        t=t,
        draws=draws,
        curve_draws=curve_draws,
        seed=seed,
        exact=exact,
    )


def _state_space_mixture(fit: Fit, t: np.ndarray) -> dict:
    """The exact predictive as a mixture of normals on the log scale (per node)."""
    post = fit.state_space
    marginal = post.predictive(t, joint=False)
    return {
        "weight": post.weight,
        "mean": marginal["mean"],
        "value_sd": np.sqrt(marginal["value_var"]),
        "curve_sd": np.sqrt(np.clip(marginal["curve_var"], 0, None)),
    }


def _state_space_draws(fit: Fit, t: np.ndarray, rng: np.random.Generator):
    """Joint predictive paths, one per posterior draw (its node and coefficients).

    Returns the value draws and the level draws.
    """
    post = fit.state_space
    nodes = fit.extra["nodes"].reshape(-1)
    curve, values = post.simulate(t, nodes, post.beta_of(fit.flat()), rng)
    return np.exp(values), np.exp(curve)
