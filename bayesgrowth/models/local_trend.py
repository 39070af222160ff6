"""The local trend as a Gaussian process in closed form, its states integrated out.

On the calendar grid ``j = 0, 1, ...`` from the first observation,

``level_j = level_{j-1} + growth_j + sigma_level z_j``,
``growth_j = c + rho (growth_{j-1} - c) + sigma_growth u_j`` (``rho = 1``, no ``c``,
for the random walk), ``level_0 = log a``, ``growth_0 = b``, ``z, u ~ Normal(0, 1)``.

Every level and growth is linear in the shocks, so given the scalar parameters
the log values are jointly normal: ``level = mean + sigma_growth A u + sigma_level
B z`` with ``A_jk = sum_{i=k..j} rho^(i-k) = (1 - rho^(j-k+1)) / (1 - rho)`` and
``B_jk = 1`` for ``k <= j``, and ``growth_j = mean + sigma_growth sum_k rho^(j-k)
u_k``. The likelihood is then the multivariate normal density of the
observations, which is what the Kalman filter computes (Durbin & Koopman 2012,
*Time Series Analysis by State Space Methods*, ch. 7: the prediction-error
decomposition). Sampling only the handful of scalar parameters avoids the badly
conditioned, funnel-shaped geometry of sampling the paths themselves.

The level's starting value ``log a``, the starting growth ``b``, the long-run
growth ``c`` (mean-reverting drift) and the seasonal factors enter the mean
linearly, and their priors are normal, so they too are integrated out while
sampling: with ``beta`` those coefficients, ``X`` their design and ``beta ~
N(mu0, diag(v0))``, the log values are normal with mean ``X mu0`` and covariance
``K + X diag(v0) X'``. NUTS then samples only the scales (and the persistences).
Sampled jointly with the scales, ``log a`` made a funnel: without level shocks
the first observation is the level plus noise, so ``log a`` tightens as the
noise scale shrinks (16 divergent transitions on the demo series, 52 s; none,
and 10-27 s depending on the machine's load, once integrated out). See
:mod:`bayesgrowth.models.linear`. Each draw's coefficients are drawn
afterwards from their exact normal conditional (:func:`draw_linear`), so the
posterior holds every parameter.

Pointwise log likelihoods are the one-step conditional densities
``p(y_i | y_1..y_{i-1})`` (from the Cholesky factor of the covariance), and
forecasts condition the joint normal of future values on the observed ones.
"""

from __future__ import annotations

import math

import numpy as np

from bayesgrowth.models import linear, season_drift
from bayesgrowth.models.parameters import (
    GROWTH,
    HALF_LIFE,
    LONG_RUN,
    half_life_line,
    long_run_line,
)
from bayesgrowth.models.registry import ModelFamily, Parameter, register

__all__ = [
    "FAMILY",
    "coefficients",
    "conditional_draws",
    "design",
    "draw_linear",
    "error_covariance",
    "log_likelihood",
]

_JITTER = 1e-10
_CHUNK = 250


def coefficients(rho: np.ndarray | None, n_grid: int, xp=np):
    """Shock loadings ``A`` (level), ``C`` (growth) and ``B`` (level shocks).

    Shapes ``(S, n_grid, n_grid - 1)`` when ``rho`` has ``S`` draws, or
    ``(n_grid, n_grid - 1)`` for the random walk (``rho=None``). With ``xp``
    ``pytensor.tensor`` and a scalar ``rho`` the matrices are symbolic.
    """
    j = np.arange(n_grid)[:, None]
    k = np.arange(1, n_grid)[None, :]
    on = (j >= k).astype(float)
    d = np.maximum(j - k, 0).astype(float)
    b = on
    if rho is None:
        return (d + 1) * on, on, b
    if xp is np:
        r = np.asarray(rho, dtype=float)[:, None, None]
        a = on * (1 - r ** (d + 1)) / (1 - r)
        c = on * r**d
        return a, c, b
    a = on * (1 - rho ** (d + 1)) / (1 - rho)
    c = on * rho**d
    return a, c, b


def mean_paths(draws: dict, n_grid: int, mean_reverting: bool):
    """Mean level and growth on the grid, ``(S, n_grid)`` each."""
    j = np.arange(n_grid, dtype=float)[None, :]
    log_a = np.asarray(draws["log_a"], dtype=float)[:, None]
    g0 = np.asarray(draws["log1p_g"], dtype=float)[:, None]
    if not mean_reverting:
        return log_a + j * g0, np.broadcast_to(g0, (g0.shape[0], n_grid))
    c = np.asarray(draws["long_run"], dtype=float)[:, None]
    r = np.asarray(draws["rho"], dtype=float)[:, None]
    growth = c + r**j * (g0 - c)
    level = log_a + j * c + (g0 - c) * r * (1 - r**j) / (1 - r)
    return level, growth


def error_covariance(sigma, phi, t: np.ndarray, xp=np):
    """Covariance of the errors at times ``t``: ``sigma^2 I`` or stationary AR(1).

    With NumPy ``sigma`` and ``phi`` are draws (or ``phi=None``) and the result
    is ``(S, n, n)``.
    """
    t = np.asarray(t, dtype=float)
    gap = np.abs(t[:, None] - t[None, :])
    if xp is np:
        s2 = np.asarray(sigma, dtype=float)[:, None, None] ** 2
        if phi is None:
            return s2 * np.eye(t.size)[None]
        p = np.asarray(phi, dtype=float)[:, None, None]
        return s2 / (1 - p**2) * p**gap
    if phi is None:
        return sigma**2 * np.eye(t.size)
    return sigma**2 / (1 - phi**2) * phi**gap


def _level_cov(draws, spec, n_grid, rows_a, rows_b, m=None):
    """``sigma_growth^2 A_r A_s' + sigma_level^2 B_r B_s'`` (+ seasonal drift's) for rows r, s."""
    rho = np.asarray(draws["rho"]) if spec.mean_reverting else None
    a, _, b = coefficients(rho, n_grid)
    sg2 = np.asarray(draws["sigma_growth"], dtype=float)[:, None, None] ** 2
    sl2 = np.asarray(draws["sigma_level"], dtype=float)[:, None, None] ** 2
    ar, as_ = a[..., rows_a, :], a[..., rows_b, :]
    br, bs = b[rows_a], b[rows_b]
    cov = sg2 * (ar @ np.swapaxes(as_, -1, -2)) + sl2 * (br @ bs.T)[None]
    if spec.season_drift:
        cov = cov + season_drift.drift_cov(draws, n_grid, rows_a, rows_b, m)
    return cov


def _chunks(draws: dict, n: int):
    for start in range(0, n, _CHUNK):
        yield {k: np.asarray(v)[start:start + _CHUNK] for k, v in draws.items()}


def log_likelihood(spec, draws: dict, t: np.ndarray, resid_mean: np.ndarray, t_ref: int):
    """One-step conditional log densities of the log values, ``(S, n)``.

    ``resid_mean`` is ``log y`` minus the seasonal factors, per draw ``(S, n)``.
    """
    t = np.asarray(t, dtype=int)
    idx = t - int(t_ref)
    n_grid = int(idx.max()) + 1
    out = []
    n_draws = resid_mean.shape[0]
    draws = {**draws, "_y": resid_mean}
    for d in _chunks(draws, n_draws):
        level, _ = mean_paths(d, n_grid, spec.mean_reverting)
        r = d["_y"] - level[:, idx]
        cov = _level_cov(d, spec, n_grid, idx, idx) + error_covariance(
            d["sigma"], d.get("phi") if spec.errors == "ar1" else None, t
        )
        cov = cov + _JITTER * np.eye(idx.size)
        chol = np.linalg.cholesky(cov)
        v = np.linalg.solve(chol, r[..., None])[..., 0]
        diag = np.diagonal(chol, axis1=-2, axis2=-1)
        out.append(-0.5 * v**2 - np.log(diag) - 0.5 * math.log(2 * math.pi))
    return np.concatenate(out, axis=0)


def conditional_draws(
    spec,
    draws: dict,
    t_obs: np.ndarray,
    resid_mean: np.ndarray,
    t_future: np.ndarray,
    t_ref: int,
    rng: np.random.Generator,
):
    """Draw future levels, future log values (seasons excluded) and the latest growth.

    Each posterior draw's joint normal of (observations, future levels, future
    values, growth in the last observed period) is conditioned on the observed
    values, and one draw is taken from the conditional.

    Returns
    -------
    level, value : numpy.ndarray, shape (S, H)
    growth_last : numpy.ndarray, shape (S,)
    """
    t_obs = np.asarray(t_obs, dtype=int)
    t_future = np.asarray(t_future, dtype=int)
    idx = t_obs - int(t_ref)
    fidx = t_future - int(t_ref)
    n_grid = int(max(idx.max(), fidx.max() if fidx.size else 0)) + 1
    n, h = idx.size, fidx.size
    levels, values, growths = [], [], []
    draws = {**draws, "_y": resid_mean}
    for d in _chunks(draws, resid_mean.shape[0]):
        cov, mean = _joint(spec, d, idx, fidx, np.concatenate([t_obs, t_future]), n_grid)
        x = _condition(cov, mean, d["_y"], n, rng)
        levels.append(x[:, :h])
        values.append(x[:, h:2 * h])
        growths.append(x[:, -1])
    return (np.concatenate(levels), np.concatenate(values), np.concatenate(growths))


def _joint(spec, d: dict, idx, fidx, t_all, n_grid: int):
    """Covariance and mean of (observations, future levels, future values, last growth)."""
    s = d["_y"].shape[0]
    n, h, j_last = idx.size, fidx.size, int(idx[-1])
    rho = np.asarray(d["rho"]) if spec.mean_reverting else None
    a, c, b = coefficients(rho, n_grid)
    if rho is None:
        a, c = np.broadcast_to(a, (s, *a.shape)), np.broadcast_to(c, (s, *c.shape))
    sg = np.asarray(d["sigma_growth"], dtype=float)[:, None, None]
    sl = np.asarray(d["sigma_level"], dtype=float)[:, None, None]
    rows = np.concatenate([idx, fidx])
    # loadings of [level at obs and future; growth at the last observation] on (u, z)
    load_u = np.concatenate([a[:, rows, :], c[:, [j_last], :]], axis=1) * sg
    load_z = np.concatenate(
        [np.broadcast_to(b[rows], (s, rows.size, n_grid - 1)),
         np.zeros((s, 1, n_grid - 1))], axis=1) * sl
    lat = load_u @ np.swapaxes(load_u, -1, -2) + load_z @ np.swapaxes(load_z, -1, -2)
    if spec.season_drift:  # the seasonal deviations load the levels, not the growth
        w = season_drift.drift_loadings(d, n_grid, rows, extra=1)
        lat = lat + w @ np.swapaxes(w, -1, -2)
    # add the errors: observations and future values get them, levels do not
    m = n + h
    k = n + 2 * h + 1
    sel = np.zeros((k, m + 1))  # map [obs levels, future levels, growth] -> outputs
    sel[:n, :n] = np.eye(n)
    sel[n:n + h, n:n + h] = np.eye(h)  # future levels
    sel[n + h:n + 2 * h, n:n + h] = np.eye(h)  # future values share the level
    sel[-1, -1] = 1.0
    cov = sel @ lat @ sel.T
    err = error_covariance(d["sigma"], d.get("phi") if spec.errors == "ar1" else None, t_all)
    pos = np.concatenate([np.arange(n), np.arange(n + h, n + 2 * h)])
    cov[:, pos[:, None], pos[None, :]] += err
    level_mean, growth_mean = mean_paths(d, n_grid, spec.mean_reverting)
    mean = np.concatenate(
        [level_mean[:, idx], level_mean[:, fidx], level_mean[:, fidx],
         growth_mean[:, [j_last]]], axis=1,
    )
    return cov, mean


def _condition(cov, mean, y, n: int, rng: np.random.Generator) -> np.ndarray:
    """One draw of the last rows of a joint normal given its first ``n`` rows equal ``y``."""
    s, k = mean.shape
    s_oo = cov[:, :n, :n] + _JITTER * np.eye(n)
    s_fo = cov[:, n:, :n]
    s_ff = cov[:, n:, n:]
    chol = np.linalg.cholesky(s_oo)
    gain = np.swapaxes(
        np.linalg.solve(np.swapaxes(chol, -1, -2), np.linalg.solve(chol, np.swapaxes(
            s_fo, -1, -2))), -1, -2)
    cmean = mean[:, n:] + (gain @ (y - mean[:, :n])[..., None])[..., 0]
    ccov = s_ff - gain @ np.swapaxes(s_fo, -1, -2)
    ccov = 0.5 * (ccov + np.swapaxes(ccov, -1, -2))
    evals, evecs = np.linalg.eigh(ccov)
    root = evecs * np.sqrt(np.clip(evals, 0, None))[:, None, :]
    return cmean + (root @ rng.standard_normal((s, k - n, 1)))[..., 0]


def design(spec, idx: np.ndarray, rho=None, season_rows=None, xp=np):
    """Design of the linear coefficients at grid positions ``idx``.

    Columns: ``1`` (log a); ``j`` for ``b`` under random-walk drift, or ``w_j =
    rho (1 - rho^j) / (1 - rho)`` for ``b`` and ``j - w_j`` for ``c`` under
    mean reversion; then the seasonal rows ``D Q`` (``season_rows``, ``(n, m - 1)``).
    With NumPy and ``rho`` draws the result is ``(S, n, p)``, else ``(n, p)``;
    with ``xp`` ``pytensor.tensor`` and a scalar ``rho`` it is symbolic.
    """
    j = np.asarray(idx, dtype=float)
    ones = np.ones_like(j)
    extra = [] if season_rows is None else [np.asarray(season_rows, dtype=float)]
    if not spec.mean_reverting:
        return np.column_stack([ones, j, *extra])
    if xp is np:
        r = np.asarray(rho, dtype=float)[:, None]
        w = r * (1 - r**j) / (1 - r)
        cols = [np.broadcast_to(ones, w.shape), w, j - w]
        out = np.stack(cols, axis=-1)
        if extra:
            out = np.concatenate(
                [out, np.broadcast_to(extra[0], (w.shape[0], *extra[0].shape))], axis=-1
            )
        return out
    w = rho * (1 - rho**j) / (1 - rho)
    return xp.concatenate(
        [xp.stack([xp.as_tensor(ones), w, j - w], axis=1), *(xp.as_tensor(e) for e in extra)],
        axis=1,
    )


def draw_linear(spec, priors, draws: dict, t, log_y, axis, rng: np.random.Generator) -> dict:
    """Complete scale draws with ``log_a``, ``log1p_g`` (``long_run``, ``season``).

    Each draw of the scales gets one draw of the linear coefficients from their
    normal conditional given the scales and the observed log values: with ``S =
    K + X V X'``, mean ``mu0 + V X' S^-1 (y - X mu0)`` and covariance ``V - V X'
    S^-1 X V`` (a fixed coefficient, variance 0, keeps its value). Prior draws
    (no observations) come from :func:`bayesgrowth.models.linear.prior_coefficients`.

    Parameters
    ----------
    spec : ModelSpec
    priors : ResolvedPriors
    draws : dict
        Flat draws of the scales (``sigma``, ``sigma_level``, ``sigma_growth`` and,
        where used, ``rho``, ``phi``), each ``(S,)``.
    t, log_y : numpy.ndarray
        Observed times and log values.
    axis : PeriodAxis or None
        Needed for seasonal factors.
    rng : numpy.random.Generator

    Returns
    -------
    dict
        ``draws`` plus the coefficients (``season`` shaped ``(S, m)``).
    """
    t = np.asarray(t, dtype=int)
    n_draws = np.asarray(draws["sigma"]).size
    m = linear.season_count(spec, axis)
    mu0, var0 = linear.linear_prior(spec, priors, m)
    p = mu0.size
    idx = t - int(priors.t_ref)
    n_grid = int(idx.max()) + 1
    rows, _ = linear.season_rows(spec, axis, t)
    y = np.asarray(log_y, dtype=float)
    out = []
    for d in _chunks(draws, n_draws):
        s = np.asarray(d["sigma"]).size
        x = design(spec, idx, d.get("rho"), rows)
        x = np.broadcast_to(x, (s, *x.shape[-2:]))
        k = _level_cov(d, spec, n_grid, idx, idx, m) + error_covariance(
            d["sigma"], d.get("phi") if spec.errors == "ar1" else None, t
        )
        xv = x * var0
        chol = np.linalg.cholesky(k + xv @ np.swapaxes(x, -1, -2) + _JITTER * np.eye(t.size))
        a = np.linalg.solve(chol, xv)
        r = np.linalg.solve(chol, (y - x @ mu0)[..., None])[..., 0]
        mean = mu0 + (np.swapaxes(a, -1, -2) @ r[..., None])[..., 0]
        cov = np.diag(var0) - np.swapaxes(a, -1, -2) @ a
        evals, evecs = np.linalg.eigh(0.5 * (cov + np.swapaxes(cov, -1, -2)))
        root = evecs * np.sqrt(np.clip(evals, 0, None))[:, None, :]
        out.append(mean + (root @ rng.standard_normal((s, p, 1)))[..., 0])
    beta = np.concatenate(out)
    return {**draws, **linear.split_coefficients(spec, beta, m, priors.fixed_initial,
                                                 priors.log_a_mu)}


def _parameter_names(spec) -> tuple[str, ...]:
    fades = spec.growth_fades
    return ("log1p_g", *(("long_run",) if fades else ()), "sigma_level", "sigma_growth",
            *(("sigma_season",) if spec.season_drift else ()),
            *(("rho", "half_life") if fades else ()))


def _prior_lines(resolved, spec) -> list[str]:
    lines = [long_run_line(resolved)] if spec.growth_fades else []
    lines.append(
        f"local trend: level shocks about {100 * math.expm1(resolved.level_shock_scale):.3g}%"
        f" per period, growth drifts about {100 * resolved.growth_drift_scale:.3g} points "
        f"per period ({spec.drift.replace('-', ' ')})"
    )
    if spec.growth_fades:
        lines.append(half_life_line(resolved, "half-life of growth when it fades"))
    if spec.season_drift:
        pct = 100 * math.expm1(resolved.season_drift_scale)
        lines.append(f"drifting seasons: shocks of about {pct:.3g}% per period move the factors")
    return lines


FAMILY = register(ModelFamily(
    name="local-trend",
    summary="level and growth rate move over time; growth may fade toward a long-run rate",
    parameters=(
        GROWTH,
        LONG_RUN,
        Parameter("sigma_level", "sd of the per-period shocks to the log level"),
        Parameter("sigma_growth", "sd of the per-period change of the log growth rate"),
        Parameter("sigma_season", "sd of the per-period shocks to drifting seasonal factors"),
        Parameter("rho", "per-period persistence of growth above the long-run rate"),
        HALF_LIFE,
    ),
    log_mean=None,
    prior_lines=_prior_lines,
    engines=("state-space", "nuts"),
    bends=True,
    states=True,
    spec_parameters=_parameter_names,
    drifts=True,
    named_options={"drift": "random-walk"},
    auto_seasonal=True,
    # its NUTS fit is the slowest: minutes until its coefficients were integrated out,
    # about 10-25 s on the demo now (see docs/choosing-models.md)
    compare_by_default=False,
))
