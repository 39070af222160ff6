"""A Kalman filter for the local trend's random part, vectorised over parameter nodes.

On the calendar grid ``j = 0, 1, ...`` from the first observation, the log value is

``y_j = X_j beta + d_j + eps_j``,  ``eps_j ~ Normal(0, sigma^2)``,

where ``X_j beta`` is the deterministic mean path (starting level, starting growth,
long-run growth, seasonal factors: see :func:`bayesgrowth.models.local_trend.design`)
and ``d_j`` the level's deviation from it, driven by the shocks:

``e_j = rho e_{j-1} + sigma_growth u_j``  (growth deviation),
``d_j = d_{j-1} + e_j + sigma_level z_j``, with ``d_0 = e_0 = 0``.

The filter runs on the two-dimensional state ``(d_j, e_j)`` and is applied to
the columns of ``[y, X]`` at once (the augmented filter of de Jong 1991, *The
Annals of Statistics* 19(2)): because the gains do not depend on the data, the
innovations of every column are the same unit lower-triangular transform
``L^-1 [y, X]`` with ``Cov(d + eps) = L diag(F) L'`` (the prediction-error
decomposition, Durbin & Koopman 2012, *Time Series Analysis by State Space
Methods*, 2nd ed., sec. 7.2). Integrating ``beta`` out is then a small dense
problem per node (:mod:`bayesgrowth.inference.statespace`).

Every array carries a leading node axis ``G``, so one pass filters all the nodes
of a parameter grid.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["FilterResult", "augmented_filter", "gram_filter", "integrate_compiled", "run_filter",
           "transition"]


@dataclass(frozen=True)
class FilterResult:
    """Innovations and the final filtered state of the augmented filter.

    Attributes
    ----------
    innovations : numpy.ndarray, shape (G, n, k)
        Innovations of each data column (column 0 is ``y``, the others ``X``).
    variance : numpy.ndarray, shape (G, n)
        Innovation variances ``F``.
    state : numpy.ndarray, shape (G, 2, k)
        Filtered state mean at the last observation, per data column: the state
        given ``beta`` is ``state[..., 0] - state[..., 1:] @ beta``.
    state_cov : numpy.ndarray, shape (G, 2, 2)
        Filtered state covariance at the last observation.
    """

    innovations: np.ndarray
    variance: np.ndarray
    state: np.ndarray
    state_cov: np.ndarray


def transition(rho: np.ndarray, sigma_level: np.ndarray, sigma_growth: np.ndarray):
    """Transition matrices ``T`` and shock covariances ``Q``, each ``(G, 2, 2)``.

    ``(d_j, e_j) = T (d_{j-1}, e_{j-1}) + shocks``: the growth shock moves both
    the level and the growth, the level shock only the level.
    """
    rho = np.asarray(rho, dtype=float)
    g = rho.size
    t = np.zeros((g, 2, 2))
    t[:, 0, 0] = 1.0
    t[:, 0, 1] = rho
    t[:, 1, 1] = rho
    sg2 = np.asarray(sigma_growth, dtype=float) ** 2
    sl2 = np.asarray(sigma_level, dtype=float) ** 2
    q = np.empty((g, 2, 2))
    q[:, 0, 0] = sg2 + sl2
    q[:, 0, 1] = q[:, 1, 0] = sg2
    q[:, 1, 1] = sg2
    return t, q


def augmented_filter(
    data: np.ndarray,
    grid_index: np.ndarray,
    rho: np.ndarray,
    sigma_level: np.ndarray,
    sigma_growth: np.ndarray,
    sigma: np.ndarray,
) -> FilterResult:
    """Filter the columns of ``data`` through the local trend's random part.

    Parameters
    ----------
    data : numpy.ndarray, shape (G, n, k) or (n, k)
        ``[y, X]`` at the observed positions, per node (broadcast when 2-D).
    grid_index : numpy.ndarray of int, shape (n,)
        Calendar position ``j`` of each observation (increasing, starting at 0);
        missing periods between them are predicted over without an update.
    rho, sigma_level, sigma_growth, sigma : numpy.ndarray, shape (G,)
        Growth persistence (1 for a random walk), level-shock, growth-drift and
        noise standard deviations.

    Returns
    -------
    FilterResult
    """
    t, q = transition(rho, sigma_level, sigma_growth)
    return run_filter(data, grid_index, t, q, sigma)


def run_filter(data, grid_index, t, q, sigma, z=None) -> FilterResult:
    """The augmented filter for transitions ``t`` and shock covariances ``q`` ``(G, r, r)``.

    The observation loads the state by ``z`` (default: the first state alone, the
    level deviation). See :func:`augmented_filter` for the other arguments.
    """
    idx = np.asarray(grid_index, dtype=int)
    if idx[0] != 0 or np.any(np.diff(idx) <= 0):
        raise ValueError("grid positions must start at 0 and increase")
    sigma2 = np.asarray(sigma, dtype=float) ** 2
    g, n, r = sigma2.size, idx.size, t.shape[-1]
    data = np.asarray(data, dtype=float)
    k = data.shape[-1]
    a = np.zeros((g, r, k))
    p = np.zeros((g, r, r))
    innov = np.empty((g, n, k))
    var = np.empty((g, n))
    j_prev = 0
    for i, j in enumerate(idx):
        for _ in range(j - j_prev):
            a = t @ a
            p = t @ p @ np.swapaxes(t, 1, 2) + q
        j_prev = j
        row = data[..., i, :]
        v = row - (a[:, 0, :] if z is None else z @ a)
        pz = p[:, :, 0] if z is None else p @ z
        f = (pz[:, 0] if z is None else pz @ z) + sigma2
        gain = pz / f[:, None]
        a = a + gain[:, :, None] * v[:, None, :]
        p = p - gain[:, :, None] * gain[:, None, :] * f[:, None, None]
        innov[:, i, :] = v
        var[:, i] = f
    return FilterResult(innovations=innov, variance=var, state=a, state_cov=p)


_BLOCK = 256  # nodes filtered together (their arrays fit in a core's cache)
#: Innovation variances multiplied together before one logarithm. Eight stay inside the
#: floating-point range while each lies between 1e-38 and 1e38: while the noise scale stays
#: above 1e-19 (a variance is at least the noise variance) and the random part of a log
#: value has a standard deviation below 1e19.
_LOG_EVERY = 8


def _gram_kernel(y, season, idx, rho, s_level, s_growth, sigma, long_run, block,
                 gram, logf, state, state_cov):  # pragma: no cover - compiled by numba
    """Filter ``[y, X]`` per node, ``X`` built on the fly, ``block`` nodes at a time.

    Accumulates ``sum_i v_i v_i' / F_i`` (``gram``) and ``sum_i log F_i``, and keeps
    the last state. The innermost loops run over the nodes of a block, which the
    compiler turns into vector instructions; a block's arrays stay in cache. The
    growth loading ``w_j = sum_{i<=j} rho^i`` follows ``w_j = rho (1 + w_{j-1})``.
    ``sum log F`` is taken as the log of products of ``_LOG_EVERY`` variances: a
    logarithm is a library call the compiler cannot vectorise (a quarter of the time).
    """
    n, n_s, n_nodes = y.size, season.shape[1], rho.size
    k = 3 + int(long_run) + n_s  # y, 1, w, [j - w], seasons
    a0, a1, row = np.empty((k, block)), np.empty((k, block)), np.empty((k, block))
    acc = np.empty((k, k, block))
    p00, p01, p11, w = np.empty(block), np.empty(block), np.empty(block), np.empty(block)
    lf, r, sg2, q00 = np.empty(block), np.empty(block), np.empty(block), np.empty(block)
    s2, finv, k0, k1 = np.empty(block), np.empty(block), np.empty(block), np.empty(block)
    prod = np.empty(block)
    for start in range(0, n_nodes, block):
        m = min(block, n_nodes - start)
        for b in range(m):
            r[b] = rho[start + b]
            sg2[b] = s_growth[start + b] ** 2
            q00[b] = sg2[b] + s_level[start + b] ** 2
            s2[b] = sigma[start + b] ** 2
        p00[:], p01[:], p11[:], w[:], lf[:], prod[:] = 0.0, 0.0, 0.0, 0.0, 0.0, 1.0
        a0[:, :], a1[:, :], acc[:, :, :] = 0.0, 0.0, 0.0
        j_prev = 0
        for i in range(n):
            jj = idx[i]
            for _ in range(jj - j_prev):  # predict over the periods since the last one
                for c in range(k):
                    for b in range(m):
                        a0[c, b] += r[b] * a1[c, b]
                        a1[c, b] *= r[b]
                for b in range(m):
                    rb = r[b]
                    n00 = p00[b] + 2.0 * rb * p01[b] + rb * rb * p11[b] + q00[b]
                    p01[b] = rb * p01[b] + rb * rb * p11[b] + sg2[b]
                    p11[b] = rb * rb * p11[b] + sg2[b]
                    p00[b] = n00
                    w[b] = rb * (1.0 + w[b])
            j_prev = jj
            row[0, :], row[1, :], row[2, :] = y[i], 1.0, w
            c0 = 3
            if long_run:
                for b in range(m):
                    row[3, b] = jj - w[b]
                c0 = 4
            for c in range(n_s):
                row[c0 + c, :] = season[i, c]
            for b in range(m):
                f = p00[b] + s2[b]
                finv[b] = 1.0 / f
                k0[b] = p00[b] / f
                k1[b] = p01[b] / f
                p11[b] -= k1[b] * k1[b] * f
                p01[b] -= k0[b] * k1[b] * f
                p00[b] -= k0[b] * k0[b] * f
                prod[b] *= f
            if i % _LOG_EVERY == _LOG_EVERY - 1 or i == n - 1:
                for b in range(m):
                    lf[b] += np.log(prod[b])
                    prod[b] = 1.0
            for c in range(k):
                for b in range(m):
                    v = row[c, b] - a0[c, b]
                    row[c, b] = v  # the innovation
                    a0[c, b] += k0[b] * v
                    a1[c, b] += k1[b] * v
            for c1 in range(k):
                for c2 in range(c1 + 1):
                    for b in range(m):
                        acc[c1, c2, b] += row[c1, b] * row[c2, b] * finv[b]
        for b in range(m):
            g = start + b
            for c1 in range(k):
                for c2 in range(c1 + 1):
                    gram[g, c1, c2] = gram[g, c2, c1] = acc[c1, c2, b]
                state[g, 0, c1], state[g, 1, c1] = a0[c1, b], a1[c1, b]
            logf[g] = lf[b]
            state_cov[g, 0, 0], state_cov[g, 1, 1] = p00[b], p11[b]
            state_cov[g, 0, 1] = state_cov[g, 1, 0] = p01[b]




_COMPILED = None


def gram_filter(y, season, grid_index, rho, sigma_level, sigma_growth, sigma, long_run):
    """The augmented filter's sufficient statistics, compiled (numba), for many nodes.

    The design is the local trend's mean path (``1``, ``w_j``, ``j - w_j`` when
    ``long_run``, then the ``season`` rows), built per node from ``rho``; the
    result equals :func:`augmented_filter` on ``[y, X]`` reduced to
    ``gram = V' diag(1/F) V``, ``sum log F`` and the last filtered state, which is
    all the integration over ``beta`` needs (checked against it in the tests).

    Returns
    -------
    gram : numpy.ndarray, shape (G, k, k)
    logf : numpy.ndarray, shape (G,)
    state : numpy.ndarray, shape (G, 2, k)
    state_cov : numpy.ndarray, shape (G, 2, 2)
    """
    global _COMPILED
    if _COMPILED is None:
        import numba

        _COMPILED = numba.njit(cache=True, error_model="numpy")(_gram_kernel)
    season = np.zeros((len(y), 0)) if season is None else np.ascontiguousarray(season, float)
    rho = np.ascontiguousarray(rho, dtype=float)
    g = rho.size
    k = 3 + int(long_run) + season.shape[1]
    gram = np.zeros((g, k, k))
    logf = np.zeros(g)
    state = np.zeros((g, 2, k))
    state_cov = np.zeros((g, 2, 2))
    _COMPILED(np.ascontiguousarray(y, float), season, np.asarray(grid_index, dtype=np.int64),
              rho, np.ascontiguousarray(sigma_level, float),
              np.ascontiguousarray(sigma_growth, float), np.ascontiguousarray(sigma, float),
              bool(long_run), _BLOCK, gram, logf, state, state_cov)
    return gram, logf, state, state_cov


def _integrate_kernel(gram, logf, n, mu0, sd0, block, loglik, beta_mean,
                      beta_cov):  # pragma: no cover - compiled by numba
    """Per node, what :func:`bayesgrowth.inference.statespace_nodes.integrate` computes in numpy.

    A Cholesky factor ``L`` of ``M = I + S A S`` gives ``log|M|``, ``z = M^-1 S b``
    and ``M^-1 = L^-T L^-1``. As in the filter, ``block`` nodes at a time with the
    node loop innermost.
    """
    p = mu0.size
    log2pi = np.log(2.0 * np.pi)
    m, chol = np.empty((p, p, block)), np.empty((p, p, block))
    linv, minv = np.empty((p, p, block)), np.empty((p, p, block))
    sb, rr, logdet, acc = np.empty((p, block)), np.empty(block), np.empty(block), np.empty(block)
    for start in range(0, gram.shape[0], block):
        nb = min(block, gram.shape[0] - start)
        for b in range(nb):
            rr[b] = gram[start + b, 0, 0]
        for i in range(p):
            for b in range(nb):
                g = start + b
                amu = 0.0
                for j in range(p):
                    amu += gram[g, 1 + i, 1 + j] * mu0[j]
                    m[i, j, b] = sd0[i] * gram[g, 1 + i, 1 + j] * sd0[j]
                m[i, i, b] += 1.0
                rr[b] += -2.0 * gram[g, 1 + i, 0] * mu0[i] + amu * mu0[i]
                sb[i, b] = sd0[i] * (gram[g, 1 + i, 0] - amu)
        logdet[:] = 0.0
        for i in range(p):
            for j in range(i + 1):
                acc[:] = m[i, j, :]
                for c in range(j):
                    for b in range(nb):
                        acc[b] -= chol[i, c, b] * chol[j, c, b]
                for b in range(nb):
                    if i == j:
                        chol[i, i, b] = np.sqrt(acc[b])
                        logdet[b] += 2.0 * np.log(chol[i, i, b])
                    else:
                        chol[i, j, b] = acc[b] / chol[j, j, b]
        for j in range(p):  # L^-1, lower triangular, column by column
            for i in range(j, p):  # the entries above the diagonal are never read
                acc[:] = 1.0 if i == j else 0.0
                for c in range(j, i):
                    for b in range(nb):
                        acc[b] -= chol[i, c, b] * linv[c, j, b]
                for b in range(nb):
                    linv[i, j, b] = acc[b] / chol[i, i, b]
        for i in range(p):  # M^-1 = L^-T L^-1
            for j in range(p):
                acc[:] = 0.0
                for c in range(max(i, j), p):
                    for b in range(nb):
                        acc[b] += linv[c, i, b] * linv[c, j, b]
                minv[i, j, :] = acc
        for b in range(nb):
            g = start + b
            quad = rr[b]
            for i in range(p):
                z = 0.0
                for j in range(p):
                    beta_cov[g, i, j] = sd0[i] * minv[i, j, b] * sd0[j]
                    z += minv[i, j, b] * sb[j, b]
                quad -= sb[i, b] * z
                beta_mean[g, i] = mu0[i] + sd0[i] * z
            loglik[g] = -0.5 * (n * log2pi + logf[g] + logdet[b] + quad)


_INTEGRATE = None


def integrate_compiled(gram, logf, n, mu0, var0):
    """Marginal log likelihood and normal posterior of ``beta`` per node, compiled (numba).

    Equals :func:`bayesgrowth.inference.statespace_nodes.integrate` (checked in the tests).
    """
    global _INTEGRATE
    if _INTEGRATE is None:
        import numba

        _INTEGRATE = numba.njit(cache=True, error_model="numpy")(_integrate_kernel)
    g, p = gram.shape[0], gram.shape[1] - 1
    loglik = np.empty(g)
    beta_mean = np.empty((g, p))
    beta_cov = np.empty((g, p, p))
    _INTEGRATE(np.ascontiguousarray(gram, float), np.ascontiguousarray(logf, float), int(n),
               np.ascontiguousarray(mu0, float), np.sqrt(np.asarray(var0, dtype=float)),
               _BLOCK, loglik, beta_mean, beta_cov)
    return loglik, beta_mean, beta_cov
