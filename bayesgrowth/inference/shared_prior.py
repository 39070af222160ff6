"""Many series teach each other: the local trend's prior scales learned from a panel.

The exact engine gives each series' evidence ``p(y_i | prior)`` (its marginal
likelihood with every parameter integrated out). For a panel of series on the same
calendar, type-II maximum likelihood (empirical Bayes; e.g. Gelman et al. 2013,
*Bayesian Data Analysis*, 3rd ed., sec. 5.1) chooses the prior that makes the panel
most probable:

``eta* = argmax_eta sum_i log p(y_i | eta)``

over a small grid of multipliers ``eta`` of the default prior means of the level
shocks and of the growth drift (the two scales whose defaults are the least
certain: see :mod:`bayesgrowth.priors`). Each series then keeps its own posterior
under the shared prior. This helps most when each series is short and the panel is
large; with one or two series it only adds noise, so at least five are required.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from itertools import product

import numpy as np
import pandas as pd

from bayesgrowth.config import DEFAULT_MODEL
from bayesgrowth.models.spec import ModelSpec, resolve_seasonal
from bayesgrowth.priors import LocalTrendPrior, Priors

__all__ = ["FACTORS", "SharedPrior", "learn_shared_prior"]

#: Multipliers of the default prior means tried for level shocks and growth drift.
FACTORS = (0.25, 0.5, 1.0, 2.0, 4.0)
#: Fewest series the prior is learned from.
MIN_SERIES = 5


@dataclass(frozen=True)
class SharedPrior:
    """A local-trend prior learned from a panel.

    Attributes
    ----------
    priors : Priors
        The base priors with the learned level-shock and growth-drift means.
    level_factor, drift_factor : float
        The chosen multipliers of the default means.
    table : pandas.DataFrame
        Summed log evidence of the panel for every pair of multipliers tried.
    n_series : int
    """

    priors: Priors
    level_factor: float
    drift_factor: float
    table: pd.DataFrame
    n_series: int

    def __repr__(self) -> str:
        return (f"SharedPrior(level shocks x{self.level_factor:g}, growth drift "
                f"x{self.drift_factor:g}, from {self.n_series} series)")


def _periods_per_year(series_list) -> float:
    ppy = {s.axis.periods_per_year for s in series_list}
    if len(ppy) != 1:
        raise ValueError(
            "learn a shared prior from series on one calendar (all yearly, all quarterly or "
            "all monthly); split the panel by frequency first"
        )
    return ppy.pop() or 1.0


def learn_shared_prior(series_list, base: Priors | None = None, *,
                       factors=FACTORS, drift: str = DEFAULT_MODEL["drift"],
                       seasonal=DEFAULT_MODEL["seasonal"], max_series: int = 60) -> SharedPrior:
    """Choose the local trend's level-shock and growth-drift prior means from a panel.

    Parameters
    ----------
    series_list : sequence of GrowthSeries
        At least five series on the same calendar.
    base : Priors, optional
        The other priors (kept as they are); default the documented defaults.
    factors : sequence of float
        Multipliers of the default means to try, for each of the two scales.
    drift, seasonal
        The local trend's options (as for :func:`bayesgrowth.inference.fit_series`).
    max_series : int
        At most this many series, evenly spaced through the panel, enter the
        evidence (each costs one exact fit per pair of multipliers).

    Returns
    -------
    SharedPrior
    """
    from bayesgrowth.inference.statespace import state_space_posterior

    series_list = list(series_list)
    if len(series_list) < MIN_SERIES:
        raise ValueError(
            f"a shared prior needs at least {MIN_SERIES} series, got {len(series_list)}; "
            "fit them one by one instead"
        )
    ppy = _periods_per_year(series_list)
    if len(series_list) > max_series:
        pick = np.linspace(0, len(series_list) - 1, max_series).round().astype(int)
        series_list = [series_list[i] for i in pick]
    base = base or Priors()
    level0, drift0 = 10.0 / math.sqrt(ppy), 4.0 / ppy**1.5  # the documented defaults
    rows = []
    for fl, fd in product(factors, factors):
        pr = replace(base, local_trend=LocalTrendPrior(level_shock_pct=fl * level0,
                                                       growth_drift_pts=fd * drift0))
        total = 0.0
        for s in series_list:
            spec = ModelSpec(model="local-trend", drift=drift,
                             seasonal=resolve_seasonal(seasonal, s.axis, s.t))
            total += state_space_posterior(s, pr.resolve(s), spec).log_evidence
        rows.append({"level_factor": fl, "drift_factor": fd, "log_evidence": total})
    table = pd.DataFrame(rows)
    best = table.loc[int(np.argmax(table["log_evidence"].to_numpy()))]
    fl, fd = float(best["level_factor"]), float(best["drift_factor"])
    priors = replace(base, local_trend=LocalTrendPrior(level_shock_pct=fl * level0,
                                                       growth_drift_pts=fd * drift0))
    return SharedPrior(priors=priors, level_factor=fl, drift_factor=fd, table=table,
                       n_series=len(series_list))
