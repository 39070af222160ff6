"""bayesgrowth: Bayesian forecasts of business growth with honest, backtested bands.

The pipeline, one subpackage per stage: ``data`` (read and validate series) →
``models`` (growth curves and their PyMC models) → ``inference`` (NUTS and exact
engines, diagnostics) → ``forecast`` (posterior predictive bands) → ``leastsq``
(point-estimate fits for comparison) and ``backtest``/``scoring`` (calibration) →
``plots``, ``report`` and ``cli``. PyMC is imported only when the NUTS engine runs.
"""

from bayesgrowth._version import __version__
from bayesgrowth.backtest import BacktestResult, backtest
from bayesgrowth.batch import BatchSettings, run_batch
from bayesgrowth.config import DEFAULT_LEVELS
from bayesgrowth.data import GrowthSeries, InputError, load_demo, read_series
from bayesgrowth.data.panel import read_panel
from bayesgrowth.forecast import CAUTION, Forecast, forecast
from bayesgrowth.forecast.prior import prior_predictive
from bayesgrowth.forecast.sensitivity import prior_sensitivity
from bayesgrowth.inference import Diagnostics, Fit, SamplingWarning, fit_series
from bayesgrowth.inference.pooled import PooledFit, fit_pooled
from bayesgrowth.model import GrowthModel
from bayesgrowth.plots.fan import plot_fan
from bayesgrowth.priors import GrowthPrior, InitialValuePrior, NoisePrior, Priors
from bayesgrowth.report import build_report
from bayesgrowth.select import compare_models, fit_models, model_average, registered_models

__all__ = [
    "BacktestResult",
    "BatchSettings",
    "CAUTION",
    "DEFAULT_LEVELS",
    "Diagnostics",
    "Fit",
    "Forecast",
    "GrowthModel",
    "GrowthPrior",
    "GrowthSeries",
    "InitialValuePrior",
    "InputError",
    "NoisePrior",
    "PooledFit",
    "Priors",
    "SamplingWarning",
    "__version__",
    "backtest",
    "build_report",
    "compare_models",
    "fit_models",
    "fit_pooled",
    "fit_series",
    "forecast",
    "load_demo",
    "model_average",
    "plot_fan",
    "prior_predictive",
    "prior_sensitivity",
    "read_panel",
    "read_series",
    "registered_models",
    "run_batch",
]
