"""Forecast layer: posterior predictive bands, target probabilities, growth summaries."""

from bayesgrowth.forecast.forecast import CAUTION, Forecast, extrapolation_caution, forecast

__all__ = ["CAUTION", "Forecast", "extrapolation_caution", "forecast"]
