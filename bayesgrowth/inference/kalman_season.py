"""The local trend's Kalman filter with drifting seasonal factors, vectorised over nodes.

The fixed seasonal factors stay linear coefficients in ``beta`` (integrated out as in
:mod:`bayesgrowth.inference.kalman`); on top of them a seasonal *deviation* follows the
dummy seasonal random walk (Harvey 1989, *Forecasting, Structural Time Series Models and
the Kalman Filter*, sec. 2.3.4; Durbin & Koopman 2012, *Time Series Analysis by State
Space Methods*, 2nd ed., sec. 3.2.1):

``s_j = -(s_{j-1} + ... + s_{j-m+1}) + omega_j``,  ``omega_j ~ Normal(0, sigma_season^2)``,

with ``s_0 = s_{-1} = ... = 0`` (the factors start where ``beta`` puts them), so

``y_j = X_j beta + d_j + s_j + eps_j``.

The state is ``(d_j, e_j, s_j, s_{j-1}, ..., s_{j-m+2})``, of size ``r = 2 + m - 1``; with
``sigma_season = 0`` the deviation stays zero and the filter is the two-state one.

The compiled kernel uses the structure instead of dense ``r x r`` products: the deviations
sit in a ring (a period ahead only the oldest slot is rewritten, with ``-S``, ``S`` their
sum, kept per data column and as ``Cov(S, state)``), so the prediction costs ``O(r + k)``;
the observation loads two states, so the update is of rank one, on one triangle of the
symmetric covariance.
"""

from __future__ import annotations

import numpy as np

from bayesgrowth.inference.kalman import _BLOCK, _LOG_EVERY, FilterResult, run_filter, transition

__all__ = ["gram_filter_season", "season_filter", "season_loadings", "season_transition"]


def season_transition(rho, sigma_level, sigma_growth, sigma_season, m: int):
    """Transition matrices ``T`` and shock covariances ``Q``, each ``(G, r, r)``, ``r = m + 1``."""
    t2, q2 = transition(rho, sigma_level, sigma_growth)
    g, r = t2.shape[0], m + 1
    t = np.zeros((g, r, r))
    q = np.zeros((g, r, r))
    t[:, :2, :2], q[:, :2, :2] = t2, q2
    t[:, 2, 2:] = -1.0  # s_j = -(s_{j-1} + ... + s_{j-m+1}) + omega_j
    for i in range(3, r):
        t[:, i, i - 1] = 1.0  # the older deviations shift down
    q[:, 2, 2] = np.asarray(sigma_season, dtype=float) ** 2
    return t, q


def season_filter(data, grid_index, rho, sigma_level, sigma_growth, sigma, sigma_season,
                  m: int) -> FilterResult:
    """The augmented filter of ``[y, X]`` with the seasonal deviation in the state.

    As :func:`bayesgrowth.inference.kalman.augmented_filter` (same arguments, plus the
    deviations' shock sd ``sigma_season`` per node and the number of seasons ``m``); the
    observation loads the level deviation and the current seasonal deviation. The plain
    reference of the compiled :func:`gram_filter_season`.
    """
    t, q = season_transition(rho, sigma_level, sigma_growth, sigma_season, m)
    z = np.zeros(m + 1)
    z[0] = z[2] = 1.0
    return run_filter(data, grid_index, t, q, sigma, z)


def season_loadings(m: int, steps: np.ndarray) -> np.ndarray:
    """Loading of the deviation state at the last observation on ``s`` ``h`` steps on.

    Row ``h`` of the result ``(len(steps), m - 1)`` is the first row of ``C^h`` with
    ``C`` the seasonal block of the transition.
    """
    c = np.zeros((m - 1, m - 1))
    c[0, :] = -1.0
    c[np.arange(1, m - 1), np.arange(m - 2)] = 1.0
    out, power = [], np.eye(m - 1)
    for _ in range(int(np.max(steps))):
        power = c @ power
        out.append(power[0].copy())
    return np.asarray(out)[np.asarray(steps, dtype=int) - 1]


def _predict(a, sa, p, cs, drop, r, k, nb, rb, sg2, sl2, ss2):  # pragma: no cover - numba
    """One period ahead for ``nb`` nodes, in place, with the seasonal deviations in a ring.

    The ring's slot ``drop`` (physical row) holds the oldest deviation; it becomes the new
    current one, ``-S`` with ``S`` the sum of the deviations, and the others stay where they
    are, so only the level and growth rows and the new slot's row change: ``O(r + k)`` work
    instead of a dense ``T P T'``. ``sa`` is ``S`` per data column and ``cs`` ``Cov(S, x)``
    per state ``x``; after the step the sum is ``-(old drop) + omega``. ``p`` holds its
    lower triangle only (row >= column).
    """
    for c in range(k):
        for b in range(nb):
            a[0, c, b] += rb[b] * a[1, c, b]
            a[1, c, b] *= rb[b]
            old = a[drop, c, b]
            a[drop, c, b] = -sa[c, b]
            sa[c, b] = -old
    for b in range(nb):  # Var(S) from the old sums, before they change
        sa_var = 0.0
        for i in range(2, r):
            sa_var += cs[i, b]
        n00 = p[0, 0, b] + 2.0 * rb[b] * p[1, 0, b] + rb[b] * rb[b] * p[1, 1, b]
        p[1, 0, b] = rb[b] * p[1, 0, b] + rb[b] * rb[b] * p[1, 1, b] + sg2[b]
        p[1, 1, b] = rb[b] * rb[b] * p[1, 1, b] + sg2[b]
        p[0, 0, b] = n00 + sg2[b] + sl2[b]
        d0, d1 = p[drop, 0, b], p[drop, 1, b]
        p[drop, 0, b] = -(cs[0, b] + rb[b] * cs[1, b])
        p[drop, 1, b] = -rb[b] * cs[1, b]
        cs[0, b] = -(d0 + rb[b] * d1)
        cs[1, b] = -rb[b] * d1
        cs[drop, b] += ss2[b]
        p[drop, drop, b] = sa_var + ss2[b]
    for i in range(2, r):  # the kept slots: level and growth rows, and the new slot's row
        if i == drop:
            continue
        lo, hi = min(i, drop), max(i, drop)
        for b in range(nb):
            p[i, 0, b] += rb[b] * p[i, 1, b]
            p[i, 1, b] *= rb[b]
            old = p[hi, lo, b]
            p[hi, lo, b] = -cs[i, b]
            cs[i, b] = -old


def _update(a, sa, p, cs, pz, gain, row, acc, finv, prod, s2, cur, r, k,
            nb):  # pragma: no cover - numba
    """Measurement update of ``nb`` nodes given the design ``row``; ``row`` becomes ``v``.

    The observation loads the level deviation (row 0) and the current seasonal deviation
    (row ``cur``), so the gain is ``P (e_0 + e_cur) / F`` and the covariance update is of
    rank one, on ``p``'s lower triangle.
    """
    for i in range(r):
        for b in range(nb):
            pz[i, b] = p[i, 0, b] + (p[cur, i, b] if i < cur else p[i, cur, b])
    for b in range(nb):
        f = pz[0, b] + pz[cur, b] + s2[b]
        finv[b] = 1.0 / f
        prod[b] *= f  # the log of the product is taken in the kernel
        pz[r, b] = cs[0, b] + cs[cur, b]  # Cov(S, observed state)
    for i in range(r + 1):  # the gains, of the state and of the sum S
        for b in range(nb):
            gain[i, b] = pz[i, b] * finv[b]
    for c1 in range(r):
        for c2 in range(c1 + 1):
            for b in range(nb):
                p[c1, c2, b] -= gain[c1, b] * pz[c2, b]
        for b in range(nb):
            cs[c1, b] -= gain[r, b] * pz[c1, b]
    for c in range(k):
        for b in range(nb):
            row[c, b] -= a[0, c, b] + a[cur, c, b]  # the innovation
        for i in range(r):
            for b in range(nb):
                a[i, c, b] += gain[i, b] * row[c, b]
        for b in range(nb):
            sa[c, b] += gain[r, b] * row[c, b]
    for c1 in range(k):
        for c2 in range(c1 + 1):
            for b in range(nb):
                acc[c1, c2, b] += row[c1, b] * row[c2, b] * finv[b]


def _store(start, nb, head, a, p, acc, lf, r, k, gram, logf, state,
           state_cov):  # pragma: no cover - numba
    """Copy a block's results out, the ring's slots back in the order of the lags."""
    n_slots = r - 2
    for b in range(nb):
        g = start + b
        for c1 in range(k):
            for c2 in range(c1 + 1):
                gram[g, c1, c2] = gram[g, c2, c1] = acc[c1, c2, b]
        logf[g] = lf[b]
    for i in range(r):  # logical row i (lag i - 2 for the deviations) at physical row pi
        pi = i if i < 2 else 2 + (head - (i - 2)) % n_slots
        for b in range(nb):
            for c in range(k):
                state[start + b, i, c] = a[pi, c, b]
        for j in range(r):
            pj = j if j < 2 else 2 + (head - (j - 2)) % n_slots
            hi, lo = max(pi, pj), min(pi, pj)
            for b in range(nb):
                state_cov[start + b, i, j] = p[hi, lo, b]


def _season_kernel(y, season, idx, rho, s_level, s_growth, s_season, sigma, long_run, m,
                   block, gram, logf, state, state_cov):  # pragma: no cover - numba
    """The compiled filter of :func:`gram_filter_season`, ``block`` nodes at a time."""
    n, n_s, n_nodes, r = y.size, season.shape[1], rho.size, m + 1
    k = 3 + int(long_run) + n_s
    a, p = np.empty((r, k, block)), np.empty((r, r, block))
    sa, cs = np.empty((k, block)), np.empty((r, block))
    acc, row = np.empty((k, k, block)), np.empty((k, block))
    pz, gain = np.empty((r + 1, block)), np.empty((r + 1, block))
    w, lf, rb, prod = np.empty(block), np.empty(block), np.empty(block), np.empty(block)
    sg2, sl2, ss2, s2 = np.empty(block), np.empty(block), np.empty(block), np.empty(block)
    finv = np.empty(block)
    for start in range(0, n_nodes, block):
        nb = min(block, n_nodes - start)
        for b in range(nb):
            rb[b], sg2[b] = rho[start + b], s_growth[start + b] ** 2
            sl2[b], ss2[b] = s_level[start + b] ** 2, s_season[start + b] ** 2
            s2[b] = sigma[start + b] ** 2
        a[:, :, :], p[:, :, :], acc[:, :, :] = 0.0, 0.0, 0.0
        sa[:, :], cs[:, :], w[:], lf[:], prod[:] = 0.0, 0.0, 0.0, 0.0, 1.0
        j_prev, head = 0, 0  # head: the ring slot of the current deviation
        for i in range(n):
            jj = idx[i]
            for _ in range(jj - j_prev):
                head = (head + 1) % (m - 1)
                _predict_c(a, sa, p, cs, 2 + head, r, k, nb, rb, sg2, sl2, ss2)
                for b in range(nb):
                    w[b] = rb[b] * (1.0 + w[b])
            j_prev = jj
            row[0, :], row[1, :], row[2, :] = y[i], 1.0, w
            if long_run:
                for b in range(nb):
                    row[3, b] = jj - w[b]
            for c in range(n_s):
                row[k - n_s + c, :] = season[i, c]
            _update_c(a, sa, p, cs, pz, gain, row, acc, finv, prod, s2, 2 + head, r, k, nb)
            if i % _LOG_EVERY == _LOG_EVERY - 1 or i == n - 1:  # see kalman._LOG_EVERY
                for b in range(nb):
                    lf[b] += np.log(prod[b])
                    prod[b] = 1.0
        _store_c(start, nb, head, a, p, acc, lf, r, k, gram, logf, state, state_cov)


_COMPILED = None
_predict_c = _update_c = _store_c = None  # the compiled helpers, bound with the kernel


def gram_filter_season(y, season, grid_index, rho, sigma_level, sigma_growth, sigma,
                       sigma_season, m: int, long_run: bool):
    """:func:`bayesgrowth.inference.kalman.gram_filter` with the seasonal deviation's state.

    Equals :func:`season_filter` on ``[y, X]`` reduced to ``V' diag(1/F) V``, ``sum log
    F`` and the last state (checked in the tests); ``state`` is ``(G, m + 1, k)`` and
    ``state_cov`` ``(G, m + 1, m + 1)``.
    """
    global _COMPILED, _predict_c, _store_c, _update_c
    if _COMPILED is None:
        import numba

        _predict_c = numba.njit(cache=True, error_model="numpy")(_predict)
        _update_c = numba.njit(cache=True, error_model="numpy")(_update)
        _store_c = numba.njit(cache=True, error_model="numpy")(_store)
        _COMPILED = numba.njit(cache=True, error_model="numpy")(_season_kernel)
    season = np.zeros((len(y), 0)) if season is None else np.ascontiguousarray(season, float)
    rho = np.ascontiguousarray(rho, dtype=float)
    g, r = rho.size, m + 1
    k = 3 + int(long_run) + season.shape[1]
    gram, logf = np.zeros((g, k, k)), np.zeros(g)
    state, state_cov = np.zeros((g, r, k)), np.zeros((g, r, r))
    as_float = [np.ascontiguousarray(x, float) for x in (sigma_level, sigma_growth,
                                                          sigma_season, sigma)]
    _COMPILED(np.ascontiguousarray(y, float), season, np.asarray(grid_index, dtype=np.int64),
              rho, *as_float, bool(long_run), int(m), _BLOCK, gram, logf, state, state_cov)
    return gram, logf, state, state_cov
