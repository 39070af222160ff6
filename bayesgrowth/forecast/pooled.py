"""Forecasts of a pooled fit: every series, and the group total summed draw by draw.

Each series' forecast is the single-series forecast of its marginal posterior
(:meth:`~bayesgrowth.inference.pooled.PooledFit.fit_for`), with its own seed
(:func:`bayesgrowth.seeds.series_seed`). The group total sums the series'
predictive draws draw by draw: bands of a sum are not sums of bands.

The total covers the ``horizon`` periods after the latest last observation of any
series, and adds the series period by period on the one calendar. A series whose
history ends earlier is forecast further, through the total's last period, so that
every series has a forecast for every period of the total (and its table shows those
periods); :attr:`PooledForecast.ends_note` says which series end earlier and when. Series
on different calendars (quarters and months, or quarters taken in different months) get
no total, and :attr:`PooledForecast.note` says why.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd

from bayesgrowth.config import DEFAULT_LEVELS, check_levels
from bayesgrowth.display import fmt_interval, fmt_number, html_summary, text_summary
from bayesgrowth.forecast.bands import band_columns, check_horizon
from bayesgrowth.forecast.forecast import forecast
from bayesgrowth.forecast.means import mean_of_draws
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
        Each series' forecast, as for one series: its next ``horizon`` periods, and as many
        more as its history ends before the latest series' (through the total's last period).
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
    ends_note : str or None
        Which series end before the latest one and how far they are forecast so that
        the total covers the same periods for every series; ``None`` when all end together.
    """

    forecasts: dict
    total: pd.DataFrame | None
    total_draws: np.ndarray | None
    aligned: dict | None = None
    note: str | None = None
    ends_note: str | None = None

    def _summary(self) -> tuple[str, str]:
        first = next(iter(self.forecasts.values()))
        horizon = first.horizon if self.total is None else len(self.total)
        title = f"Pooled forecast of {len(self.forecasts)} series, {horizon} periods"
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
            t = fc.table.copy()  # the forecast's own table stays as it is
            t.insert(0, "series", name)
            parts.append(t)
        return pd.concat(parts, ignore_index=True)

    def tables(self) -> dict[str, pd.DataFrame]:
        """Each series' forecast table, by name."""
        return {name: fc.table for name, fc in self.forecasts.items()}


def _centre_and_bands(draws: np.ndarray, levels: tuple[int, ...]) -> dict:
    return {"mean": mean_of_draws(draws), "median": np.median(draws, axis=0),
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
    behind, note = periods_behind(fit.series)
    forecasts, aligned = {}, {}
    for name in fit.series:
        extra = 0 if behind is None else behind[name]
        forecasts[name] = forecast(fit.fit_for(name), horizon + extra, levels=levels,
                                   seed=series_seed(seed, name))
        if behind is not None:
            aligned[name] = forecasts[name].draws[:, extra:]
            periods = forecasts[name].periods[extra:]
    if behind is None:
        return PooledForecast(forecasts, None, None, None, note)
    total_draws = np.sum(list(aligned.values()), axis=0)
    total = pd.DataFrame({"period": periods, "step": np.arange(1, horizon + 1),
                          **_centre_and_bands(total_draws, levels)})
    return PooledForecast(forecasts, total, total_draws, aligned,
                          ends_note=_ends_note(fit.series, behind, periods))


def periods_behind(series: dict) -> tuple[dict | None, str | None]:
    """How many periods each series' history ends before the latest one, on a shared calendar.

    Parameters
    ----------
    series : dict of str to GrowthSeries

    Returns
    -------
    behind : dict of str to int, or None
        ``None`` when the series do not share one calendar: different label styles or
        steps, or periods of one step that fall in different months (quarters taken in
        January, April, ... and in February, May, ...), which cannot be added up.
    note : str or None
        Why there is no shared calendar, if there is none.
    """
    axes = {(s.axis.style, s.axis.step) for s in series.values()}
    if len(axes) > 1:
        return None, ("the series are on different calendars "
                      f"({', '.join(sorted(f'{a}/{b}' for a, b in axes))}); no group total")
    step = next(iter(axes))[1]
    ordinal = {n: s.axis.origin + s.t_last * s.axis.step for n, s in series.items()}
    latest = max(ordinal, key=ordinal.get)
    off = [n for n in series if (ordinal[latest] - ordinal[n]) % step]
    if off:
        return None, (f"the periods of {off[0]!r} (last {series[off[0]].labels[-1]}) and "
                      f"{latest!r} (last {series[latest].labels[-1]}) fall in different "
                      "months, so no period is shared to add them up; no group total")
    return {n: (ordinal[latest] - o) // step for n, o in ordinal.items()}, None


def _ends_note(series: dict, behind: dict, periods: list[str]) -> str | None:
    """Which series end before the latest one, and how far they are forecast for the total."""
    early = [n for n in series if behind[n] > 0]
    if not early:
        return None
    latest = next(n for n in series if behind[n] == 0)
    first = early[0]
    more = f" (and {len(early) - 1} more series)" if len(early) > 1 else ""
    return (f"{first!r} ends in {series[first].labels[-1]}, {behind[first]} period(s) before "
            f"the latest series ({series[latest].labels[-1]}){more}: the group total covers "
            f"{periods[0]} to {periods[-1]}, so such a series is forecast from its own last "
            f"period through {periods[-1]}, and its forecast is longer and wider than the "
            "others'")


