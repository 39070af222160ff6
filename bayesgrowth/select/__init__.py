"""Choosing between models: PSIS-LOO, stacking weights and model-averaged forecasts."""

from bayesgrowth.select.averaging import (
    AveragedForecast,
    ModelAverage,
    average_forecasts,
    fit_models,
    model_average,
    registered_models,
)
from bayesgrowth.select.loo import LooResult, ModelComparison, compare_models, loo
from bayesgrowth.select.stacking import kkt_gap, stacking_objective, stacking_weights

__all__ = [
    "AveragedForecast",
    "LooResult",
    "ModelAverage",
    "ModelComparison",
    "average_forecasts",
    "compare_models",
    "fit_models",
    "kkt_gap",
    "loo",
    "model_average",
    "registered_models",
    "stacking_objective",
    "stacking_weights",
]
