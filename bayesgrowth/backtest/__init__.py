"""Rolling-origin backtests: splits, the runner, its result and the methods it compares."""

from bayesgrowth.backtest.methods import METHODS
from bayesgrowth.backtest.runner import BACKTEST_CAUTION, BacktestResult, backtest
from bayesgrowth.backtest.split import RollingOrigin

__all__ = ["BACKTEST_CAUTION", "METHODS", "BacktestResult", "RollingOrigin", "backtest"]
