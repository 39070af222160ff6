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

Priors of the bending curves and error options
----------------------------------------------
Used only by the models that have the parameter (see :mod:`bayesgrowth.models.spec`).

ceiling (logistic, Gompertz)
    "About 3 times the latest value, give or take 100%": a normal prior on
    ``log K`` centred on ``log(3 * latest)`` with sd ``log 2``. A practitioner who
    knows the market states an absolute size instead (``CeilingPrior(value=...)``).
    The spread is wide because the data of a series still far from its ceiling say
    little about it; a stated ceiling below the observed data is refused.
half-life of growth (damped, logistic, Gompertz)
    "Growth halves about every two years, within a factor of 3": a normal prior on
    the log of the half-life in periods, centred on two years' worth of periods (8
    quarters, 24 months; 8 periods for uncalendared data) with sd ``log 3``. Within
    two sd that spans under a year to nearly twenty years, from fast saturation to
    practically exponential growth.
long-run growth (damped; local trend with mean reversion)
    "0% per period, fixed": growth eventually dies out, the cautious default for a
    business. Give a spread to estimate it.
persistence of deviations (AR(1) errors)
    Uniform on 0 to 1 (a Beta(1, 1) prior on ``phi``): from independent errors to
    deviations that almost never fade. Negative autocorrelation of levels is rare
    in business series and is excluded.
local trend
    Level shocks and drift of the growth rate, each with a Gamma(2, 2/s) prior on
    its per-period sd (mean ``s``). The Gamma(2) shape keeps the sd off the boundary
    at zero, where a half-normal prior gave divergent transitions under NUTS. The
    means are stated per year and scaled to the calendar, because independent shocks
    add up in variance: level shocks of about 10% a year (``10 / sqrt(p)`` percent
    per period with ``p`` periods a year: 5% a quarter, 2.9% a month) and a growth
    rate that drifts by about 4 points of yearly growth a year (``4 / p^1.5``
    points of per-period growth per period: 0.5 a quarter, 0.1 a month). Real
    business series change level and growth rate by such amounts from year to year;
    without level shocks, or with a drift fixed per period whatever the calendar, the
    bands of real competition series were far too narrow (see docs/benchmark.md).
    When growth fades (mean-reverting or adaptive drift), its half-life has the same
    prior as the damped curve's.
seasonal factors
    Normal factors on the log scale constrained to sum to zero, sd ``log 1.3``
    ("seasons differ from the average by about 30%"; see ``SeasonalPrior`` for why).
Student-t noise
    Degrees of freedom ``nu ~ Gamma(2, 0.1)`` (mean 20), the prior recommended by
    Juárez & Steel (2010), *Journal of Business & Economic Statistics* 28(1); it
    allows heavy tails without ruling out normal ones.
"""

from __future__ import annotations

import math
from dataclasses import MISSING, asdict, dataclass, field, fields

from bayesgrowth.priors.resolved import NU_ALPHA, NU_BETA, ResolvedPriors
from bayesgrowth.priors.stated import (
    CeilingPrior,
    GrowthPrior,
    HalfLifePrior,
    InitialValuePrior,
    LocalTrendPrior,
    LongRunGrowthPrior,
    NoisePrior,
    PersistencePrior,
    SeasonalPrior,
    _check,
)

__all__ = [
    "CeilingPrior",
    "GrowthPrior",
    "HalfLifePrior",
    "InitialValuePrior",
    "LocalTrendPrior",
    "LongRunGrowthPrior",
    "NU_ALPHA",
    "NU_BETA",
    "NoisePrior",
    "PersistencePrior",
    "Priors",
    "ResolvedPriors",
    "SeasonalPrior",
]


def _article(word: str) -> str:
    return "an" if word[0] in "AEIOU" else "a"


@dataclass(frozen=True)
class Priors:
    """The priors of the growth models, with documented defaults.

    The first three serve every model; the others only the models that have the
    parameter (each is merged over its documented default).

    Parameters
    ----------
    initial : InitialValuePrior
    growth : GrowthPrior
        For the damped and local-trend models: the growth at the reference period.
    noise : NoisePrior
    reference_period : str, optional
        Period label that the initial value refers to; default the first observation.
    ceiling : CeilingPrior
    half_life : HalfLifePrior
    long_run : LongRunGrowthPrior
    persistence : PersistencePrior
    local_trend : LocalTrendPrior
    seasonal : SeasonalPrior

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
    ceiling: CeilingPrior = field(default_factory=CeilingPrior)
    half_life: HalfLifePrior = field(default_factory=HalfLifePrior)
    long_run: LongRunGrowthPrior = field(default_factory=LongRunGrowthPrior)
    persistence: PersistencePrior = field(default_factory=PersistencePrior)
    local_trend: LocalTrendPrior = field(default_factory=LocalTrendPrior)
    seasonal: SeasonalPrior = field(default_factory=SeasonalPrior)

    def __post_init__(self) -> None:
        """Refuse a field of the wrong kind (``Priors(GrowthPrior(...))`` would set ``initial``)."""
        for f in fields(self):
            value, kind = getattr(self, f.name), f.default_factory
            if kind is not MISSING and not isinstance(value, kind):
                name = kind.__name__
                raise TypeError(
                    f"Priors {f.name} must be {_article(name)} {name}, not "
                    f"{type(value).__name__}; write Priors({f.name}={name}(...)), by keyword")
        if self.reference_period is not None and not isinstance(self.reference_period, str):
            raise TypeError("Priors reference_period must be a period label such as '2024Q1', "
                            f"not {type(self.reference_period).__name__}")

    def _ceiling_centre(self, series) -> float:
        """The ceiling prior's centre: the stated market size, or a multiple of the latest value."""
        if self.ceiling.value is None:
            return self.ceiling.multiple * float(series.values[-1])
        top = float(max(series.values))
        _check(
            self.ceiling.value > top,
            f"ceiling {self.ceiling.value:,.6g} is not above the largest observed value "
            f"{top:,.6g}; state a ceiling above the data (or a multiple of the latest value)",
        )
        return self.ceiling.value

    def resolve(self, series) -> ResolvedPriors:
        """Translate to the log scale for ``series`` (a :class:`GrowthSeries`).

        Raises
        ------
        InputError
            If the reference period is not one of the series' observations.
        ValueError
            If a stated ceiling is not above the observed data.
        """
        i_ref = 0 if self.reference_period is None else series.index_of(self.reference_period)
        anchor = self.initial.value if self.initial.value is not None else series.values[i_ref]
        g0 = self.growth.center_pct / 100
        k_centre = self._ceiling_centre(series)
        ppy = series.axis.periods_per_year
        half_life = self.half_life.periods
        if half_life is None:
            half_life = 2 * ppy if ppy else 8.0
        pm_, pc = self.persistence.mean, self.persistence.concentration
        lt = self.local_trend
        lr0 = self.long_run.center_pct / 100
        return ResolvedPriors(
            log_a_mu=float(math.log(anchor)),
            log_a_sd=float(math.log1p(self.initial.give_or_take_pct / 100)),
            log1p_g_mu=float(math.log1p(g0)),
            log1p_g_sd=float(self.growth.give_or_take_pts / 100 / (1 + g0)),
            sigma_scale=float(math.log1p(self.noise.typical_pct / 100)),
            t_ref=int(series.t[i_ref]),
            reference_period=series.labels[i_ref],
            stated={f.name: asdict(getattr(self, f.name)) for f in fields(self)
                    if f.name != "reference_period"},
            log_k_mu=float(math.log(k_centre)),
            log_k_sd=float(math.log1p(self.ceiling.give_or_take_pct / 100)),
            log_h_mu=float(math.log(half_life)),
            log_h_sd=float(math.log(self.half_life.factor)),
            long_run_mu=float(math.log1p(lr0)),
            long_run_sd=float(self.long_run.give_or_take_pts / 100 / (1 + lr0)),
            phi_alpha=float(pm_ * pc),
            phi_beta=float((1 - pm_) * pc),
            level_shock_scale=float(lt.scales(ppy)[0]),
            growth_drift_scale=float(lt.scales(ppy)[1]),
            seasonal_scale=float(math.log1p(self.seasonal.typical_pct / 100)),
            season_drift_scale=float(math.log1p(lt.season_drift_pct / 100)),
        )
