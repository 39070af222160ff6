"""Recalibrated bands: learn from a backtest how a model's forecasts missed, and correct them.

A rolling-origin backtest of the chosen model on the user's history
(:func:`bayesgrowth.backtest.backtest`) gives one PIT value per past outcome: the
share of that forecast's predictive distribution below what happened. The PIT values
of each horizon step say how the predictive misses there (too narrow, too wide,
too high, too low), and a monotone map learned from them corrects the forecast
(:mod:`bayesgrowth.forecast.recalibration_map` builds the map,
:mod:`bayesgrowth.forecast.recalibrated` applies it).

**Why quantile recalibration is the default.** The published alternatives are quantile
recalibration of the predictive CDF (Kuleshov, Fenner & Ermon 2018, ICML) and
split-conformal widening of the bands per horizon step (Stankeviciute, Alaa & van der
Schaar 2021, "Conformal time-series forecasting", NeurIPS). Conformal widening scales a
band symmetrically around the forecast until it holds its level on past outcomes: it
fixes the width but not a bias. Growth forecasts mostly miss on one side (a curve keeps
compounding when growth slows, and outcomes fall below its band), and quantile
recalibration moves the lower and upper ends separately, so it corrects one-sided
misses as well as width. It also corrects the whole distribution at once (every band
level, the median and the probability of a target) from one monotone map, where
conformal widening needs a separate calibration per band level and says nothing about
probabilities. Both rest on past outcomes resembling future ones.

**Many series.** A short series gives few outcomes, and the map is then shrunk close
to "no change". In a batch or panel, :func:`pooled_maps` learns one map per frequency
and horizon step from every series' backtest together, and :func:`recalibrate_panel`
applies it to each series' forecast: that is where recalibration has the evidence to
help.
"""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
import pandas as pd

from bayesgrowth.config import PREDICTIVE_DRAWS
from bayesgrowth.data.series import MIN_OBSERVATIONS, GrowthSeries
from bayesgrowth.forecast.bands import band_probabilities
from bayesgrowth.forecast.forecast import Forecast
from bayesgrowth.forecast.recalibrated import RecalibratedForecast, apply_map
from bayesgrowth.forecast.recalibration_map import (
    MIN_OUTCOMES,
    PSEUDO_COUNT,
    QuantileMap,
    learn_map,
)

__all__ = [
    "backtest_model",
    "default_min_train",
    "map_from_backtest",
    "outcomes_of",
    "pit_coverage",
    "pooled_maps",
    "pooled_source",
    "priors_of",
    "recalibrate",
    "recalibrate_panel",
]

#: Fewest backtest origins a recalibration runs on.
MIN_ORIGINS = 2


def default_min_train(n: int) -> int:
    """Training points at the first origin by default: half the history (at least 3)."""
    return max(MIN_OBSERVATIONS, int(n) // 2)


def priors_of(fit):
    """The stated :class:`~bayesgrowth.priors.Priors` behind a fit's resolved priors.

    The backtest resolves them afresh on each training set, as the fit did on the
    whole series. A reference period at the first observation is left unset (it is
    the default), so it follows each training set's start.
    """
    from bayesgrowth import priors as p

    resolved = fit.priors
    st = resolved.stated
    if not st:
        return None
    kinds = {"initial": p.InitialValuePrior, "growth": p.GrowthPrior, "noise": p.NoisePrior,
             "ceiling": p.CeilingPrior, "half_life": p.HalfLifePrior,
             "long_run": p.LongRunGrowthPrior, "persistence": p.PersistencePrior,
             "local_trend": p.LocalTrendPrior, "seasonal": p.SeasonalPrior}
    parts = {k: cls(**st[k]) for k, cls in kinds.items() if k in st}
    ref = resolved.reference_period
    first = fit.series.labels[0]
    return p.Priors(**parts, reference_period=None if ref == first else ref)


def backtest_model(fit, series: GrowthSeries | None = None, *, horizon: int,
                   min_train: int | None = None, stride: int = 1, window: int | None = None,
                   seed: int | None = None, priors=None, n_draws: int = PREDICTIVE_DRAWS,
                   progress: bool = False):
    """Rolling-origin backtest of the model of ``fit`` (same engine, model and priors).

    Parameters
    ----------
    fit : Fit
        The fitted model whose forecasts are to be recalibrated.
    series : GrowthSeries, optional
        The history to backtest on; default the fitted series.
    horizon : int
        Steps forecast from each origin.
    min_train : int, optional
        Training points at the first origin; default half the history.
    stride, window : int
        As in :func:`bayesgrowth.backtest.backtest`.
    seed : int, optional
        Seed of the backtest; default the fit's seed.
    priors : Priors, optional
        Default the priors the fit stated (:func:`priors_of`).
    n_draws : int, default 4000
        Predictive draws per backtest forecast (the PIT's resolution is ``1/n_draws``).
    progress : bool
        Show a progress bar over the origins.

    Returns
    -------
    BacktestResult
    """
    from bayesgrowth.backtest import backtest

    series = fit.series if series is None else series
    min_train = default_min_train(series.n) if min_train is None else int(min_train)
    if series.n - min_train < MIN_ORIGINS:
        raise ValueError(
            f"min_train {min_train} leaves {max(series.n - min_train, 0)} of the "
            f"{series.n} observations to backtest on; recalibration needs at least "
            f"{MIN_ORIGINS}: lower min_train"
        )
    options = dict(fit.spec.to_dict())
    if fit.engine == "nuts":
        options.update({k: fit.settings[k] for k in ("draws", "chains", "tune")
                        if k in fit.settings})
        if "draws" in options and "chains" in options:  # no more draws than the sampler gives
            n_draws = min(n_draws, int(options["draws"]) * int(options["chains"]))
    return backtest(
        series, methods=(fit.engine,), horizon=int(horizon), min_train=min_train,
        stride=stride, window=window, seed=fit.seed if seed is None else int(seed),
        priors=priors_of(fit) if priors is None else priors, model_options=options,
        n_draws=n_draws, progress=progress,
    )


def outcomes_of(result, method: str | None = None) -> pd.DataFrame:
    """The backtest rows with a PIT value: ``origin``, ``step``, ``period``, ``pit``.

    Parameters
    ----------
    result : BacktestResult
    method : str, optional
        The method (or model label) whose rows to take; default the only one.

    Raises
    ------
    ValueError
        If the result holds several methods and none is named.
    """
    rows = result.forecasts
    names = list(dict.fromkeys(rows["method"]))
    if method is None and len(names) > 1:
        raise ValueError(f"the backtest holds several methods ({', '.join(names)}); name one")
    if method is not None:
        rows = rows[rows["method"] == method]
    rows = rows[np.isfinite(rows["pit"].to_numpy(dtype=float))]
    return rows[["origin", "step", "period", "pit"]].reset_index(drop=True)


def _n_draws(result) -> float:
    return float(result.settings.get("n_draws", PREDICTIVE_DRAWS))


def map_from_backtest(result, *, method: str | None = None, horizon: int | None = None,
                      pseudo_count: float = PSEUDO_COUNT,
                      min_outcomes: int = MIN_OUTCOMES) -> QuantileMap:
    """The recalibration map learned from one backtest's PIT values.

    Parameters
    ----------
    result : BacktestResult
    method : str, optional
        See :func:`outcomes_of`.
    horizon : int, optional
        Steps of the map; default the backtest's horizon.
    pseudo_count, min_outcomes : see :func:`~bayesgrowth.forecast.recalibration_map.learn_map`.
    """
    rows = outcomes_of(result, method)
    return learn_map(rows["pit"], rows["step"],
                     horizon=horizon or int(result.settings["horizon"]),
                     pseudo_count=pseudo_count, min_outcomes=min_outcomes,
                     pit_floor=0.5 / _n_draws(result))


def pooled_maps(results: Sequence, *, method: str | None = None, horizon: int | None = None,
                pseudo_count: float = PSEUDO_COUNT,
                min_outcomes: int = MIN_OUTCOMES) -> dict[str, QuantileMap]:
    """One map per frequency, learned from the PIT values of every series' backtest together.

    Parameters
    ----------
    results : sequence of BacktestResult
        Backtests of the same model on the series of a batch or panel.
    method, horizon, pseudo_count, min_outcomes :
        As in :func:`map_from_backtest`; the horizon defaults to the longest backtest's.

    Returns
    -------
    dict of str to QuantileMap
        Keyed by the series' frequency (``"quarterly"``, ...).
    """
    groups: dict[str, list] = {}
    for r in results:
        groups.setdefault(r.series.axis.frequency, []).append(r)
    maps = {}
    for freq, members in groups.items():
        rows = [outcomes_of(r, method) for r in members]
        pit = np.concatenate([x["pit"].to_numpy(dtype=float) for x in rows])
        step = np.concatenate([x["step"].to_numpy(dtype=int) for x in rows])
        h = horizon or max(int(r.settings["horizon"]) for r in members)
        floor = 0.5 / max(_n_draws(r) for r in members)
        maps[freq] = learn_map(pit, step, horizon=h, pseudo_count=pseudo_count,
                               min_outcomes=min_outcomes, pit_floor=floor)
    return maps


def pit_coverage(pit, levels) -> dict[str, float]:
    """Share of outcomes inside each central band before recalibration, from their PIT values.

    An outcome is inside the central ``L`` band when its PIT lies in ``[a, 1 - a]``,
    ``a = (1 - L/100)/2``. Keys are the levels as text (JSON-ready).
    """
    u = np.asarray(pit, dtype=float)
    u = u[np.isfinite(u)]
    if not u.size:
        return {}
    bands = {lev: band_probabilities(lev) for lev in levels}
    return {str(lev): float(np.mean((u >= lo) & (u <= hi))) for lev, (lo, hi) in bands.items()}


def _own_source(result, method: str | None) -> dict:
    s = result.settings
    return {"where": f"{s['n_origins']} rolling origins of this series, first training "
                     f"set {s['min_train']} points", "origins": int(s["n_origins"]),
            "min_train": int(s["min_train"]), "backtest_horizon": int(s["horizon"]),
            "backtest_coverage": pit_coverage(outcomes_of(result, method)["pit"],
                                              result.levels)}


def recalibrate(fc: Forecast, series: GrowthSeries | None = None, *,
                min_train: int | None = None, horizon: int | None = None, stride: int = 1,
                window: int | None = None, seed: int | None = None, priors=None,
                n_draws: int = PREDICTIVE_DRAWS, pseudo_count: float = PSEUDO_COUNT,
                min_outcomes: int = MIN_OUTCOMES, result=None,
                progress: bool = False) -> RecalibratedForecast:
    """Backtest the forecast's model on the series and recalibrate the forecast's bands.

    Parameters
    ----------
    fc : Forecast
        A forecast of the model to recalibrate.
    series : GrowthSeries, optional
        The history to backtest on; default the series the model was fitted to.
    min_train : int, optional
        Training points at the first origin; default half the history.
    horizon : int, optional
        Steps forecast from each origin; default the forecast's horizon.
    stride, window, seed, priors, n_draws :
        Backtest settings (:func:`backtest_model`).
    pseudo_count, min_outcomes :
        Map settings (:func:`~bayesgrowth.forecast.recalibration_map.learn_map`).
    result : BacktestResult, optional
        A backtest already run for this model; then no backtest is run.
    progress : bool
        Show a progress bar over the origins.

    Returns
    -------
    RecalibratedForecast
        Its ``recalibrated`` property, table attrs and summary say from how many
        outcomes.

    Raises
    ------
    ValueError
        If the series is too short for two origins at ``min_train``.

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> from bayesgrowth.backtest.recalibrate import recalibrate
    >>> fc = bg.GrowthModel(seed=1).fit(bg.load_demo()).forecast(4)
    >>> fixed = recalibrate(fc, min_train=16)
    >>> fixed.recalibrated["n_outcomes"]
    10
    """
    if result is None:
        result = backtest_model(fc.fit, series, horizon=horizon or fc.horizon,
                                min_train=min_train, stride=stride, window=window, seed=seed,
                                priors=priors, n_draws=n_draws, progress=progress)
    method = fc.fit.engine if fc.fit.engine in set(result.forecasts["method"]) else None
    qmap = map_from_backtest(result, method=method,
                             horizon=max(fc.horizon, int(result.settings["horizon"])),
                             pseudo_count=pseudo_count, min_outcomes=min_outcomes)
    return apply_map(fc, qmap, _own_source(result, method))


def recalibrate_panel(forecasts: Sequence[Forecast], results: Sequence, *,
                      method: str | None = None, pseudo_count: float = PSEUDO_COUNT,
                      min_outcomes: int = MIN_OUTCOMES) -> list[RecalibratedForecast]:
    """Recalibrate every forecast of a panel with the map pooled over all series' backtests.

    Parameters
    ----------
    forecasts : sequence of Forecast
        One forecast per series, all of the same model.
    results : sequence of BacktestResult
        Backtests of that model (on the same or other series of the panel).
    method, pseudo_count, min_outcomes :
        As in :func:`pooled_maps`.

    Returns
    -------
    list of RecalibratedForecast
        In the order of ``forecasts``; each uses its frequency's map.

    Raises
    ------
    ValueError
        If a forecast's frequency has no backtest among ``results``.
    """
    horizon = max([fc.horizon for fc in forecasts] + [int(r.settings["horizon"]) for r in results])
    maps = pooled_maps(results, method=method, horizon=horizon, pseudo_count=pseudo_count,
                       min_outcomes=min_outcomes)
    sources = {}
    for freq in maps:
        members = [r for r in results if r.series.axis.frequency == freq]
        pit = np.concatenate([outcomes_of(r, method)["pit"].to_numpy(dtype=float)
                              for r in members])
        sources[freq] = pooled_source(freq, len(members), pit, members[0].levels)
    out = []
    for fc in forecasts:
        freq = fc.fit.series.axis.frequency
        if freq not in maps:
            raise ValueError(f"no backtest of a {freq} series to learn {fc.fit.series.name}'s "
                             "map from")
        out.append(apply_map(fc, maps[freq], sources[freq]))
    return out


def pooled_source(frequency: str, n_series: int, pit, levels) -> dict:
    """How a pooled map was learned, for the ``recalibrated`` entry of each forecast."""
    kind = "" if frequency == "per period" else f"{frequency} "
    return {"where": f"backtests of {n_series} {kind}series pooled",
            "series_pooled": int(n_series), "backtest_coverage": pit_coverage(pit, levels)}
