"""Least-squares point forecasts beside the Bayesian band for the same period.

Joins the two sides of the pipeline: the least-squares variants of
:mod:`bayesgrowth.leastsq` (numpy/scipy only) and a Bayesian
:class:`~bayesgrowth.forecast.Forecast`.
"""

from __future__ import annotations

from dataclasses import dataclass, replace

import numpy as np
import pandas as pd

from bayesgrowth.display import fmt_interval, fmt_number, fmt_percent, html_summary, text_summary
from bayesgrowth.forecast.forecast import Forecast
from bayesgrowth.leastsq import GrowthFit, LeastSquaresError, fit_table, fit_variants
from bayesgrowth.leastsq.curves import CURVE_NAMES, fit_curve
from bayesgrowth.leastsq.intervals import level_name

#: Bending curves that have a least-squares fit in :mod:`bayesgrowth.leastsq.curves`; a
#: model family names its match in the registry (``ModelFamily.leastsq_curve``).
CURVE_FITS = CURVE_NAMES


def _leastsq_curve(fit) -> str | None:
    """The least-squares curve matching the fit's model family, if it declares one."""
    spec = getattr(fit, "spec", None)
    curve = None if spec is None else spec.family.leastsq_curve
    return curve if curve in CURVE_FITS else None


@dataclass(frozen=True)
class CurveVariant:
    """A least-squares bending curve, shaped like a :class:`GrowthFit` row of the table.

    ``growth_per_period`` is the curve's growth over the last observed period
    (bending curves have no single growth rate).
    """

    variant: str
    n_points: int
    initial_value: float
    growth_per_period: float
    r_squared: float
    rmse: float
    t_last: float
    curve: object

    def value_at(self, t):
        """The fitted curve at times ``t``."""
        return self.curve.value_at(t)


def curve_variant(name: str, t: np.ndarray, y: np.ndarray, t_ref: float) -> CurveVariant:
    """Least-squares fit of the bending curve ``name`` as a comparison row.

    Raises
    ------
    LeastSquaresError
        If the fit does not converge.
    """
    fit = fit_curve(name, t, y, t_ref=t_ref)
    t = np.asarray(t, dtype=float)
    fitted = np.asarray(fit.value_at(t), dtype=float)
    resid = y - fitted
    t_last = float(t[-1])
    last = np.asarray(fit.value_at(np.array([t_last - 1.0, t_last])), dtype=float)
    return CurveVariant(
        variant=f"{name} (revenue scale)",
        n_points=int(t.size),
        initial_value=float(fit.params["a"]),
        growth_per_period=float(last[1] / last[0] - 1.0),
        r_squared=float(1.0 - resid @ resid / np.sum((y - y.mean()) ** 2)),
        rmse=float(np.sqrt(np.mean(resid**2))),
        t_last=t_last,
        curve=fit,
    )

__all__ = ["CURVE_FITS", "Comparison", "CurveVariant", "compare_to_forecast", "curve_variant"]


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

    def _summary(self) -> tuple[str, str, list[str], list[list[str]]]:
        fc = self.forecast
        level = max(fc.levels)
        bayes = self.table.iloc[0]
        title = (f"Least-squares fits of {fc.fit.series.name!r} beside the Bayesian forecast, "
                 f"{fc.horizon} periods ahead")
        points = self.table["value_at_horizon"]
        band = fmt_interval(bayes[f"bayes_lower_{level}"], bayes[f"bayes_upper_{level}"])
        # the two point forecasts as the variants' rows show them (a band is rounded outward)
        headline = (f"point forecasts {fmt_number(points.min())} to {fmt_number(points.max())}; "
                    f"Bayesian median {fmt_number(bayes['bayes_median'])}, {level}% band {band}")
        rows = [[r["variant"], str(r["n_points"]), fmt_percent(r["growth_per_period"]),
                 fmt_number(r["value_at_horizon"])] for _, r in self.table.iterrows()]
        return title, headline, ["variant", "points", "growth", "value at horizon"], rows

    def __repr__(self) -> str:
        title, headline, _, rows = self._summary()
        points = self.table["value_at_horizon"].to_numpy()
        low, high = rows[int(np.argmin(points))], rows[int(np.argmax(points))]
        return text_summary(title, [headline, f"{len(rows)} variants: lowest {low[0]} "
                                    f"({low[3]}), highest {high[0]} ({high[3]})"])

    def _repr_html_(self) -> str:
        return html_summary(*self._summary())

    @property
    def spread(self) -> dict:
        """``min``, ``max``, ``max_over_min`` of the point forecasts, and the extreme variants."""
        return dict(self.table.attrs["spread"])


_LEFT_OUT = "log-linear, leave out t="


def _with_period_label(fit, series):
    """A leave-one-out variant named by the period left out ("leave out 2023Q2"), not its index."""
    if not fit.variant.startswith(_LEFT_OUT):
        return fit
    t = int(float(fit.variant[len(_LEFT_OUT):]))
    return replace(fit, variant=f"log-linear, leave out {series.axis.label(t)}")


def compare_to_forecast(forecast: Forecast, *, max_drop: int | None = None) -> Comparison:
    """Fit every least-squares variant to the forecast's series and tabulate the spread.

    When the forecast's model is a bending curve (logistic, Gompertz, damped), the
    least-squares fit of that curve is added as a further variant.

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

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> fc = bg.GrowthModel(seed=1).fit(bg.load_demo()).forecast(8)
    >>> comparison = bg.compare_to_forecast(fc)
    >>> comparison.table[["variant", "value_at_horizon", "prob_at_least"]].shape
    (30, 3)
    >>> comparison.table["variant"].iloc[0]
    'log-linear'
    """
    series = forecast.fit.series
    t_ref = forecast.fit.priors.t_ref
    fits = [_with_period_label(f, series) for f in fit_variants(
        series.t, series.values, t_ref=t_ref, max_drop=max_drop)]
    curve = _leastsq_curve(forecast.fit)
    if curve is not None:
        # The same curve as the Bayesian model, fitted the way an analyst would.
        try:
            fits.append(curve_variant(curve, series.t, series.values, t_ref))
        except LeastSquaresError:
            pass  # the table then holds the exponential variants only
    table = fit_table(fits, forecast.horizon)
    _add_bayes_columns(table, forecast)
    table.insert(1, "period", forecast.periods[-1])
    return Comparison(fits=fits, table=table, forecast=forecast)


def _add_bayes_columns(table: pd.DataFrame, forecast: Forecast) -> None:
    """The forecast's median and bands at the horizon, and each row's ``prob_at_least``.

    Taken from the forecast's own table and :meth:`~Forecast.prob_exceeds` (exact for an
    exact forecast), so they are the numbers the forecast reports.
    """
    last = forecast.table.iloc[-1]
    table["bayes_median"] = float(last["median"])
    for level in forecast.levels:
        table[f"bayes_lower_{level_name(level)}"] = float(last[f"lower_{level}"])
        table[f"bayes_upper_{level_name(level)}"] = float(last[f"upper_{level}"])
    table["prob_at_least"] = [float(forecast.prob_exceeds(v).iloc[-1])
                              for v in table["value_at_horizon"]]
