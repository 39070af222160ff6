"""Plots: each takes computed results and an optional Axes, and returns the Axes."""

from bayesgrowth.plots.fan import plot_fan

__all__ = ["plot_fan"]
