"""A forecast whose bands were recalibrated: the same interface, corrected numbers.

:class:`RecalibratedForecast` is a :class:`~bayesgrowth.forecast.forecast.Forecast`
whose value bands, median, mean, probabilities of targets and predictive draws follow
the recalibrated predictive CDF ``R(F(y))`` (see
:mod:`bayesgrowth.forecast.recalibration_map`). The curve bands (``curve_*`` columns,
the fitted model's mean curve alone) are the model's own and are left unchanged.

- **Bands and median.** The band at level ``L`` runs between the original predictive's
  quantiles at ``R^-1((1 - L)/2)`` and ``R^-1((1 + L)/2)``; the median is its quantile
  at ``R^-1(1/2)``. For the exact engine these quantiles come from the log-normal
  mixture itself (:func:`~bayesgrowth.inference.mixture.mixture_quantiles`), otherwise
  from the draws.
- **Probabilities.** ``P(value >= target) = 1 - R(F(target))``.
- **Draws.** Each step's draws are moved monotonically: a draw at rank position
  ``u = (rank + 1/2) / m`` among the ``m`` draws becomes the draws' quantile at
  ``R^-1(u)``. Ranks are kept, so the dependence between steps is kept; the draws
  cannot reach beyond the original draws' range. The ``mean`` column is their mean.
"""

from __future__ import annotations

import functools
from dataclasses import dataclass, fields

import numpy as np
import pandas as pd

from bayesgrowth.forecast.bands import band_probabilities
from bayesgrowth.forecast.forecast import Forecast
from bayesgrowth.forecast.means import mean_of_draws
from bayesgrowth.forecast.recalibration_map import QuantileMap
from bayesgrowth.inference.mixture import mixture_quantiles

__all__ = ["RecalibratedForecast", "apply_map", "base_quantiles"]


def base_quantiles(fc: Forecast, probs: np.ndarray) -> np.ndarray:
    """Quantiles of the original predictive at probabilities that differ per step.

    Parameters
    ----------
    fc : Forecast
        The forecast before recalibration.
    probs : numpy.ndarray, shape (P, H)
        Probabilities strictly between 0 and 1, one column per step.

    Returns
    -------
    numpy.ndarray, shape (P, H)
        Quantiles on the value scale.
    """
    probs = np.asarray(probs, dtype=float)
    out = np.empty_like(probs)
    for h in range(fc.horizon):
        if fc.exact is not None:
            e = fc.exact
            q = mixture_quantiles(e["weight"], e["mean"][:, h:h + 1],
                                  e["value_sd"][:, h:h + 1], probs[:, h])
            out[:, h] = np.exp(q[:, 0])
        else:
            out[:, h] = np.quantile(fc.draws[:, h], probs[:, h])
    return out


def _moved_draws(draws: np.ndarray, qmap: QuantileMap) -> np.ndarray:
    m = draws.shape[0]
    out = np.empty_like(draws)
    index = np.arange(m)
    u = (index + 0.5) / m  # rank position of the k-th smallest draw
    for h in range(draws.shape[1]):
        order = np.argsort(draws[:, h], kind="stable")
        ordered = draws[order, h]
        # the draws' quantile at R^-1(u), by linear interpolation (numpy's default rule)
        out[order, h] = np.interp(qmap.inverse(u, h + 1) * (m - 1), index, ordered)
    return out


@dataclass
class RecalibratedForecast(Forecast):
    """A :class:`Forecast` with recalibrated bands, probabilities and draws.

    Attributes
    ----------
    calibration : QuantileMap
        The map applied.
    base : Forecast
        The forecast before recalibration.
    source : dict
        Where the map was learned (``"backtest of this series"`` or a pooled panel),
        with the backtest's settings; shown in :attr:`recalibrated`.
    """

    calibration: QuantileMap | None = None
    base: Forecast | None = None
    source: dict | None = None

    @property
    def recalibrated(self) -> dict:
        """``{method, n_outcomes, effective_n, ...}``: how the bands were recalibrated."""
        return {**self.calibration.describe(), **(self.source or {})}

    def _probs(self, levels_probs: list[float]) -> np.ndarray:
        return np.array([[float(self.calibration.inverse(p, h + 1)) for h in range(self.horizon)]
                         for p in levels_probs])

    @functools.cached_property
    def table(self) -> pd.DataFrame:
        """The base table with recalibrated ``mean``, ``median`` and value bands.

        Two more columns say what each step's map rests on:
        ``recalibration_outcomes`` (outcomes, pooled neighbours included) and
        ``recalibration_effective_n``. ``table.attrs["recalibrated"]`` holds
        :attr:`recalibrated`.
        """
        frame = self.base.table.copy()
        probs = [0.5]
        for level in self.levels:
            probs += band_probabilities(level)
        q = base_quantiles(self.base, self._probs(probs))
        frame["mean"] = mean_of_draws(self.draws)
        frame["median"] = q[0]
        for i, level in enumerate(self.levels):
            frame[f"lower_{level}"] = q[1 + 2 * i]
            frame[f"upper_{level}"] = q[2 + 2 * i]
        steps = np.arange(self.horizon)
        at = np.minimum(steps, self.calibration.horizon - 1)
        frame["recalibration_outcomes"] = self.calibration.n_outcomes[at]
        frame["recalibration_effective_n"] = np.round(self.calibration.effective_n[at], 1)
        frame.attrs["recalibrated"] = self.recalibrated
        return frame

    def prob_exceeds(self, target: float) -> pd.Series:
        """Recalibrated probability that each future period's value is at least ``target``."""
        below = 1.0 - self.base.prob_exceeds(target).to_numpy()
        prob = np.array([1.0 - float(self.calibration.forward(below[h], h + 1))
                         for h in range(self.horizon)])
        return pd.Series(prob, index=pd.Index(self.periods, name="period"), name="probability")

    def summary(self, target: float | None = None, target_probability: float = 0.5) -> dict:
        """The forecast's summary, with the final period from the recalibrated table.

        A ``recalibrated`` entry says how (:attr:`recalibrated`), and a caution says
        what recalibration assumes.
        """
        out = super().summary(target, target_probability)
        last = self.table.iloc[-1]
        out["final_period"].update({k: float(last[k]) for k in out["final_period"]
                                    if k != "period" and k in last.index})
        out["recalibrated"] = self.recalibrated
        out["cautions"].insert(0, recalibration_caution(self.recalibrated))
        return out


def recalibration_caution(info: dict) -> str:
    """The caution of a recalibrated forecast, naming what the map rests on."""
    return (
        f"The bands are recalibrated from {info['n_outcomes']} outcomes of a backtest "
        f"({info.get('where', 'rolling origins')}): they are moved to hold what they state on "
        "those past forecasts, which assumes the model misses in future the way it missed "
        "then. Few outcomes move the bands little (the map is shrunk towards no change)."
    )


def apply_map(fc: Forecast, qmap: QuantileMap, source: dict | None = None) -> RecalibratedForecast:
    """Recalibrate a forecast with a learned map.

    Parameters
    ----------
    fc : Forecast
        The forecast to correct (a recalibrated one is corrected from its base).
    qmap : QuantileMap
        The map, learned for the same model (steps past its horizon use its last step).
    source : dict, optional
        Where the map was learned; shown in the summary's ``recalibrated`` entry.

    Returns
    -------
    RecalibratedForecast
    """
    if isinstance(fc, RecalibratedForecast):
        fc = fc.base
    state = {f.name: getattr(fc, f.name) for f in fields(Forecast)}
    state["draws"] = _moved_draws(np.asarray(fc.draws, dtype=float), qmap)
    return RecalibratedForecast(**state, calibration=qmap, base=fc, source=dict(source or {}))
