"""The priors as a practitioner states them: small validated objects with documented defaults.

See :mod:`bayesgrowth.priors` for the defaults and the reasons for them.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from bayesgrowth.display import fmt_given

__all__ = [
    "CeilingPrior",
    "GrowthPrior",
    "HalfLifePrior",
    "InitialValuePrior",
    "LocalTrendPrior",
    "LongRunGrowthPrior",
    "NoisePrior",
    "PersistencePrior",
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
            "initial-value give-or-take must be >= 0 percent, "
            f"got {fmt_given(self.give_or_take_pct)}",
        )
        _check(
            self.value is None or (math.isfinite(self.value) and self.value > 0),
            f"initial value must be > 0, got {fmt_given(self.value)}",
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
            f"growth centre must be above -100 percent, got {fmt_given(self.center_pct)}",
        )
        _check(
            math.isfinite(self.give_or_take_pts) and self.give_or_take_pts > 0,
            f"growth give-or-take must be > 0 points, got {fmt_given(self.give_or_take_pts)}",
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
            f"typical noise must be > 0 percent, got {fmt_given(self.typical_pct)}",
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
            "ceiling must be > 0, "
            f"got {fmt_given(self.value)}; state the market size on the data's "
            "scale",
        )
        _check(
            math.isfinite(self.multiple) and self.multiple > 1,
            f"ceiling multiple must be above 1 (the ceiling lies above the latest value), "
            f"got {fmt_given(self.multiple)}",
        )
        _check(
            math.isfinite(self.give_or_take_pct) and self.give_or_take_pct > 0,
            f"ceiling give-or-take must be > 0 percent, got {fmt_given(self.give_or_take_pct)}",
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
            f"half-life must be > 0 periods, got {fmt_given(self.periods)}; "
            "give the number of periods over which growth halves",
        )
        _check(
            math.isfinite(self.factor) and self.factor > 1,
            f"half-life factor must be above 1, got {fmt_given(self.factor)}",
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
            f"long-run growth must be above -100 percent, got {fmt_given(self.center_pct)}",
        )
        _check(
            math.isfinite(self.give_or_take_pts) and self.give_or_take_pts >= 0,
            "long-run growth give-or-take must be >= 0 points, "
            f"got {fmt_given(self.give_or_take_pts)}",
        )


def _check_beta(mean: float, concentration: float, what: str) -> None:
    _check(
        math.isfinite(mean) and 0 < mean < 1,
        f"{what} mean must be between 0 and 1 (exclusive), got {fmt_given(mean)}",
    )
    _check(
        math.isfinite(concentration) and concentration > 0,
        f"{what} concentration must be > 0, got {fmt_given(concentration)}",
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
    season_drift_pct : float
        Prior mean of the sd of the per-period shocks to drifting seasonal factors, in
        percent (used only with drifting seasons). Default 2.36%: each shock moves one
        season's factor up and the next one's down for good, so a factor wanders by
        ``sqrt(2)`` shocks a year, 3.3%; the default level shocks move the level by 10% a
        year, and a seasonal pattern that drifts *slowly* should move by a fraction of
        that, here a third, whatever the calendar. Chosen by that reasoning, not on a
        benchmark.
    """

    level_shock_pct: float | None = None
    growth_drift_pts: float | None = None
    season_drift_pct: float = 10.0 / 3.0 / math.sqrt(2.0)

    def __post_init__(self) -> None:
        _check(
            self.level_shock_pct is None
            or (math.isfinite(self.level_shock_pct) and self.level_shock_pct >= 0),
            "level shock must be >= 0 percent (0: no level shocks), got "
            f"{fmt_given(self.level_shock_pct)}",
        )
        _check(
            self.growth_drift_pts is None
            or (math.isfinite(self.growth_drift_pts) and self.growth_drift_pts > 0),
            f"growth drift must be > 0 points per period, got {fmt_given(self.growth_drift_pts)}",
        )
        _check(
            math.isfinite(self.season_drift_pct) and self.season_drift_pct > 0,
            "seasonal drift must be > 0 percent per period, "
            f"got {fmt_given(self.season_drift_pct)}",
        )

    def scales(self, periods_per_year: float | None) -> tuple[float, float]:
        """Per-period level-shock and growth-drift prior means as fractions."""
        ppy = periods_per_year or 1.0
        level = 10.0 / math.sqrt(ppy) if self.level_shock_pct is None else self.level_shock_pct
        drift = 4.0 / ppy**1.5 if self.growth_drift_pts is None else self.growth_drift_pts
        return math.log1p(level / 100), drift / 100


@dataclass(frozen=True)
class SeasonalPrior:
    """Belief about the size of seasonal factors: typical deviation of a season, percent.

    The default, 30% (a normal prior with sd ``log 1.3`` on each log factor), is wide
    enough not to shrink strong real seasons: in the training parts of the growing
    seasonal series of the M1 and Tourism collections (docs/benchmark.md) the typical
    (root-mean-square) log factor of a classical decomposition had a median of 0.02 to
    0.26 and a 90th percentile of 0.12 to 0.54 by collection and frequency. An earlier
    default of 10% shrank Tourism's seasons visibly (sMAPE 22% instead of 18.6% on 50
    Tourism monthly series).
    """

    typical_pct: float = 30.0

    def __post_init__(self) -> None:
        _check(
            math.isfinite(self.typical_pct) and self.typical_pct > 0,
            f"seasonal typical deviation must be > 0 percent, got {fmt_given(self.typical_pct)}",
        )
