"""bayesgrowth: Bayesian forecasts of business growth with honest, backtested bands.

The pipeline, one subpackage per stage: ``data`` (read and validate series) →
``models`` (growth curves and their PyMC models) → ``inference`` (NUTS and exact
engines, diagnostics) → ``forecast`` (posterior predictive bands) → ``leastsq``
(point-estimate fits for comparison) and ``backtest``/``scoring`` (calibration) →
``plots``, ``report`` and ``cli``. PyMC is imported only when the NUTS engine runs.
"""

import importlib
import sys
import types

from bayesgrowth._version import __version__
from bayesgrowth.config import DEFAULT_LEVELS

#: Where each public name lives; imported on first use (PEP 562), so that a command
#: pays only for the layers it runs: ``import bayesgrowth`` loads no NumPy, and the
#: exact forecast no sampler, no backtest or scoring, no model comparison.
_HOMES = {
    "BacktestResult": "bayesgrowth.backtest",
    "Comparison": "bayesgrowth.comparison",
    "compare_to_forecast": "bayesgrowth.comparison",
    "backtest": "bayesgrowth.backtest",
    "GrowthSeries": "bayesgrowth.data",
    "InputError": "bayesgrowth.data",
    "load_demo": "bayesgrowth.data",
    "read_series": "bayesgrowth.data",
    "CAUTION": "bayesgrowth.forecast",
    "Forecast": "bayesgrowth.forecast",
    "forecast": "bayesgrowth.forecast",
    "Diagnostics": "bayesgrowth.inference",
    "Fit": "bayesgrowth.inference",
    "SamplingWarning": "bayesgrowth.inference",
    "fit_series": "bayesgrowth.inference",
    "GrowthModel": "bayesgrowth.model",
    "GrowthPrior": "bayesgrowth.priors",
    "InitialValuePrior": "bayesgrowth.priors",
    "NoisePrior": "bayesgrowth.priors",
    "Priors": "bayesgrowth.priors",
    "BatchSettings": "bayesgrowth.batch",
    "run_batch": "bayesgrowth.batch",
    "read_panel": "bayesgrowth.data.panel",
    "prior_predictive": "bayesgrowth.forecast.prior",
    "prior_sensitivity": "bayesgrowth.forecast.sensitivity",
    "Scenario": "bayesgrowth.forecast.scenario",
    "apply_scenario": "bayesgrowth.forecast.scenario",
    "PooledFit": "bayesgrowth.inference.pooled",
    "fit_pooled": "bayesgrowth.inference.pooled",
    "plot_compared": "bayesgrowth.plots.compare",
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

#: Public functions named like the subpackage they live in: the name stays the function
#: when the subpackage is imported (which would otherwise bind the name to it).
_SHADOWED = ("backtest", "forecast")

__all__ = [
    "BacktestResult",
    "BatchSettings",
    "CAUTION",
    "Comparison",
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
    "compare_to_forecast",
    "fit_models",
    "fit_pooled",
    "fit_series",
    "forecast",
    "load_demo",
    "model_average",
    "plot_compared",
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
        try:  # a subpackage or module, as ``bayesgrowth.data`` after an import of it
            return importlib.import_module(f"{__name__}.{name}")
        except ModuleNotFoundError:
            raise AttributeError(f"module 'bayesgrowth' has no attribute {name!r}") from None
    value = getattr(importlib.import_module(home), name)
    globals()[name] = value
    return value


def __dir__() -> list[str]:
    return sorted(__all__)


class _Front(types.ModuleType):
    """The package module: importing ``bayesgrowth.backtest`` keeps ``backtest`` the function."""

    def __setattr__(self, name: str, value) -> None:
        if name in _SHADOWED and isinstance(value, types.ModuleType):
            return  # the import system binding the subpackage; the public name is the function
        super().__setattr__(name, value)


sys.modules[__name__].__class__ = _Front
