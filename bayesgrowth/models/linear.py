"""Coefficients that enter the log mean linearly, integrated out while sampling.

In the exponential and damped curves (given the half-life) and in the local
trend, the starting level ``log a``, the growth ``b`` and the long-run growth
``c`` enter the log mean linearly, ``m = X beta``, and so do the local trend's
seasonal factors (the curves sample theirs: that keeps ``p <= 3`` coefficients, whose
algebra is written out in closed form). Their priors are normal, ``beta ~ N(mu0,
diag(v0))``, so with normal noise the log values are normal given the remaining parameters,
with mean ``X mu0`` and covariance ``K + X diag(v0) X'`` (``K`` the error covariance). NUTS
then samples only the scales and shape parameters, and each draw's ``beta`` is drawn
afterwards from its exact normal conditional.

Why: sampled jointly with the AR(1) persistence ``phi``, the starting level made a funnel.
Its posterior sd grows like ``sigma / sqrt(1 - phi^2)`` as ``phi`` nears 1, and NUTS diverged
on US real GDP (14 divergent transitions on 20 quarters; none once ``log a`` was fixed).
Without level shocks, the local trend has the same funnel in the noise scale.

For the curves with independent or AR(1) errors, ``K^-1 = T'T`` with ``T`` the innovation
transform (each row turns an error into its standardised innovation), so the marginal
density is computed in ``O(n p^2)``. With ``z = T (y - X mu0)``, ``W = T X`` and ``M =
diag(1/v0) + W'W``:

``log p(y) = -n/2 log(2 pi) - log det T^-1 - z'z/2 + g' M^-1 g / 2 - log det(diag(v0) M) / 2``,

with ``g = W'z`` (the Woodbury identity). Given the other parameters, ``beta - mu0 ~ N(M^-1
g, M^-1)``. A coefficient with prior variance 0 is fixed at its mean and left out of ``X``.
``M`` is at most 3 x 3, and its determinant and inverse are written out with cofactors:
PyTensor runs its Cholesky and triangular solves as Python calls, which made each gradient
about 1.3 ms on the damped curve.

A ``ZeroSumNormal(s)`` vector of ``m`` seasonal factors is ``Q eta``, with ``eta ~ N(0, s^2
I)`` and ``Q`` an orthonormal basis of the zero-sum vectors. The exact engines of the
exponential curve integrate its seasonal factors out that way too (:func:`with_season_columns`:
columns ``D Q``, ``D`` the season indicators); their NumPy algebra takes any number of
coefficients, while the PyMC model keeps sampling them and its written-out algebra.
"""

from __future__ import annotations

import functools
import math

import numpy as np

from bayesgrowth.models import ar1_products
from bayesgrowth.models.spec import ModelSpec, season_index

__all__ = [
    "COEFFICIENTS",
    "STAND_INS",
    "curve_design",
    "draw_curve_coefficients",
    "integrates_linear",
    "linear_prior",
    "marginal_loglik",
    "prior_coefficients",
    "season_basis",
    "uses_long_run",
    "season_rows",
    "split_coefficients",
    "with_season_columns",
]

#: Variables sampled in place of a model parameter; dropped once the draws are complete.
STAND_INS = ("log_ceiling_ratio",)

#: The family parameters each scheme of ``ModelFamily.linear`` integrates out
#: (besides the level ``log_a``); the family's other parameters are sampled.
COEFFICIENTS = {"growth": ("log1p_g", "long_run"), "ceiling": ("log_k",), None: ()}


def integrates_linear(spec: ModelSpec) -> bool:
    """Whether the PyMC model of ``spec`` integrates its linear coefficients out.

    Families with states (the local trend) always do; the families that declare a
    linear scheme do with normal noise, except the plain exponential model
    (independent errors, no seasons), whose level-at-the-centre parameterisation
    already samples well.
    """
    if spec.family.states:
        return True
    return (spec.family.linear is not None and spec.noise == "normal"
            and not spec.is_plain_exponential)


@functools.lru_cache(maxsize=16)
def season_basis(m: int) -> np.ndarray:
    """Orthonormal ``(m, m - 1)`` basis of the vectors that sum to zero (cached, read-only)."""
    q = np.linalg.qr(np.eye(m) - 1.0 / m)[0][:, : m - 1].copy()
    q.flags.writeable = False
    return q


def season_count(spec: ModelSpec, axis) -> int:
    """Seasons per year for a seasonal ``spec`` (0 without seasons)."""
    return season_index(axis, np.arange(1))[0] if spec.seasonal else 0


def season_rows(spec: ModelSpec, axis, t) -> tuple[np.ndarray | None, int]:
    """``D Q`` at times ``t`` (``D`` the season indicators) and the season count."""
    if not spec.seasonal:
        return None, 0
    m, s_idx = season_index(axis, np.asarray(t))
    return season_basis(m)[s_idx], m


def with_season_columns(spec: ModelSpec, priors, x, axis, t):
    """A ``"growth"`` curve's design and prior with its seasonal coordinates among them.

    Columns ``D Q`` (:func:`season_rows`) follow the curve's columns ``x`` (``(n, p)``, or
    ``(S, n, p)`` per draw), with the prior ``N(0, seasonal_scale^2)`` of each coordinate
    (the PyMC model's ``ZeroSumNormal``).

    Returns
    -------
    x, mu0, var0, m
        The widened design, the prior means and variances in design order, and the
        number of seasons.
    """
    rows, m = season_rows(spec, axis, t)
    mu0, var0 = linear_prior(spec, priors, m, seasons=True)
    rows = np.broadcast_to(rows, (*np.shape(x)[:-1], m - 1))
    return np.concatenate([x, rows], axis=-1), mu0, var0, m


def uses_long_run(spec: ModelSpec) -> bool:
    """Whether the mean path has a long-run growth coefficient (growth that fades)."""
    return "long_run" in spec.parameters()


def linear_prior(spec: ModelSpec, priors, n_seasons: int = 0, *,
                 seasons: bool = True) -> tuple[np.ndarray, np.ndarray]:
    """Prior means and variances of the linear coefficients, in design order.

    ``log a`` and ``b``, then ``c`` (damped curve, mean-reverting local trend), then
    ``m - 1`` seasonal coordinates (unless ``seasons`` is false: the curves sample
    their seasonal factors). A fixed value has variance 0.
    """
    mu = [priors.log_a_mu, priors.log1p_g_mu]
    var = [priors.log_a_sd**2, priors.log1p_g_sd**2]
    if uses_long_run(spec):
        mu.append(priors.long_run_mu)
        var.append(priors.long_run_sd**2)
    if spec.seasonal and seasons:
        mu += [0.0] * (n_seasons - 1)
        var += [priors.seasonal_scale**2] * (n_seasons - 1)
    return np.asarray(mu, dtype=float), np.asarray(var, dtype=float)


def split_coefficients(spec: ModelSpec, beta: np.ndarray, n_seasons: int,
                       fixed_initial: bool, log_a_mu: float) -> dict:
    """Named draws from coefficient draws ``beta`` ``(S, p)`` in design order.

    ``n_seasons`` is 0 when ``beta`` holds no seasonal coordinates.
    """
    out = {"log_a": beta[:, 0], "log1p_g": beta[:, 1]}
    if fixed_initial:
        out["log_a"] = np.full(beta.shape[0], log_a_mu)
    if uses_long_run(spec):
        out["long_run"] = beta[:, 2]
    if n_seasons:
        out["season"] = beta[:, beta.shape[1] - (n_seasons - 1):] @ season_basis(n_seasons).T
    return out


def prior_coefficients(spec: ModelSpec, priors, draws: dict, axis,
                       rng: np.random.Generator) -> dict:
    """``draws`` plus prior draws of the linear coefficients.

    The local trend integrates its seasonal factors out too; the curves sample
    theirs, so their prior draws are already in ``draws``.
    """
    n = np.asarray(draws["sigma"]).size
    if spec.family.linear == "ceiling":
        kappa = np.asarray(draws["log_ceiling_ratio"], dtype=float)
        mean, var = level_given_ratio(priors, kappa)
        log_a = mean + math.sqrt(var) * rng.standard_normal(n)
        return {**draws, "log_a": log_a, "log_k": log_a + kappa}
    seasons = spec.family.states
    m = season_count(spec, axis) if seasons else 0
    mu0, var0 = linear_prior(spec, priors, m, seasons=seasons)
    beta = mu0 + np.sqrt(var0) * rng.standard_normal((n, mu0.size))
    return {**draws, **split_coefficients(spec, beta, m, priors.fixed_initial, priors.log_a_mu)}


def curve_design(spec: ModelSpec, dt, half_life=None, xp=np):
    """Design of a ``"growth"`` family's linear coefficients at offsets ``dt``.

    The family's ``design``: columns ``1`` (log a), then ``dt`` (b) for the
    exponential curve, or ``f`` (b) and ``dt - f`` (c) for the damped curve (see
    :mod:`bayesgrowth.models.damped`). With NumPy and ``half_life`` draws ``(S,)``
    the damped design is ``(S, n, 3)``.
    """
    return spec.family.design(dt, half_life, xp)


def _whiten(spec: ModelSpec, v, sigma, phi, lag, xp):
    """Rows of ``v`` (PyTensor, ``(n,)``) turned into standardised innovations, and log scales.

    ``lag[i]`` is the gap between rows ``i - 1`` and ``i`` (``lag[0]`` is unused). The log
    scales add up to ``log det T^-1``. NumPy callers, which need many ``(sigma, phi)`` at
    once, take the products of whitened columns from row sums instead
    (:mod:`bayesgrowth.models.ar1_products`).
    """
    if spec.errors == "independent":
        return v / sigma, xp.log(sigma * xp.ones_like(lag))
    phik = phi ** lag[1:]
    ratio = xp.sqrt((1 - phik**2) / (1 - phi**2))
    scale = sigma * xp.concatenate([xp.stack([1 / xp.sqrt(1 - phi**2)]), ratio])
    innov = xp.concatenate([v[:1], v[1:] - phik * v[:-1]])
    return innov / scale, xp.log(scale)


def _small_solve(m, g, xp):
    """``log det M`` and ``g' M^-1 g`` for a symmetric positive definite ``M`` of size 1 to 3.

    Written out with cofactors so that PyTensor compiles them to plain C
    (its Cholesky and triangular solves run as Python calls, and on small
    matrices that overhead made each gradient 20 times dearer).
    """
    p = len(g)
    if p == 1:
        return xp.log(m[0][0]), g[0] ** 2 / m[0][0]
    if p == 2:
        det = m[0][0] * m[1][1] - m[0][1] ** 2
        quad = m[1][1] * g[0] ** 2 - 2 * m[0][1] * g[0] * g[1] + m[0][0] * g[1] ** 2
        return xp.log(det), quad / det
    c00 = m[1][1] * m[2][2] - m[1][2] ** 2
    c01 = m[0][2] * m[1][2] - m[0][1] * m[2][2]
    c02 = m[0][1] * m[1][2] - m[0][2] * m[1][1]
    c11 = m[0][0] * m[2][2] - m[0][2] ** 2
    c12 = m[0][1] * m[0][2] - m[0][0] * m[1][2]
    c22 = m[0][0] * m[1][1] - m[0][1] ** 2
    det = m[0][0] * c00 + m[0][1] * c01 + m[0][2] * c02
    quad = (c00 * g[0] ** 2 + c11 * g[1] ** 2 + c22 * g[2] ** 2
            + 2 * (c01 * g[0] * g[1] + c02 * g[0] * g[2] + c12 * g[1] * g[2]))
    return xp.log(det), quad / det


def _cholesky_solve(m, g):
    """``log det M`` and ``g' M^-1 g`` for NumPy stacks ``(S,)`` of any size: ``M = L L'``.

    Entry by entry over the ``S`` values (faster than a stack of small LAPACK calls).
    """
    p = len(g)
    low = [[None] * p for _ in range(p)]
    z = [None] * p
    logdet, quad = 0.0, 0.0
    for j in range(p):
        d = m[j][j] - sum(low[j][k] ** 2 for k in range(j))
        root = np.sqrt(d)
        for i in range(j + 1, p):
            low[i][j] = (m[i][j] - sum(low[i][k] * low[j][k] for k in range(j))) / root
        low[j][j] = root
        z[j] = (g[j] - sum(low[j][k] * z[k] for k in range(j))) / root
        logdet, quad = logdet + np.log(d), quad + z[j] ** 2
    return logdet, quad


def ceiling_ratio_prior(priors) -> tuple[float, float]:
    """Prior mean and sd of ``kappa = log K - log a`` for the logistic and Gompertz curves.

    With ``log a ~ N(mu_a, s_a^2)`` and ``log K ~ N(mu_k, s_k^2)`` independent,
    ``kappa ~ N(mu_k - mu_a, s_a^2 + s_k^2)`` and, given ``kappa``, ``log a`` is
    normal (see :func:`level_given_ratio`); the change of variables has Jacobian 1.
    """
    return (priors.log_k_mu - priors.log_a_mu,
            math.sqrt(priors.log_a_sd**2 + priors.log_k_sd**2))


def level_given_ratio(priors, kappa):
    """Mean and variance of the prior of ``log a`` given ``kappa`` (product of two normals)."""
    if priors.fixed_initial:
        return priors.log_a_mu + 0.0 * kappa, 0.0
    pa, pk = 1.0 / priors.log_a_sd**2, 1.0 / priors.log_k_sd**2
    var = 1.0 / (pa + pk)
    return var * (pa * priors.log_a_mu + pk * (priors.log_k_mu - kappa)), var


def curve_pieces(spec: ModelSpec, priors, dt, params: dict, xp=np):
    """Offset, design, prior means and variances of a curve's linear coefficients.

    The log mean is ``offset + X beta``. For the ``"growth"`` families (exponential,
    damped) ``offset = 0`` and ``beta = (log a, b[, c])``; for the ``"ceiling"``
    families (logistic, Gompertz) ``beta = (log a)`` and the offset is the family's
    ``ceiling_offset``, the curve's shape given ``kappa = log K - log a`` and the
    half-life. With NumPy, ``params`` hold draws ``(S,)`` and the results carry a
    leading draw axis.

    Returns
    -------
    offset, x, mu0, var0
        ``var0`` is a NumPy vector; ``mu0`` is one too except for the ceiling
        curves, where it depends on ``kappa``.
    """
    if spec.family.linear == "growth":
        mu0, var0 = linear_prior(spec, priors, seasons=False)
        x = curve_design(spec, dt, params.get("half_life"), xp=xp)
        return 0.0, x, mu0, var0
    kappa = params["log_ceiling_ratio"]
    lam = math.log(2.0) / params["half_life"]
    if xp is np:
        kappa, lam = np.asarray(kappa, dtype=float)[:, None], np.asarray(lam)[:, None]
        dt = np.asarray(dt, dtype=float)[None, :]
    decay = xp.exp(-lam * dt)
    offset = spec.family.ceiling_offset(kappa, decay, xp)
    mean, var = level_given_ratio(priors, kappa[..., 0] if xp is np else kappa)
    ones = xp.ones_like(offset)[..., None]
    mu0 = mean[:, None] if xp is np else xp.stack([mean])
    return offset, ones, mu0, np.array([var])


def _whitened_products(spec: ModelSpec, r, x, free, w, lag, sigma, phi, xp):
    """``log det T^-1``, ``z'z``, ``g = W'z`` and ``W'W`` of ``z = T r`` and ``W = T x[:, free]``.

    With NumPy the products come from row sums (:mod:`bayesgrowth.models.ar1_products`)
    for every value of ``(sigma, phi)`` at once and carry its leading axis; the rows
    switched off (``w`` 0, after the others) are left out.
    """
    if xp is np:
        on = np.asarray(w) > 0
        stats = ar1_products.gap_statistics(np.column_stack([r, x[:, free]])[on], lag[on])
        log_det, gram = ar1_products.whitened_gram(stats, sigma, phi)
        f = range(1, free.size + 1)
        return (log_det, gram[:, 0, 0], [gram[:, 0, i] for i in f],
                [[gram[:, i, j] for j in f] for i in f])
    z, log_scale = _whiten(spec, r, sigma, phi, lag, xp)
    z = w * z
    cols = [w * _whiten(spec, x[:, i], sigma, phi, lag, xp)[0] for i in free]
    return ((w * log_scale).sum(), xp.dot(z, z), [xp.dot(col, z) for col in cols],
            [[xp.dot(ci, cj) for cj in cols] for ci in cols])


def marginal_loglik(spec: ModelSpec, y, w, x, mu0, var0, lag, sigma, phi, xp=None):
    """A curve's log likelihood with its linear coefficients integrated out.

    ``y`` is the log values less the offset and any seasonal factors (those are
    sampled), ``x``, ``mu0`` and ``var0`` come from :func:`curve_pieces`. ``w``
    weights rows 0/1 (switched-off rows must follow the rows that are on, as the
    AR(1) innovations chain each row to the one before). ``xp`` is
    ``pytensor.tensor`` (the default: a term of the PyMC model) or NumPy, where
    ``sigma`` and ``phi`` are arrays ``(S,)`` of parameter values, ``lag`` is one row
    ``(n,)`` and the result holds one log likelihood per value (the exact engine's grid
    nodes).
    """
    if xp is None:
        import pytensor.tensor as xp
    free = np.flatnonzero(np.asarray(var0) > 0)
    r = y - xp.dot(x, mu0)
    log_det, zz, g, m = _whitened_products(spec, r, x, free, w, lag, sigma, phi, xp)
    out = -0.5 * math.log(2 * math.pi) * w.sum() - log_det - 0.5 * zz
    if free.size == 0:
        return out
    m = [[m[i][j] + (1.0 / var0[free[i]] if i == j else 0.0) for j in range(free.size)]
         for i in range(free.size)]
    logdet, quad = _small_solve(m, g, xp) if free.size <= 3 else _cholesky_solve(m, g)
    return out + 0.5 * quad - 0.5 * logdet - 0.5 * np.log(var0[free]).sum()


def draw_curve_coefficients(spec: ModelSpec, priors, draws: dict, t, log_y, axis,
                            rng: np.random.Generator, *, seasons: bool = False) -> dict:
    """``draws`` plus each draw's linear coefficients from their normal conditional.

    Seasonal factors, when the model has them, are among ``draws`` (they are
    sampled) and are taken off the log values first, unless ``seasons`` is true: then
    they are drawn with the other coefficients (a ``"growth"`` curve, seasonal factors
    integrated out, as the exact engines do). The ceiling curves also get
    ``log_k = log a + kappa``.
    """
    t = np.asarray(t, dtype=float)
    sigma = np.asarray(draws["sigma"], dtype=float)
    n_draws = sigma.size
    phi = np.asarray(draws["phi"], dtype=float) if spec.errors == "ar1" else None
    offset, x, mu0, var0 = curve_pieces(spec, priors, t - priors.t_ref, draws)
    y = np.asarray(log_y, dtype=float)[None, :] - offset
    m = 0
    if spec.seasonal and seasons:
        x, mu0, var0, m = with_season_columns(spec, priors, x, axis, t)
    elif spec.seasonal:
        y = y - np.asarray(draws["season"])[:, season_index(axis, t)[1]]
    beta = np.broadcast_to(mu0, (n_draws, var0.size)).copy()
    free = np.flatnonzero(var0 > 0)
    if free.size:
        r = y - (x @ np.asarray(mu0)[..., None])[..., 0]
        lead = np.broadcast_shapes(r.shape[:-1], x.shape[:-2])  # (1,) when shared by all draws
        c = np.concatenate([np.broadcast_to(r[..., None], (*lead, t.size, 1)),
                            np.broadcast_to(x[..., free], (*lead, t.size, free.size))], axis=-1)
        lag = np.concatenate([[1.0], np.diff(t)])
        stats = ar1_products.gap_statistics(c[0] if lead == (1,) else c, lag)
        _, gram = ar1_products.whitened_gram(stats, sigma, phi)
        g = gram[:, 1:, :1]
        chol = np.linalg.cholesky(np.diag(1.0 / var0[free]) + gram[:, 1:, 1:])
        mean = np.linalg.solve(np.swapaxes(chol, -1, -2), np.linalg.solve(chol, g))
        eps = rng.standard_normal((n_draws, free.size, 1))
        beta[:, free] += (mean + np.linalg.solve(np.swapaxes(chol, -1, -2), eps))[..., 0]
    if spec.family.linear == "ceiling":
        log_a = np.full(n_draws, priors.log_a_mu) if priors.fixed_initial else beta[:, 0]
        kappa = np.asarray(draws["log_ceiling_ratio"], dtype=float)
        return {**draws, "log_a": log_a, "log_k": log_a + kappa}
    return {**draws, **split_coefficients(spec, beta, m, priors.fixed_initial, priors.log_a_mu)}
