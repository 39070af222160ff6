"""Ranking backtested models by a proper score, with the uncertainty of every difference.

Two models forecast the same cases (origin and step) in a backtest, so they are
compared case by case: the loss difference ``d = L_A - L_B`` of each shared case
(CRPS by default, a proper score; the interval score or the log score on request).
Its mean says which model did better on this history; whether that is more than
luck is the Diebold-Mariano question (Diebold & Mariano 1995, "Comparing
predictive accuracy", Journal of Business & Economic Statistics 13(3), 253-263):
``DM = mean(d) / se(mean(d))``.

The standard error must allow for dependence. Forecasts of steps 1..H from one
origin share the origin's estimation error, and forecasts from origins less than
H apart share target periods, so differences are correlated within an origin and
across neighbouring origins. The variance used here sums the centred differences
within each origin and applies Newey-West (Bartlett) weights across origins up to
``ceil(H / stride) - 1`` lags, the origins whose targets overlap (Newey & West
1987, Econometrica 55(3); summing within a time period first is the Driscoll &
Kraay 1998 panel form, statsmodels' ``cov_nw_groupsum``). For one step at a time
it is the usual Newey-West Diebold-Mariano variance with ``h - 1`` lags for
``h``-step forecasts. The statistic is then multiplied by the small-sample factor
``sqrt((n + 1 - 2h + h(h - 1) / n) / n)`` of Harvey, Leybourne & Newbold (1997,
"Testing the equality of prediction mean squared errors", International Journal
of Forecasting 13(2), 281-291), with ``n`` the origins and ``h = lags + 1``, and
its two-sided p-value taken from Student's t with ``n - 1`` degrees of freedom, as
they recommend. (Their factor was derived for the uniform kernel; with the
Bartlett weights it is an approximation.)

How honest the p-values are was measured by simulation
(``benchmarks/ranking_size.py``: loss differences with no true difference and
moving-average dependence over 4 origins, 3,000 runs): at a nominal 5% the test
said "better" 10% of the time with 60 origins and 14% with 12 (12.5% and 26%
without the small-sample factor; 32% and 38% if the dependence is ignored). With
a dozen origins, read p-values up to about 0.1 as "unclear".

Caveats: with few origins the variance estimate is itself noisy, so p-values near
the threshold mean "unclear"; CRPS is in the value's units, so on a growing series
later origins weigh more; the test asks whether the models forecast equally well on
this history, not which one is right.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pandas as pd

from bayesgrowth.scoring.intervals import interval_score
from bayesgrowth.scoring.table import ALL_STEPS

__all__ = [
    "PairedDifference",
    "case_losses",
    "diebold_mariano",
    "newey_west_lags",
    "rank_models",
    "ranking_lines",
]

#: Scores a ranking can use (``interval_score_L`` for any backtest level ``L``).
SCORES = ("crps", "log_score", "interval_score_L")
#: Threshold of "A better than B" in the verdicts (common practice, no single source).
ALPHA = 0.05


@dataclass(frozen=True)
class PairedDifference:
    """Mean loss difference of two models over shared cases, with its uncertainty.

    Attributes
    ----------
    n : int
        Shared cases.
    n_origins : int
        Origins (groups) they come from.
    mean : float
        Mean of ``d = L_A - L_B``; negative means A did better.
    se : float
        Standard error of the mean (Newey-West over origins).
    stat : float
        The Diebold-Mariano statistic, ``mean / se`` with the small-sample factor.
    pvalue : float
        Two-sided, from Student's t with ``n_origins - 1`` degrees of freedom.
    lags : int
        Newey-West lags used.
    """

    n: int
    n_origins: int
    mean: float
    se: float
    stat: float
    pvalue: float
    lags: int


def newey_west_lags(step: int, stride: int = 1) -> int:
    """Lags of the variance for ``step``-ahead forecasts from origins ``stride`` apart.

    Origins closer than ``step`` periods share target periods: ``ceil(step / stride) - 1``.
    """
    return max(0, math.ceil(int(step) / int(stride)) - 1)


def diebold_mariano(diff, *, lags: int, groups=None, small_sample: bool = True
                    ) -> PairedDifference:
    """Diebold-Mariano comparison of two forecasts from their loss differences.

    Parameters
    ----------
    diff : array_like, shape (n,)
        Loss differences ``L_A - L_B``, one per shared case, in time order.
    lags : int
        Newey-West lags (Bartlett weights ``1 - j / (lags + 1)``), counted in
        origins; at most (origins - 2) are used.
    groups : array_like of int, shape (n,), optional
        Origin number (0, 1, ... in time order) of each case; the centred differences
        are summed per origin before the weights apply. Default: each case its own
        origin, in the order given (the plain Newey-West variance).
    small_sample : bool, default True
        Multiply the statistic by the Harvey-Leybourne-Newbold factor (see the
        module docstring).

    Returns
    -------
    PairedDifference
        ``se`` is the Newey-West standard error of the mean difference; ``stat``
        is ``mean / se`` times the small-sample factor.

    Notes
    -----
    ``Var(mean) = [sum_g S_g^2 + 2 sum_j w_j sum_g S_g S_{g-j}] / n^2`` with ``S_g``
    the sum of ``d_i - mean(d)`` over origin ``g`` and ``n`` the cases; with one
    case per origin this is the Newey-West long-run variance over ``n``. An
    identical pair of forecasts (every difference zero) gets a NaN statistic and
    p-value 1.
    """
    from scipy import stats

    d = np.asarray(diff, dtype=float)
    if d.ndim != 1 or not np.isfinite(d).all():
        raise ValueError("loss differences must be a finite one-dimensional array")
    if d.size == 0:
        raise ValueError("no shared cases to compare")
    g = np.arange(d.size) if groups is None else np.asarray(groups, dtype=int)
    n_groups = int(np.unique(g).size)
    lags = int(min(max(lags, 0), max(n_groups - 2, 0)))
    mean = float(d.mean())
    sums = np.bincount(g - g.min(), weights=d - mean)
    var = float(sums @ sums)
    for j in range(1, lags + 1):
        var += 2 * (1 - j / (lags + 1)) * float(sums[j:] @ sums[:-j])
    se = math.sqrt(max(var, 0.0)) / d.size
    if se == 0 or n_groups < 3:
        pvalue = 1.0 if np.all(d == 0) else float("nan")
        return PairedDifference(d.size, n_groups, mean, se, float("nan"), pvalue, lags)
    stat = mean / se
    if small_sample:
        h, m = lags + 1, n_groups
        stat *= math.sqrt((m + 1 - 2 * h + h * (h - 1) / m) / m)
    pvalue = float(2 * stats.t.sf(abs(stat), df=n_groups - 1))
    return PairedDifference(d.size, n_groups, mean, se, stat, pvalue, lags)


def _loss(forecasts: pd.DataFrame, score: str) -> pd.Series:
    if score in ("crps", "log_score"):
        return forecasts[score].astype(float)
    if score.startswith("interval_score_"):
        level = score.removeprefix("interval_score_")
        lo, hi = f"lower_{level}", f"upper_{level}"
        if not level.isdigit() or lo not in forecasts.columns:
            raise ValueError(f"score {score!r}: the backtest has no {level}% bands")
        values = interval_score(forecasts["actual"], forecasts[lo], forecasts[hi],
                                1 - int(level) / 100)
        return pd.Series(np.asarray(values, dtype=float), index=forecasts.index)
    raise ValueError(f"unknown score {score!r}; choose from {', '.join(SCORES)}")


def case_losses(forecasts: pd.DataFrame, score: str = "crps") -> pd.DataFrame:
    """Loss of every model at every case, NaN where a model has no finite loss.

    Rows are the cases ``(origin, step)`` in time order, columns the models (the
    ``method`` column).

    Parameters
    ----------
    forecasts : pandas.DataFrame
        :attr:`bayesgrowth.backtest.BacktestResult.forecasts`.
    score : str, default "crps"
        ``"crps"``, ``"log_score"`` or ``"interval_score_L"`` (lower is better for each).

    Returns
    -------
    pandas.DataFrame
    """
    frame = forecasts.assign(_loss=_loss(forecasts, score))
    frame["_loss"] = frame["_loss"].where(np.isfinite(frame["_loss"]))
    origins = list(pd.unique(frame["origin"]))
    table = frame.pivot_table(index=["origin", "step"], columns="method", values="_loss",
                              aggfunc="first", dropna=False, sort=False)
    order = sorted(table.index, key=lambda k: (origins.index(k[0]), k[1]))
    models = [m for m in pd.unique(frame["method"]) if m in table.columns]
    return table.loc[order, models]


def _compare(losses: pd.DataFrame, a: str, b: str, step, stride: int) -> PairedDifference:
    rows = losses if step == ALL_STEPS else losses[losses.index.get_level_values("step") == step]
    origins = rows.index.get_level_values("origin")
    codes = pd.Index(pd.unique(losses.index.get_level_values("origin"))).get_indexer(origins)
    max_step = int(losses.index.get_level_values("step").max()) if step == ALL_STEPS else step
    return diebold_mariano((rows[a] - rows[b]).to_numpy(), groups=codes,
                           lags=newey_west_lags(max_step, stride))


def _rank_step(losses: pd.DataFrame, step, stride: int, alpha: float) -> list[dict]:
    means = losses.mean().sort_values(kind="stable")
    best = str(means.index[0])
    rows = []
    for rank, (model, mean) in enumerate(means.items(), start=1):
        row = {"step": step, "rank": rank, "method": model, "mean": float(mean),
               "n_cases": int(len(losses)),
               "n_origins": int(losses.index.get_level_values("origin").nunique()), "vs": best}
        if model == best:
            rows.append({**row, "diff": 0.0, "diff_pct": 0.0, "verdict": "best"})
            continue
        p = _compare(losses, model, best, step, stride)
        if math.isnan(p.pvalue):
            verdict = "not tested (too few origins, or no spread in the differences)"
        elif p.pvalue < alpha and p.mean > 0:
            verdict = f"{best} better"
        else:
            verdict = f"no clear difference from {best}"
        rows.append({**row, "diff": p.mean, "diff_pct": 100 * p.mean / abs(means[best]),
                     "diff_se": p.se, "dm_stat": p.stat, "p_value": p.pvalue, "lags": p.lags,
                     "verdict": verdict})
    return rows


def rank_models(forecasts: pd.DataFrame, *, score: str = "crps", stride: int = 1,
                alpha: float = ALPHA) -> pd.DataFrame:
    """Rank models by mean score over the cases all of them forecast, each against the best.

    Parameters
    ----------
    forecasts : pandas.DataFrame
        :attr:`bayesgrowth.backtest.BacktestResult.forecasts`.
    score : str, default "crps"
        Proper score to rank by (see :func:`case_losses`); lower is better.
    stride : int, default 1
        Points between the backtest's origins (sets the Newey-West lags).
    alpha : float, default 0.05
        Threshold of the verdict "best better".

    Returns
    -------
    pandas.DataFrame
        For step ``"all"`` and then each step, one row per model with a finite
        score: ``step``, ``score``, ``rank``, ``method``, ``mean``, ``n_cases``,
        ``n_origins``, ``vs`` (the best model of that step), ``diff`` (mean minus
        the best's), ``diff_pct`` (that in percent of the best's mean), ``diff_se``,
        ``dm_stat``, ``p_value``, ``lags`` (empty for the best) and ``verdict``.
        Models without the score (a point forecast has no interval or log score)
        are left out.
    """
    losses = case_losses(forecasts, score).dropna(axis=1, how="all").dropna(axis=0)
    if losses.empty:
        raise ValueError(f"no case has a finite {score} for every model")
    rows = _rank_step(losses, ALL_STEPS, stride, alpha)
    for step in sorted(pd.unique(losses.index.get_level_values("step"))):
        part = losses[losses.index.get_level_values("step") == step]
        rows += _rank_step(part, int(step), stride, alpha)
    columns = ["step", "score", "rank", "method", "mean", "n_cases", "n_origins", "vs", "diff",
               "diff_pct", "diff_se", "dm_stat", "p_value", "lags", "verdict"]
    return pd.DataFrame(rows).assign(score=score).reindex(columns=columns)


def ranking_lines(ranking: pd.DataFrame) -> list[str]:
    """The printed summary of :func:`rank_models` (its ``"all"`` step), one line per model."""
    rows = ranking[ranking["step"].astype(str) == ALL_STEPS]
    first = rows.iloc[0]
    name = {"crps": "CRPS", "log_score": "log score"}.get(first["score"], first["score"])
    width = max(len(str(m)) for m in rows["method"])
    lines = [f"ranking by mean {name} over the {first['n_cases']} forecasts every model made "
             f"({first['n_origins']} origins; lower is better), each against the best with "
             "its standard error and a Diebold-Mariano test:"]
    for r in rows.itertuples():
        head = f"  {r.rank}. {r.method:<{width}}  {r.mean:,.4g}"
        if r.verdict == "best":
            lines.append(f"{head}  (best)")
            continue
        pct = f"{r.diff_pct:+.1f}%" if abs(r.diff_pct) < 10 else f"{r.diff_pct:+.0f}%"
        lines.append(f"{head}  {r.diff:+,.3g} ({pct}), standard error {r.diff_se:,.2g}, "
                     f"p = {r.p_value:.2g}: {r.verdict}")
    if len(rows) > 1:
        lines.append(f"  (the test allows for forecasts that share periods, but with "
                     f"{first['n_origins']} origins its p-values run small: read p up to about "
                     "0.1 as unclear)")
    return lines

