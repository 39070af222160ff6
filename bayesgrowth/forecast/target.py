"""Time to a target as a distribution: the probability of having reached it by each period.

"Reached by period ``k``" means the value was at or above the target at least
once in future periods ``1..k`` (first passage). That is a property of whole
paths, not of any one period: ``P(max(Y_1..Y_k) >= target)`` depends on how the
periods move together, so the per-period predictive distributions (the
marginals behind the bands and :meth:`Forecast.prob_exceeds`) do not determine
it. A path that pokes above the target in one period and falls back counts as
having reached it, and the marginal probability of the last period alone
understates the chance of reaching the target at some point. It is therefore
estimated from the joint predictive paths (``Forecast.draws``: one simulated
path per posterior draw), with a binomial standard error per period.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import pandas as pd

__all__ = ["TimeToTarget", "first_passage", "time_to_target"]

#: Probabilities at which the printed line and the summary name a period.
DEFAULT_PROBABILITIES = (0.5, 0.8)


@dataclass(frozen=True)
class TimeToTarget:
    """When the value first reaches a target, as a distribution over future periods.

    Attributes
    ----------
    target : float
    periods : list of str
        Future period labels, step 1 first.
    first_reached : numpy.ndarray
        Probability that the target is first reached in each period.
    reached_by : numpy.ndarray
        Probability that it has been reached in that period or before
        (the running sum of ``first_reached``).
    n_paths : int
        Number of joint predictive paths the probabilities come from.
    """

    target: float
    periods: list[str]
    first_reached: np.ndarray
    reached_by: np.ndarray
    n_paths: int

    @property
    def not_reached(self) -> float:
        """Probability that the target is not reached within the horizon."""
        return float(1.0 - self.reached_by[-1])

    @property
    def table(self) -> pd.DataFrame:
        """One row per future period.

        Columns ``period``, ``step``, ``first_reached``, ``reached_by`` and
        ``std_error`` (binomial standard error of ``reached_by``, ``sqrt(p (1 - p) / n)``).
        """
        p = self.reached_by
        return pd.DataFrame({
            "period": self.periods,
            "step": np.arange(1, len(self.periods) + 1),
            "first_reached": self.first_reached,
            "reached_by": p,
            "std_error": np.sqrt(p * (1 - p) / self.n_paths),
        })

    def period_at(self, probability: float) -> str | None:
        """The first period by which the target is reached with at least ``probability``.

        ``None`` when no period within the horizon gets there.
        """
        if not 0 < probability < 1:
            raise ValueError(f"probability must be between 0 and 1, got {probability}")
        hits = np.flatnonzero(self.reached_by >= probability)
        return self.periods[int(hits[0])] if hits.size else None

    def to_dict(self, probabilities: Sequence[float] = DEFAULT_PROBABILITIES) -> dict:
        """A JSON-ready form for ``summary.json``."""
        return {
            "value": float(self.target),
            "probability_reached_by_period": dict(zip(self.periods,
                                                      map(float, self.reached_by),
                                                      strict=True)),
            "probability_first_reached_in_period": dict(zip(self.periods,
                                                            map(float, self.first_reached),
                                                            strict=True)),
            "probability_not_reached_within_horizon": self.not_reached,
            "reached_by_with_probability": {
                f"{p:g}": self.period_at(p) for p in sorted(set(probabilities))
            },
            "paths": int(self.n_paths),
            "method": "share of the joint predictive paths at or above the target in at "
                      "least one period up to each period (first passage)",
        }


def first_passage(paths: np.ndarray, target: float, periods: Sequence[str]) -> TimeToTarget:
    """First-passage probabilities of ``target`` from joint paths.

    Parameters
    ----------
    paths : numpy.ndarray, shape (n_paths, horizon)
        Joint draws of the future values, one path per row.
    target : float
    periods : sequence of str
        Labels of the ``horizon`` periods.

    Returns
    -------
    TimeToTarget
    """
    paths = np.asarray(paths, dtype=float)
    if paths.ndim != 2 or paths.shape[1] != len(periods):
        raise ValueError(f"paths must be (n_paths, {len(periods)}), got {paths.shape}")
    if not math.isfinite(target):
        raise ValueError(f"target must be finite, got {target}")
    hit = paths >= target
    reached = np.logical_or.accumulate(hit, axis=1)
    reached_by = reached.mean(axis=0)
    first = np.diff(np.concatenate([[0.0], reached_by]))
    return TimeToTarget(target=float(target), periods=list(periods), first_reached=first,
                        reached_by=reached_by, n_paths=int(paths.shape[0]))


def time_to_target(fc, target: float) -> TimeToTarget:
    """Time to ``target`` of a forecast, from its joint predictive paths.

    Parameters
    ----------
    fc : Forecast
    target : float
        A value above 0, in the series' units.

    Returns
    -------
    TimeToTarget
    """
    from bayesgrowth.forecast.bands import check_target

    return first_passage(fc.draws, check_target(target), fc.periods)
