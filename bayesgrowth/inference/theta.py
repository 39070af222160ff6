"""The local trend's scale and persistence parameters ``theta``, and their priors.

The exact state-space engine integrates over these parameters on a grid in
transformed coordinates ``u`` (the log of each standard deviation, the log of
the growth half-life), so each prior is written here as a log density in ``u``,
Jacobian included. The NUTS engine uses the same families
(:func:`bayesgrowth.models.general.build_pymc_model`), so the two engines answer
the same question.

* ``sigma`` (noise): half-normal with scale ``priors.sigma_scale``;
* ``sigma_level`` (level shocks): Gamma(2, 2/s) with mean ``s =
  priors.level_shock_scale``, absent when ``s = 0``;
* ``sigma_growth`` (growth drift): Gamma(2, 2/s) with mean ``s =
  priors.growth_drift_scale``;
* ``sigma_season`` (drifting seasonal factors only): Gamma(2, 2/s) with mean ``s =
  priors.season_drift_scale``;
* ``half_life`` (mean-reverting growth only): log-normal with log-median
  ``priors.log_h_mu`` and log-sd ``priors.log_h_sd``; the persistence is
  ``rho = 2^(-1/half_life)``.
"""

from __future__ import annotations

import functools
import math
from dataclasses import dataclass

import numpy as np

from bayesgrowth.inference.normal import ndtri

__all__ = ["ThetaDim", "theta_dims"]

_TAIL = 1e-4  # the coarse grid spans the prior's central 1 - 2e-4 (in u)


@dataclass(frozen=True)
class ThetaDim:
    """One grid dimension: a parameter, its prior, and the grid coordinate.

    The locating grid runs in ``u = log x`` for every parameter (it must span
    orders of magnitude). The weighting grid runs in ``u = log x`` for the
    half-life and in ``u = x`` for the standard deviations, whose posteriors often
    reach down to zero, where a log grid would spend most of its nodes.

    Attributes
    ----------
    name : str
        Parameter name as in the posterior (``sigma``, ``sigma_level``, ...).
    dist : object
        Prior of the parameter on its natural scale, with ``logpdf`` and ``ppf``
        (checked against scipy.stats in the tests).
    linear_fine : bool
        Whether the weighting grid runs in ``x`` itself.
    """

    name: str
    dist: object
    linear_fine: bool = True

    def value(self, u: np.ndarray, log: bool) -> np.ndarray:
        """Parameter value at grid coordinate ``u``."""
        return np.exp(u) if log else u

    def log_prior(self, u: np.ndarray, log: bool) -> np.ndarray:
        """Prior log density of the coordinate ``u`` (Jacobian included for ``log x``)."""
        if log:
            return self.dist.logpdf(np.exp(u)) + u
        return self.dist.logpdf(u)

    def span(self, log: bool = True) -> tuple[float, float]:
        """Range of the coordinate holding all but ``2e-4`` of the prior mass."""
        lo, hi = self.dist.ppf([_TAIL, 1 - _TAIL])
        if log:
            return float(math.log(lo)), float(math.log(hi))
        return 0.0, float(hi)


class _HalfNormal:
    """Half-normal distribution with scale ``s`` (scipy.stats.halfnorm's density)."""

    def __init__(self, scale: float) -> None:
        self.s = float(scale)

    def logpdf(self, x):
        x = np.asarray(x, dtype=float)
        out = 0.5 * math.log(2 / math.pi) - math.log(self.s) - 0.5 * (x / self.s) ** 2
        return np.where(x >= 0, out, -np.inf)

    def ppf(self, q):
        return self.s * ndtri(0.5 + 0.5 * np.asarray(q, dtype=float))


class _Gamma2:
    """Gamma distribution with shape 2 and the given mean (rate ``2 / mean``)."""

    def __init__(self, mean: float) -> None:
        self.theta = float(mean) / 2.0

    def logpdf(self, x):
        x = np.asarray(x, dtype=float)
        with np.errstate(divide="ignore"):
            out = np.log(x) - x / self.theta - 2 * math.log(self.theta)
        return np.where(x > 0, out, -np.inf)

    def ppf(self, q):
        q = np.asarray(q, dtype=float)
        u = [_gamma2_quantile(float(p)) for p in q.reshape(-1)]
        return self.theta * np.array(u).reshape(q.shape)


def _gamma2_cdf(u: float) -> float:
    """``P(U <= u) = 1 - e^-u (1 + u)`` for ``U ~ Gamma(2, 1)``, to full relative precision."""
    if u >= 1.0:
        return 1.0 - math.exp(-u) * (1.0 + u)
    # below 1 the closed form cancels: its series sum_k>=2 (-1)^k (k-1) u^k / k! does not
    total, power = 0.0, u
    for k in range(2, 30):
        power *= u / k
        total += (-1) ** k * (k - 1) * power
    return total


@functools.lru_cache(maxsize=64)  # a grid asks for the same two tail quantiles many times
def _gamma2_quantile(q: float) -> float:
    """``u`` with ``P(U <= u) = q`` for ``U ~ Gamma(2, 1)``, by Newton steps.

    Below the median the steps solve ``log F(u) = log q`` from ``sqrt(2 q)`` (``F(u) <=
    u^2 / 2``), above it ``log S(u) = -u + log(1 + u) = log(1 - q)`` from ``-log(1 - q)``;
    both logs are concave (the Gamma(2) density is log-concave), so the steps approach the
    root from one side and cannot overshoot into a region where they diverge.
    """
    if not 0.0 < q < 1.0:
        return {0.0: 0.0, 1.0: math.inf}.get(q, math.nan)
    lower = q <= 0.5
    target = math.log(q) if lower else math.log1p(-q)
    u = math.sqrt(2.0 * q) if lower else -target
    for _ in range(100):
        if lower:
            f = _gamma2_cdf(u)
            step = (target - math.log(f)) * f / (u * math.exp(-u))
        else:
            step = (-u + math.log1p(u) - target) * (1.0 + u) / u
        u += step
        if abs(step) <= 1e-16 * u:
            break
    return u


class _LogNormal:
    """Log-normal distribution: ``log x ~ Normal(mu, sd)``."""

    def __init__(self, mu: float, sd: float) -> None:
        self.mu, self.sd = float(mu), float(sd)

    def logpdf(self, x):
        x = np.asarray(x, dtype=float)
        with np.errstate(divide="ignore"):
            lx = np.log(x)
        z = (lx - self.mu) / self.sd
        return -0.5 * z**2 - lx - math.log(self.sd) - 0.5 * math.log(2 * math.pi)

    def ppf(self, q):
        return np.exp(self.mu + self.sd * ndtri(np.asarray(q, dtype=float)))


def theta_dims(priors, mean_reverting: bool, season_drift: bool = False) -> list[ThetaDim]:
    """The grid dimensions for a local trend with these resolved priors."""
    dims = [ThetaDim("sigma", _HalfNormal(priors.sigma_scale))]
    if priors.level_shock_scale > 0:
        dims.append(ThetaDim("sigma_level", _Gamma2(priors.level_shock_scale)))
    dims.append(ThetaDim("sigma_growth", _Gamma2(priors.growth_drift_scale)))
    if season_drift:
        dims.append(ThetaDim("sigma_season", _Gamma2(priors.season_drift_scale)))
    if mean_reverting:
        dims.append(ThetaDim("half_life", _LogNormal(priors.log_h_mu, priors.log_h_sd),
                             linear_fine=False))
    return dims


def rho_of(half_life: np.ndarray) -> np.ndarray:
    """Growth persistence per period for a half-life in periods."""
    return np.power(0.5, 1.0 / np.asarray(half_life, dtype=float))
