"""Least-squares point forecasts beside the Bayesian band for the same period.

Joins the two sides of the pipeline: the least-squares variants of
:mod:`bayesgrowth.leastsq` (numpy/scipy only) and a Bayesian
:class:`~bayesgrowth.forecast.Forecast`.
"""

from __future__ import annotations

from dataclasses import dataclass

import pandas as pd

from bayesgrowth.forecast.forecast import Forecast
from bayesgrowth.leastsq import GrowthFit, fit_table, fit_variants

__all__ = ["Comparison", "compare_to_forecast"]


@dataclass(frozen=True)
class Comparison:
    """The least-squares fits, their table and the Bayesian forecast they are set beside.

    ``table`` has one row per variant: ``variant``, ``n_points``,
    ``initial_value``, ``growth_per_period``, ``value_at_horizon``,
    ``r_squared``, ``rmse``, the Bayesian ``bayes_median``/``bayes_lower_L``/
    ``bayes_upper_L`` for the same period and ``prob_at_least`` (posterior
    probability of a value at least that variant's forecast).
    """

    fits: list[GrowthFit]
    table: pd.DataFrame
    forecast: Forecast

    @property
    def spread(self) -> dict:
        """``min``, ``max``, ``max_over_min`` of the point forecasts, and the extreme variants."""
        return dict(self.table.attrs["spread"])


def compare_to_forecast(forecast: Forecast, *, max_drop: int | None = None) -> Comparison:
    """Fit every least-squares variant to the forecast's series and tabulate the spread.

    Parameters
    ----------
    forecast : Forecast
        The Bayesian forecast; its last period is the comparison's horizon.
    max_drop : int, optional
        Largest number of observations dropped from either end in the window
        variants (default ``min(3, n - 3)``).

    Returns
    -------
    Comparison
    """
    series = forecast.fit.series
    fits = fit_variants(series.t, series.values, t_ref=forecast.fit.priors.t_ref,
                        max_drop=max_drop)
    table = fit_table(fits, forecast.horizon, predictive_draws=forecast.draws[:, -1],
                      levels=forecast.levels)
    table.insert(1, "period", forecast.periods[-1])
    return Comparison(fits=fits, table=table, forecast=forecast)
