"""The math of every model in :mod:`bayesgrowth.models.spec`, in NumPy and in PyMC.

Each family's curve is in its own module and declared in the registry
(:mod:`bayesgrowth.models.registry`): ``dt = t - t_ref``, ``a`` the level at
``t_ref``, ``lambda = ln 2 / h`` with ``h`` the half-life of growth in periods:

* exponential: ``m = log a + b dt`` with ``b = log(1+g)``
  (:mod:`~bayesgrowth.models.exponential`);
* damped: growth in excess of the long-run rate ``c`` halves every ``h`` periods
  (:mod:`~bayesgrowth.models.damped`);
* logistic and Gompertz: growth toward a ceiling ``K`` (:mod:`~bayesgrowth.models.logistic`,
  :mod:`~bayesgrowth.models.gompertz`);
* local trend (on the calendar grid ``j = 0, 1, ...`` from the first period):
  ``level_j = level_{j-1} + growth_j + sigma_level z_j`` and either
  ``growth_j = growth_{j-1} + sigma_growth u_j`` (random walk) or
  ``growth_j = c + rho (growth_{j-1} - c) + sigma_growth u_j`` (mean-reverting),
  with ``level_0 = log a`` and ``growth_0 = b``; ``z``, ``u`` standard normal. The
  states are integrated out in closed form (see :mod:`bayesgrowth.models.local_trend`),
  so only the scalar parameters are sampled; noise must be normal. Families with
  such states (``ModelFamily.states``) take the local trend's paths here.

Errors: independent, or AR(1) ``e_t = phi^k e_{t-k} + eps_t`` across a gap of ``k``
periods, whose innovation has variance ``sigma^2 (1 - phi^(2k)) / (1 - phi^2)`` and
whose first error is drawn from the stationary ``sigma^2 / (1 - phi^2)``. The noise
``eps`` is normal or Student-t with scale ``sigma``.

PyMC's model (:mod:`bayesgrowth.models.pymc_build`) keeps the data in ``pm.Data``
containers ``dt``, ``log_y`` and ``weight`` (plus ``lag`` and ``season_index`` when
used), and the likelihood is one 0/1-weighted ``pm.Potential``, so a backtest can switch
trailing rows off without changing any shape. With AR(1) errors each observation's
density is conditional on the row before it, so switched-off rows must come after the
rows that are on (as in a rolling origin). For the local trend the weights act on the
joint normal: a switched-off row is decoupled from the others (its residual and
covariances set to zero, its variance to one), which drops it exactly.
"""

from __future__ import annotations

import math

import numpy as np

from bayesgrowth.models import linear, local_trend, registry
from bayesgrowth.models.pymc_build import build_pymc_model
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

def curve_log_mean(model: str, p: dict, dt, xp=np):
    """Log of a parametric curve at ``dt``, with ``xp`` NumPy or ``pytensor.tensor``.

    With NumPy, ``p`` holds draws shaped ``(n_draws, 1)`` and ``dt`` a row vector.
    The formula is the family's ``log_mean`` (see :mod:`bayesgrowth.models.registry`).
    """
    family = registry.get_family(model)
    if family.log_mean is None:
        raise ValueError(f"{model!r} is not a parametric curve")
    return family.log_mean(p, dt, xp)


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
    if spec.family.states:
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
    from scipy.special import gammaln  # here: scipy.special costs 0.1 s, normal noise skips it

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
    if spec.family.states:
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
    if spec.family.states:
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
    if spec.family.states:
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
    last = np.asarray(log_obs, dtype=float)[-1] - log_trend(
        spec, draws, np.array([t_last]), t_ref, axis
    )[:, 0]
    return curve + _ar1_errors(draws["phi"], last, t_last, t_future, eps), curve


def _ar1_errors(phi, e, t_last: int, t_future: np.ndarray, eps: np.ndarray) -> np.ndarray:
    """AR(1) errors at ``t_future`` from the last observed error ``e`` and innovations ``eps``."""
    phi = np.asarray(phi, dtype=float)
    errors = np.empty(eps.shape)
    prev_t = t_last
    for h, tf in enumerate(t_future):
        k = int(tf - prev_t)
        ratio = np.sqrt((1 - phi ** (2 * k)) / (1 - phi**2))
        e = phi**k * e + ratio * eps[:, h]
        errors[:, h] = e
        prev_t = tf
    return errors


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
    elif spec.family.states:
        done = local_trend.draw_linear(spec, priors, draws, t, log_y, axis, rng)
    else:
        done = linear.draw_curve_coefficients(spec, priors, draws, t, log_y, axis, rng)
    return {k: v for k, v in done.items() if k not in linear.STAND_INS}
