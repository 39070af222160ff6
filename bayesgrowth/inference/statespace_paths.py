"""Forecasts of the exact local-trend posterior: normal moments per node, and joint paths.

Given a node's parameters and the linear coefficients ``beta``, the state at the last
observation is normal (the filter's), and every future period adds its shocks: growth
and level shocks, and with drifting seasons the seasonal deviation's
(:mod:`bayesgrowth.inference.kalman_season`). :func:`predictive` integrates ``beta``
out in closed form per node; :func:`simulate` runs the state forward for draws.
"""

from __future__ import annotations

import numpy as np

from bayesgrowth.inference.kalman_season import season_loadings
from bayesgrowth.inference.statespace_nodes import design, growth_loading
from bayesgrowth.models.season_drift import impulse

__all__ = ["predictive", "shock_terms", "simulate"]


def _drifts(post) -> bool:
    return bool(post._ctx.season_drift)


def predictive(post, t_future: np.ndarray, joint: bool = True,
               nodes: np.ndarray | None = None) -> dict:
    """Normal forecast of future log values per node of ``post`` (a StateSpacePosterior).

    The future level is ``g @ beta + z @ state`` with ``z`` the loading of the state at
    the last observation (level, growth and, with drifting seasons, the seasonal
    deviations), plus the future shocks; ``beta`` and the state are normal.

    Returns
    -------
    dict
        ``mean`` ``(G, H)``; ``curve_cov``/``value_cov`` (joint) or
        ``curve_var``/``value_var`` ``(G, H)``: the level alone, and the level plus noise.
    """
    sel = slice(None) if nodes is None else np.asarray(nodes)
    ctx, p = post._ctx, {k: v[sel] for k, v in post.params.items()}
    state, state_cov = post._state[sel], post._state_cov[sel]
    beta_mean, beta_cov = post.beta_mean[sel], post.beta_cov[sel]
    jf = np.asarray(t_future, dtype=int) - post.t_ref
    steps = jf - int(ctx.idx[-1])
    if not joint and not _drifts(post):
        return _plain_marginal(post, p, state, state_cov, beta_mean, beta_cov, jf, steps)
    rho = p["rho"]
    xf = design(ctx, rho, jf, post._season_rows(t_future))
    z = np.stack([np.ones((rho.size, steps.size)),
                  growth_loading(rho, steps.astype(float))], axis=-1)
    if _drifts(post):
        c = season_loadings(ctx.n_seasons, steps)
        z = np.concatenate([z, np.broadcast_to(c, (rho.size, *c.shape))], axis=-1)
    ay, ax = state[:, :, 0], state[:, :, 1:]
    g = xf - z @ ax
    mean = (g @ beta_mean[..., None])[..., 0] + (z @ ay[..., None])[..., 0]
    gb = g @ beta_cov
    if joint:
        cov = gb @ np.swapaxes(g, 1, 2) + z @ state_cov @ np.swapaxes(z, 1, 2)
        for term in _shock_cov(post, p, steps.astype(float)):
            cov = cov + term
        noise = (p["sigma"] ** 2)[:, None, None] * np.eye(steps.size)[None]
        return {"mean": mean, "curve_cov": cov, "value_cov": cov + noise}
    var = (gb * g).sum(-1) + np.einsum("ghi,gij,ghj->gh", z, state_cov, z)
    for term in shock_terms(p, steps, ctx.n_seasons):
        var = var + term
    return {"mean": mean, "curve_var": var, "value_var": var + p["sigma"][:, None] ** 2}


def _plain_marginal(post, p: dict, state, state_cov, beta_mean, beta_cov, jf, steps) -> dict:
    """:func:`predictive` without joint covariances or drifting seasons.

    The level's loading on ``beta`` is ``g = a + c_h + w v - u b1`` per node and step:
    ``a = e_level - b0`` and ``b1`` per node (``b0``, ``b1`` the state's loadings on
    ``beta``), ``c_h`` per step (long-run offset, seasons), ``w`` and ``u`` the growth
    loadings of the design and of the state. Expanding ``g' B g`` in these terms needs
    products per node and matrix products over the steps, in ``(H, G)`` arrays (so that
    per-node terms broadcast along rows), instead of a small matrix product per node and
    step: about half the time, the same numbers to rounding. The arrays returned are
    ``(G, H)`` views of them.
    """
    ctx, rho = post._ctx, p["rho"]
    # growth loadings as (H, G): per-node terms then broadcast along rows
    w, u = np.split(growth_loading(rho, np.concatenate([jf, steps]).astype(float)).T, 2)
    k = beta_mean.shape[1]
    v = np.zeros(k)
    v[1] = 1.0
    c = np.zeros((jf.size, k))
    if ctx.long_run:  # the long-run column is j - w
        v[2] = -1.0
        c[:, 2] = jf
    season = post._season_rows(post.t_ref + jf)
    if season is not None:
        c[:, k - season.shape[1]:] = season
    ay, a, b1 = state[:, :, 0], -state[:, 0, 1:], state[:, 1, 1:]
    a[:, 0] += 1.0
    ba, bb = np.moveaxis(beta_cov @ np.stack([a, b1], axis=-1), -1, 0)
    bv = (beta_cov.reshape(-1, k) @ v).reshape(-1, k)

    def dot(x, y):
        return np.einsum("gp,gp->g", x, y)

    mean = c @ beta_mean.T
    mean += ay[:, 0] + dot(a, beta_mean) + w * (beta_mean @ v)
    mean += u * (ay[:, 1] - dot(b1, beta_mean))
    var = ((c[:, :, None] * c[:, None, :]).reshape(jf.size, k * k)
           @ beta_cov.reshape(-1, k * k).T)
    var += 2 * (c @ ba.T) + dot(a, ba)
    var += w * (w * (bv @ v) + 2 * (dot(a, bv) + c @ bv.T))
    var -= u * (2 * (dot(a, bb) + c @ bb.T) + 2 * w * (bb @ v) - u * dot(b1, bb))
    var += state_cov[:, 0, 0] + u * (2 * state_cov[:, 0, 1] + u * state_cov[:, 1, 1])
    for term in shock_terms(p, steps, ctx.n_seasons):
        var += term.T
    value = var + p["sigma"] ** 2
    return {"mean": mean.T, "curve_var": var.T, "value_var": value.T}


def _shock_cov(post, p: dict, s: np.ndarray) -> list:
    """Covariances ``(G, H, H)`` of the future levels from each kind of future shock."""
    rho = p["rho"]
    # loading of the growth shock at future step i on the level at step h (i <= h)
    d = s[:, None] - s[None, :]
    on = (d >= 0).astype(float)
    r = rho[:, None, None]
    with np.errstate(divide="ignore", invalid="ignore"):
        af = np.where(r == 1.0, d + 1, (1 - r ** (d + 1)) / (1 - r)) * on
    out = [(p["sigma_growth"] ** 2)[:, None, None] * (af @ np.swapaxes(af, 1, 2)),
           (p["sigma_level"] ** 2)[:, None, None] * (on @ on.T)[None]]
    if _drifts(post):  # a seasonal shock at step i moves s at step h by impulse(h - i)
        psi = impulse(post._ctx.n_seasons, int(s.max()))[np.clip(d, 0, None).astype(int)] * on
        out.append((p["sigma_season"] ** 2)[:, None, None] * (psi @ psi.T)[None])
    return out


def shock_terms(p: dict, steps: np.ndarray, seasons: int = 0) -> list:
    """The diagonal of :func:`_shock_cov` without ``(G, H, H)`` arrays, one term per shock.

    Growth drift and level shocks ``(G, H)`` for the node parameters ``p``, then, with
    drifting seasons (``sigma_season`` in ``p``, ``seasons`` of them), the seasonal shocks.
    """
    # a growth shock k steps before h loads 1 + rho + ... + rho^(k-1) on the level, so the
    # shocks add a cumulative sum of its squares; worked out as (H, G) arrays, returned as
    # (G, H) views
    rho = p["rho"]
    s = steps.astype(float)
    squares = np.empty((int(s.max()), rho.size))
    load, total = np.ones(rho.size), np.zeros(rho.size)
    for k in range(squares.shape[0]):
        if k:
            load = 1.0 + rho * load
        total = total + load * load
        squares[k] = total
    shocks = squares[steps - 1]
    out = [(p["sigma_growth"] ** 2 * shocks).T, (p["sigma_level"] ** 2 * s[:, None]).T]
    if "sigma_season" in p:
        psi2 = np.cumsum(impulse(seasons, int(s.max())) ** 2)[steps - 1]
        out.append((p["sigma_season"] ** 2 * psi2[:, None]).T)
    return out


def _start(post, nodes, beta, rng):
    """Draws of the state at the last observation given ``(node, beta)``, ``(S, r)``."""
    state, cov = post._state[nodes], post._state_cov[nodes]
    mean = state[:, :, 0] - np.einsum("sip,sp->si", state[:, :, 1:], beta)
    if not _drifts(post):
        c00 = np.sqrt(np.clip(cov[:, 0, 0], 0, None))
        c10 = np.where(c00 > 0, cov[:, 1, 0] / np.where(c00 > 0, c00, 1), 0.0)
        c11 = np.sqrt(np.clip(cov[:, 1, 1] - c10**2, 0, None))
        z = rng.standard_normal((2, nodes.size))
        return np.stack([mean[:, 0] + c00 * z[0], mean[:, 1] + c10 * z[0] + c11 * z[1]], 1)
    ev, evec = np.linalg.eigh(0.5 * (cov + np.swapaxes(cov, 1, 2)))
    root = evec * np.sqrt(np.clip(ev, 0, None))[:, None, :]
    return mean + np.einsum("sij,sj->si", root, rng.standard_normal(mean.shape))


def simulate(post, t_future: np.ndarray, nodes: np.ndarray, beta: np.ndarray,
             rng: np.random.Generator) -> tuple[np.ndarray, np.ndarray]:
    """Joint predictive paths by running the state forward, one per ``(node, beta)``.

    Memory grows with draws times horizon only.

    Returns
    -------
    level, value : numpy.ndarray, shape (S, H)
        Log level (the trend, seasons included) and log value (plus noise).
    """
    ctx, p = post._ctx, {k: v[nodes] for k, v in post.params.items()}
    jf = np.asarray(t_future, dtype=int) - post.t_ref
    steps = jf - int(ctx.idx[-1])
    if np.any(np.diff(np.concatenate([[0], steps])) != 1):
        raise ValueError("simulate needs the consecutive periods after the last one")
    x0 = _start(post, nodes, beta, rng)
    dev, grow, seas = x0[:, 0], x0[:, 1], x0[:, 2:]
    season = post._season_rows(t_future)
    level = np.empty((nodes.size, steps.size))
    rho = p["rho"]
    for h in range(steps.size):
        grow = rho * grow + p["sigma_growth"] * rng.standard_normal(nodes.size)
        dev = dev + grow + p["sigma_level"] * rng.standard_normal(nodes.size)
        x = design(ctx, rho, jf[h:h + 1], None if season is None else season[h:h + 1])
        level[:, h] = np.einsum("sp,sp->s", x[:, 0, :], beta) + dev
        if seas.shape[1]:  # s_j = -(s_{j-1} + ... + s_{j-m+1}) + omega_j
            new = -seas.sum(axis=1) + p["sigma_season"] * rng.standard_normal(nodes.size)
            seas = np.concatenate([new[:, None], seas[:, :-1]], axis=1)
            level[:, h] += seas[:, 0]
    value = level + p["sigma"][:, None] * rng.standard_normal(level.shape)
    return level, value
