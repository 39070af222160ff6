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
from bayesgrowth.priors import GrowthPrior, InitialValuePrior, NoisePrior, Priors

#: Where the heavier public names live; imported on first use (PEP 562), so that a
#: command pays only for the layers it runs (no sampler, no cluster client, no model
#: comparison on the exact forecast path).
_HOMES = {
    "BatchSettings": "bayesgrowth.batch",
    "run_batch": "bayesgrowth.batch",
    "read_panel": "bayesgrowth.data.panel",
    "prior_predictive": "bayesgrowth.forecast.prior",
    "prior_sensitivity": "bayesgrowth.forecast.sensitivity",
    "Scenario": "bayesgrowth.forecast.scenario",
    "apply_scenario": "bayesgrowth.forecast.scenario",
    "PooledFit": "bayesgrowth.inference.pooled",
    "fit_pooled": "bayesgrowth.inference.pooled",
    "plot_fan": "bayesgrowth.plots.fan",
    "build_report": "bayesgrowth.report",
    "compare_models": "bayesgrowth.select",
    "fit_models": "bayesgrowth.select",
    "model_average": "bayesgrowth.select",
    "registered_models": "bayesgrowth.select",
    "ModelFamily": "bayesgrowth.models.registry",
    "Parameter": "bayesgrowth.models.registry",
    "register_model": "bayesgrowth.models.registry",
}

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
    "ModelFamily",
    "NoisePrior",
    "Parameter",
    "PooledFit",
    "Priors",
    "SamplingWarning",
    "Scenario",
    "__version__",
    "apply_scenario",
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
    "register_model",
    "registered_models",
    "run_batch",
]


def __getattr__(name: str):
    home = _HOMES.get(name)
    if home is None:
        raise AttributeError(f"module 'bayesgrowth' has no attribute {name!r}")
    import importlib

    value = getattr(importlib.import_module(home), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(__all__)
