"""The local trend's likelihood at each node of ``theta``: filter, then integrate ``beta``.

Per node (one value of the noise, level-shock and growth-drift scales, the growth
persistence and, with drifting seasons, the seasonal drift's scale) the augmented
Kalman filter of :mod:`bayesgrowth.inference.kalman` (with drifting seasons,
:mod:`bayesgrowth.inference.kalman_season`) filters the log values and the columns of the
mean-path design at once; the linear coefficients ``beta`` (starting level, starting
growth, long-run growth, seasonal factors) are then integrated out against their normal
prior in closed form (:func:`integrate`). Everything carries a leading node axis, so one
call evaluates a whole grid. :mod:`bayesgrowth.inference.statespace` builds the grid and the
posterior.
"""

from __future__ import annotations

import math
import sys
from dataclasses import dataclass

import numpy as np

from bayesgrowth.inference.kalman import augmented_filter, gram_filter, integrate_compiled
from bayesgrowth.inference.kalman_season import gram_filter_season, season_filter

__all__ = ["Context", "design", "evaluate", "growth_loading", "innovations", "integrate",
           "use_compiled"]


@dataclass
class Context:
    """What the filter needs about the series, fixed across nodes."""

    idx: np.ndarray  # calendar positions of the observations, from 0
    y: np.ndarray  # log values
    season: np.ndarray | None  # seasonal design rows at the observations
    mu0: np.ndarray
    var0: np.ndarray
    long_run: bool  # the design has a long-run growth column
    n_seasons: int
    season_drift: bool = False  # the seasonal factors drift (the deviation in the state)


def growth_loading(rho: np.ndarray, j: np.ndarray) -> np.ndarray:
    """``w = sum_{i=1..j} rho^i``, the growth mean's loading on the level (``j`` at ``rho = 1``)."""
    r = rho[:, None]
    with np.errstate(divide="ignore", invalid="ignore"):
        w = r * (1 - r ** j[None, :]) / (1 - r)
    return np.where(r == 1.0, j[None, :].astype(float), w)


def design(ctx: Context, rho: np.ndarray, j: np.ndarray, season) -> np.ndarray:
    """Mean-path design ``(G, len(j), p)``: level, starting growth, long run, seasons."""
    jf = np.asarray(j, dtype=float)
    w = growth_loading(rho, jf)
    cols = [np.ones_like(w), w]
    if ctx.long_run:
        cols.append(jf[None, :] - w)
    x = np.stack(cols, axis=-1)
    if season is not None:
        x = np.concatenate([x, np.broadcast_to(season, (rho.size, *season.shape))], axis=-1)
    return x


def integrate(gram, logf, n: int, ctx: Context):
    """Marginal log likelihood and the normal posterior of ``beta`` per node.

    ``gram`` is ``V' diag(1/F) V`` of the filtered columns ``[y, X]``. With ``r =
    v_y - V_X mu0``, ``A = V_X' F^-1 V_X``, ``b = V_X' F^-1 r`` and ``S =
    diag(sd0)``, the log values are ``N(X mu0, L (F + V_X S S V_X') L')`` with
    ``|L| = 1``, so by the matrix determinant lemma and Woodbury's identity
    ``log p = -1/2 [n log 2 pi + sum log F + log|M| + r' F^-1 r - (S b)' M^-1 (S b)]``
    with ``M = I + S A S``, and ``beta | y ~ N(mu0 + S M^-1 S b, S M^-1 S)``.
    Zero prior sds (fixed coefficients) are handled without inverting ``S``.
    """
    mu0 = ctx.mu0
    a = gram[:, 1:, 1:]
    xy = gram[:, 1:, 0]
    amu = a @ mu0
    rr = gram[:, 0, 0] - 2 * xy @ mu0 + amu @ mu0
    b = xy - amu
    s = np.sqrt(ctx.var0)
    m = np.eye(s.size) + s[:, None] * a * s[None, :]
    chol = np.linalg.cholesky(m)
    sb = s * b
    z = np.linalg.solve(m, sb[..., None])[..., 0]
    logdet = 2 * np.log(np.diagonal(chol, axis1=1, axis2=2)).sum(axis=1)
    quad = rr - (sb * z).sum(axis=1)
    loglik = -0.5 * (n * math.log(2 * math.pi) + logf + logdet + quad)
    minv = np.linalg.inv(m)
    return loglik, mu0 + s * z, s[:, None] * minv * s[None, :]


#: Below this many node-observations the filter runs in numpy: compiling (or loading the
#: compiled kernel, about a second with numba's import) costs more than it saves. Once a
#: process has filtered ``_WARM`` node-observations in all (a backtest, a batch) or has
#: loaded numba anyway, the compiled kernel serves every size. Both count observations of
#: the quarterly design (seven filtered columns); the numpy filter's work grows with the
#: square of the columns, so a monthly design (fifteen) counts 4.6 times as much.
_COMPILE_ABOVE = 150_000
_COLUMNS = 7
_WARM = 2_000_000
_filtered = 0
_ROUTE = "auto"  # or "numpy", "compiled"


def use_compiled(work: int) -> bool:
    """Whether to filter ``work`` node-observations with the compiled kernel."""
    global _filtered
    if _ROUTE != "auto":
        return _ROUTE == "compiled"
    _filtered += work
    return work > _COMPILE_ABOVE or _filtered > _WARM or "numba" in sys.modules


def evaluate(ctx: Context, params: dict) -> dict:
    """Filter every node and integrate ``beta`` out."""
    states = ctx.n_seasons + 1 if ctx.season_drift else 2
    columns = 3 + int(ctx.long_run) + max(ctx.n_seasons - 1, 0)  # y, level, growth, ...
    work = params["sigma"].size * ctx.y.size * (states / 2) ** 2 * (columns / _COLUMNS) ** 2
    if not use_compiled(int(work)):
        res = _filter(ctx, params)
        v, f, state, state_cov = res.innovations, res.variance, res.state, res.state_cov
        gram = np.einsum("gni,gnj->gij", v / f[..., None], v)
        logf = np.log(f).sum(axis=1)
        loglik, bm, bc = integrate(gram, logf, ctx.y.size, ctx)
    elif ctx.season_drift:
        gram, logf, state, state_cov = gram_filter_season(
            ctx.y, ctx.season, ctx.idx, params["rho"], params["sigma_level"],
            params["sigma_growth"], params["sigma"], params["sigma_season"], ctx.n_seasons,
            ctx.long_run)
        loglik, bm, bc = integrate_compiled(gram, logf, ctx.y.size, ctx.mu0, ctx.var0)
    else:
        gram, logf, state, state_cov = gram_filter(
            ctx.y, ctx.season, ctx.idx, params["rho"], params["sigma_level"],
            params["sigma_growth"], params["sigma"], ctx.long_run)
        loglik, bm, bc = integrate_compiled(gram, logf, ctx.y.size, ctx.mu0, ctx.var0)
    return {"loglik": loglik, "beta_mean": bm, "beta_cov": bc, "state": state,
            "state_cov": state_cov}


def _filter(ctx: Context, params: dict):
    """The plain numpy filter of ``[y, X]`` per node (a :class:`FilterResult`)."""
    x = design(ctx, params["rho"], ctx.idx, ctx.season)
    data = np.concatenate([np.broadcast_to(ctx.y, (x.shape[0], ctx.y.size))[..., None], x],
                          axis=-1)
    if ctx.season_drift:
        return season_filter(data, ctx.idx, params["rho"], params["sigma_level"],
                             params["sigma_growth"], params["sigma"], params["sigma_season"],
                             ctx.n_seasons)
    return augmented_filter(data, ctx.idx, params["rho"], params["sigma_level"],
                            params["sigma_growth"], params["sigma"])


def innovations(ctx: Context, params: dict):
    """Innovations ``(G, n, 1 + p)`` and their variances ``(G, n)`` of ``[y, X]`` per node."""
    res = _filter(ctx, params)
    return res.innovations, res.variance
