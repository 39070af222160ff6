"""Honest evaluation of recalibration: learn the map on earlier origins, score on later ones.

A map scored on the outcomes it was learned from would look perfect by construction. Here
each series' backtest origins are split in time: the map is learned from the outcomes
that were already observed at the split (their target period at or before it), pooled
over the series of each frequency, and scored on the forecasts made from the split
onwards, which it never saw. Coverage is read from the PIT values: an outcome is inside
the central ``L`` band before recalibration when its PIT lies in ``[a, 1 - a]`` with
``a = (1 - L)/2``, and inside the recalibrated band when ``R(PIT)`` does (the
recalibrated band's ends are the predictive quantiles at ``R^-1(a)`` and
``R^-1(1 - a)``).

The binomial intervals (Clopper & Pearson 1934) treat the scored outcomes as
independent. Outcomes of one series from overlapping origins are not, so read the
intervals as indicative; a check that needs them exact should score one outcome per
series.
"""

from __future__ import annotations

import math
from collections.abc import Sequence

import numpy as np
import pandas as pd

from bayesgrowth.backtest.recalibrate import outcomes_of
from bayesgrowth.config import PREDICTIVE_DRAWS
from bayesgrowth.forecast.bands import band_probabilities
from bayesgrowth.forecast.recalibration_map import MIN_OUTCOMES, PSEUDO_COUNT, learn_map
from bayesgrowth.scoring import coverage_interval

__all__ = ["nested_evaluation", "split_outcomes"]


def split_outcomes(result, *, learn_share: float = 0.5,
                   method: str | None = None) -> tuple[pd.DataFrame, pd.DataFrame]:
    """Split one backtest's outcomes in time into a learning part and a scoring part.

    Parameters
    ----------
    result : BacktestResult
    learn_share : float, default 0.5
        Share of the origins before the split: the first scoring origin is the one at
        position ``ceil(learn_share * n_origins)`` in time order.
    method : str, optional
        The method whose rows to take (see
        :func:`~bayesgrowth.backtest.recalibrate.outcomes_of`).

    Returns
    -------
    learn, score : pandas.DataFrame
        ``learn``: outcomes whose target period is at or before the first scoring
        origin (known when that forecast was made); ``score``: outcomes of the
        scoring origins. Columns ``origin``, ``step``, ``period``, ``pit``.

    Raises
    ------
    ValueError
        If ``learn_share`` is not strictly between 0 and 1, or there are fewer than
        two origins.
    """
    if not 0 < learn_share < 1:
        raise ValueError(f"learn_share must be between 0 and 1, got {learn_share}")
    rows = outcomes_of(result, method)
    position = {label: i for i, label in enumerate(result.series.labels)}
    origin_pos = rows["origin"].map(position).to_numpy()
    target_pos = rows["period"].map(position).to_numpy()
    origins = np.unique(origin_pos)
    if origins.size < 2:
        raise ValueError(f"{result.series.name}: {origins.size} origin(s); a split needs two")
    cut = origins[min(max(math.ceil(learn_share * origins.size), 1), origins.size - 1)]
    return rows[target_pos <= cut], rows[origin_pos >= cut]


def _shares(pit: np.ndarray, a: float) -> tuple[int, int, int]:
    below = int(np.sum(pit < a))
    above = int(np.sum(pit > 1 - a))
    return pit.size - below - above, below, above


def _level_row(level: int, before: np.ndarray, after: np.ndarray, n_learn: int) -> dict:
    a = band_probabilities(level)[0]
    row: dict = {"level": level, "n_scored": int(before.size), "n_learned": n_learn}
    for name, pit in (("before", before), ("after", after)):
        inside, below, above = _shares(pit, a)
        low, high = coverage_interval(inside, pit.size) if pit.size else (np.nan, np.nan)
        row.update({
            f"coverage_{name}": inside / pit.size if pit.size else np.nan,
            f"coverage_{name}_low": low, f"coverage_{name}_high": high,
            f"below_{name}": below / pit.size if pit.size else np.nan,
            f"above_{name}": above / pit.size if pit.size else np.nan,
        })
    return row


def nested_evaluation(results, *, learn_share: float = 0.5, levels=(50, 80, 95),
                      method: str | None = None, pseudo_count: float = PSEUDO_COUNT,
                      min_outcomes: int = MIN_OUTCOMES) -> pd.DataFrame:
    """Coverage before and after recalibration on origins the map never saw.

    Parameters
    ----------
    results : BacktestResult or sequence of BacktestResult
        One backtest, or the backtests of a panel's series (the map is then pooled
        per frequency, as :func:`~bayesgrowth.backtest.recalibrate.pooled_maps` does).
    learn_share : float, default 0.5
        See :func:`split_outcomes`.
    levels : sequence of int, default (50, 80, 95)
        Band levels in percent.
    method, pseudo_count, min_outcomes :
        As in :func:`~bayesgrowth.backtest.recalibrate.map_from_backtest`.

    Returns
    -------
    pandas.DataFrame
        One row per level: ``n_scored``, ``n_learned``, ``coverage_before`` and
        ``coverage_after`` with their Clopper-Pearson 95% intervals (``_low``,
        ``_high``), and the shares below and above the band before and after.
    """
    if not isinstance(results, Sequence):
        results = [results]
    groups: dict[str, list] = {}
    for r in results:
        learn, score = split_outcomes(r, learn_share=learn_share, method=method)
        floor = 0.5 / float(r.settings.get("n_draws", PREDICTIVE_DRAWS))
        groups.setdefault(r.series.axis.frequency, []).append((learn, score, floor))
    before, after, n_learn = [], [], 0
    for parts in groups.values():
        learn = pd.concat([p[0] for p in parts], ignore_index=True)
        score = pd.concat([p[1] for p in parts], ignore_index=True)
        qmap = learn_map(learn["pit"], learn["step"], horizon=int(score["step"].max()),
                         pseudo_count=pseudo_count, min_outcomes=min_outcomes,
                         pit_floor=min(p[2] for p in parts))
        pit = score["pit"].to_numpy(dtype=float)
        step = score["step"].to_numpy(dtype=int)
        before.append(pit)
        after.append(np.array([float(qmap.forward(u, s)) for u, s in zip(pit, step,
                                                                          strict=True)]))
        n_learn += len(learn)
    b, a = np.concatenate(before), np.concatenate(after)
    return pd.DataFrame([_level_row(int(lev), b, a, n_learn) for lev in levels])
