"""Priors stated the way an analyst thinks, and their translation to the log scale.

The exponential model is ``log R_t = log a + (t - t_ref) * log(1 + g) + e_t`` with
``e_t ~ Normal(0, sigma)``. Three small prior objects describe beliefs about
``a``, ``g`` and ``sigma`` in practitioner terms; :meth:`Priors.resolve` turns
them into the numbers both engines use, so the NUTS and exact engines answer the
same question.

Defaults, and why they are weakly informative
---------------------------------------------
initial value
    "The observed value at the reference period, give or take 50%": a normal
    prior on ``log a`` centred on the log of that observation with standard
    deviation ``log(1.5) = 0.405``. One observation already pins the level far
    more tightly than this on any series with modest noise, so the anchor mostly
    guards against absurd levels on very short series. ``give_or_take_pct=0``
    fixes the initial value (the limit of a very strong anchor).
growth
    "0% per period, give or take 30 points": a normal prior on ``log(1+g)`` with
    mean 0 and sd 0.30. It does not presume growth, and allows anything from a
    halving to a doubling per period within about two sd; with eight or more
    observations the data dominate it.
noise
    "Typical deviation from trend about 30%": a half-normal prior on ``sigma``
    with scale ``log(1.3) = 0.262``. Revenue series usually deviate from a smooth
    trend by a few percent; this scale admits far noisier series while keeping the
    posterior of ``sigma`` proper on three or four points.
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, field

__all__ = ["InitialValuePrior", "GrowthPrior", "NoisePrior", "Priors", "ResolvedPriors"]


def _check(condition: bool, message: str) -> None:
    if not condition:
        raise ValueError(message)


@dataclass(frozen=True)
class InitialValuePrior:
    """Belief about the initial value ``a`` (the level at the reference period).

    Parameters
    ----------
    give_or_take_pct : float
        Spread of the anchor in percent: the prior on ``log a`` has standard
        deviation ``log(1 + give_or_take_pct / 100)``. ``0`` fixes ``a``.
    value : float, optional
        Centre of the anchor; defaults to the observed value at the reference period.
    """

    give_or_take_pct: float = 50.0
    value: float | None = None

    def __post_init__(self) -> None:
        _check(
            math.isfinite(self.give_or_take_pct) and self.give_or_take_pct >= 0,
            f"initial-value give-or-take must be >= 0 percent, got {self.give_or_take_pct}",
        )
        _check(
            self.value is None or (math.isfinite(self.value) and self.value > 0),
            f"initial value must be > 0, got {self.value}",
        )


@dataclass(frozen=True)
class GrowthPrior:
    """Belief about the growth per period ``g``: "G% per period, give or take S points".

    Parameters
    ----------
    center_pct : float
        Central growth per period in percent (``5`` means 5% per period).
    give_or_take_pts : float
        Spread in percentage points; the prior on ``log(1+g)`` has standard
        deviation ``(give_or_take_pts / 100) / (1 + center_pct / 100)``, the
        first-order (delta-method) translation of points of ``g`` to ``log(1+g)``.
    """

    center_pct: float = 0.0
    give_or_take_pts: float = 30.0

    def __post_init__(self) -> None:
        _check(
            math.isfinite(self.center_pct) and self.center_pct > -100,
            f"growth centre must be above -100 percent, got {self.center_pct}",
        )
        _check(
            math.isfinite(self.give_or_take_pts) and self.give_or_take_pts > 0,
            f"growth give-or-take must be > 0 points, got {self.give_or_take_pts}",
        )


@dataclass(frozen=True)
class NoisePrior:
    """Belief about the noise: the typical percentage deviation from the trend.

    Parameters
    ----------
    typical_pct : float
        Scale of the half-normal prior on ``sigma`` is ``log(1 + typical_pct/100)``.
    """

    typical_pct: float = 30.0

    def __post_init__(self) -> None:
        _check(
            math.isfinite(self.typical_pct) and self.typical_pct > 0,
            f"typical noise must be > 0 percent, got {self.typical_pct}",
        )


@dataclass(frozen=True)
class ResolvedPriors:
    """The priors on the log scale, as both engines use them.

    ``log_a ~ Normal(log_a_mu, log_a_sd)`` (fixed at ``log_a_mu`` when
    ``log_a_sd == 0``), ``log1p_g ~ Normal(log1p_g_mu, log1p_g_sd)`` and
    ``sigma ~ HalfNormal(sigma_scale)``. ``t_ref`` is the time index that ``a``
    refers to and ``reference_period`` its label.
    """

    log_a_mu: float
    log_a_sd: float
    log1p_g_mu: float
    log1p_g_sd: float
    sigma_scale: float
    t_ref: int
    reference_period: str
    stated: dict = field(default_factory=dict)

    @property
    def fixed_initial(self) -> bool:
        """Whether the initial value is fixed rather than estimated."""
        return self.log_a_sd == 0.0

    def to_dict(self) -> dict:
        """A JSON-ready description of the priors used."""
        return asdict(self)

    def describe(self) -> list[str]:
        """The priors in plain words, one line each."""
        st = self.stated
        a_line = (
            f"initial value at {self.reference_period}: fixed at {math.exp(self.log_a_mu):,.4g}"
            if self.fixed_initial
            else f"initial value at {self.reference_period}: about {math.exp(self.log_a_mu):,.4g}"
            f", give or take {st['initial']['give_or_take_pct']:g}%"
        )
        return [
            a_line,
            f"growth: about {st['growth']['center_pct']:g}% per period, give or take "
            f"{st['growth']['give_or_take_pts']:g} points",
            f"noise: typical deviation from trend about {st['noise']['typical_pct']:g}%",
        ]


@dataclass(frozen=True)
class Priors:
    """The three priors of the exponential growth model, with documented defaults.

    Parameters
    ----------
    initial : InitialValuePrior
    growth : GrowthPrior
    noise : NoisePrior
    reference_period : str, optional
        Period label that the initial value refers to; default the first observation.

    Examples
    --------
    >>> p = Priors(growth=GrowthPrior(center_pct=8, give_or_take_pts=10))
    >>> p.growth.center_pct
    8
    """

    initial: InitialValuePrior = field(default_factory=InitialValuePrior)
    growth: GrowthPrior = field(default_factory=GrowthPrior)
    noise: NoisePrior = field(default_factory=NoisePrior)
    reference_period: str | None = None

    def resolve(self, series) -> ResolvedPriors:
        """Translate to the log scale for ``series`` (a :class:`GrowthSeries`).

        Raises
        ------
        InputError
            If the reference period is not one of the series' observations.
        """
        i_ref = 0 if self.reference_period is None else series.index_of(self.reference_period)
        anchor = self.initial.value if self.initial.value is not None else series.values[i_ref]
        g0 = self.growth.center_pct / 100
        return ResolvedPriors(
            log_a_mu=float(math.log(anchor)),
            log_a_sd=float(math.log1p(self.initial.give_or_take_pct / 100)),
            log1p_g_mu=float(math.log1p(g0)),
            log1p_g_sd=float(self.growth.give_or_take_pts / 100 / (1 + g0)),
            sigma_scale=float(math.log1p(self.noise.typical_pct / 100)),
            t_ref=int(series.t[i_ref]),
            reference_period=series.labels[i_ref],
            stated={
                "initial": asdict(self.initial),
                "growth": asdict(self.growth),
                "noise": asdict(self.noise),
            },
        )
