"""Predictive distributions of the real-data benchmark: what a method returns.

A method is a callable ``(train, h, period) -> Predictive``; a predictive answers one
question, its quantiles on the original (revenue) scale, one row per probability and one
column per step ahead.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Protocol, runtime_checkable

import numpy as np
from scipy import stats

__all__ = [
    "LogNormalPredictive",
    "Method",
    "NormalPredictive",
    "Predictive",
    "SamplePredictive",
    "ScaledPredictive",
]


@runtime_checkable
class Predictive(Protocol):
    """A forecast distribution for steps ``1..h``."""

    def quantiles(self, probs: np.ndarray) -> np.ndarray:
        """Quantiles on the original scale, shape ``(len(probs), h)``."""
        ...


#: A forecasting method: ``(train, h, period) -> Predictive``.
Method = Callable[[np.ndarray, int, int], Predictive]


def _probs(probs: np.ndarray) -> np.ndarray:
    p = np.asarray(probs, dtype=float)
    if p.ndim != 1 or np.any((p <= 0) | (p >= 1)):
        raise ValueError("probabilities must be a 1-d array of values strictly inside (0, 1)")
    return p


@dataclass(frozen=True)
class LogNormalPredictive:
    """Gaussian on the log scale: per step, the mean and sd of the log value.

    Quantiles are ``exp(mean + sd * z_p)`` with ``z_p`` the standard normal quantile
    (the log-normal's quantiles, since ``exp`` is increasing).
    """

    mean_log: np.ndarray
    sd_log: np.ndarray

    def quantiles(self, probs: np.ndarray) -> np.ndarray:
        """Log-normal quantiles, shape ``(len(probs), h)``."""
        z = stats.norm.ppf(_probs(probs))[:, None]
        return np.exp(np.asarray(self.mean_log)[None, :] + z * np.asarray(self.sd_log)[None, :])


@dataclass(frozen=True)
class NormalPredictive:
    """Gaussian on the original scale: per step, mean and sd (quantiles may be negative)."""

    mean: np.ndarray
    sd: np.ndarray

    def quantiles(self, probs: np.ndarray) -> np.ndarray:
        """Normal quantiles, shape ``(len(probs), h)``."""
        z = stats.norm.ppf(_probs(probs))[:, None]
        return np.asarray(self.mean)[None, :] + z * np.asarray(self.sd)[None, :]


@dataclass(frozen=True)
class SamplePredictive:
    """Draws of the value, shape ``(n_draws, h)``; quantiles by linear interpolation."""

    draws: np.ndarray

    def quantiles(self, probs: np.ndarray) -> np.ndarray:
        """Empirical quantiles of the draws per step, shape ``(len(probs), h)``."""
        return np.quantile(np.asarray(self.draws), _probs(probs), axis=0)


@dataclass(frozen=True)
class ScaledPredictive:
    """A predictive multiplied by positive per-step factors (e.g. seasonal indices).

    For a factor ``s > 0`` the ``p`` quantile of ``s Y`` is ``s`` times that of ``Y``.
    """

    base: Predictive
    factors: np.ndarray

    def quantiles(self, probs: np.ndarray) -> np.ndarray:
        """The base quantiles times the factors, shape ``(len(probs), h)``."""
        return self.base.quantiles(probs) * np.asarray(self.factors)[None, :]
