"""Partial pooling: exponential growth of many series whose growth rates share a group.

Each series ``i`` has its own curve ``log R_it = log a_i + (t - t_ref,i) b_i + e_it``
with ``b_i = log(1 + g_i)``. The growth rates are drawn from one Normal whose centre
and spread are learned from all the series::

    mu  ~ Normal(log1p_g_mu, log1p_g_sd)        the single-series growth prior
    tau ~ HalfNormal(growth_spread)             how much the series' growth differs
    b_i = mu + tau * z_i,  z_i ~ Normal(0, 1)   non-centred

so a short series borrows strength from the others: its growth is pulled towards
the group centre as far as its own data are weak and the group is tight. The
initial values keep the single-series prior (``log a_i`` around the log of series
``i``'s value at its reference period), sampled at the centre of the series'
observed times as in :func:`bayesgrowth.models.exponential.build_pymc_model`.

Parameterisation. Non-centred (``z_i``) suits series whose own data say little
about their growth: their ``b_i`` follows ``mu`` and ``tau`` closely, the funnel
that defeats NUTS in the centred form. A long series pins its ``b_i`` by itself;
non-centred, every move of ``mu`` or ``tau`` then needs a matching move of its
``z_i``, a ridge NUTS crosses in tiny steps (measured: bulk ESS about 200 of 4,000
draws for ``mu`` on 14 series of 24 points and 6 of 5 points). So each series is
non-centred unless its data alone pin the growth rate more tightly than the group
spread does (least-squares standard error of its slope below a moment estimate of
``tau``, see :func:`choose_centred`), in which case ``b_i ~ Normal(mu, tau)`` is sampled directly
(Papaspiliopoulos, Roberts & Sköld 2007, "A general framework for the
parametrization of hierarchical models", *Statistical Science* 22(1)). The choice
changes how the sampler moves, never the model or its posterior.

Noise is per series, ``sigma_i ~ HalfNormal(sigma_scale)`` as for one series, or
(``pool_noise=True``) pooled on the log scale: ``log sigma_i = m + s w_i`` with
``m ~ Normal(log(0.674 sigma_scale), 1)`` (0.674 sigma_scale is the median of the
single-series half-normal prior), ``s ~ HalfNormal(noise_spread)`` and
``w_i ~ Normal(0, 1)``. Errors are independent, or AR(1) per series with
``phi_i ~ Beta(phi_alpha, phi_beta)`` and the same gap-aware form as
:mod:`bayesgrowth.models.general`.

Group prior defaults, and why
-----------------------------
growth spread
    ``tau ~ HalfNormal(0.10)``: "the series' growth rates differ from the group's
    by up to about 20 points per period" (two prior sd). Series of one business
    line usually differ by a few points; the scale is wide enough that a group of
    unlike series is not squeezed together by the prior alone, while still
    letting a tight group pool strongly.
noise spread (with ``pool_noise``)
    ``s ~ HalfNormal(0.5)``: noise levels within a factor of about e (2.7) of
    each other across series, within two prior sd.

PyMC is imported only inside :func:`build_pymc_model`.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.priors import ResolvedPriors

__all__ = ["GroupPrior", "PanelData", "build_pymc_model", "stack_panel", "ERRORS"]

ERRORS = ("independent", "ar1")

#: Median of a half-normal distribution as a multiple of its scale, ``Phi^-1(0.75)``.
HALF_NORMAL_MEDIAN = 0.6744897501960817


@dataclass(frozen=True)
class GroupPrior:
    """Beliefs about how alike the series of a group are.

    Parameters
    ----------
    growth_spread_pts : float
        Half-normal scale of the spread ``tau`` of the series' ``log(1+g)`` around
        the group centre, in percentage points (10 means 0.10).
    pool_noise : bool
        Also pool the noise levels (on the log scale).
    noise_spread : float
        Half-normal scale of the spread of ``log sigma`` across series.
    """

    growth_spread_pts: float = 10.0
    pool_noise: bool = False
    noise_spread: float = 0.5

    def __post_init__(self) -> None:
        if not (math.isfinite(self.growth_spread_pts) and self.growth_spread_pts > 0):
            raise ValueError(
                f"growth spread must be > 0 points, got {self.growth_spread_pts}"
            )
        if not (math.isfinite(self.noise_spread) and self.noise_spread > 0):
            raise ValueError(f"noise spread must be > 0, got {self.noise_spread}")

    @property
    def tau_scale(self) -> float:
        """Half-normal scale of ``tau`` on the ``log(1+g)`` scale."""
        return self.growth_spread_pts / 100


@dataclass(frozen=True)
class PanelData:
    """The observations of all series stacked into one long vector.

    Attributes
    ----------
    index : numpy.ndarray of int
        Series position of each observation.
    dt : numpy.ndarray
        ``t - t_ref`` of each observation, on its own series' reference.
    log_y : numpy.ndarray
    lag : numpy.ndarray
        Periods since the previous observation of the same series (1 for firsts).
    first : numpy.ndarray of bool
        Whether the observation is its series' first.
    anchor : numpy.ndarray
        Centre of each series' ``log a`` prior.
    centre : numpy.ndarray
        Mean ``dt`` of each series.
    centred : numpy.ndarray of bool
        Whether each series' growth is sampled centred (see the module docstring).
    """

    index: np.ndarray
    dt: np.ndarray
    log_y: np.ndarray
    lag: np.ndarray
    first: np.ndarray
    anchor: np.ndarray
    centre: np.ndarray
    centred: np.ndarray

    @property
    def n_series(self) -> int:
        """Number of series."""
        return int(self.anchor.size)


def _slope_fit(s: GrowthSeries) -> tuple[float, float, float]:
    """Least-squares slope of ``log y`` on ``t``, residual sd and ``sum (t - tbar)^2``."""
    t = s.t.astype(float)
    sxx = float(((t - t.mean()) ** 2).sum())
    slope, intercept = np.polyfit(t, s.log_values, 1)
    resid = s.log_values - (intercept + slope * t)
    return float(slope), float(np.sqrt((resid**2).sum() / max(s.n - 2, 1))), sxx


def choose_centred(series: list[GrowthSeries], tau_scale: float) -> np.ndarray:
    """Which series to sample centred.

    Those whose slope's standard error is below a rough estimate of the group spread.
    The spread is the DerSimonian-Laird moment estimate from the least-squares
    slopes and their standard errors (DerSimonian & Laird 1986, "Meta-analysis in
    clinical trials", *Controlled Clinical Trials* 7(3)). The standard errors use
    the median residual sd of all series, not each series' own: a 4-point series
    that happens to fit a line closely would otherwise look well determined. With
    fewer than 3 series nothing is learned about the spread and every series is
    non-centred.
    ``tau_scale`` is kept for the record of the choice; it does not enter it.
    """
    if len(series) < 3:
        return np.zeros(len(series), dtype=bool)
    est = np.array([_slope_fit(s) for s in series])
    slopes = est[:, 0]
    se = max(float(np.median(est[:, 1])), 1e-3) / np.sqrt(est[:, 2])
    w = 1.0 / se**2
    mean = float(np.sum(w * slopes) / w.sum())
    q = float(np.sum(w * (slopes - mean) ** 2))
    denom = float(w.sum() - np.sum(w**2) / w.sum())
    tau_hat = float(np.sqrt(max((q - (len(series) - 1)) / denom, 0.0))) if denom > 0 else 0.0
    return se < tau_hat


def stack_panel(
    series: list[GrowthSeries], priors: list[ResolvedPriors], tau_scale: float = 0.1
) -> PanelData:
    """Stack ``series`` (with their resolved priors) into :class:`PanelData`.

    ``tau_scale`` is the prior scale of the group spread, used to choose each
    series' parameterisation when there are too few series to estimate it.
    """
    index, dt, log_y, lag, first = [], [], [], [], []
    for i, (s, p) in enumerate(zip(series, priors, strict=True)):
        index.append(np.full(s.n, i))
        dt.append((s.t - p.t_ref).astype(float))
        log_y.append(s.log_values)
        lag.append(np.concatenate([[1.0], np.diff(s.t).astype(float)]))
        first.append(np.arange(s.n) == 0)
    return PanelData(
        index=np.concatenate(index).astype("int64"),
        dt=np.concatenate(dt),
        log_y=np.concatenate(log_y),
        lag=np.concatenate(lag),
        first=np.concatenate(first),
        anchor=np.array([p.log_a_mu for p in priors]),
        centre=np.array([d.mean() for d in dt]),
        centred=choose_centred(series, tau_scale),
    )


def build_pymc_model(
    data: PanelData, priors: ResolvedPriors, group: GroupPrior, errors: str = "independent"
):
    """Build the pooled PyMC model.

    Parameters
    ----------
    data : PanelData
    priors : ResolvedPriors
        Priors of any one series: their spreads (identical for every series) and
        the growth prior's centre, which becomes the prior of the group centre.
    group : GroupPrior
    errors : {"independent", "ar1"}

    Returns
    -------
    pymc.Model
        Free variables ``mu_growth``, ``tau_growth``, ``z_growth`` (non-centred
        series) and ``growth_centred`` (centred series), ``level`` and
        the noise (``sigma`` or ``log_sigma_mu``, ``log_sigma_sd``, ``z_sigma``),
        plus ``phi`` for AR(1); deterministics ``log1p_g``, ``log_a``, ``sigma``.
    """
    import pymc as pm
    import pytensor.tensor as pt

    if errors not in ERRORS:
        raise ValueError(f"errors must be one of {', '.join(ERRORS)}, got {errors!r}")
    n = data.n_series
    with pm.Model(coords={"series": np.arange(n)}) as model:
        idx = pm.Data("series_index", data.index)
        dt = pm.Data("dt", data.dt)
        y = pm.Data("log_y", data.log_y)
        anchor = pm.Data("anchor", data.anchor)
        centre = pm.Data("centre", data.centre)
        b = _pooled_growth(data, priors, group)
        level = pm.Normal("level", mu=anchor + b * centre, sigma=priors.log_a_sd, dims="series")
        log_a = pm.Deterministic("log_a", level - b * centre, dims="series")
        if group.pool_noise:
            m = pm.Normal("log_sigma_mu", math.log(HALF_NORMAL_MEDIAN * priors.sigma_scale), 1.0)
            s = pm.HalfNormal("log_sigma_sd", sigma=group.noise_spread)
            w = pm.Normal("z_sigma", 0.0, 1.0, dims="series")
            sigma = pm.Deterministic("sigma", pt.exp(m + s * w), dims="series")
        else:
            sigma = pm.HalfNormal("sigma", sigma=priors.sigma_scale, dims="series")
        resid = y - (log_a[idx] + b[idx] * dt)
        if errors == "ar1":
            innov, scale = _ar1_innovations(data, priors, resid, sigma, idx)
        else:
            innov, scale = resid, sigma[idx]
        pm.Potential("loglik", pm.logp(pm.Normal.dist(mu=0.0, sigma=scale), innov).sum())
    return model


def _pooled_growth(data: PanelData, priors: ResolvedPriors, group: GroupPrior):
    """Each series' log growth around the group centre, centred or not per series."""
    import pymc as pm
    import pytensor.tensor as pt

    mu_g = pm.Normal("mu_growth", mu=priors.log1p_g_mu, sigma=priors.log1p_g_sd)
    tau_g = pm.HalfNormal("tau_growth", sigma=group.tau_scale)
    b = pt.zeros(data.n_series)
    c_idx = np.flatnonzero(data.centred)
    n_idx = np.flatnonzero(~data.centred)
    if n_idx.size:
        z_g = pm.Normal("z_growth", 0.0, 1.0, shape=n_idx.size)
        b = pt.set_subtensor(b[n_idx], mu_g + tau_g * z_g)
    if c_idx.size:
        b_c = pm.Normal("growth_centred", mu=mu_g, sigma=tau_g, shape=c_idx.size)
        b = pt.set_subtensor(b[c_idx], b_c)
    return pm.Deterministic("log1p_g", b, dims="series")


def _ar1_innovations(data: PanelData, priors: ResolvedPriors, resid, sigma, idx):
    """AR(1) innovations of the stacked residuals and their scales (``phi`` per series)."""
    import pymc as pm
    import pytensor.tensor as pt

    phi = pm.Beta("phi", alpha=priors.phi_alpha, beta=priors.phi_beta, dims="series")
    lag = pm.Data("lag", data.lag)
    first = pm.Data("first", data.first.astype(float))
    prev = pt.concatenate([resid[:1], resid[:-1]])  # previous obs; unused for firsts
    phik = phi[idx] ** lag
    innov = resid - (1.0 - first) * phik * prev
    one_minus = 1.0 - phi[idx] ** 2
    ratio = first / one_minus + (1.0 - first) * (1.0 - phik**2) / one_minus
    return innov, sigma[idx] * pt.sqrt(ratio)
