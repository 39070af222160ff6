"""bayesgrowth: Bayesian forecasts of business growth with honest, backtested bands.

The pipeline, one subpackage per stage: ``data`` (read and validate series) →
``models`` (growth curves and their PyMC models) → ``inference`` (NUTS and exact
engines, diagnostics) → ``forecast`` (posterior predictive bands) → ``leastsq``
(point-estimate fits for comparison) and ``backtest``/``scoring`` (calibration) →
``plots``, ``report`` and ``cli``. PyMC is imported only when the NUTS engine runs.
"""

from bayesgrowth._version import __version__
from bayesgrowth.backtest import BacktestResult, backtest
from bayesgrowth.config import DEFAULT_LEVELS
from bayesgrowth.data import GrowthSeries, InputError, load_demo, read_series
from bayesgrowth.forecast import CAUTION, Forecast, forecast
from bayesgrowth.inference import Diagnostics, Fit, SamplingWarning, fit_series
from bayesgrowth.model import GrowthModel
from bayesgrowth.plots.fan import plot_fan
from bayesgrowth.priors import GrowthPrior, InitialValuePrior, NoisePrior, Priors

__all__ = [
    "BacktestResult",
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
    "Priors",
    "SamplingWarning",
    "__version__",
    "backtest",
    "fit_series",
    "forecast",
    "load_demo",
    "plot_fan",
    "read_series",
]
