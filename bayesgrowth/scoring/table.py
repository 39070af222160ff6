"""Summary table of backtest scores, one row per method and step."""

from __future__ import annotations

from collections.abc import Sequence

import numpy as np
import pandas as pd

from bayesgrowth.scoring.intervals import (
    abs_pct_error,
    coverage_counts,
    coverage_interval,
    interval_score,
)
from bayesgrowth.scoring.pit import pit_uniformity
from bayesgrowth.scoring.verdict import calibration_verdict, combine_verdicts

__all__ = ["ALL_STEPS", "score_table"]

ALL_STEPS = "all"


def _check_levels(levels: Sequence[int]) -> list[int]:
    out = []
    for lev in levels:
        if isinstance(lev, bool) or not isinstance(lev, (int, np.integer)) or not 0 < lev < 100:
            raise ValueError(f"levels must be whole percentages in (0, 100), got {lev!r}")
        out.append(int(lev))
    if not out:
        raise ValueError("levels must name at least one band level")
    return out


def _summarise(group: pd.DataFrame, levels: list[int], ci_level: float, min_n: int) -> dict:
    y = group["actual"].to_numpy(dtype=float)
    row: dict = {"n": int(len(group))}
    verdicts = []
    for lev in levels:
        lo = group[f"lower_{lev}"].to_numpy(dtype=float)
        hi = group[f"upper_{lev}"].to_numpy(dtype=float)
        k, n = coverage_counts(y, lo, hi)
        if n:
            c_lo, c_hi = coverage_interval(k, n, level=ci_level)
            cov = k / n
        else:
            cov = c_lo = c_hi = float("nan")
        row[f"coverage_{lev}"] = cov
        row[f"coverage_{lev}_low"] = c_lo
        row[f"coverage_{lev}_high"] = c_hi
        row[f"interval_score_{lev}"] = float(np.mean(interval_score(y, lo, hi, 1 - lev / 100)))
        verdicts.append(calibration_verdict(k, n, lev / 100, level=ci_level, min_n=min_n))
    row["crps"] = float(group["crps"].to_numpy(dtype=float).mean())
    row["log_score"] = float(group["log_score"].to_numpy(dtype=float).mean())
    row["abs_pct_error_median"] = float(
        np.mean(abs_pct_error(y, group["median"].to_numpy(dtype=float)))
    )
    row["pit_ks_pvalue"] = pit_uniformity(group["pit"].to_numpy(dtype=float))
    row["verdict"] = combine_verdicts(verdicts)
    return row


def score_table(
    frame: pd.DataFrame,
    levels: Sequence[int] = (50, 80, 95),
    ci_level: float = 0.95,
    min_n: int = 10,
) -> pd.DataFrame:
    """Summarise per-forecast scores by method and forecast step.

    Parameters
    ----------
    frame : pandas.DataFrame
        One row per method, origin and step, with columns ``method``,
        ``origin``, ``step``, ``actual``, ``median``, ``lower_L`` and
        ``upper_L`` for each level ``L``, and the per-row scores ``pit``,
        ``crps`` and ``log_score``. Rows whose ``actual`` is NaN are dropped.
    levels : sequence of int, default (50, 80, 95)
        Band levels in percent; each needs its ``lower_L``/``upper_L``.
    ci_level : float, default 0.95
        Confidence level of the binomial coverage intervals.
    min_n : int, default 10
        Fewest outcomes for a calibration verdict.

    Returns
    -------
    pandas.DataFrame
        One row per method and step (ascending), then one row with step
        ``"all"`` pooling every step of that method; methods in order of
        first appearance. Columns: ``method``, ``step``, ``n``, and for each
        level ``L``: ``coverage_L``, ``coverage_L_low``, ``coverage_L_high``
        (Clopper-Pearson interval) and ``interval_score_L`` (mean); then the
        means ``crps``, ``log_score``, ``abs_pct_error_median`` (percent),
        ``pit_ks_pvalue`` (:func:`~bayesgrowth.scoring.pit.pit_uniformity`)
        and ``verdict`` (combined over levels,
        :func:`~bayesgrowth.scoring.verdict.combine_verdicts`). A NaN score
        in a group gives a NaN mean, so missing scores are not hidden.

        Rows of the same origin are dependent, and the ``"all"`` row pools
        several steps of each origin, so its intervals and p-value are
        optimistic (too narrow, too small).

    Raises
    ------
    ValueError
        If a needed column is missing or a level is invalid.
    """
    levs = _check_levels(levels)
    needed = ["method", "origin", "step", "actual", "median", "pit", "crps", "log_score"]
    needed += [f"{side}_{lev}" for lev in levs for side in ("lower", "upper")]
    missing = [c for c in needed if c not in frame.columns]
    if missing:
        raise ValueError(f"score_table: frame lacks column(s) {', '.join(missing)}")
    data = frame.loc[frame["actual"].notna(), needed]
    rows = []
    for method in pd.unique(data["method"]):
        sub = data[data["method"] == method]
        for step in sorted(pd.unique(sub["step"])):
            rows.append(
                {"method": method, "step": step}
                | _summarise(sub[sub["step"] == step], levs, ci_level, min_n)
            )
        rows.append({"method": method, "step": ALL_STEPS} | _summarise(sub, levs, ci_level, min_n))
    columns = ["method", "step", "n"]
    for lev in levs:
        columns += [
            f"coverage_{lev}",
            f"coverage_{lev}_low",
            f"coverage_{lev}_high",
            f"interval_score_{lev}",
        ]
    columns += ["crps", "log_score", "abs_pct_error_median", "pit_ks_pvalue", "verdict"]
    out = pd.DataFrame(rows, columns=columns)
    out["step"] = out["step"].astype(object)
    return out
