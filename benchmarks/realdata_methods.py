"""Forecasting methods of the real-data benchmark: reference methods and the bayesgrowth adapter.

Every method is a callable ``(train, h, period) -> Predictive`` (see
:mod:`realdata_predictive`). The reference methods, all on the log scale except Theta:

``rw_drift``
    Random walk with drift on the logs (numpy). The drift is the mean log difference,
    sigma the sample sd of the log differences (``n - 2`` degrees of freedom), and the
    h-step variance ``sigma^2 h (1 + h / (n - 1))`` includes the drift's estimation error
    (Hyndman & Athanasopoulos, Forecasting: Principles and Practice, 3rd ed., section 5.5).
``ets_damped``
    ETS with additive errors and an additive damped trend on the logs (statsmodels
    ``ETSModel``); its exact Gaussian forecast mean and variance.
``theta``
    The Theta method on the original scale (statsmodels ``ThetaModel``, Assimakopoulos &
    Nikolopoulos 2000). Its ``prediction_intervals`` are a normal interval around the Theta
    forecast, so the predictive is normal with that centre and the sd read off the 95%
    interval's half-width (``half-width / z_0.975``); its quantiles may go below zero.
``arima011``
    ARIMA(0,1,1) with drift on the logs (statsmodels ``ARIMA``, ``trend="t"``).

Seasonal handling (quarterly and monthly series), common practice as in the M4 benchmarks
(Makridakis, Spiliotis & Assimakopoulos 2020, IJF 36(1):54-74): a series is seasonal when
it has at least three full years and its autocorrelation at the seasonal lag passes the
90% test below. Seasonal series get, for ``rw_drift`` and ``arima011``, classical
multiplicative decomposition (statsmodels ``seasonal_decompose``): the method forecasts the
seasonally adjusted series and its quantiles are multiplied by the seasonal indices
(treated as known). ``ets_damped`` instead adds an additive seasonal component on the logs
(multiplicative on the original scale). ``theta`` uses ``ThetaModel``'s own seasonality
test and multiplicative deseasonalising.
"""

from __future__ import annotations

import zlib
from collections.abc import Callable

import numpy as np
import pandas as pd
from realdata_predictive import (
    LogNormalPredictive,
    Method,
    NormalPredictive,
    Predictive,
    SamplePredictive,
    ScaledPredictive,
)
from scipy import stats

__all__ = [
    "arima011",
    "bayesgrowth_method",
    "deseasonalised",
    "drifting_seasons_method",
    "ets_damped",
    "growth_series",
    "is_seasonal",
    "rw_drift",
    "rw_drift_log",
    "seasonal_factors",
    "theta",
]

#: Two-sided 90% normal critical value of the seasonality test.
SEASONAL_Z = stats.norm.ppf(0.95)
#: Fewest full years before a series is tested for seasonality (M4 benchmark practice).
MIN_YEARS = 3


def is_seasonal(train: np.ndarray, period: int) -> bool:
    """The 90% autocorrelation test for seasonality used by the M4 benchmarks.

    Seasonal when ``|r_m| > 1.645 sqrt((1 + 2 sum_{k<m} r_k^2) / n)``, with ``r_k`` the
    sample autocorrelation at lag ``k``, ``m`` the period and ``n`` the length: Bartlett's
    approximate standard error of ``r_m`` under an MA(m-1) (Box & Jenkins). The form and
    the three-year minimum follow the M4 benchmark code (from memory).
    """
    from statsmodels.tsa.stattools import acf

    y = np.asarray(train, dtype=float)
    if period <= 1 or y.size < MIN_YEARS * period:
        return False
    r = acf(y, nlags=period, fft=False)[1:]
    limit = SEASONAL_Z * np.sqrt((1 + 2 * np.sum(r[: period - 1] ** 2)) / y.size)
    return bool(abs(r[period - 1]) > limit)


def seasonal_factors(train: np.ndarray, period: int, h: int) -> tuple[np.ndarray, np.ndarray]:
    """Classical multiplicative seasonal indices for the training part and the next ``h`` steps.

    Returns
    -------
    in_sample : numpy.ndarray
        Index of each training period (they average one over a year).
    future : numpy.ndarray
        Index of steps ``1..h`` after the training part.
    """
    from statsmodels.tsa.seasonal import seasonal_decompose

    y = np.asarray(train, dtype=float)
    index = seasonal_decompose(y, model="multiplicative", period=period).seasonal[:period]
    n = y.size
    in_sample = index[np.arange(n) % period]
    future = index[(n + np.arange(h)) % period]
    return in_sample, future


def deseasonalised(method: Method) -> Method:
    """Wrap ``method`` so that seasonal series are forecast seasonally adjusted.

    When :func:`is_seasonal` says so, ``method`` sees the training part divided by its
    classical multiplicative indices, and its quantiles are multiplied by the indices of
    the forecast steps; otherwise ``method`` sees the series unchanged.
    """

    def wrapped(train: np.ndarray, h: int, period: int) -> Predictive:
        if not is_seasonal(train, period):
            return method(train, h, period)
        in_sample, future = seasonal_factors(train, period, h)
        return ScaledPredictive(method(np.asarray(train) / in_sample, h, period), future)

    wrapped.__name__ = f"deseasonalised_{getattr(method, '__name__', 'method')}"
    wrapped.__doc__ = f"{getattr(method, '__name__', 'method')} on seasonally adjusted data."
    return wrapped


def _log(train: np.ndarray) -> np.ndarray:
    y = np.asarray(train, dtype=float)
    if np.any(y <= 0):
        raise ValueError("the log-scale methods need every training value > 0")
    return np.log(y)


def rw_drift_log(log_train: np.ndarray, h: int) -> tuple[np.ndarray, np.ndarray]:
    """Mean and sd of the random walk with drift's h-step forecasts of a log series.

    Mean ``y_n + c j`` and variance ``sigma^2 j (1 + j / (n - 1))`` for ``j = 1..h``,
    with ``c`` the mean difference and ``sigma`` the sd of the ``n - 1`` differences
    (``ddof = 1``).
    """
    y = np.asarray(log_train, dtype=float)
    n = y.size
    if n < 3:
        raise ValueError(f"random walk with drift needs at least 3 values, got {n}")
    d = np.diff(y)
    steps = np.arange(1, h + 1)
    mean = y[-1] + d.mean() * steps
    sd = d.std(ddof=1) * np.sqrt(steps * (1 + steps / (n - 1)))
    return mean, sd


def _rw_drift(train: np.ndarray, h: int, period: int) -> Predictive:
    return LogNormalPredictive(*rw_drift_log(_log(train), h))


def _arima011(train: np.ndarray, h: int, period: int) -> Predictive:
    from statsmodels.tsa.arima.model import ARIMA

    result = ARIMA(_log(train), order=(0, 1, 1), trend="t").fit()
    fc = result.get_forecast(h)
    return LogNormalPredictive(
        np.asarray(fc.predicted_mean, dtype=float), np.sqrt(np.asarray(fc.var_pred_mean))
    )


#: Random walk with drift on logs, classical deseasonalising for seasonal series.
rw_drift = deseasonalised(_rw_drift)
rw_drift.__name__ = "rw_drift"
#: ARIMA(0,1,1) with drift on logs, classical deseasonalising for seasonal series.
arima011 = deseasonalised(_arima011)
arima011.__name__ = "arima011"


def ets_damped(train: np.ndarray, h: int, period: int) -> Predictive:
    """ETS(A,Ad,N) on the logs, or ETS(A,Ad,A) when :func:`is_seasonal` says so."""
    from statsmodels.tsa.exponential_smoothing.ets import ETSModel

    y = pd.Series(_log(train))  # statsmodels 0.15 needs an indexed series for get_prediction
    seasonal = is_seasonal(train, period)
    model = ETSModel(
        y,
        error="add",
        trend="add",
        damped_trend=True,
        seasonal="add" if seasonal else None,
        seasonal_periods=period if seasonal else None,
    )
    result = model.fit(disp=False)
    pred = result.get_prediction(start=y.size, end=y.size + h - 1)
    return LogNormalPredictive(
        np.asarray(pred.predicted_mean, dtype=float),
        np.sqrt(np.asarray(pred.forecast_variance, dtype=float)),
    )


def theta(train: np.ndarray, h: int, period: int) -> Predictive:
    """Theta on the original scale; normal predictive matched to its 95% interval."""
    from statsmodels.tsa.forecasting.theta import ThetaModel

    y = np.asarray(train, dtype=float)
    model = ThetaModel(y, period=period, deseasonalize=period > 1, use_test=True)
    result = model.fit()
    centre = np.asarray(result.forecast(h), dtype=float)
    band = result.prediction_intervals(h, alpha=0.05)
    half = (np.asarray(band["upper"], dtype=float) - np.asarray(band["lower"], dtype=float)) / 2
    return NormalPredictive(centre, half / stats.norm.ppf(0.975))


_STYLES = {1: ("year", 2000), 4: ("quarter", 2000 * 4), 12: ("month", 2000 * 12)}


def growth_series(train: np.ndarray, period: int, name: str = "series"):
    """A :class:`bayesgrowth.GrowthSeries` of ``train`` on a yearly, quarterly or monthly axis.

    The calendar starts in 2000 (an arbitrary origin: the models use only the time index).
    """
    from bayesgrowth.data.periods import PeriodAxis
    from bayesgrowth.data.series import GrowthSeries

    if period not in _STYLES:
        raise ValueError(f"period must be 1, 4 or 12, got {period}")
    style, origin = _STYLES[period]
    values = np.asarray(train, dtype=float)
    axis = PeriodAxis(style=style, step=1, origin=origin)
    return GrowthSeries(values=values, t=np.arange(values.size), axis=axis, name=name,
                        source="benchmark")


def bayesgrowth_method(**fit_kwargs) -> Callable[[np.ndarray, int, int], Predictive]:
    """A method that fits a bayesgrowth model and returns its posterior predictive draws.

    Parameters
    ----------
    **fit_kwargs
        Passed to :func:`bayesgrowth.inference.run.fit_series` (default
        ``engine="exact"``). Without ``seed``, each series gets a seed from a checksum of
        its values, so runs are reproducible.

    Returns
    -------
    callable
        ``(train, h, period) -> SamplePredictive``.
    """
    from bayesgrowth.config import DEFAULT_ENGINE, DEFAULT_MODEL

    settings = {"engine": DEFAULT_ENGINE, **DEFAULT_MODEL, **fit_kwargs}

    def method(train: np.ndarray, h: int, period: int) -> Predictive:
        import warnings

        from bayesgrowth.forecast.forecast import forecast
        from bayesgrowth.inference.run import fit_series

        values = np.ascontiguousarray(train, dtype=float)
        seed = settings.get("seed", zlib.crc32(values.tobytes()))
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            fit = fit_series(growth_series(values, period), **{**settings, "seed": seed})
            return SamplePredictive(forecast(fit, h).draws)

    return method


def drifting_seasons_method() -> Callable[[np.ndarray, int, int], Predictive]:
    """The default model with drifting seasonal factors wherever it would fit seasons.

    ``seasonal="auto"`` fits seasonal factors on quarterly and monthly series with two
    full years observed; there this method lets them drift (``seasonal="drifting"``),
    elsewhere it is the default itself.
    """
    drifting, plain = bayesgrowth_method(seasonal="drifting"), bayesgrowth_method()

    def method(train: np.ndarray, h: int, period: int) -> Predictive:
        seasons = period in (4, 12) and np.asarray(train).size >= 2 * period
        return (drifting if seasons else plain)(train, h, period)

    return method


def shared_prior_method(path=None) -> Callable[[np.ndarray, int, int], Predictive]:
    """The default model with the prior learned per frequency by benchmarks/shared_prior.py."""
    import json
    import math
    from pathlib import Path

    path = Path(path or Path(__file__).parent.parent / "docs" / "benchmark" / "shared_prior.json")
    names = {1: "yearly", 4: "quarterly", 12: "monthly"}

    def method(train: np.ndarray, h: int, period: int) -> Predictive:
        from bayesgrowth.priors import LocalTrendPrior, Priors

        learned = json.loads(path.read_text(encoding="utf-8"))[names[period]]
        priors = Priors(local_trend=LocalTrendPrior(
            level_shock_pct=learned["level_factor"] * 10.0 / math.sqrt(period),
            growth_drift_pts=learned["drift_factor"] * 4.0 / period**1.5))
        return bayesgrowth_method(priors=priors)(train, h, period)

    return method
