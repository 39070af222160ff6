"""The math of every model in :mod:`bayesgrowth.models.spec`, in NumPy and in PyMC.

Curves (``dt = t - t_ref``, ``a`` the level at ``t_ref``, ``lambda = ln 2 / h`` with
``h`` the half-life of growth in periods):

* exponential: ``m = log a + b dt`` with ``b = log(1+g)``;
* damped: the log growth of period ``s`` is ``c + (b - c) delta^(s-1)``,
  ``delta = exp(-lambda)``, so ``m = log a + c dt + (b - c) (1 - delta^dt) / (1 - delta)``;
  growth in excess of the long-run rate ``c`` halves every ``h`` periods;
* logistic: ``R = K / (1 + ((K - a) / a) exp(-lambda dt))``; the odds
  ``(K - R) / R`` halve every ``h`` periods;
* Gompertz: ``R = K exp(-ln(K / a) exp(-lambda dt))``; ``ln(K / R)``, and with it
  the growth rate, halves every ``h`` periods;
* local trend (on the calendar grid ``j = 0, 1, ...`` from the first period):
  ``level_j = level_{j-1} + growth_j + sigma_level z_j`` and either
  ``growth_j = growth_{j-1} + sigma_growth u_j`` (random walk) or
  ``growth_j = c + rho (growth_{j-1} - c) + sigma_growth u_j`` (mean-reverting),
  with ``level_0 = log a`` and ``growth_0 = b``; ``z``, ``u`` standard normal. The
  states are integrated out in closed form (see :mod:`bayesgrowth.models.local_trend`),
  so only the scalar parameters are sampled; noise must be normal.

Errors: independent, or AR(1) ``e_t = phi^k e_{t-k} + eps_t`` across a gap of ``k``
periods, whose innovation has variance ``sigma^2 (1 - phi^(2k)) / (1 - phi^2)`` and
whose first error is drawn from the stationary ``sigma^2 / (1 - phi^2)``. The noise
``eps`` is normal or Student-t with scale ``sigma``.

PyMC's model keeps the data in ``pm.Data`` containers ``dt``, ``log_y`` and
``weight`` (plus ``lag`` and ``season_index`` when used), and the likelihood is
one 0/1-weighted ``pm.Potential``, so a backtest can switch trailing rows off
without changing any shape. With AR(1) errors each observation's density is
conditional on the row before it, so switched-off rows must come after the rows
that are on (as in a rolling origin). For the local trend the weights act on the
joint normal: a switched-off row is decoupled from the others (its residual and
covariances set to zero, its variance to one), which drops it exactly.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.special import gammaln

from bayesgrowth.models import linear, local_trend
from bayesgrowth.models.spec import ModelSpec, season_index
from bayesgrowth.seeds import stream

__all__ = [
    "curve_log_mean",
    "log_trend",
    "log_likelihood",
    "simulate_log",
    "latest_growth",
    "build_pymc_model",
    "complete_draws",
]

LN2 = math.log(2.0)


def curve_log_mean(model: str, p: dict, dt, xp=np):
    """Log of a parametric curve at ``dt``, with ``xp`` NumPy or ``pytensor.tensor``.

    With NumPy, ``p`` holds draws shaped ``(n_draws, 1)`` and ``dt`` a row vector.
    """
    if model == "exponential":
        return p["log_a"] + p["log1p_g"] * dt
    lam = LN2 / p["half_life"]
    if model == "damped":
        c = p["long_run"]
        return p["log_a"] + c * dt + (p["log1p_g"] - c) * xp.expm1(-lam * dt) / xp.expm1(-lam)
    if model == "logistic":
        return p["log_k"] - xp.log1p(xp.expm1(p["log_k"] - p["log_a"]) * xp.exp(-lam * dt))
    if model == "gompertz":
        return p["log_k"] - (p["log_k"] - p["log_a"]) * xp.exp(-lam * dt)
    raise ValueError(f"{model!r} is not a parametric curve")


def _column(draws: dict, names) -> dict:
    return {k: np.asarray(draws[k], dtype=float)[:, None] for k in names if k in draws}


def _seasons(spec: ModelSpec, draws: dict, t: np.ndarray, axis) -> np.ndarray:
    if not spec.seasonal:
        return np.zeros((1, len(t)))
    _, idx = season_index(axis, t)
    return np.asarray(draws["season"])[:, idx]


def _path_index(t: np.ndarray, t_ref: int, length: int) -> np.ndarray:
    j = np.asarray(t, dtype=int) - int(t_ref)
    if j.min() < 0 or j.max() >= length:
        raise ValueError("the local-trend path does not cover these periods")
    return j


def log_trend(
    spec: ModelSpec, draws: dict, t: np.ndarray, t_ref: int, axis=None, *, seasonal: bool = True
) -> np.ndarray:
    """Curve (plus seasonal factors) at times ``t``, shape ``(n_draws, len(t))``.

    For the local trend this is the prior mean path (its states are integrated out).
    """
    t = np.asarray(t, dtype=float)
    if spec.model == "local-trend":
        j = _path_index(t, t_ref, int(t.max() - t_ref) + 1)
        level, _ = local_trend.mean_paths(draws, int(j.max()) + 1, spec.mean_reverting)
        m = level[:, j]
    else:
        m = curve_log_mean(spec.model, _column(draws, spec.parameters()), (t - t_ref)[None, :])
    return m + _seasons(spec, draws, t, axis) if seasonal else m


def _noise_logpdf(spec: ModelSpec, x: np.ndarray, scale: np.ndarray, nu) -> np.ndarray:
    z = x / scale
    if spec.noise == "normal":
        return -0.5 * z**2 - np.log(scale) - 0.5 * math.log(2 * math.pi)
    nu = np.asarray(nu, dtype=float)[:, None]
    return (
        gammaln((nu + 1) / 2) - gammaln(nu / 2) - 0.5 * np.log(nu * math.pi) - np.log(scale)
        - (nu + 1) / 2 * np.log1p(z**2 / nu)
    )


def _innovations(spec: ModelSpec, draws: dict, resid: np.ndarray, t: np.ndarray):
    """Innovations and their scales: the AR(1) conditional decomposition of the errors."""
    sigma = np.asarray(draws["sigma"], dtype=float)[:, None]
    if spec.errors == "independent":
        return resid, np.broadcast_to(sigma, resid.shape)
    phi = np.asarray(draws["phi"], dtype=float)[:, None]
    lag = np.diff(np.asarray(t, dtype=float))[None, :]
    phik = phi**lag
    innov = np.concatenate([resid[:, :1], resid[:, 1:] - phik * resid[:, :-1]], axis=1)
    ratio = np.concatenate([1 / (1 - phi**2), (1 - phik**2) / (1 - phi**2)], axis=1)
    return innov, sigma * np.sqrt(ratio)


def log_likelihood(
    spec: ModelSpec, draws: dict, t: np.ndarray, values: np.ndarray, t_ref: int, axis=None
) -> np.ndarray:
    """Pointwise log density of the observed values (data scale), ``(n_draws, n_obs)``.

    With AR(1) errors the density of each observation is conditional on the one
    before it (the first one has the stationary density), so the pointwise terms
    add up to the joint density and suit leave-future-out and PSIS-LOO checks.
    The Jacobian ``1/R`` turns the log-scale density into the data-scale one.
    """
    values = np.asarray(values, dtype=float)
    if spec.model == "local-trend":
        y = np.log(values)[None, :] - _seasons(spec, draws, np.asarray(t), axis)
        y = np.broadcast_to(y, (np.asarray(draws["sigma"]).size, values.size))
        return local_trend.log_likelihood(spec, draws, t, y, t_ref) - np.log(values)[None, :]
    resid = np.log(values)[None, :] - log_trend(spec, draws, t, t_ref, axis)
    innov, scale = _innovations(spec, draws, resid, t)
    return _noise_logpdf(spec, innov, scale, draws.get("nu")) - np.log(values)[None, :]


def _noise_draws(spec: ModelSpec, draws: dict, shape, rng: np.random.Generator) -> np.ndarray:
    sigma = np.asarray(draws["sigma"], dtype=float)[:, None]
    if spec.noise == "normal":
        return sigma * rng.standard_normal(shape)
    nu = np.asarray(draws["nu"], dtype=float)[:, None]
    return sigma * rng.standard_t(np.broadcast_to(nu, shape))


def latest_growth(
    spec: ModelSpec, draws: dict, t_last: int, t_ref: int, series=None, seed: int = 0
) -> np.ndarray:
    """Log growth of the curve (no seasons) over the period ending at ``t_last``.

    For the local trend it is a draw of the growth state given the data, so the
    observed ``series`` is needed (``seed`` makes that draw reproducible).
    """
    if spec.model == "local-trend":
        t = series.t[series.t <= t_last]
        y = series.log_values[: t.size][None, :] - _seasons(spec, draws, t, series.axis)
        y = np.broadcast_to(y, (np.asarray(draws["sigma"]).size, t.size))
        rng = stream(seed, "latest_growth")
        return local_trend.conditional_draws(spec, draws, t, y, np.array([], int), t_ref, rng)[2]
    t = np.array([t_last - 1, t_last], dtype=float)
    m = log_trend(spec, draws, t, t_ref, seasonal=False)
    return m[:, 1] - m[:, 0]


def simulate_log(
    spec: ModelSpec,
    draws: dict,
    t_obs: np.ndarray,
    log_obs: np.ndarray,
    t_future: np.ndarray,
    t_ref: int,
    rng: np.random.Generator,
    axis=None,
) -> tuple[np.ndarray, np.ndarray]:
    """Posterior predictive draws of ``log R`` at future times, and of the curve alone.

    Parameters
    ----------
    spec : ModelSpec
    draws : dict
        Flat posterior draws.
    t_obs, log_obs : numpy.ndarray
        Observed times and log values (the AR(1) forecast starts from the last
        observed deviation, the local trend from its last state).
    t_future : numpy.ndarray
        Consecutive future times after ``t_obs[-1]``.
    t_ref : int
    rng : numpy.random.Generator
    axis : PeriodAxis, optional
        Needed for seasonal factors.

    Returns
    -------
    log_values, log_curve : numpy.ndarray, shape (n_draws, len(t_future))
        Predictive draws (curve, errors, noise) and the curve with seasons but
        without errors (for the local trend the curve includes the drift of level
        and growth, which is uncertainty about the trend itself).
    """
    t_future = np.asarray(t_future, dtype=float)
    t_last = int(np.asarray(t_obs)[-1])
    n_draws = np.asarray(draws["sigma"]).size
    shape = (n_draws, t_future.size)
    if spec.model == "local-trend":
        t_obs = np.asarray(t_obs)
        y = np.asarray(log_obs, dtype=float)[None, :] - _seasons(spec, draws, t_obs, axis)
        y = np.broadcast_to(y, (n_draws, t_obs.size))
        level, value, _ = local_trend.conditional_draws(
            spec, draws, t_obs, y, t_future.astype(int), t_ref, rng
        )
        season_f = _seasons(spec, draws, t_future, axis)
        return value + season_f, level + season_f
    m = log_trend(spec, draws, t_future, t_ref, seasonal=False)
    curve = m + _seasons(spec, draws, t_future, axis)
    eps = _noise_draws(spec, draws, shape, rng)
    if spec.errors == "independent":
        return curve + eps, curve
    phi = np.asarray(draws["phi"], dtype=float)
    e = np.asarray(log_obs, dtype=float)[-1] - log_trend(
        spec, draws, np.array([t_last]), t_ref, axis
    )[:, 0]
    errors = np.empty(shape)
    prev_t = t_last
    for h, tf in enumerate(t_future):
        k = int(tf - prev_t)
        ratio = np.sqrt((1 - phi ** (2 * k)) / (1 - phi**2))
        e = phi**k * e + ratio * eps[:, h]
        errors[:, h] = e
        prev_t = tf
    return curve + errors, curve


def _grid_length(t: np.ndarray, t_ref: int) -> int:
    return int(np.max(t) - t_ref) + 1


def build_pymc_model(
    spec: ModelSpec, priors, t: np.ndarray, log_y: np.ndarray, weights=None, *, axis=None
):
    """Build the PyMC model of ``spec`` with the data as ``pm.Data``.

    Parameters
    ----------
    spec : ModelSpec
    priors : ResolvedPriors
    t, log_y : numpy.ndarray
        Time index and log values of the observations.
    weights : numpy.ndarray, optional
        0/1 weight of each observation in the likelihood (default all 1).
    axis : PeriodAxis, optional
        The calendar; required for seasonal factors.

    Returns
    -------
    pymc.Model
    """
    import pymc as pm
    import pytensor.tensor as pt

    t = np.asarray(t, dtype=float)
    log_y = np.asarray(log_y, dtype=float)
    weights = np.ones_like(t) if weights is None else np.asarray(weights, dtype=float)
    t_ref = priors.t_ref
    with pm.Model() as model:
        dt = pm.Data("dt", t - t_ref)
        y = pm.Data("log_y", log_y)
        w = pm.Data("weight", weights)
        if spec.model == "local-trend":
            _local_trend_likelihood(spec, priors, t, y, w, axis)
            return model
        if linear.integrates_linear(spec):
            _integrated_curve_likelihood(spec, priors, t, dt, y, w, axis)
            return model
        if priors.fixed_initial:
            log_a = pm.Deterministic("log_a", pm.math.constant(priors.log_a_mu))
        else:
            log_a = pm.Normal("log_a", mu=priors.log_a_mu, sigma=priors.log_a_sd)
        p = {"log_a": log_a}
        if spec.model in ("exponential", "damped"):
            p["log1p_g"] = pm.Normal("log1p_g", mu=priors.log1p_g_mu, sigma=priors.log1p_g_sd)
        if spec.model in ("logistic", "gompertz"):
            p["log_k"] = pm.Normal("log_k", mu=priors.log_k_mu, sigma=priors.log_k_sd)
        if spec.model in ("damped", "logistic", "gompertz"):
            log_h = pm.Normal("log_half_life", mu=priors.log_h_mu, sigma=priors.log_h_sd)
            p["half_life"] = pm.Deterministic("half_life", pt.exp(log_h))
        if spec.model == "damped":
            if priors.long_run_sd == 0:
                p["long_run"] = pm.Deterministic(
                    "long_run", pm.math.constant(priors.long_run_mu)
                )
            else:
                p["long_run"] = pm.Normal(
                    "long_run", mu=priors.long_run_mu, sigma=priors.long_run_sd
                )
        sigma = pm.HalfNormal("sigma", sigma=priors.sigma_scale)

        mu = curve_log_mean(spec.model, p, dt, pt)
        season_term = 0.0
        if spec.seasonal:
            m, s_idx = season_index(axis, t)
            season = pm.ZeroSumNormal("season", sigma=priors.seasonal_scale, shape=m)
            season_term = season[pm.Data("season_index", s_idx.astype("int64"))]
        mu = mu + season_term

        resid = y - mu
        if spec.errors == "ar1":
            phi = pm.Beta("phi", alpha=priors.phi_alpha, beta=priors.phi_beta)
            lag = pm.Data("lag", np.concatenate([[1.0], np.diff(t)]))
            phik = phi ** lag[1:]
            innov = pt.concatenate([resid[:1], resid[1:] - phik * resid[:-1]])
            ratio = pt.concatenate(
                [pt.stack([1.0 / (1.0 - phi**2)]), (1.0 - phik**2) / (1.0 - phi**2)]
            )
            scale = sigma * pt.sqrt(ratio)
        else:
            innov, scale = resid, sigma
        if spec.noise == "student-t":
            nu = pm.Gamma("nu", alpha=priors.nu_alpha, beta=priors.nu_beta)
            dist = pm.StudentT.dist(nu=nu, mu=0.0, sigma=scale)
        else:
            dist = pm.Normal.dist(mu=0.0, sigma=scale)
        pm.Potential("loglik", (w * pm.logp(dist, innov)).sum())
    return model


def _integrated_curve_likelihood(spec, priors, t, dt, y, w, axis) -> None:
    """A curve with normal noise: log a, b (and c) integrated out.

    The scales, the half-life, the seasonal factors and, for the logistic and
    Gompertz curves, ``log_ceiling_ratio = log K - log a`` are sampled (see
    :mod:`bayesgrowth.models.linear`).
    """
    import pymc as pm
    import pytensor.tensor as pt

    params = {}
    if spec.model in ("logistic", "gompertz"):
        mean, sd = linear.ceiling_ratio_prior(priors)
        params["log_ceiling_ratio"] = pm.Normal("log_ceiling_ratio", mu=mean, sigma=sd)
    if spec.model in ("damped", "logistic", "gompertz"):
        log_h = pm.Normal("log_half_life", mu=priors.log_h_mu, sigma=priors.log_h_sd)
        params["half_life"] = pm.Deterministic("half_life", pt.exp(log_h))
    sigma = pm.HalfNormal("sigma", sigma=priors.sigma_scale)
    phi = pm.Beta("phi", alpha=priors.phi_alpha, beta=priors.phi_beta) if (
        spec.errors == "ar1") else None
    lag = pm.Data("lag", np.concatenate([[1.0], np.diff(t)]))
    if spec.seasonal:
        m, s_idx = season_index(axis, t)
        season = pm.ZeroSumNormal("season", sigma=priors.seasonal_scale, shape=m)
        y = y - season[pm.Data("season_index", s_idx.astype("int64"))]
    offset, x, mu0, var0 = linear.curve_pieces(spec, priors, dt, params, xp=pt)
    pm.Potential("loglik", linear.marginal_loglik(spec, y - offset, w, x, mu0, var0, lag,
                                                  sigma, phi))


def complete_draws(spec: ModelSpec, priors, draws: dict, t, log_y, axis,
                   rng: np.random.Generator) -> dict:
    """Flat draws plus the linear coefficients a PyMC model of ``spec`` integrated out.

    ``draws`` holds what the model sampled, including its stand-ins (such as
    ``log_ceiling_ratio``), which are replaced by the parameters they stand for.
    With no observations (``t`` empty) the coefficients come from their prior.
    Specs that sample every parameter get their draws back unchanged.
    """
    if not linear.integrates_linear(spec):
        return draws
    if np.size(t) == 0:
        done = linear.prior_coefficients(spec, priors, draws, axis, rng)
    elif spec.model == "local-trend":
        done = local_trend.draw_linear(spec, priors, draws, t, log_y, axis, rng)
    else:
        done = linear.draw_curve_coefficients(spec, priors, draws, t, log_y, axis, rng)
    return {k: v for k, v in done.items() if k not in linear.STAND_INS}


def _local_trend_likelihood(spec, priors, t, y, w, axis) -> None:
    """The local trend's scales and their likelihood, the linear coefficients integrated out.

    The log values are normal with mean ``X mu0`` and covariance ``K + X V X'``
    (see :mod:`bayesgrowth.models.local_trend`); rows with weight 0 are decoupled
    from the others (zero residual and covariances, unit variance), which drops
    them exactly.
    """
    import pymc as pm
    import pytensor.tensor as pt

    t_ref = priors.t_ref
    if np.min(t) != t_ref:
        raise ValueError(
            "the local-trend model anchors its level at the first observation; "
            "leave the reference period unset"
        )
    sigma = pm.HalfNormal("sigma", sigma=priors.sigma_scale)
    if priors.level_shock_scale > 0:
        s_l = pm.Gamma("sigma_level", alpha=2.0, beta=2.0 / priors.level_shock_scale)
    else:
        s_l = pm.Deterministic("sigma_level", pm.math.constant(0.0))
    s_g = pm.Gamma("sigma_growth", alpha=2.0, beta=2.0 / priors.growth_drift_scale)
    rho = None
    if spec.mean_reverting:  # same prior as the exact engine (bayesgrowth.inference.theta)
        log_h = pm.Normal("log_half_life", mu=priors.log_h_mu, sigma=priors.log_h_sd)
        pm.Deterministic("half_life", pt.exp(log_h))
        rho = pm.Deterministic("rho", pt.exp(-math.log(2.0) * pt.exp(-log_h)))
    phi = pm.Beta("phi", alpha=priors.phi_alpha, beta=priors.phi_beta) if (
        spec.errors == "ar1") else None

    idx = (t - t_ref).astype(int)
    n_grid = int(idx.max()) + 1
    rows, m = linear.season_rows(spec, axis, t)
    mu0, var0 = linear.linear_prior(spec, priors, m)
    if spec.mean_reverting:
        a, _, b = local_trend.coefficients(rho, n_grid, xp=pt)
        x = local_trend.design(spec, idx, rho, rows, xp=pt)
    else:
        a, _, b = local_trend.coefficients(None, n_grid)
        x = local_trend.design(spec, idx, None, rows)
    a_o, b_o = a[idx], b[idx]
    cov = s_g**2 * pt.dot(a_o, a_o.T) + s_l**2 * (b_o @ b_o.T)
    cov = cov + local_trend.error_covariance(sigma, phi, t, xp=pt)
    cov = cov + pt.dot(x * var0, x.T)
    ww = pt.outer(w, w)
    cov = ww * cov + pt.diag(1.0 - w) + local_trend._JITTER * np.eye(t.size)
    resid = w * (y - pt.dot(x, mu0))
    dropped = 0.5 * math.log(2 * math.pi) * (1.0 - w).sum()  # each decoupled row's N(0, 1) at 0
    pm.Potential("loglik",
                 pm.logp(pm.MvNormal.dist(mu=pt.zeros(t.size), cov=cov), resid) + dropped)

