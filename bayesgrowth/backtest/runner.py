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
from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from bayesgrowth.backtest.methods import (
    BAYESIAN,
    check_methods,
    make_predictor,
    score_prediction,
)
from bayesgrowth.backtest.split import RollingOrigin
from bayesgrowth.config import DEFAULT_LEVELS, check_levels
from bayesgrowth.data.series import MIN_OBSERVATIONS, GrowthSeries
from bayesgrowth.inference.diagnostics import SamplingWarning
from bayesgrowth.scoring import ALL_STEPS, score_table

__all__ = ["BACKTEST_CAUTION", "NO_BANDS", "BacktestResult", "backtest", "origin_seed"]

#: Verdict of a method that gives a point forecast only.
NO_BANDS = "no bands (point forecast)"

#: The standing caution printed with every backtest.
BACKTEST_CAUTION = (
    "Calibration evidence from few origins is weak. Forecasts from overlapping origins and "
    "neighbouring steps share errors, so the outcomes are not independent and the binomial "
    "intervals behind the verdicts are narrower than they should be. A backtest describes how "
    "the methods did on this history; it is not investment advice."
)


def origin_seed(seed: int, origin: int) -> int:
    """Seed of the fits at one origin, from the run's seed and the origin's position.

    It depends on the origin, not on how many origins come before it, so a
    change of ``stride`` keeps the fits at the origins both runs share.

    Parameters
    ----------
    seed : int
        The backtest's seed.
    origin : int
        Position of the origin (its number of the first test point).

    Returns
    -------
    int
        A 32-bit seed.
    """
    return int(np.random.SeedSequence([int(seed), int(origin)]).generate_state(1)[0])


@dataclass
class BacktestResult:
    """Forecasts and scores of a rolling-origin backtest.

    Attributes
    ----------
    forecasts : pandas.DataFrame
        One row per method, origin and step: ``method``, ``origin`` (label of
        the last training period), ``step`` (periods after the origin), ``period``
        (label of the target), ``actual``, ``median``, ``lower_L``/``upper_L``
        for each level, ``pit``, ``crps``, ``log_score``, then ``n_train``
        (training points used).
    scores : pandas.DataFrame
        :func:`bayesgrowth.scoring.score_table` of the forecasts: one row per
        method and step plus an ``"all"`` step, with ``n``, ``coverage_L`` and
        its binomial interval, ``crps``, ``log_score``, ``abs_pct_error_median``,
        ``verdict`` and more.
    diagnostics : pandas.DataFrame
        One row per origin of each Bayesian method: ``origin``, ``method``,
        ``ok``, ``max_rhat``, ``min_ess_bulk``, ``min_ess_tail``,
        ``divergences``, ``problems``.
    series : GrowthSeries
        The series backtested.
    levels : tuple of int
        Band levels in percent.
    settings : dict
        The run's settings (methods, horizon, min_train, stride, window, seed, n_draws).
    """

    forecasts: pd.DataFrame
    scores: pd.DataFrame
    diagnostics: pd.DataFrame
    series: GrowthSeries
    levels: tuple[int, ...]
    settings: dict = field(default_factory=dict)

    @property
    def methods(self) -> tuple[str, ...]:
        """Methods in the order they were run."""
        return tuple(self.settings["methods"])

    def _overall(self, method: str) -> pd.Series:
        rows = self.scores[(self.scores["method"] == method) & (self.scores["step"] == ALL_STEPS)]
        return rows.iloc[0]

    def has_bands(self, method: str) -> bool:
        """Whether ``method`` gave bands (False for a point forecast)."""
        rows = self.forecasts[self.forecasts["method"] == method]
        return bool(rows[f"lower_{self.levels[0]}"].notna().any())

    def verdicts(self) -> dict[str, str]:
        """Calibration verdict of each method over all steps, in plain words.

        Returns
        -------
        dict of str to str
            ``"calibrated"``, ``"bands too narrow"``, ``"bands too wide"``,
            ``"mixed"`` (too narrow at one level, too wide at another), ``"too few
            outcomes"`` or, for a point forecast, ``"no bands (point forecast)"``.
            Decided by whether each stated level lies inside the binomial
            interval of the observed coverage
            (:func:`bayesgrowth.scoring.calibration_verdict`).
        """
        return {
            m: self._overall(m)["verdict"] if self.has_bands(m) else NO_BANDS
            for m in self.methods
        }

    def verdict_lines(self) -> list[str]:
        """One sentence per method: its verdict, coverage per level and mean CRPS."""
        lines = []
        for method, verdict in self.verdicts().items():
            row = self._overall(method)
            crps = f"mean CRPS {row['crps']:,.4g}"
            if verdict == NO_BANDS:
                lines.append(f"{method}: {verdict}; {crps} (the mean absolute error)")
                continue
            held = ", ".join(
                f"{lev}% bands held {row[f'coverage_{lev}']:.0%} "
                f"(interval {row[f'coverage_{lev}_low']:.0%}-{row[f'coverage_{lev}_high']:.0%})"
                for lev in self.levels
            )
            lines.append(f"{method}: {verdict}: {held} of {int(row['n'])} outcomes; {crps}")
        return lines


def _check_min(value: int | None, name: str) -> None:
    if value is not None and value < MIN_OBSERVATIONS:
        raise ValueError(
            f"{name} must be at least {MIN_OBSERVATIONS} (a growth curve needs "
            f"{MIN_OBSERVATIONS} observations), got {value}"
        )


def backtest(
    series: GrowthSeries,
    *,
    methods=("exact", "log-linear", "naive"),
    horizon: int,
    min_train: int,
    stride: int = 1,
    window: int | None = None,
    levels=DEFAULT_LEVELS,
    seed: int = 1,
    priors=None,
    model_options: dict | None = None,
    n_draws: int = 4000,
    progress: bool = False,
) -> BacktestResult:
    """Rolling-origin backtest of forecasting methods on one series.

    Parameters
    ----------
    series : GrowthSeries
        The series; gaps keep their place in time.
    methods : sequence of str
        Any of ``"nuts"``, ``"exact"`` (the Bayesian engines), ``"log-linear"``,
        ``"log-linear, anchored"`` (alias ``"log-linear-anchored"``),
        ``"revenue-scale"`` and ``"naive"``; see :mod:`bayesgrowth.backtest.methods`.
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
        (:func:`origin_seed`).
    priors : Priors, optional
        Priors of the Bayesian methods, resolved afresh on each training set.
    model_options : dict, optional
        Keyword options passed through to :func:`bayesgrowth.inference.fit_series`
        by the Bayesian methods (for example ``tune``, ``target_accept``, a model).
        ``draws`` and ``chains`` default to ``n_draws`` spread over 4 chains.
    n_draws : int, default 4000
        Predictive draws per forecast, the same for every method (CRPS depends on it).
    progress : bool, default False
        Show a progress bar over the origins.

    Returns
    -------
    BacktestResult

    Raises
    ------
    ValueError
        If a method is unknown, a setting is out of range, or the series is too
        short for one origin; the message names the setting.

    Warns
    -----
    SamplingWarning
        When a Bayesian fit fails its diagnostics at some origins (see
        :attr:`BacktestResult.diagnostics`).
    """
    methods = check_methods(methods)
    levels = check_levels(levels)
    splitter = RollingOrigin(horizon, min_train, stride=stride, window=window)
    _check_min(min_train, "min_train")
    _check_min(window, "window")
    if isinstance(n_draws, bool) or not isinstance(n_draws, (int, np.integer)) or n_draws < 2:
        raise ValueError(f"n_draws must be a whole number of at least 2, got {n_draws!r}")
    splits = list(splitter.split(series.n))
    predictors = {
        m: make_predictor(m, series, priors=priors, model_options=model_options,
                          n_draws=int(n_draws), horizon=splitter.horizon)
        for m in methods
    }
    labels = series.labels
    iterator = splits
    if progress:
        from tqdm.auto import tqdm

        iterator = tqdm(splits, desc="backtest origins", unit="origin")
    blocks: list[dict] = []
    diag_rows: list[dict] = []
    for train_idx, test_idx in iterator:
        train = series.take(train_idx)
        steps = series.t[test_idx] - train.t_last
        test_idx = test_idx[steps <= splitter.horizon]
        if test_idx.size == 0:
            continue
        target_t = series.t[test_idx]
        actual = series.values[test_idx]
        origin = labels[train_idx[-1]]
        seed_k = origin_seed(seed, int(train_idx[-1]) + 1)
        for method in methods:
            pred = predictors[method](train_idx, train, target_t, seed_k)
            scored = score_prediction(pred, actual, levels, int(n_draws))
            blocks.append({
                "method": method,
                "origin": origin,
                "step": (target_t - train.t_last).astype(int),
                "period": [labels[i] for i in test_idx],
                "actual": actual,
                **scored,
                "n_train": train.n,
            })
            if pred.diagnostics is not None:
                d = pred.diagnostics
                diag_rows.append({
                    "origin": origin, "method": method, "ok": d.ok, "max_rhat": d.max_rhat,
                    "min_ess_bulk": d.min_ess_bulk, "min_ess_tail": d.min_ess_tail,
                    "divergences": d.divergences, "problems": "; ".join(d.problems),
                })
    forecasts = _forecast_frame(blocks, levels)
    diagnostics = pd.DataFrame(
        diag_rows,
        columns=["origin", "method", "ok", "max_rhat", "min_ess_bulk", "min_ess_tail",
                 "divergences", "problems"],
    )
    _warn_failed(diagnostics)
    settings = {
        "methods": list(methods), "horizon": splitter.horizon, "min_train": splitter.min_train,
        "stride": splitter.stride, "window": splitter.window, "seed": int(seed),
        "n_draws": int(n_draws), "n_origins": int(forecasts["origin"].nunique()),
        "model_options": dict(model_options or {}),
    }
    return BacktestResult(
        forecasts=forecasts,
        scores=score_table(forecasts, levels),
        diagnostics=diagnostics,
        series=series,
        levels=levels,
        settings=settings,
    )


def _forecast_frame(blocks: list[dict], levels: tuple[int, ...]) -> pd.DataFrame:
    columns = ["method", "origin", "step", "period", "actual", "median"]
    columns += [f"{side}_{lev}" for lev in levels for side in ("lower", "upper")]
    columns += ["pit", "crps", "log_score", "n_train"]
    frame = pd.concat([pd.DataFrame(b) for b in blocks], ignore_index=True)[columns]
    return frame.astype({"step": int, "n_train": int})


def _warn_failed(diagnostics: pd.DataFrame) -> None:
    for method in BAYESIAN:
        rows = diagnostics[diagnostics["method"] == method]
        bad = rows[~rows["ok"].astype(bool)]
        if len(bad):
            warnings.warn(
                f"{method}: sampling diagnostics failed at {len(bad)} of {len(rows)} origins "
                f"(first {bad['origin'].iloc[0]}: {bad['problems'].iloc[0]}); see "
                "BacktestResult.diagnostics and treat those forecasts with care",
                SamplingWarning,
                stacklevel=3,
            )
