"""Scores of the real-data benchmark, per series and aggregated with bootstrap intervals.

Per series (averaged over the hold-out steps):

* ``inside_80``, ``inside_95`` - share of hold-out values inside the central 80% / 95% band;
* ``below_95``, ``above_95`` - share below the 2.5% / above the 97.5% quantile;
* ``msis`` - mean scaled interval score of the 95% band (M4 Competitor's Guide, 2018):
  ``mean[(U - L) + (2/a)(L - y)1{y < L} + (2/a)(y - U)1{y > U}] / scale`` with ``a = 0.05``;
* ``scaled_crps`` - CRPS by the quantile decomposition ``CRPS = 2 int_0^1 QS_tau dtau``
  (Gneiting & Ranjan 2011, JBES 29(3):411-422), approximated by twice the mean pinball loss
  over the 99 levels 0.01..0.99, divided by ``scale``;
* ``smape`` - symmetric MAPE of the median (M4 Competitor's Guide):
  ``(200 / h) sum |y - F| / (|y| + |F|)``, in percent;
* ``mase`` - mean absolute error of the median divided by ``scale``.

``scale`` is the in-sample mean absolute seasonal difference
``mean_{t > m} |y_t - y_{t-m}|`` with ``m`` the seasonal period (1, 4 or 12), as in M4.
"""

from __future__ import annotations

import zlib
from collections.abc import Sequence

import numpy as np
import pandas as pd

__all__ = [
    "CRPS_LEVELS",
    "PROBS",
    "SCORE_COLUMNS",
    "crps_from_quantiles",
    "mase",
    "msis",
    "pinball",
    "score_series",
    "seasonal_scale",
    "smape",
    "summarise",
]

#: The 99 quantile levels of the CRPS approximation.
CRPS_LEVELS = np.round(np.arange(1, 100) / 100, 2)
#: Every probability a predictive is asked for: the CRPS levels and the 95% band ends.
PROBS = np.union1d(CRPS_LEVELS, [0.025, 0.975])
#: Per-series score columns, in table order.
SCORE_COLUMNS = (
    "inside_80", "inside_95", "below_95", "above_95", "msis", "scaled_crps", "smape", "mase",
)


def _at(quantiles: np.ndarray, p: float) -> np.ndarray:
    return quantiles[int(np.flatnonzero(np.isclose(PROBS, p))[0])]


def pinball(quantiles: np.ndarray, y: np.ndarray, levels: np.ndarray) -> np.ndarray:
    """Pinball (quantile) loss ``(1{y < q} - tau)(q - y)`` per level and step.

    Parameters
    ----------
    quantiles : numpy.ndarray, shape (k, h)
    y : numpy.ndarray, shape (h,)
    levels : numpy.ndarray, shape (k,)
    """
    q = np.asarray(quantiles, dtype=float)
    obs = np.asarray(y, dtype=float)[None, :]
    tau = np.asarray(levels, dtype=float)[:, None]
    return ((obs < q).astype(float) - tau) * (q - obs)


def crps_from_quantiles(quantiles: np.ndarray, y: np.ndarray, levels: np.ndarray) -> np.ndarray:
    """CRPS per step, approximated as twice the mean pinball loss over ``levels``."""
    return 2.0 * pinball(quantiles, y, levels).mean(axis=0)


def seasonal_scale(train: np.ndarray, period: int) -> float:
    """In-sample mean absolute seasonal difference (lag ``period``); NaN if none exists."""
    y = np.asarray(train, dtype=float)
    if y.size <= period:
        return float("nan")
    return float(np.mean(np.abs(y[period:] - y[:-period])))


def msis(y: np.ndarray, lower: np.ndarray, upper: np.ndarray, scale: float,
         alpha: float = 0.05) -> float:
    """Mean scaled interval score of a central ``1 - alpha`` band (M4 definition)."""
    y, lo, hi = (np.asarray(a, dtype=float) for a in (y, lower, upper))
    score = (hi - lo) + (2 / alpha) * np.maximum(lo - y, 0) + (2 / alpha) * np.maximum(y - hi, 0)
    return float(np.mean(score) / scale)


def smape(y: np.ndarray, forecast: np.ndarray) -> float:
    """Symmetric MAPE in percent (M4 definition)."""
    y, f = np.asarray(y, dtype=float), np.asarray(forecast, dtype=float)
    return float(200 * np.mean(np.abs(y - f) / (np.abs(y) + np.abs(f))))


def mase(y: np.ndarray, forecast: np.ndarray, scale: float) -> float:
    """Mean absolute scaled error of a point forecast."""
    y, f = np.asarray(y, dtype=float), np.asarray(forecast, dtype=float)
    return float(np.mean(np.abs(y - f)) / scale)


def score_series(train: np.ndarray, test: np.ndarray, period: int,
                 quantiles: np.ndarray) -> dict[str, float]:
    """Every per-series score from the predictive's quantiles at :data:`PROBS`.

    Parameters
    ----------
    train, test : numpy.ndarray
        Training part (for the scale) and hold-out.
    period : int
        Seasonal period of the scale.
    quantiles : numpy.ndarray, shape (len(PROBS), h)

    Raises
    ------
    ValueError
        If the quantiles have the wrong shape, are not finite or decrease in probability.
    """
    q = np.asarray(quantiles, dtype=float)
    y = np.asarray(test, dtype=float)
    if q.shape != (PROBS.size, y.size):
        raise ValueError(f"quantiles have shape {q.shape}, expected {(PROBS.size, y.size)}")
    if not np.all(np.isfinite(q)):
        raise ValueError("the predictive's quantiles are not all finite")
    if np.any(np.diff(q, axis=0) < -1e-9 * np.abs(q[1:]).max()):
        raise ValueError("the predictive's quantiles decrease with the probability")
    scale = seasonal_scale(train, period)
    lo80, hi80, lo95, hi95, median = (_at(q, p) for p in (0.1, 0.9, 0.025, 0.975, 0.5))
    crps_q = q[np.isin(PROBS, CRPS_LEVELS)]
    return {
        "inside_80": float(np.mean((y >= lo80) & (y <= hi80))),
        "inside_95": float(np.mean((y >= lo95) & (y <= hi95))),
        "below_95": float(np.mean(y < lo95)),
        "above_95": float(np.mean(y > hi95)),
        "msis": msis(y, lo95, hi95, scale),
        "scaled_crps": float(crps_from_quantiles(crps_q, y, CRPS_LEVELS).mean() / scale),
        "smape": smape(y, median),
        "mase": mase(y, median, scale),
    }


def _bootstrap_share(inside: np.ndarray, points: np.ndarray, rng: np.random.Generator,
                     n_boot: int) -> tuple[float, float]:
    """95% percentile interval of ``sum(inside) / sum(points)``, resampling whole series."""
    idx = rng.integers(0, inside.size, size=(n_boot, inside.size))
    shares = inside[idx].sum(axis=1) / points[idx].sum(axis=1)
    lo, hi = np.quantile(shares, [0.025, 0.975])
    return float(lo), float(hi)


def _summary_row(rows: pd.DataFrame, rng: np.random.Generator, n_boot: int) -> dict:
    ok = rows[rows["ok"]]
    out = {"series": int(len(rows)), "failed": int((~rows["ok"]).sum()),
           "points": int(ok["h"].sum())}
    points = ok["h"].to_numpy(dtype=float)
    for col in ("inside_80", "inside_95", "below_95", "above_95"):
        counts = ok[col].to_numpy(dtype=float) * points
        out[col] = float(counts.sum() / points.sum()) if points.size else float("nan")
        if col.startswith("inside"):
            lo, hi = _bootstrap_share(counts, points, rng, n_boot) if points.size else (
                float("nan"), float("nan"))
            out[f"{col}_lo"], out[f"{col}_hi"] = lo, hi
    for col in ("msis", "scaled_crps", "smape", "mase"):
        out[col] = float(ok[col].mean()) if len(ok) else float("nan")
    for col in ("msis", "scaled_crps"):
        out[f"{col}_median"] = float(ok[col].median()) if len(ok) else float("nan")
    for col in ("seconds", "cpu_seconds"):
        out[f"{col}_mean"] = float(rows[col].mean())
        out[f"{col}_total"] = float(rows[col].sum())
    return out


def summarise(scores: pd.DataFrame, n_boot: int = 2000, seed: int = 0,
              methods: Sequence[str] | None = None) -> pd.DataFrame:
    """One row per method and group (each collection and frequency, then ``pooled``).

    Coverage shares pool the hold-out points of the group's successful fits (each point
    counts once, as in the M4 coverage measure); their 95% intervals come from
    ``n_boot`` bootstrap resamples of whole series (seeded). The other scores are means
    over successful series (``msis_median`` and ``scaled_crps_median`` their medians, less
    swayed by the few series whose log-scale bands explode); seconds are over every attempt.

    Parameters
    ----------
    scores : pandas.DataFrame
        Per-series rows with ``collection``, ``frequency``, ``method``, ``ok``, ``h``,
        ``seconds``, ``cpu_seconds`` and :data:`SCORE_COLUMNS`.
    n_boot : int
    seed : int
    methods : sequence of str, optional
        Method order of the output; defaults to the order of first appearance.
    """
    methods = list(methods or dict.fromkeys(scores["method"]))
    frame = scores.assign(group=scores["collection"] + " " + scores["frequency"])
    groups = list(dict.fromkeys(frame["group"])) + ["pooled"]
    rows = []
    for group in groups:
        in_group = frame if group == "pooled" else frame[frame["group"] == group]
        for method in methods:
            sel = in_group[in_group["method"] == method]
            if sel.empty:
                continue
            rng = np.random.default_rng([seed, zlib.crc32(f"{group}|{method}".encode())])
            rows.append({"group": group, "method": method, **_summary_row(sel, rng, n_boot)})
    return pd.DataFrame(rows)
