"""Forecasts of a pooled fit: every series, and the group total summed draw by draw.

Each series' forecast is the single-series forecast of its marginal posterior
(:meth:`~bayesgrowth.inference.pooled.PooledFit.fit_for`), with its own seed
(:func:`bayesgrowth.seeds.series_seed`). The group total sums the series'
predictive draws draw by draw: bands of a sum are not sums of bands.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
import pandas as pd

from bayesgrowth.config import DEFAULT_LEVELS, check_levels
from bayesgrowth.display import fmt_interval, fmt_number, html_summary, text_summary
from bayesgrowth.forecast.bands import band_columns, check_horizon
from bayesgrowth.forecast.forecast import forecast
from bayesgrowth.forecast.summaries import forecast_headline
from bayesgrowth.inference.pooled import PooledFit
from bayesgrowth.seeds import series_seed

__all__ = ["PooledForecast", "forecast_pooled"]


@dataclass
class PooledForecast:
    """Forecasts of every series of a pooled fit and of their total.

    Attributes
    ----------
    forecasts : dict of str to Forecast
        Each series' forecast (its next ``horizon`` periods), as for one series.
    total : pandas.DataFrame or None
        The group total for the ``horizon`` periods after the latest last
        observation: ``period``, ``step``, ``mean``, ``median``, ``lower_L``,
        ``upper_L``. ``None`` when the series do not share a calendar.
    total_draws : numpy.ndarray or None
        Predictive draws of the total, ``(n_draws, horizon)``.
    aligned : dict of str to numpy.ndarray
        Each series' predictive draws at the total's periods, ``(n_draws, horizon)``;
        ``total_draws`` is their sum, draw by draw.
    note : str or None
        Why there is no total, if there is none.
    """

    forecasts: dict
    total: pd.DataFrame | None
    total_draws: np.ndarray | None
    aligned: dict | None = None
    note: str | None = None

    def _summary(self) -> tuple[str, str]:
        first = next(iter(self.forecasts.values()))
        title = f"Pooled forecast of {len(self.forecasts)} series, {first.horizon} periods"
        if self.total is None:
            return title, f"no group total: {self.note}"
        last, level = self.total.iloc[-1], max(first.levels)
        band = fmt_interval(last[f"lower_{level}"], last[f"upper_{level}"])
        return title, (f"group total in {last['period']}: median {fmt_number(last['median'])}, "
                       f"{level}% band {band}")

    def __repr__(self) -> str:
        title, headline = self._summary()
        return text_summary(title, [headline] + [f"{name}: {forecast_headline(fc)}"
                                                 for name, fc in list(self.forecasts.items())[:3]]
                            + (["..."] if len(self.forecasts) > 3 else []))

    def _repr_html_(self) -> str:
        title, headline = self._summary()
        rows = [[name, forecast_headline(fc)] for name, fc in self.forecasts.items()]
        return html_summary(title, headline, ["series", "last period"], rows)

    @property
    def table(self) -> pd.DataFrame:
        """Every series' forecast table, one below the other, with a ``series`` column."""
        parts = []
        for name, fc in self.forecasts.items():
            t = fc.table
            t.insert(0, "series", name)
            parts.append(t)
        return pd.concat(parts, ignore_index=True)

    def tables(self) -> dict[str, pd.DataFrame]:
        """Each series' forecast table, by name."""
        return {name: fc.table for name, fc in self.forecasts.items()}


def _centre_and_bands(draws: np.ndarray, levels: tuple[int, ...]) -> dict:
    return {"mean": draws.mean(axis=0), "median": np.median(draws, axis=0),
            **band_columns(draws, levels)}


def forecast_pooled(
    fit: PooledFit, horizon: int, *, levels=DEFAULT_LEVELS, seed: int | None = None
) -> PooledForecast:
    """Forecast every series of a pooled fit ``horizon`` periods ahead, and the group total.

    :func:`bayesgrowth.forecast` calls it when given a
    :class:`~bayesgrowth.inference.pooled.PooledFit`.

    Parameters
    ----------
    fit : PooledFit
    horizon : int
    levels : sequence of int
        Band levels in percent.
    seed : int, optional
        Seed of the predictive noise (default the fit's); each series gets its
        own stream.

    Returns
    -------
    PooledForecast
    """
    horizon, levels = check_horizon(horizon), check_levels(levels)
    seed = fit.seed if seed is None else int(seed)
    axes = {(s.axis.style, s.axis.step) for s in fit.series.values()}
    ordinal = {n: s.axis.origin + s.t_last * s.axis.step for n, s in fit.series.items()}
    shared = len(axes) == 1
    step = next(iter(axes))[1]
    latest = max(ordinal.values())
    forecasts, aligned = {}, {}
    for name in fit.series:
        behind = (latest - ordinal[name]) // step if shared else 0
        full = forecast(fit.fit_for(name), horizon + behind, levels=levels,
                        seed=series_seed(seed, name))
        forecasts[name] = replace(
            full, horizon=horizon, periods=full.periods[:horizon], t=full.t[:horizon],
            draws=full.draws[:, :horizon], curve_draws=full.curve_draws[:, :horizon],
        )
        if shared:
            aligned[name] = full.draws[:, behind:behind + horizon]
            periods = full.periods[behind:behind + horizon]
    if not shared:
        note = ("the series are on different calendars "
                f"({', '.join(sorted(f'{a}/{b}' for a, b in axes))}); no group total")
        return PooledForecast(forecasts, None, None, None, note)
    total_draws = np.sum(list(aligned.values()), axis=0)
    total = pd.DataFrame({"period": periods, "step": np.arange(1, horizon + 1),
                          **_centre_and_bands(total_draws, levels)})
    return PooledForecast(forecasts, total, total_draws, aligned)


