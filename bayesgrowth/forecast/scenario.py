"""Scenario bands: a stated adjustment applied to every predictive path of a forecast.

A scenario answers "what if growth halves from next year?" or "what if a one-off
shock takes 10% off the level in 2026Q3?" without refitting: each predictive path
of the base forecast is shifted, period by period, on the log scale.

- **Growth factor** ``f`` from period ``s``: the base case's median growth in each
  period from ``s`` on is multiplied by ``f``. With ``M`` the log median path (the
  log observed values before the forecast), the growth of period ``j`` is
  ``g_j = (M_j - M_{j-m}) / m`` with ``m`` the number of seasons of a seasonal fit
  (year-on-year growth spread over the year, so the seasonal swing is kept) and 1
  otherwise; every path moves by ``d_h = -(1 - f) * sum_{j=s..h} g_j`` for ``h >= s``.
- **Shock** of ``x`` percent in period ``p``: the level drops (or jumps) once and
  stays there; every path moves by ``log(1 + x/100)`` from ``p`` on.

The shift of a period is the same for every path, so every quantile of the value
moves by exactly that shift on the log scale, the band keeps the base case's
width in log terms, and the adjustment is easy to state and to check. A scenario
states an assumption; it says nothing about how likely that assumption is.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from bayesgrowth.display import fmt_given

__all__ = ["Scenario", "apply_scenario", "scenario_shift"]


@dataclass(frozen=True)
class Scenario:
    """A stated adjustment to a forecast.

    Parameters
    ----------
    growth_factor : float
        Multiplies the base case's growth per period from ``growth_from`` on (0.5
        halves it, 0 stops it, 1 leaves it); must be finite.
    growth_from : str, optional
        Label of the first period with the changed growth (default the first
        forecast period).
    shock_pct : float
        A one-off change of the level in percent (-10 takes 10% off), above -100.
    shock_at : str, optional
        Label of the period of the shock (default the first forecast period).
    """

    growth_factor: float = 1.0
    growth_from: str | None = None
    shock_pct: float = 0.0
    shock_at: str | None = None

    def __post_init__(self) -> None:
        if not math.isfinite(self.growth_factor):
            raise ValueError("growth factor must be a finite number, got "
                             f"{fmt_given(self.growth_factor)}")
        if not (math.isfinite(self.shock_pct) and self.shock_pct > -100):
            raise ValueError("shock must be a percentage above -100, "
                             f"got {fmt_given(self.shock_pct)}")

    @property
    def is_base(self) -> bool:
        """Whether the scenario changes nothing."""
        return self.growth_factor == 1 and self.shock_pct == 0

    def describe(self, periods: list[str]) -> str:
        """The scenario in words, e.g. "growth x0.5 from 2026Q1; shock -10% in 2025Q3"."""
        parts = []
        if self.growth_factor != 1:
            parts.append(f"growth x{self.growth_factor:g} from {self.growth_from or periods[0]}")
        if self.shock_pct != 0:
            parts.append(f"one-off shock {self.shock_pct:+g}% in {self.shock_at or periods[0]}")
        return "; ".join(parts) or "no change"


def _step(label: str | None, periods: list[str], what: str) -> int:
    """0-based position of ``label`` among the forecast periods (0 when unset)."""
    if label is None:
        return 0
    if label not in periods:
        raise ValueError(f"{what} {label!r} is not a forecast period ({periods[0]} to "
                         f"{periods[-1]})")
    return periods.index(label)


def _median_growth(fc) -> np.ndarray:
    """Growth per period of the base case's log median path, seasons removed (see above)."""
    series = fc.fit.series
    m = 1
    if getattr(fc.fit.spec, "seasonal", False):
        from bayesgrowth.models.spec import season_index

        m = season_index(series.axis, series.t)[0]
    past_t = np.arange(series.t_last - m + 1, series.t_last + 1)
    past = np.interp(past_t, series.t, series.log_values)  # gaps read off the line
    path = np.concatenate([past, np.log(fc.table["median"].to_numpy(dtype=float))])
    return (path[m:] - path[:-m]) / m


def scenario_shift(fc, scenario: Scenario) -> np.ndarray:
    """The shift of each forecast period on the log scale, shape ``(horizon,)``.

    Parameters
    ----------
    fc : Forecast
    scenario : Scenario

    Returns
    -------
    numpy.ndarray
        ``log(scenario value / base value)`` for every path, by period.
    """
    periods = list(fc.periods)
    shift = np.zeros(fc.horizon)
    if scenario.growth_factor != 1:
        s = _step(scenario.growth_from, periods, "growth from")
        g = _median_growth(fc)
        shift[s:] -= (1 - scenario.growth_factor) * np.cumsum(g[s:])
    if scenario.shock_pct != 0:
        p = _step(scenario.shock_at, periods, "shock at")
        shift[p:] += math.log1p(scenario.shock_pct / 100)
    return shift


def apply_scenario(fc, scenario: Scenario):
    """The forecast under ``scenario``: every path (and the exact mixture) shifted.

    Parameters
    ----------
    fc : Forecast
        The base case.
    scenario : Scenario

    Returns
    -------
    Forecast
        Same periods, levels and seed; its table, probabilities and summary are
        those of the shifted paths.

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> from bayesgrowth.forecast.scenario import Scenario, apply_scenario
    >>> fc = bg.GrowthModel(seed=1).fit(bg.load_demo()).forecast(4)
    >>> shocked = apply_scenario(fc, Scenario(shock_pct=-10))
    >>> bool(abs(shocked.table["median"].iloc[-1] / fc.table["median"].iloc[-1] - 0.9) < 1e-9)
    True
    """
    shift = scenario_shift(fc, scenario)
    factor = np.exp(shift)
    exact = None
    if fc.exact is not None:
        exact = {**fc.exact, "mean": fc.exact["mean"] + shift[None, :]}
    return dataclasses.replace(fc, draws=fc.draws * factor, curve_draws=fc.curve_draws * factor,
                               exact=exact)
