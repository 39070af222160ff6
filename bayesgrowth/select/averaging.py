"""Fit several curves to one series, and forecast from the weighted mixture of their draws.

A model-averaged forecast is the mixture of the models' posterior predictive
distributions with the stacking weights (Yao, Vehtari, Simpson & Gelman 2018):
its draws are whole predictive paths resampled from each model in proportion to
its weight, with a seed. Its bands are quantiles of those draws, which is not
the same as averaging the models' bands: two models that disagree give a wide
averaged band covering both, not a narrow band in between.
"""

from __future__ import annotations

import warnings
from collections.abc import Mapping, Sequence
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from bayesgrowth.config import DEFAULT_LEVELS
from bayesgrowth.data.series import GrowthSeries, as_series
from bayesgrowth.display import fmt_weight, html_summary, text_summary
from bayesgrowth.forecast.bands import draws_table, prob_at_least
from bayesgrowth.forecast.summaries import forecast_headline, forecast_html, forecast_text
from bayesgrowth.seeds import stream
from bayesgrowth.select.loo import ModelComparison, check_named, compare_models

__all__ = [
    "AveragedForecast",
    "ModelAverage",
    "average_forecasts",
    "fit_models",
    "model_average",
    "registered_models",
]


def registered_models() -> tuple[str, ...]:
    """Names of the curves that :func:`~bayesgrowth.inference.fit_series` can fit.

    The families of the model registry (:mod:`bayesgrowth.models.registry`), in
    registration order.

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> "exponential" in bg.registered_models()
    True
    """
    from bayesgrowth.models import registry

    return registry.names()


def fit_models(
    series: GrowthSeries,
    models: Sequence[str] | None = None,
    *,
    engine: str = "auto",
    seed: int = 1,
    priors=None,
    errors: str = "independent",
    noise: str = "normal",
    seasonal: bool = False,
    drift: str = "random-walk",
    on_fit=None,
    **settings,
) -> dict:
    """Fit each curve in ``models`` to ``series``.

    Parameters
    ----------
    series : GrowthSeries or what :func:`~bayesgrowth.data.series.read_series` reads
    models : sequence of str, optional
        Curve names, or one string of them separated by commas; default every one
        of :func:`registered_models`.
    engine : {"auto", "nuts"}
        ``auto``: the exact engine where it applies (the local trend and the plain
        exponential model), NUTS for the rest; ``nuts``: NUTS for every model.
    seed : int
        Seed of every fit.
    priors : Priors, optional
        Shared by all models; each uses the priors of its own parameters.
    errors, noise, seasonal, drift
        The error structure and options shared by every curve (see
        :func:`bayesgrowth.inference.fit_series`).
    on_fit : callable, optional
        Called as ``on_fit(name)`` before each fit (progress messages).
    **settings
        Engine settings (``draws``, ``chains``, ...).

    Returns
    -------
    dict of str to Fit
        Keyed by curve name, in the order given. Sampling-diagnostic warnings are
        kept in each fit's ``diagnostics`` rather than raised.

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> fits = bg.fit_models(bg.load_demo(), ["exponential", "local-trend"], seed=1)
    >>> {name: fit.engine for name, fit in fits.items()}
    {'exponential': 'exact', 'local-trend': 'exact'}
    """
    from bayesgrowth.inference.run import fit_series
    from bayesgrowth.models.spec import ModelSpec, resolve_seasonal

    if engine not in ("auto", "nuts"):
        raise ValueError(f"engine must be 'auto' or 'nuts', got {engine!r}")
    series = as_series(series, "series")
    if isinstance(models, str):  # "exponential,local-trend", as the command line takes them
        models = [m.strip() for m in models.split(",")]
    names = list(registered_models() if models is None else models)
    if not names:
        raise ValueError("name at least one model")
    known = registered_models()
    unknown = [n for n in names if n not in known]
    if unknown:
        raise ValueError(
            f"unknown model(s) {', '.join(map(repr, unknown))}; available: {', '.join(known)}"
        )
    if len(set(names)) != len(names):
        raise ValueError("each model may be named only once")
    fits = {}
    for name in names:
        seasons = resolve_seasonal(seasonal, series.axis, series.t, name)
        spec = ModelSpec(model=name, errors=errors, noise=noise, seasonal=seasons, drift=drift)
        use = "exact" if engine == "auto" and spec.exact_fits else "nuts"
        options = dict(settings)
        if use == "exact":
            options = {k: v for k, v in options.items() if k in ("draws", "chains")}
        else:
            options.setdefault("progressbar", False)
        if on_fit is not None:
            on_fit(name)
        with warnings.catch_warnings():
            warnings.filterwarnings("ignore", "sampling diagnostics failed")
            fits[name] = fit_series(
                series, engine=use, priors=priors, seed=seed, model=spec.model,
                errors=spec.errors, noise=spec.noise, seasonal=spec.seasonal,
                drift=spec.drift, **options,
            )
    return fits


@dataclass(frozen=True)
class _AverageSource:
    """What :func:`~bayesgrowth.plots.fan.plot_fan` reads from a forecast's ``fit``."""

    series: GrowthSeries
    engine: str


@dataclass
class AveragedForecast:
    """A forecast from the weighted mixture of several models' predictive draws.

    Attributes
    ----------
    series : GrowthSeries
    horizon : int
    levels : tuple of int
    periods : list of str
    t : numpy.ndarray
    draws : numpy.ndarray, shape (n_draws, horizon)
        Mixture draws of the value: whole rows of the models' predictive draws.
    curve_draws : numpy.ndarray, shape (n_draws, horizon)
        The curve draws of the same rows.
    source : numpy.ndarray of int, shape (n_draws,)
        Index into :attr:`models` of the model each row came from.
    models : tuple of str
    weights : dict of str to float
        The mixture weights asked for.
    seed : int
        Seed of the resampling.
    """

    series: GrowthSeries
    horizon: int
    levels: tuple[int, ...]
    periods: list[str]
    t: np.ndarray
    draws: np.ndarray
    curve_draws: np.ndarray
    source: np.ndarray
    models: tuple[str, ...]
    weights: dict
    seed: int

    @property
    def fit(self) -> _AverageSource:
        """A stand-in carrying the series, so :func:`plot_fan` can draw this forecast."""
        return _AverageSource(self.series, f"average of {len(self.models)} models by stacking")

    def __repr__(self) -> str:
        return forecast_text(self)

    def _repr_html_(self) -> str:
        return forecast_html(self)

    @property
    def shares(self) -> dict[str, float]:
        """Share of the mixture draws that came from each model."""
        counts = np.bincount(self.source, minlength=len(self.models))
        return {m: float(c / self.source.size) for m, c in zip(self.models, counts, strict=True)}

    @property
    def table(self) -> pd.DataFrame:
        """The columns of :attr:`Forecast.table <bayesgrowth.forecast.Forecast.table>`."""
        return draws_table(self.periods, self.draws, self.curve_draws, self.levels)

    @property
    def caution(self) -> str | None:
        """The extrapolation caution for this horizon, if it applies."""
        from bayesgrowth.forecast.forecast import extrapolation_caution

        s = self.series
        return extrapolation_caution(s.t_last - int(s.t[0]) + 1, self.horizon)

    def prob_exceeds(self, target: float) -> pd.Series:
        """Probability under the mixture that each future period's value is at least ``target``."""
        return prob_at_least(self.periods, self.draws, target)


def average_forecasts(
    forecasts: Mapping,
    weights: Mapping[str, float],
    *,
    n_draws: int | None = None,
    seed: int | None = None,
) -> AveragedForecast:
    """Mix the predictive draws of several forecasts of one series by ``weights``.

    The number of rows from each model is multinomial with the weights; the
    rows themselves are drawn from that model's draws without replacement (with
    replacement only if more are needed than it has), so each keeps its whole
    path over the horizon.

    Parameters
    ----------
    forecasts : mapping of str to Forecast
        Forecasts of the same series, horizon and band levels.
    weights : mapping of str to float
        Non-negative, summing to 1; a model missing from it has weight 0.
    n_draws : int, optional
        Draws of the mixture; default the largest number of draws among the forecasts.
    seed : int, optional
        Seed of the resampling; default the first forecast's seed.

    Returns
    -------
    AveragedForecast
    """
    check_named(forecasts, "forecasts", "forecast")
    if not forecasts:
        raise ValueError("give at least one forecast to average")
    names = tuple(forecasts)
    extra = set(weights) - set(names)
    if extra:
        raise ValueError(f"weights name models without a forecast: {', '.join(sorted(extra))}")
    w = np.array([float(weights.get(n, 0.0)) for n in names])
    if np.any(~np.isfinite(w)) or np.any(w < 0) or not np.isclose(w.sum(), 1.0, atol=1e-6):
        given = dict(zip(names, w.tolist(), strict=True))
        raise ValueError(f"weights must be >= 0 and sum to 1, got {given}")
    w = w / w.sum()
    first = forecasts[names[0]]
    for name in names[1:]:
        fc = forecasts[name]
        if fc.periods != first.periods or fc.fit.series.fingerprint() != (
                first.fit.series.fingerprint()):
            raise ValueError("forecasts to average must be of the same series and periods")
        if tuple(fc.levels) != tuple(first.levels):
            raise ValueError("forecasts to average must have the same band levels")
    n = int(n_draws or max(forecasts[m].draws.shape[0] for m in names))
    if n < 1:
        raise ValueError(f"n_draws must be >= 1, got {n_draws}")
    seed = int(first.seed if seed is None else seed)
    rng = stream(seed, "model_average")
    counts = rng.multinomial(n, w)
    values, curves, source = [], [], []
    for k, (name, count) in enumerate(zip(names, counts, strict=True)):
        if count == 0:
            continue
        fc = forecasts[name]
        avail = fc.draws.shape[0]
        rows = rng.choice(avail, size=count, replace=count > avail)
        values.append(fc.draws[rows])
        curves.append(fc.curve_draws[rows])
        source.append(np.full(count, k))
    order = rng.permutation(n)
    return AveragedForecast(
        series=first.fit.series,
        horizon=first.horizon,
        levels=tuple(first.levels),
        periods=list(first.periods),
        t=np.asarray(first.t),
        draws=np.concatenate(values)[order],
        curve_draws=np.concatenate(curves)[order],
        source=np.concatenate(source)[order],
        models=names,
        weights={n_: float(x) for n_, x in zip(names, w, strict=True)},
        seed=seed,
    )


@dataclass
class ModelAverage:
    """Model comparison, each model's forecast and their stacking average.

    Attributes
    ----------
    comparison : ModelComparison
        Of the models whose sampling diagnostics passed.
    forecasts : dict of str to Forecast
        Of the models in the average.
    averaged : AveragedForecast
    excluded : dict of str to str
        Models left out of the comparison and the average because their sampling
        diagnostics failed, with the failed checks.
    """

    comparison: ModelComparison
    forecasts: dict
    averaged: AveragedForecast
    excluded: dict = field(default_factory=dict)

    @property
    def _title(self) -> str:
        avg = self.averaged
        return f"Model average of {len(avg.models)} models of {avg.series.name!r}"

    def _headline(self) -> str:
        weights = ", ".join(f"{m} {fmt_weight(w)}" for m, w in self.averaged.weights.items())
        return f"stacking weights {weights}; {forecast_headline(self.averaged)}"

    def __repr__(self) -> str:
        lines = [self._headline()]
        lines += [f"left out (checks failed): {', '.join(self.excluded)}"] if self.excluded else []
        return text_summary(self._title, lines)

    def _repr_html_(self) -> str:
        return html_summary(self._title, self._headline(), ["model", "elpd_loo", "elpd_diff", "dse",
                                                      "weight"], self.comparison._rows())


def model_average(
    fits: Mapping,
    horizon: int,
    *,
    levels=DEFAULT_LEVELS,
    seed: int | None = None,
    n_draws: int | None = None,
) -> ModelAverage:
    """Compare fitted models by PSIS-LOO and forecast from their stacking mixture.

    Parameters
    ----------
    fits : mapping of str to Fit
        Models fitted to the same series.
    horizon : int
    levels : sequence of int
    seed : int, optional
        Seed of every forecast's noise and of the resampling; default each fit's seed.
    n_draws : int, optional
        Draws of the mixture (see :func:`average_forecasts`).

    Returns
    -------
    ModelAverage
        Models whose sampling diagnostics failed are left out of the comparison and
        the average, and named in ``excluded``: a failed fit can look best by
        PSIS-LOO precisely because its draws are wrong. When every model failed,
        all are kept (nothing else could be averaged) and the comparison table
        flags each; the command line then exits non-zero unless accepted.

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> series = bg.load_demo()
    >>> fits = {"exponential": bg.fit_series(series, model="exponential", seed=1),
    ...         "local trend": bg.fit_series(series, seed=1)}
    >>> avg = bg.model_average(fits, 4, seed=1)
    >>> sorted(avg.forecasts), avg.averaged.table.shape[0]
    (['exponential', 'local trend'], 4)
    """
    from bayesgrowth.forecast.forecast import forecast

    check_named(fits)
    excluded = {name: "; ".join(fit.diagnostics.problems) or "diagnostics failed"
                for name, fit in fits.items() if not fit.diagnostics.ok}
    if len(excluded) == len(fits):  # nothing left to average: keep all, each flagged failed
        excluded = {}
    kept = {name: fit for name, fit in fits.items() if name not in excluded}
    comparison = compare_models(kept)
    forecasts = {name: forecast(fit, horizon, levels=levels, seed=seed)
                 for name, fit in kept.items()}
    averaged = average_forecasts(forecasts, comparison.weights, n_draws=n_draws, seed=seed)
    return ModelAverage(comparison=comparison, forecasts=forecasts, averaged=averaged,
                        excluded=excluded)
