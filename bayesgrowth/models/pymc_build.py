"""The PyMC model of every :class:`~bayesgrowth.models.spec.ModelSpec`.

The data are ``pm.Data`` containers ``dt``, ``log_y`` and ``weight`` (plus ``lag``
and ``season_index`` when used), and the likelihood is one 0/1-weighted
``pm.Potential``, so a backtest can switch trailing rows off without changing any
shape (see :mod:`bayesgrowth.models.general` for the math). Three paths:

* a family with states (the local trend): its scales, the linear coefficients
  integrated out of a joint normal;
* a family whose linear coefficients can be integrated out (``ModelFamily.linear``)
  with normal noise: the remaining parameters sampled, the coefficients drawn
  afterwards (:func:`bayesgrowth.models.general.complete_draws`);
* otherwise every parameter sampled with the priors its family declares
  (``Parameter.sample``), on any error structure and noise.

PyMC is imported inside the functions only.
"""

from __future__ import annotations

import math

import numpy as np

from bayesgrowth.models import linear, local_trend, season_drift
from bayesgrowth.models.spec import ModelSpec, season_index

__all__ = ["build_pymc_model"]


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

    t = np.asarray(t, dtype=float)
    log_y = np.asarray(log_y, dtype=float)
    weights = np.ones_like(t) if weights is None else np.asarray(weights, dtype=float)
    with pm.Model() as model:
        dt = pm.Data("dt", t - priors.t_ref)
        y = pm.Data("log_y", log_y)
        w = pm.Data("weight", weights)
        if spec.family.states:
            _local_trend_likelihood(spec, priors, t, y, w, axis)
        elif linear.integrates_linear(spec):
            _integrated_curve_likelihood(spec, priors, t, dt, y, w, axis)
        else:
            _sampled_curve_likelihood(spec, priors, t, dt, y, w, axis)
    return model


def _sampled_curve_likelihood(spec, priors, t, dt, y, w, axis) -> None:
    """Every parameter sampled: the level, the family's parameters, the scales."""
    import pymc as pm
    import pytensor.tensor as pt

    if priors.fixed_initial:
        log_a = pm.Deterministic("log_a", pm.math.constant(priors.log_a_mu))
    else:
        log_a = pm.Normal("log_a", mu=priors.log_a_mu, sigma=priors.log_a_sd)
    p = {"log_a": log_a}
    for par in spec.family.parameters:
        p[par.name] = par.sample(priors)
    sigma = pm.HalfNormal("sigma", sigma=priors.sigma_scale)
    mu = spec.family.log_mean(p, dt, pt)
    season_term = 0.0
    if spec.seasonal:
        m, s_idx = season_index(axis, t)
        season = pm.ZeroSumNormal("season", sigma=priors.seasonal_scale, shape=m)
        season_term = season[pm.Data("season_index", s_idx.astype("int64"))]
    pm.Potential("loglik", _error_logp(spec, priors, t, y - (mu + season_term), sigma, w))


def _error_logp(spec, priors, t, resid, sigma, w):
    """Weighted log density of the residuals under the errors and noise of ``spec``."""
    import pymc as pm
    import pytensor.tensor as pt

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
    return (w * pm.logp(dist, innov)).sum()


def _integrated_curve_likelihood(spec, priors, t, dt, y, w, axis) -> None:
    """A curve with normal noise: log a, b (and c) integrated out.

    The scales, the family's other parameters (the half-life), the seasonal
    factors and, for the ceiling curves, ``log_ceiling_ratio = log K - log a`` are
    sampled (see :mod:`bayesgrowth.models.linear`).
    """
    import pymc as pm
    import pytensor.tensor as pt

    family = spec.family
    params = {}
    if family.linear == "ceiling":
        mean, sd = linear.ceiling_ratio_prior(priors)
        params["log_ceiling_ratio"] = pm.Normal("log_ceiling_ratio", mu=mean, sigma=sd)
    for par in family.parameters:
        if par.name not in linear.COEFFICIENTS[family.linear]:
            params[par.name] = par.sample(priors)
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




def _local_trend_likelihood(spec, priors, t, y, w, axis) -> None:
    """The local trend's scales and their likelihood, the linear coefficients integrated out.

    The log values are normal with mean ``X mu0`` and covariance ``K + X V X'``
    (see :mod:`bayesgrowth.models.local_trend`; drifting seasons add their deviations'
    covariance to ``K``); rows with weight 0 are decoupled
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
    if spec.season_drift:  # same prior as the exact engine (bayesgrowth.inference.theta)
        s_s = pm.Gamma("sigma_season", alpha=2.0, beta=2.0 / priors.season_drift_scale)
        d_o = season_drift.season_coefficients(m, n_grid)[idx]
        cov = cov + s_s**2 * (d_o @ d_o.T)
    cov = cov + local_trend.error_covariance(sigma, phi, t, xp=pt)
    cov = cov + pt.dot(x * var0, x.T)
    ww = pt.outer(w, w)
    cov = ww * cov + pt.diag(1.0 - w) + local_trend._JITTER * np.eye(t.size)
    resid = w * (y - pt.dot(x, mu0))
    dropped = 0.5 * math.log(2 * math.pi) * (1.0 - w).sum()  # each decoupled row's N(0, 1) at 0
    pm.Potential("loglik",
                 pm.logp(pm.MvNormal.dist(mu=pt.zeros(t.size), cov=cov), resid) + dropped)

