"""The recalibration map: how a forecast's predictive distribution missed, per horizon step.

Quantile recalibration (Kuleshov, Fenner & Ermon 2018, "Accurate uncertainties for deep
learning using calibrated regression", ICML) learns a monotone map ``R`` from the PIT
values of past forecasts: ``R(p)`` is the share of outcomes whose PIT was at most ``p``.
For a calibrated forecast PIT values are uniform and ``R`` is the identity. The
recalibrated predictive CDF is ``R(F(y))``: its central ``L`` band runs from the
predictive quantile at ``R^-1((1 - L)/2)`` to the one at ``R^-1((1 + L)/2)``, and
``P(value >= target)`` becomes ``1 - R(F(target))``.

How the map is built, for each horizon step ``h``:

1. **Pooling.** The outcomes of step ``h`` are used, with those of the neighbouring
   steps ``h +- 1, h +- 2, ...`` added until at least :data:`MIN_OUTCOMES` outcomes are
   in (or every step is). A neighbour ``k`` steps away gets the triangular weight
   ``1 - k / (d + 1)``, ``d`` the widest distance used, so the step's own outcomes
   count most.
2. **Monotone map.** ``R`` is the weighted empirical CDF of the PIT values (the
   isotonic fit of Kuleshov et al. is this empirical CDF), taken at the Hazen plotting
   position (the middle of each jump) and joined linearly between the PIT values, with
   ``R(0) = 0`` and ``R(1) = 1``. PIT values of exactly 0 or 1 (an outcome beyond every
   predictive draw) are moved to ``pit_floor`` and ``1 - pit_floor`` first.
3. **Shrinkage towards no change.** ``R_shrunk(p) = (n R(p) + n0 p) / (n + n0)``, with
   ``n`` the effective number of outcomes and ``n0`` = :data:`PSEUDO_COUNT` (20): the
   identity counts as 20 outcomes of prior evidence. This pseudo-count is a
   common-practice choice with no single published source. With 20 effective outcomes
   the map moves half-way from the identity to the empirical CDF; with 2,000 it is 99%
   the empirical CDF.

The effective number of outcomes is Kish's (1965, "Survey Sampling") ``(sum w)^2 /
sum w^2`` of the pooling weights. It does not account for dependence: outcomes of
overlapping origins share shocks, so the true effective number is smaller, and a map
learned on one short series is correspondingly less certain than its ``n`` suggests.

Because ``n0 > 0`` the shrunk map is strictly increasing and maps ``(0, 1)`` into
``(0, 1)``, so its inverse exists and every recalibrated quantile is a quantile of the
original predictive strictly inside its support.
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass

import numpy as np

__all__ = ["MIN_OUTCOMES", "PIT_FLOOR", "PSEUDO_COUNT", "QuantileMap", "learn_map"]

#: Pseudo-count ``n0`` of the identity in the shrinkage (common practice, no published value).
PSEUDO_COUNT = 20.0
#: Outcomes a step's map should rest on before neighbouring steps are pooled in
#: (common practice, no published value).
MIN_OUTCOMES = 40
#: Where PIT values of exactly 0 or 1 are moved: half the resolution of 5,000 draws.
PIT_FLOOR = 1e-4


@dataclass(frozen=True)
class QuantileMap:
    """A monotone recalibration map per horizon step, shrunk towards the identity.

    Attributes
    ----------
    knots : tuple of numpy.ndarray
        Per step ``1..H``: increasing PIT values, starting at 0 and ending at 1.
    values : tuple of numpy.ndarray
        Per step: the shrunk map at the knots, strictly increasing from 0 to 1.
    n_outcomes : numpy.ndarray of int, shape (H,)
        Outcomes each step's map rests on, pooled neighbours included.
    effective_n : numpy.ndarray of float, shape (H,)
        Kish's effective number of those outcomes (see the module docstring).
    own_outcomes : numpy.ndarray of int, shape (H,)
        Outcomes of each step itself.
    pseudo_count : float
        ``n0`` of the shrinkage.
    total_outcomes : int
        Distinct outcomes the map was learned from (over all steps).
    method : str
        ``"quantile"``: quantile recalibration of the predictive CDF.
    """

    knots: tuple[np.ndarray, ...]
    values: tuple[np.ndarray, ...]
    n_outcomes: np.ndarray
    effective_n: np.ndarray
    own_outcomes: np.ndarray
    pseudo_count: float
    total_outcomes: int
    method: str = "quantile"

    @property
    def horizon(self) -> int:
        """Steps the map was learned for."""
        return len(self.knots)

    def _index(self, step: int) -> int:
        step = int(step)
        if step < 1:
            raise ValueError(f"step must be at least 1, got {step}")
        return min(step, self.horizon) - 1  # steps past the learned horizon: the last map

    def forward(self, p, step: int) -> np.ndarray:
        """``R(p)`` at one step: the calibrated probability of predictive probability ``p``."""
        i = self._index(step)
        return np.interp(np.asarray(p, dtype=float), self.knots[i], self.values[i])

    def inverse(self, q, step: int) -> np.ndarray:
        """``R^-1(q)`` at one step: the predictive probability whose calibrated one is ``q``."""
        i = self._index(step)
        return np.interp(np.asarray(q, dtype=float), self.values[i], self.knots[i])

    def describe(self) -> dict:
        """A JSON-ready account: method, outcomes, effective numbers per step, pseudo-count."""
        return {
            "method": self.method,
            "n_outcomes": int(self.total_outcomes),
            "effective_n": [round(float(v), 1) for v in self.effective_n],
            "outcomes_per_step": [int(v) for v in self.n_outcomes],
            "pseudo_count": float(self.pseudo_count),
        }

    def fingerprint(self) -> str:
        """SHA-256 of the map's numbers (to tell two maps apart in a run record)."""
        h = hashlib.sha256()
        for arr in (*self.knots, *self.values, self.n_outcomes, self.effective_n):
            h.update(np.ascontiguousarray(arr, dtype=float).tobytes())
        h.update(repr((self.pseudo_count, self.total_outcomes, self.method)).encode())
        return h.hexdigest()


def _check_inputs(pit, step, pseudo_count: float, min_outcomes: int, pit_floor: float):
    u = np.asarray(pit, dtype=float).ravel()
    s = np.asarray(step).ravel()
    if u.shape != s.shape:
        raise ValueError(f"pit and step must have the same length, got {u.size} and {s.size}")
    keep = np.isfinite(u)
    u, s = u[keep], s[keep]
    if np.any((u < 0) | (u > 1)):
        raise ValueError("PIT values must lie between 0 and 1")
    if s.size and (np.any(s != np.round(s)) or np.any(s < 1)):
        raise ValueError("steps must be whole numbers of at least 1")
    if not pseudo_count > 0:
        raise ValueError(f"pseudo_count must be above 0, got {pseudo_count}")
    if int(min_outcomes) < 1:
        raise ValueError(f"min_outcomes must be at least 1, got {min_outcomes}")
    if not 0 < pit_floor < 0.5:
        raise ValueError(f"pit_floor must be between 0 and 0.5, got {pit_floor}")
    return np.clip(u, pit_floor, 1 - pit_floor), s.astype(int)


def _pool_weights(counts: np.ndarray, h: int, min_outcomes: int) -> np.ndarray:
    """Triangular weights of every step for step ``h`` (0-based), widening until enough."""
    steps = np.arange(counts.size)
    dist = np.abs(steps - h)
    width = 0
    while width < counts.size - 1 and counts[dist <= width].sum() < min_outcomes:
        width += 1
    return np.where(dist <= width, 1.0 - dist / (width + 1.0), 0.0)


def _weighted_ecdf(u: np.ndarray, w: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    """Knots and Hazen-position values of the weighted empirical CDF, anchored at 0 and 1."""
    order = np.argsort(u, kind="stable")
    u, w = u[order], w[order]
    knots, first = np.unique(u, return_index=True)
    weight_at = np.add.reduceat(w, first)
    cum = np.cumsum(weight_at)
    values = (cum - 0.5 * weight_at) / cum[-1]
    return np.concatenate([[0.0], knots, [1.0]]), np.concatenate([[0.0], values, [1.0]])


def _step_map(u, s, counts, h, n0, min_outcomes):
    weights_by_step = _pool_weights(counts, h, min_outcomes)
    w = weights_by_step[s - 1]
    used = w > 0
    if not used.any():
        return np.array([0.0, 1.0]), np.array([0.0, 1.0]), 0, 0.0
    w_used = w[used]
    n_eff = float(w_used.sum() ** 2 / np.sum(w_used**2))
    knots, raw = _weighted_ecdf(u[used], w_used)
    shrunk = (n_eff * raw + n0 * knots) / (n_eff + n0)
    return knots, shrunk, int(used.sum()), n_eff


def learn_map(
    pit,
    step,
    *,
    horizon: int | None = None,
    pseudo_count: float = PSEUDO_COUNT,
    min_outcomes: int = MIN_OUTCOMES,
    pit_floor: float = PIT_FLOOR,
) -> QuantileMap:
    """Learn the quantile recalibration map per step from backtest PIT values.

    Parameters
    ----------
    pit : array_like
        PIT values of past outcomes (NaN ones are left out).
    step : array_like of int
        The horizon step (1 = one period ahead) of each outcome.
    horizon : int, optional
        Steps to learn a map for; default the largest step seen. Steps without
        outcomes borrow their neighbours' (see the module docstring).
    pseudo_count : float, default :data:`PSEUDO_COUNT`
        ``n0``: how many outcomes the identity counts as.
    min_outcomes : int, default :data:`MIN_OUTCOMES`
        Outcomes a step's map should rest on before neighbours are pooled in.
    pit_floor : float, default :data:`PIT_FLOOR`
        PIT values are clipped to ``[pit_floor, 1 - pit_floor]``; draws-based PIT
        values have a resolution of one over the number of draws.

    Returns
    -------
    QuantileMap
        The identity at every step when there are no outcomes.

    Raises
    ------
    ValueError
        If the inputs are malformed (lengths, ranges, settings).
    """
    u, s = _check_inputs(pit, step, pseudo_count, min_outcomes, pit_floor)
    if horizon is None:
        horizon = int(s.max()) if s.size else 1
    if int(horizon) < 1:
        raise ValueError(f"horizon must be at least 1, got {horizon}")
    horizon = int(horizon)
    keep = s <= horizon
    u, s = u[keep], s[keep]
    counts = np.bincount(s - 1, minlength=horizon) if s.size else np.zeros(horizon, int)
    parts = [_step_map(u, s, counts, h, float(pseudo_count), int(min_outcomes))
             for h in range(horizon)]
    return QuantileMap(
        knots=tuple(p[0] for p in parts),
        values=tuple(p[1] for p in parts),
        n_outcomes=np.array([p[2] for p in parts], dtype=int),
        effective_n=np.array([p[3] for p in parts], dtype=float),
        own_outcomes=counts.astype(int),
        pseudo_count=float(pseudo_count),
        total_outcomes=int(u.size),
    )
