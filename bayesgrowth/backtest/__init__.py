"""Rolling-origin backtests: splits, the runner, its result, named models and their ranking."""

from bayesgrowth.backtest.methods import METHODS
from bayesgrowth.backtest.models import DEFAULT_MODELS, ModelChoice
from bayesgrowth.backtest.runner import BACKTEST_CAUTION, BacktestResult, backtest
from bayesgrowth.backtest.split import RollingOrigin

__all__ = [
    "BACKTEST_CAUTION",
    "DEFAULT_MODELS",
    "METHODS",
    "BacktestResult",
    "ModelChoice",
    "RollingOrigin",
    "backtest",
]
