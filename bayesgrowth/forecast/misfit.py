"""Misfit checks of a forecast: whether the next step runs ahead of the latest growth.

A growth curve fitted to a whole history can keep rising at its average pace
while the business has slowed: the first forecast period then jumps well above
where the latest growth would take it. :func:`slowdown_check` compares the two.

The rule
--------
*Recent pace.* Without seasonal factors: the mean growth per period over the
last ``recent`` periods (from the earliest observation in that window to the
last one, on the log scale; gaps count as the periods they span), carried one
more period forward from the last value. With seasonal factors (``P`` seasons a
year): the same period a year before the first forecast period, grown by the
latest year-on-year growth (last value over the value ``P`` periods earlier), so
seasons do not pass for a slowdown.

*Warning.* When the value at the recent pace falls below the lower edge of the
model's central ``level``% band (default 80%) for the first forecast period; or
when it falls below the central 50% band while the model's median runs more than
10% ahead of it (a curve that misfits a slowing series also has a wide band,
which can hide the very gap this check is for: an exponential curve whose first
step ran 13% ahead of a 1%-a-quarter pace still held that pace inside its 80%
band). The
band holds the model's own predictive spread, so the warning says: had growth
simply continued as of late, the model would call that outcome unlikely (it
gives an outcome that low a probability under ``(100 - level) / 2`` percent,
10% for the 80% band). The check needs at least two observations
in the recent window (with seasons, the values one year before the last and
before the first forecast period); otherwise it gives no verdict.

The rule is this package's own (common practice, no single published source).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from bayesgrowth.forecast.bands import band_probabilities

__all__ = ["RECENT_PERIODS", "Slowdown", "misfit_lines", "slowdown_check", "slowdown_warning"]

#: Periods the recent growth is measured over without seasonal factors (a year of quarters).
RECENT_PERIODS = 4
#: A median this far ahead of the recent pace, with the pace below the 50% band, also warns.
FAR_AHEAD = 0.10


@dataclass(frozen=True)
class Slowdown:
    """The recent pace of a series against the model's first forecast period.

    Attributes
    ----------
    period : str
        Label of the first forecast period.
    basis : str
        ``"per period"`` (growth per period over the recent window) or
        ``"year on year"`` (seasonal models).
    window : int
        Periods the recent growth spans.
    recent_growth : float
        Recent growth on that basis (0.02 is 2%).
    implied_growth : float
        The model's median growth for the first forecast period on the same basis.
    pace_value : float
        The first forecast period's value at the recent pace.
    median, lower, upper : float
        The model's median and ``level``% band for that period.
    level : int
        Band level in percent.
    """

    period: str
    basis: str
    window: int
    recent_growth: float
    implied_growth: float
    pace_value: float
    median: float
    lower: float
    upper: float
    level: int
    lower_50: float = math.nan

    @property
    def flagged(self) -> bool:
        """Whether the value at the recent pace falls below the band (see the module rule)."""
        far_ahead = (self.pace_value < self.lower_50
                     and self.median > (1 + FAR_AHEAD) * self.pace_value)
        return self.pace_value < self.lower or far_ahead


def _pace(t: np.ndarray, log_y: np.ndarray, t_next: int, recent: int,
          seasons: int | None) -> tuple[float, float, float, int, str] | None:
    """``(pace log value, recent log growth, log base of the growth, window, basis)``."""
    t_last = int(t[-1])
    if seasons:
        at = dict(zip(t.tolist(), log_y.tolist(), strict=True))
        if t_last - seasons not in at or t_next - seasons not in at:
            return None
        yoy = at[t_last] - at[t_last - seasons]
        base = at[t_next - seasons]
        return base + yoy, yoy, base, seasons, "year on year"
    inside = np.flatnonzero(t >= t_last - recent)
    first = int(inside[0])
    span = t_last - int(t[first])
    if span == 0:
        return None
    rate = (log_y[-1] - log_y[first]) / span
    step = t_next - t_last
    return log_y[-1] + rate * step, rate, float(log_y[-1]), span, "per period"


def _first_step_band(forecast, level: int) -> tuple[float, float, float]:
    table = forecast.table
    if f"lower_{level}" in table.columns:
        row = table.iloc[0]
        return float(row["median"]), float(row[f"lower_{level}"]), float(row[f"upper_{level}"])
    q = np.quantile(forecast.draws[:, 0], [0.5, *band_probabilities(level)])
    return float(q[0]), float(q[1]), float(q[2])


def slowdown_check(forecast, *, recent: int = RECENT_PERIODS, level: int = 80
                   ) -> Slowdown | None:
    """The recent pace against the model's first forecast period (rule in the module docstring).

    Parameters
    ----------
    forecast : Forecast
        From :func:`bayesgrowth.forecast.forecast`.
    recent : int, default 4
        Periods of the recent window (models without seasonal factors).
    level : int, default 80
        Band level of the comparison, in percent.

    Returns
    -------
    Slowdown or None
        ``None`` when the history lacks the observations the rule needs.
    """
    if int(recent) < 1 or not 0 < level < 100:
        raise ValueError(f"recent must be at least 1 and level in (0, 100), got {recent}, {level}")
    series = forecast.fit.series
    seasons = None
    if forecast.fit.spec is not None and forecast.fit.spec.seasonal:
        from bayesgrowth.models.spec import season_index

        seasons, _ = season_index(series.axis, series.t)
    pace = _pace(np.asarray(series.t, dtype=int), np.log(series.values), int(forecast.t[0]),
                 int(recent), seasons)
    if pace is None:
        return None
    pace_log, growth, base_log, window, basis = pace
    median, lower, upper = _first_step_band(forecast, level)
    lower_50 = _first_step_band(forecast, 50)[1]
    steps = 1 if basis == "year on year" else int(forecast.t[0]) - int(series.t[-1])
    implied = (math.log(median) - base_log) / steps
    return Slowdown(period=forecast.periods[0], basis=basis, window=window,
                    recent_growth=math.expm1(growth), implied_growth=math.expm1(implied),
                    pace_value=math.exp(pace_log), median=median, lower=lower, upper=upper,
                    level=int(level), lower_50=lower_50)


def _num(v: float) -> str:
    """Three significant figures with thousands separators (the package's number style)."""
    rounded = float(f"{v:.3g}")
    return f"{rounded:,.0f}" if abs(rounded) >= 100 else f"{rounded:,.3g}"


def slowdown_warning(forecast, *, recent: int = RECENT_PERIODS, level: int = 80) -> str | None:
    """A one-paragraph warning when the model's next step runs ahead of the recent growth.

    Parameters
    ----------
    forecast : Forecast
    recent : int, default 4
        Periods of the recent window (models without seasonal factors).
    level : int, default 80
        Band level of the comparison, in percent.

    Returns
    -------
    str or None
        The warning, or ``None`` when the recent pace lies inside or above the band
        (or the history is too short to tell). The rule is in the module docstring.
    """
    s = slowdown_check(forecast, recent=recent, level=level)
    if s is None or not s.flagged:
        return None
    if s.basis == "year on year":
        recent_text = (f"over the last year the value grew {s.recent_growth:.1%} year on year, "
                       f"but the model's median for {s.period} is {s.implied_growth:.1%} above "
                       "the same period a year earlier")
    else:
        recent_text = (f"over the last {s.window} periods the value grew "
                       f"{s.recent_growth:.1%} per period, but the model's median for "
                       f"{s.period} is {s.implied_growth:.1%} above the last value")
    return (
        f"slowdown: {recent_text}. At the recent pace {s.period} would come to "
        f"{_num(s.pace_value)}, "
        + (f"below the model's {s.level}% band ({_num(s.lower)} to {_num(s.upper)})."
           if s.pace_value < s.lower else
           f"below the model's 50% band, and its median ({_num(s.median)}) runs more than "
           f"{FAR_AHEAD:.0%} ahead of it.")
        + " The model may be running ahead of a slowdown: " + _advice(forecast)
    )


def _advice(forecast) -> str:
    """What to do about a flagged slowdown, by whether the model's growth can change."""
    spec = getattr(forecast.fit, "spec", None)
    if spec is not None and spec.family.states:  # the local trend: growth already moves
        return ("its growth rate can change, but it calls this pace unlikely: check that "
                "the latest values are right and complete, and check the model's bands with "
                "a backtest.")
    return ("compare a model whose growth can change (the default damped local trend) and "
            "check its bands with a backtest.")


def misfit_lines(forecast) -> list[str]:
    """The misfit warnings of a forecast as printed lines (``"warning: ..."``), maybe none.

    Parameters
    ----------
    forecast : Forecast

    Returns
    -------
    list of str
    """
    return [f"warning: {w}" for w in (slowdown_warning(forecast),) if w]
