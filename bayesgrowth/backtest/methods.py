"""The forecasting methods a backtest compares, and how each one's forecast is scored.

Every method, given the training part of a series, returns a :class:`Prediction`
for the target periods in one of three forms:

``draws``
    Predictive draws on the revenue scale (the Bayesian engines ``"nuts"`` and
    ``"exact"``: posterior predictive draws from :func:`bayesgrowth.forecast.forecast`).
``log_t``
    A Student-t distribution of the log value, ``log y = loc + scale * T_df``:
    the least-squares methods ``"log-linear"`` and ``"log-linear, anchored"``
    (the classical prediction interval's distribution,
    :func:`bayesgrowth.leastsq.log_linear_predictive`), and the ``"naive"``
    baseline with ``df = inf``.
``point``
    A single number (``"revenue-scale"``: nonlinear least squares on the
    original scale, which gives no predictive distribution).

The naive baseline is a random walk without drift on the log scale: the last
training value carried forward, with ``log y_{T+h} ~ Normal(log y_T, sd^2 h)``
where ``sd`` is the sample standard deviation (``ddof=1``) of the training log
changes per period. A log change across a gap of ``k`` periods counts as ``k``
periods' worth (it is divided by ``sqrt(k)``), and a target ``h`` periods past
the last training value gets variance ``sd^2 h`` (the h-step variance of a
random walk).

Scoring (:func:`score_prediction`): CRPS on the revenue scale always from a
fixed number of draws (a log-t has no finite revenue-scale CRPS, see
:mod:`bayesgrowth.scoring.draws`; quantile-spaced draws stand in for the
closed forms), so every method is scored at the same number of draws. PIT and
log score use the closed form where there is one (:func:`~bayesgrowth.scoring.pit_log_t`,
:func:`~bayesgrowth.scoring.log_score_log_t`) and the draws otherwise
(:func:`~bayesgrowth.scoring.pit`, :func:`~bayesgrowth.scoring.log_score`, a kernel
estimate on the log scale). A point forecast has CRPS equal to its absolute
error and no bands, PIT or log score (NaN).
"""

from __future__ import annotations

import warnings
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.forecast.bands import band_probabilities
from bayesgrowth.inference.diagnostics import Diagnostics, SamplingWarning
from bayesgrowth.scoring import (
    crps_ensemble,
    crps_point,
    draws_from_log_t,
    log_score,
    log_score_log_t,
    pit,
    pit_log_t,
)

__all__ = [
    "BAYESIAN",
    "METHODS",
    "Prediction",
    "check_methods",
    "make_predictor",
    "score_prediction",
]

#: Every method name, in the order reports list them.
METHODS = ("nuts", "exact", "log-linear", "log-linear, anchored", "revenue-scale", "naive")
#: Methods that fit a Bayesian model (and so have sampling diagnostics).
BAYESIAN = ("nuts", "exact")
#: Other spellings accepted for a method (a comma cannot appear in a comma-separated list).
ALIASES = {"log-linear-anchored": "log-linear, anchored"}


def check_methods(methods) -> tuple[str, ...]:
    """Validate method names (aliases allowed) and drop repeats, keeping the order.

    Parameters
    ----------
    methods : str or iterable of str
        Method names.

    Returns
    -------
    tuple of str
        The canonical names.

    Raises
    ------
    ValueError
        If a name is unknown (the message lists the allowed ones) or none is given.
    """
    if isinstance(methods, str):
        methods = (methods,)
    out: list[str] = []
    for name in methods:
        key = ALIASES.get(str(name).strip(), str(name).strip())
        if key not in METHODS:
            raise ValueError(
                f"unknown method {name!r}; choose from {', '.join(repr(m) for m in METHODS)}"
            )
        if key not in out:
            out.append(key)
    if not out:
        raise ValueError(f"name at least one method from {', '.join(METHODS)}")
    return tuple(out)


@dataclass(frozen=True)
class Prediction:
    """A method's forecast for some target periods, in exactly one of three forms.

    Attributes
    ----------
    draws : numpy.ndarray or None, shape (n_targets, n_draws)
        Predictive draws on the revenue scale.
    log_t : tuple of numpy.ndarray or None
        ``(loc, scale, df)``, each of shape ``(n_targets,)``: ``log y = loc + scale * T_df``.
    point : numpy.ndarray or None, shape (n_targets,)
        Point forecasts.
    diagnostics : Diagnostics or None
        Sampling diagnostics of a Bayesian fit.
    """

    draws: np.ndarray | None = None
    log_t: tuple[np.ndarray, np.ndarray, np.ndarray] | None = None
    point: np.ndarray | None = None
    diagnostics: Diagnostics | None = None


def score_prediction(
    pred: Prediction, actual: np.ndarray, levels: tuple[int, ...], n_draws: int
) -> dict[str, np.ndarray]:
    """Median, bands and per-outcome scores of one prediction.

    Parameters
    ----------
    pred : Prediction
    actual : numpy.ndarray, shape (n_targets,)
        Observed values at the targets.
    levels : tuple of int
        Central band levels in percent.
    n_draws : int
        Draws used for the CRPS of a closed-form predictive.

    Returns
    -------
    dict of str to numpy.ndarray
        ``median``, ``lower_L``/``upper_L`` per level, ``pit``, ``crps``, ``log_score``.
    """
    from scipy import stats  # imported here: scipy.stats costs ~1 s to import
    out: dict[str, np.ndarray] = {}
    nan = np.full(actual.shape, np.nan)
    if pred.point is not None:
        out["median"] = np.asarray(pred.point, dtype=float)
        for lev in levels:
            out[f"lower_{lev}"] = out[f"upper_{lev}"] = nan
        out.update(pit=nan, crps=np.asarray(crps_point(actual, out["median"])), log_score=nan)
        return out
    if pred.log_t is not None:
        loc, scale, df = (np.asarray(v, dtype=float) for v in pred.log_t)
        out["median"] = np.exp(loc)
        for lev in levels:
            q = stats.t.ppf(0.5 + lev / 200, df)
            out[f"lower_{lev}"] = np.exp(loc - q * scale)
            out[f"upper_{lev}"] = np.exp(loc + q * scale)
        draws = draws_from_log_t(loc, scale, df, n_draws)
        out["pit"] = np.asarray(pit_log_t(actual, loc, scale, df))
        out["crps"] = np.asarray(crps_ensemble(actual, draws))
        out["log_score"] = np.asarray(log_score_log_t(actual, loc, scale, df))
        return out
    draws = np.asarray(pred.draws, dtype=float)
    out["median"] = np.median(draws, axis=-1)
    for lev in levels:
        lo, hi = np.quantile(draws, band_probabilities(lev), axis=-1)
        out[f"lower_{lev}"], out[f"upper_{lev}"] = lo, hi
    out["pit"] = np.asarray(pit(actual, draws))
    out["crps"] = np.asarray(crps_ensemble(actual, draws))
    out["log_score"] = np.asarray(log_score(actual, draws))
    return out


#: A predictor: (training positions, training series, target times, seed) -> Prediction.
Predictor = Callable[[np.ndarray, GrowthSeries, np.ndarray, int], Prediction]


def _thin(draws: np.ndarray, n: int) -> np.ndarray:
    """``n`` draws spread evenly over all chains (rows), as ``(n_targets, n)``."""
    idx = np.linspace(0, draws.shape[0] - 1, n).round().astype(int)
    return draws[idx].T


def _bayesian_predictor(engine: str, series: GrowthSeries, priors, model_options: dict,
                        n_draws: int, horizon: int) -> Predictor:
    from bayesgrowth.config import DEFAULT_CHAINS
    from bayesgrowth.forecast.forecast import forecast
    from bayesgrowth.inference.run import fit_series

    options = dict(model_options)
    chains = int(options.pop("chains", DEFAULT_CHAINS))
    draws = int(options.pop("draws", -(-n_draws // chains)))
    if draws * chains < n_draws:
        raise ValueError(
            f"model_options give {draws * chains} posterior draws, fewer than n_draws={n_draws}"
        )
    refit = None
    if engine == "nuts":
        from bayesgrowth.inference import refit as refit_module

        if refit_module.supports(options):
            from bayesgrowth.models.spec import ModelSpec, resolve_seasonal

            # one compiled model serves every origin: "auto" seasons decided on the series
            options["seasonal"] = resolve_seasonal(options.get("seasonal", False), series.axis,
                                                   series.t, options.get("model", "exponential"))

            sampler = {k: options[k] for k in ("tune", "target_accept", "cores") if k in options}
            spec = ModelSpec(**{k: options[k] for k in refit_module.SPEC_OPTIONS if k in options})
            refit = refit_module.NutsRefitter(
                series, priors, draws=draws, chains=chains, spec=spec, **sampler
            )
        else:
            warnings.warn(
                "the compiled-once NUTS refit needs nutpie and only model and sampler options; "
                "refitting with fit_series at every origin instead (slower)",
                stacklevel=4,
            )

    def predict(positions, train, target_t, seed):
        if refit is not None:
            fit = refit.fit(positions, seed)
        else:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore", SamplingWarning)
                fit = fit_series(train, engine=engine, priors=priors, seed=seed, draws=draws,
                                 chains=chains, **options)
        fc = forecast(fit, horizon)
        steps = np.asarray(target_t) - train.t_last
        return Prediction(draws=_thin(fc.draws[:, steps - 1], n_draws),
                          diagnostics=fit.diagnostics)

    return predict


def _log_linear_predictor(anchored: bool) -> Predictor:
    from bayesgrowth.leastsq import fit_log_linear, fit_log_linear_anchored, log_linear_predictive

    fitter = fit_log_linear_anchored if anchored else fit_log_linear

    def predict(positions, train, target_t, seed):
        fit = fitter(train.t, train.values)
        pred = log_linear_predictive(fit, target_t)
        return Prediction(log_t=(pred["loc"].to_numpy(), pred["scale"].to_numpy(),
                                 pred["df"].to_numpy(dtype=float)))

    return predict


def _revenue_scale_predict(positions, train, target_t, seed) -> Prediction:
    from bayesgrowth.leastsq import LeastSquaresError, fit_revenue_scale

    try:
        fit = fit_revenue_scale(train.t, train.values)
    except LeastSquaresError:
        return Prediction(point=np.full(np.shape(target_t), np.nan))
    return Prediction(point=np.asarray(fit.value_at(np.asarray(target_t, dtype=float))))


def naive_spread(train: GrowthSeries) -> float:
    """Standard deviation of the log changes per period (``ddof=1``; gaps scaled by ``sqrt``).

    Parameters
    ----------
    train : GrowthSeries
        At least three observations.

    Returns
    -------
    float
        ``sd`` of the naive baseline.
    """
    changes = np.diff(train.log_values) / np.sqrt(np.diff(train.t))
    return float(np.std(changes, ddof=1))


def _naive_predict(positions, train, target_t, seed) -> Prediction:
    steps = np.asarray(target_t, dtype=float) - train.t_last
    sd = naive_spread(train)
    last = np.full(steps.shape, train.log_values[-1])
    if sd == 0:
        return Prediction(point=np.exp(last))
    return Prediction(log_t=(last, sd * np.sqrt(steps), np.full(steps.shape, np.inf)))


def make_predictor(
    method: str,
    series: GrowthSeries,
    *,
    priors=None,
    model_options: dict | None = None,
    n_draws: int,
    horizon: int,
) -> Predictor:
    """The function that forecasts the targets of one origin by ``method``.

    Parameters
    ----------
    method : str
        One of :data:`METHODS`.
    series : GrowthSeries
        The full series (the NUTS refit compiles its model on it once).
    priors : Priors, optional
        Priors of the Bayesian methods.
    model_options : dict, optional
        Passed to :func:`bayesgrowth.inference.fit_series` by the Bayesian methods.
    n_draws : int
        Predictive draws per forecast.
    horizon : int
        Largest step forecast.

    Returns
    -------
    callable
        ``predict(positions, train, target_t, seed) -> Prediction``.
    """
    (method,) = check_methods([method])
    if method in BAYESIAN:
        return _bayesian_predictor(method, series, priors, model_options or {}, n_draws, horizon)
    if method == "log-linear":
        return _log_linear_predictor(anchored=False)
    if method == "log-linear, anchored":
        return _log_linear_predictor(anchored=True)
    if method == "revenue-scale":
        return _revenue_scale_predict
    return _naive_predict
