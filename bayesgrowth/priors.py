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
    Normal factors on the log scale constrained to sum to zero, sd ``log 1.1``
    ("seasons differ from the average by about 10%").
Student-t noise
    Degrees of freedom ``nu ~ Gamma(2, 0.1)`` (mean 20), the prior recommended by
    Juárez & Steel (2010), *Journal of Business & Economic Statistics* 28(1); it
    allows heavy tails without ruling out normal ones.
"""

from __future__ import annotations

import math
from dataclasses import asdict, dataclass, field

__all__ = [
    "CeilingPrior",
    "GrowthPrior",
    "HalfLifePrior",
    "InitialValuePrior",
    "LocalTrendPrior",
    "LongRunGrowthPrior",
    "NoisePrior",
    "PersistencePrior",
    "Priors",
    "ResolvedPriors",
    "SeasonalPrior",
]


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
class CeilingPrior:
    """Belief about the ceiling ``K`` of a logistic or Gompertz curve.

    State either an absolute market size (``value``) or a multiple of the latest
    observed value (``multiple``, used when ``value`` is not given).

    Parameters
    ----------
    value : float, optional
        Central ceiling on the scale of the data (e.g. the size of the market).
        Must be above every observed value.
    multiple : float
        Central ceiling as a multiple of the latest observed value (> 1).
    give_or_take_pct : float
        Spread: the prior on ``log K`` has sd ``log(1 + give_or_take_pct / 100)``.
    """

    value: float | None = None
    multiple: float = 3.0
    give_or_take_pct: float = 100.0

    def __post_init__(self) -> None:
        _check(
            self.value is None or (math.isfinite(self.value) and self.value > 0),
            f"ceiling must be > 0, got {self.value}; state the market size on the data's scale",
        )
        _check(
            math.isfinite(self.multiple) and self.multiple > 1,
            f"ceiling multiple must be above 1 (the ceiling lies above the latest value), "
            f"got {self.multiple}",
        )
        _check(
            math.isfinite(self.give_or_take_pct) and self.give_or_take_pct > 0,
            f"ceiling give-or-take must be > 0 percent, got {self.give_or_take_pct}",
        )


@dataclass(frozen=True)
class HalfLifePrior:
    """Belief about how fast growth fades: the half-life of growth, in periods.

    Parameters
    ----------
    periods : float, optional
        Central half-life in periods; default two years' worth of periods (8 when
        the data have no calendar).
    factor : float
        Spread: the prior on the log half-life has sd ``log(factor)`` ("within a
        factor of 3").
    """

    periods: float | None = None
    factor: float = 3.0

    def __post_init__(self) -> None:
        _check(
            self.periods is None or (math.isfinite(self.periods) and self.periods > 0),
            f"half-life must be > 0 periods, got {self.periods}; "
            "give the number of periods over which growth halves",
        )
        _check(
            math.isfinite(self.factor) and self.factor > 1,
            f"half-life factor must be above 1, got {self.factor}",
        )


@dataclass(frozen=True)
class LongRunGrowthPrior:
    """Belief about the growth rate that damped growth settles to.

    Parameters
    ----------
    center_pct : float
        Long-run growth per period in percent.
    give_or_take_pts : float
        Spread in percentage points; ``0`` fixes the long-run rate at the centre.
    """

    center_pct: float = 0.0
    give_or_take_pts: float = 0.0

    def __post_init__(self) -> None:
        _check(
            math.isfinite(self.center_pct) and self.center_pct > -100,
            f"long-run growth must be above -100 percent, got {self.center_pct}",
        )
        _check(
            math.isfinite(self.give_or_take_pts) and self.give_or_take_pts >= 0,
            f"long-run growth give-or-take must be >= 0 points, got {self.give_or_take_pts}",
        )


def _check_beta(mean: float, concentration: float, what: str) -> None:
    _check(
        math.isfinite(mean) and 0 < mean < 1,
        f"{what} mean must be between 0 and 1 (exclusive), got {mean}",
    )
    _check(
        math.isfinite(concentration) and concentration > 0,
        f"{what} concentration must be > 0, got {concentration}",
    )


@dataclass(frozen=True)
class PersistencePrior:
    """Belief about how long deviations from the curve last (AR(1) coefficient ``phi``).

    ``phi ~ Beta(mean * concentration, (1 - mean) * concentration)`` on 0 to 1:
    ``phi`` near 0 means deviations fade within a period, near 1 that they persist.

    Parameters
    ----------
    mean : float
        Prior mean of ``phi``, between 0 and 1.
    concentration : float
        Prior strength in pseudo-observations; the default 2 with mean 0.5 is uniform.
    """

    mean: float = 0.5
    concentration: float = 2.0

    def __post_init__(self) -> None:
        _check_beta(self.mean, self.concentration, "persistence")


@dataclass(frozen=True)
class LocalTrendPrior:
    """Beliefs about how the local trend moves.

    Parameters
    ----------
    level_shock_pct : float, optional
        Prior mean of the sd of per-period shocks to the level, in percent; ``0``
        means no level shocks. Default: 10% a year scaled to the calendar
        (``10 / sqrt(periods per year)``).
    growth_drift_pts : float, optional
        Prior mean of the sd of the per-period change of the growth rate, in points.
        Default: 4 points of yearly growth a year scaled to the calendar
        (``4 / periods_per_year ** 1.5``).
    """

    level_shock_pct: float | None = None
    growth_drift_pts: float | None = None

    def __post_init__(self) -> None:
        _check(
            self.level_shock_pct is None
            or (math.isfinite(self.level_shock_pct) and self.level_shock_pct >= 0),
            f"level shock must be >= 0 percent (0: no level shocks), got {self.level_shock_pct}",
        )
        _check(
            self.growth_drift_pts is None
            or (math.isfinite(self.growth_drift_pts) and self.growth_drift_pts > 0),
            f"growth drift must be > 0 points per period, got {self.growth_drift_pts}",
        )

    def scales(self, periods_per_year: float | None) -> tuple[float, float]:
        """Per-period level-shock and growth-drift prior means as fractions."""
        ppy = periods_per_year or 1.0
        level = 10.0 / math.sqrt(ppy) if self.level_shock_pct is None else self.level_shock_pct
        drift = 4.0 / ppy**1.5 if self.growth_drift_pts is None else self.growth_drift_pts
        return math.log1p(level / 100), drift / 100


@dataclass(frozen=True)
class SeasonalPrior:
    """Belief about the size of seasonal factors: typical deviation of a season, percent."""

    typical_pct: float = 10.0

    def __post_init__(self) -> None:
        _check(
            math.isfinite(self.typical_pct) and self.typical_pct > 0,
            f"seasonal typical deviation must be > 0 percent, got {self.typical_pct}",
        )


#: Degrees-of-freedom prior of Student-t noise, ``Gamma(alpha, beta)`` (Juárez & Steel 2010).
NU_ALPHA, NU_BETA = 2.0, 0.1


@dataclass(frozen=True)
class ResolvedPriors:
    """The priors on the log scale, as both engines use them.

    ``log_a ~ Normal(log_a_mu, log_a_sd)`` (fixed at ``log_a_mu`` when
    ``log_a_sd == 0``), ``log1p_g ~ Normal(log1p_g_mu, log1p_g_sd)`` and
    ``sigma ~ HalfNormal(sigma_scale)``. ``t_ref`` is the time index that ``a``
    refers to and ``reference_period`` its label.

    The remaining fields serve the other curves and options:
    ``log_k ~ Normal(log_k_mu, log_k_sd)`` (ceiling), ``log half_life ~
    Normal(log_h_mu, log_h_sd)``, long-run log growth ``~ Normal(long_run_mu,
    long_run_sd)`` (fixed when the sd is 0), ``phi ~ Beta(phi_alpha, phi_beta)``,
    level-shock and growth-drift Gamma(2) means, the seasonal sd and
    ``nu ~ Gamma(nu_alpha, nu_beta)``.
    """

    log_a_mu: float
    log_a_sd: float
    log1p_g_mu: float
    log1p_g_sd: float
    sigma_scale: float
    t_ref: int
    reference_period: str
    stated: dict = field(default_factory=dict)
    log_k_mu: float = 0.0
    log_k_sd: float = math.log(2.0)
    log_h_mu: float = math.log(8.0)
    log_h_sd: float = math.log(3.0)
    long_run_mu: float = 0.0
    long_run_sd: float = 0.0
    phi_alpha: float = 1.0
    phi_beta: float = 1.0
    level_shock_scale: float = 0.0
    growth_drift_scale: float = 0.01
    seasonal_scale: float = math.log1p(0.10)
    nu_alpha: float = NU_ALPHA
    nu_beta: float = NU_BETA

    def compile_key(self) -> tuple:
        """Prior settings a compiled NUTS model bakes in (``log_a_mu`` and ``t_ref`` are data).

        Two resolved priors with the same key can share one compiled model.
        """
        return (self.log_a_sd, self.log1p_g_mu, self.log1p_g_sd, self.sigma_scale)

    @property
    def fixed_initial(self) -> bool:
        """Whether the initial value is fixed rather than estimated."""
        return self.log_a_sd == 0.0

    def to_dict(self) -> dict:
        """A JSON-ready description of the priors used."""
        return asdict(self)

    def describe(self, spec=None) -> list[str]:
        """The priors in plain words, one line each.

        Parameters
        ----------
        spec : ModelSpec, optional
            The model the priors serve; adds a line for each further prior it uses.
            Without it only the three priors of the exponential model are described.
        """
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
        ] + ([] if spec is None else self._describe_extra(spec))

    def _describe_extra(self, spec) -> list[str]:
        st = self.stated
        lines = []
        if spec.model in ("logistic", "gompertz"):
            c = st.get("ceiling", {})
            how = (
                f"about {c['value']:,.4g}" if c.get("value") is not None
                else f"about {c.get('multiple', 3):g} times the latest value "
                f"({math.exp(self.log_k_mu):,.4g})"
            )
            lines.append(f"ceiling: {how}, give or take {c.get('give_or_take_pct', 100):g}%")
        if spec.model in ("damped", "logistic", "gompertz"):
            lines.append(
                f"half-life of growth: about {math.exp(self.log_h_mu):.3g} periods, within a "
                f"factor of {math.exp(self.log_h_sd):.3g}"
            )
        if spec.model == "damped" or spec.growth_fades:
            lr = 100 * math.expm1(self.long_run_mu)
            lines.append(
                f"long-run growth: fixed at {lr:.3g}% per period" if self.long_run_sd == 0
                else f"long-run growth: about {lr:.3g}% per period, give or take "
                f"{100 * self.long_run_sd:.3g} points"
            )
        if spec.model == "local-trend":
            lines.append(
                f"local trend: level shocks about {100 * math.expm1(self.level_shock_scale):.3g}%"
                f" per period, growth drifts about {100 * self.growth_drift_scale:.3g} points "
                f"per period ({spec.drift.replace('-', ' ')})"
            )
            if spec.growth_fades:
                lines.append(
                    f"half-life of growth when it fades: about {math.exp(self.log_h_mu):.3g} "
                    f"periods, within a factor of {math.exp(self.log_h_sd):.3g}"
                )
        if spec.errors == "ar1":
            lines.append(
                f"persistence of deviations (AR(1)): Beta({self.phi_alpha:g}, "
                f"{self.phi_beta:g}) on 0 to 1, mean "
                f"{self.phi_alpha / (self.phi_alpha + self.phi_beta):.2g}"
            )
        if spec.noise == "student-t":
            lines.append(
                f"heavy tails: Student-t degrees of freedom Gamma({self.nu_alpha:g}, "
                f"{self.nu_beta:g}), mean {self.nu_alpha / self.nu_beta:g}"
            )
        if spec.seasonal:
            lines.append(
                f"seasonal factors: seasons differ from the average by about "
                f"{100 * math.expm1(self.seasonal_scale):.3g}% (factors sum to zero on the "
                "log scale)"
            )
        return lines


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
        top = float(max(series.values))
        if self.ceiling.value is not None:
            _check(
                self.ceiling.value > top,
                f"ceiling {self.ceiling.value:,.6g} is not above the largest observed value "
                f"{top:,.6g}; state a ceiling above the data (or a multiple of the latest value)",
            )
            k_centre = self.ceiling.value
        else:
            k_centre = self.ceiling.multiple * float(series.values[-1])
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
            stated={
                "initial": asdict(self.initial),
                "growth": asdict(self.growth),
                "noise": asdict(self.noise),
                "ceiling": asdict(self.ceiling),
                "half_life": asdict(self.half_life),
                "long_run": asdict(self.long_run),
                "persistence": asdict(self.persistence),
                "local_trend": asdict(self.local_trend),
                "seasonal": asdict(self.seasonal),
            },
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
        )
