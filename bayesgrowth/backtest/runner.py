"""Rolling-origin backtests: refit every method at every origin and score the forecasts.

At each origin the methods are fitted to the training part of the series (all
points before the origin, or the last ``window`` of them; see
:class:`~bayesgrowth.backtest.split.RollingOrigin`) and forecast the next
``horizon`` periods. Each outcome is scored against its forecast (coverage of
the central bands, PIT, CRPS, log score; see :mod:`bayesgrowth.backtest.methods`),
and the scores are summarised per method and step by
:func:`bayesgrowth.scoring.score_table`, whose binomial intervals decide the
verdicts.

The NUTS engine is refitted by :class:`bayesgrowth.inference.refit.NutsRefitter`,
which compiles the model once for all origins; its module docstring gives the
timings that led to that design.
"""

from __future__ import annotations

import warnings

import numpy as np
import pandas as pd

from bayesgrowth.backtest.methods import make_predictor, score_prediction
from bayesgrowth.backtest.models import (
    DEFAULT_MODELS,
    SAMPLER_KEYS,
    ModelChoice,
    choices_from_methods,
    resolve_models,
)
from bayesgrowth.backtest.result import NO_BANDS, BacktestResult
from bayesgrowth.backtest.split import RollingOrigin
from bayesgrowth.config import DEFAULT_LEVELS, PREDICTIVE_DRAWS, check_levels
from bayesgrowth.data.series import MIN_OBSERVATIONS, GrowthSeries, as_series
from bayesgrowth.inference.diagnostics import SamplingWarning
from bayesgrowth.scoring import score_table
from bayesgrowth.seeds import origin_seed

__all__ = ["BACKTEST_CAUTION", "NO_BANDS", "BacktestResult", "backtest"]

#: The standing caution printed with every backtest.
BACKTEST_CAUTION = (
    "Calibration evidence from few origins is weak. Forecasts from overlapping origins and "
    "neighbouring steps share errors, so the outcomes are not independent and the binomial "
    "intervals behind the verdicts are narrower than they should be. A backtest describes how "
    "the methods did on this history; it is not investment advice."
)


def _check_min(value: int | None, name: str) -> None:
    if value is not None and value < MIN_OBSERVATIONS:
        raise ValueError(
            f"{name} must be at least {MIN_OBSERVATIONS} (a growth curve needs "
            f"{MIN_OBSERVATIONS} observations), got {value}"
        )


def backtest(
    series: GrowthSeries,
    *,
    models=None,
    methods=None,
    horizon: int,
    min_train: int,
    stride: int = 1,
    window: int | None = None,
    levels=DEFAULT_LEVELS,
    seed: int = 1,
    priors=None,
    model_options: dict | None = None,
    n_draws: int = PREDICTIVE_DRAWS,
    progress: bool = False,
) -> BacktestResult:
    """Rolling-origin backtest of several models on one series, on the same origins.

    Parameters
    ----------
    series : GrowthSeries
        The series (or what :func:`~bayesgrowth.data.series.read_series` reads: a
        path, a DataFrame, a Series); gaps keep their place in time.
    models : str, mapping or sequence, optional
        The models to compare, each under its name (which labels every row, score
        and plot): names such as ``"default,exponential,log-linear"`` or
        ``["default", "exponential/ar1", "naive"]``, a mapping of names to specs such
        as ``{"default": {}, "exponential": {"model": "exponential"},
        "log-linear": "log-linear"}``, or :class:`~bayesgrowth.backtest.models.ModelChoice`
        objects; see :mod:`bayesgrowth.backtest.models`. Default
        ``("default", "exponential", "log-linear")`` unless ``methods`` is given.
    methods : sequence of str, optional
        The earlier form, instead of ``models``: method names ``"nuts"``,
        ``"exact"`` (the Bayesian engines, both fitting the model ``model_options``
        describe, by default the exponential curve), ``"log-linear"``,
        ``"log-linear, anchored"`` (alias ``"log-linear-anchored"``),
        ``"revenue-scale"`` and ``"naive"``; see :mod:`bayesgrowth.backtest.methods`.
        Rows are labelled by method.
    horizon : int
        Periods forecast from each origin. Targets are the observations at most
        ``horizon`` periods after the last training period (fewer near the end of
        the series or after a gap).
    min_train : int
        Training points at the first origin, at least 3.
    stride : int, default 1
        Points between consecutive origins.
    window : int, optional
        Train on only the last ``window`` points (at least 3, at most
        ``min_train``); by default the training set expands.
    levels : sequence of int, default (50, 80, 95)
        Central band levels in percent.
    seed : int, default 1
        Seed of the whole run; each origin's fits get a seed derived from it
        (:func:`bayesgrowth.seeds.origin_seed`).
    priors : Priors, optional
        Priors of the Bayesian models, resolved afresh on each training set.
    model_options : dict, optional
        With ``methods``: options passed to :func:`bayesgrowth.inference.fit_series`
        by the Bayesian methods (a model, ``tune``, ``target_accept``, ...). With
        ``models``: sampler settings only (``draws``, ``chains``, ``tune``,
        ``target_accept``, ``cores``), shared by every Bayesian model. ``draws`` and
        ``chains`` default to ``n_draws`` spread over 4 chains.
    n_draws : int, default 4000
        Predictive draws per forecast, the same for every model (CRPS depends on it).
    progress : bool, default False
        Show a progress bar over the origins.

    Returns
    -------
    BacktestResult

    Raises
    ------
    ValueError
        If a model or method is unknown, both are given, a setting is out of range,
        or the series is too short for one origin; the message names the setting.

    Warns
    -----
    SamplingWarning
        When a Bayesian fit fails its diagnostics at some origins (see
        :attr:`BacktestResult.diagnostics`).

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> result = bg.backtest(bg.load_demo(), horizon=2, min_train=16, methods=["exact", "naive"])
    >>> result.methods
    ('exact', 'naive')
    >>> all_steps = result.scores[result.scores["step"] == "all"]
    >>> all_steps[["method", "n"]].to_dict("records")
    [{'method': 'exact', 'n': 7}, {'method': 'naive', 'n': 7}]
    """
    series = as_series(series, "series")
    choices = _choices(models, methods, model_options)
    levels = check_levels(levels)
    splitter = RollingOrigin(horizon, min_train, stride=stride, window=window)
    _check_min(min_train, "min_train")
    _check_min(window, "window")
    if isinstance(n_draws, bool) or not isinstance(n_draws, (int, np.integer)) or n_draws < 2:
        raise ValueError(f"n_draws must be a whole number of at least 2, got {n_draws!r}")
    splits = bar = list(splitter.split(series.n))
    if progress:
        from tqdm.auto import tqdm

        splits = bar = tqdm(splits, desc="backtest origins", unit="origin")
    try:
        blocks, diag_rows = _run_origins(series, choices, splits, splitter.horizon, levels,
                                         seed=seed, priors=priors, n_draws=int(n_draws))
    finally:  # also on Ctrl-C, so that the bar's line ends before the message
        getattr(bar, "close", lambda: None)()
    forecasts = _forecast_frame(blocks, levels)
    diagnostics = pd.DataFrame(diag_rows, columns=DIAGNOSTIC_COLUMNS)
    _warn_failed(diagnostics, choices)
    settings = {
        "methods": [c.name for c in choices], "horizon": splitter.horizon,
        "min_train": splitter.min_train, "stride": splitter.stride, "window": splitter.window,
        "seed": int(seed), "n_draws": int(n_draws),
        "n_origins": int(forecasts["origin"].nunique()),
        "model_options": dict(model_options or {}),
        "models": [{"name": c.name, "method": c.method, "options": dict(c.options),
                    "description": c.describe(series, splitter)} for c in choices],
    }
    return BacktestResult(forecasts=forecasts, scores=score_table(forecasts, levels),
                          diagnostics=diagnostics, series=series, levels=levels,
                          settings=settings)


#: Columns of :attr:`BacktestResult.diagnostics`.
DIAGNOSTIC_COLUMNS = ["origin", "method", "ok", "max_rhat", "min_ess_bulk", "min_ess_tail",
                      "divergences", "problems"]


def _choices(models, methods, model_options) -> tuple[ModelChoice, ...]:
    """The models to run, from ``models`` or the earlier ``methods`` form."""
    if models is not None and methods is not None:
        raise ValueError("give models or methods, not both")
    if models is None and methods is not None:
        return choices_from_methods(methods, model_options)
    choices = resolve_models(DEFAULT_MODELS if models is None else models)
    extra = [k for k in (model_options or {}) if k not in SAMPLER_KEYS]
    if extra:
        raise ValueError(
            f"model_options: {extra[0]!r} belongs in a model's own options when models are "
            f"named (model_options holds only sampler settings: {', '.join(SAMPLER_KEYS)})"
        )
    shared = dict(model_options or {})
    return tuple(ModelChoice(c.name, c.method, {**shared, **c.options}) if c.bayesian else c
                 for c in choices)


def _run_origins(series, choices, splits, horizon, levels, *, seed, priors, n_draws):
    """Fit every model at every origin; forecast rows and diagnostics rows."""
    predictors = {
        c.name: make_predictor(c.method, series, priors=priors, model_options=c.options,
                               n_draws=n_draws, horizon=horizon)
        for c in choices
    }
    labels = series.labels
    blocks: list[dict] = []
    diag_rows: list[dict] = []
    for train_idx, test_idx in splits:
        train = series.take(train_idx)
        test_idx = test_idx[series.t[test_idx] - train.t_last <= horizon]
        if test_idx.size == 0:
            continue
        target_t = series.t[test_idx]
        actual = series.values[test_idx]
        origin = labels[train_idx[-1]]
        seed_k = origin_seed(seed, int(train_idx[-1]) + 1)
        for c in choices:
            pred = predictors[c.name](train_idx, train, target_t, seed_k)
            blocks.append({
                "method": c.name, "origin": origin,
                "step": (target_t - train.t_last).astype(int),
                "period": [labels[i] for i in test_idx], "actual": actual,
                **score_prediction(pred, actual, levels, n_draws), "n_train": train.n,
            })
            if pred.diagnostics is not None:
                d = pred.diagnostics
                diag_rows.append({
                    "origin": origin, "method": c.name, "ok": d.ok, "max_rhat": d.max_rhat,
                    "min_ess_bulk": d.min_ess_bulk, "min_ess_tail": d.min_ess_tail,
                    "divergences": d.divergences, "problems": "; ".join(d.problems),
                })
    return blocks, diag_rows


def _forecast_frame(blocks: list[dict], levels: tuple[int, ...]) -> pd.DataFrame:
    columns = ["method", "origin", "step", "period", "actual", "median"]
    columns += [f"{side}_{lev}" for lev in levels for side in ("lower", "upper")]
    columns += ["pit", "crps", "log_score", "n_train"]
    frame = pd.concat([pd.DataFrame(b) for b in blocks], ignore_index=True)[columns]
    return frame.astype({"step": int, "n_train": int})


def _warn_failed(diagnostics: pd.DataFrame, choices) -> None:
    for c in (c for c in choices if c.bayesian):
        rows = diagnostics[diagnostics["method"] == c.name]
        bad = rows[~rows["ok"].astype(bool)]
        if len(bad):
            warnings.warn(
                f"{c.name}: sampling diagnostics failed at {len(bad)} of {len(rows)} origins "
                f"(first {bad['origin'].iloc[0]}: {bad['problems'].iloc[0]}); see "
                "BacktestResult.diagnostics and treat those forecasts with care",
                SamplingWarning,
                stacklevel=3,
            )
