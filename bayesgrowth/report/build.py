"""Compute everything a report shows, then render it (see :mod:`bayesgrowth.report.html`)."""

from __future__ import annotations

import warnings
from pathlib import Path

from bayesgrowth.config import DEFAULT_LEVELS, DEFAULT_MODEL
from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.report.html import ReportParts, figure_data_uri, render_report

__all__ = ["backtest_settings_for", "build_report", "report_parts", "write_report"]

#: Fewest training points at the first backtest origin in a report.
MIN_TRAIN_FLOOR = 6


def backtest_settings_for(n_obs: int, horizon: int) -> tuple[int, int] | None:
    """``(min_train, backtest_horizon)`` for a report's backtest, or ``None`` if too short.

    The first origin trains on half the history (at least 6 points) and each
    origin forecasts up to 4 periods (or the forecast horizon if shorter), so
    that the backtest scores at least 4 origins.
    """
    bt_horizon = max(1, min(4, horizon))
    min_train = max(MIN_TRAIN_FLOOR, n_obs // 2)
    if n_obs - min_train < 4:
        return None
    return min_train, bt_horizon


def build_report(
    series: GrowthSeries,
    horizon: int,
    *,
    engine: str = "exact",
    seed: int = 1,
    priors=None,
    levels=DEFAULT_LEVELS,
    target: float | None = None,
    target_probability: float = 0.5,
    with_backtest: bool = True,
    models=None,
    models_note: str | None = None,
    average=None,
    command: str | None = None,
    fit_options: dict | None = None,
    timestamp: str | None = None,
    unit: str | None = None,
) -> str:
    """Fit, forecast, compare, backtest and render one self-contained HTML page.

    Parameters
    ----------
    series : GrowthSeries
    horizon : int
        Periods to forecast.
    engine : {"exact", "nuts"}
        Engine of the forecast and of the backtest's Bayesian method.
    seed : int
    priors : Priors, optional
    levels : sequence of int
    target : float, optional
        A budget or guidance value; the headline gives the probability of reaching it.
    target_probability : float
    with_backtest : bool
        Run a rolling-origin backtest (engine, log-linear and naive methods) when the
        history is long enough (see :func:`backtest_settings_for`).
    models : pandas.DataFrame, optional
        A model comparison table to show (when several models were fitted).
    models_note : str, optional
    average : ModelAverage, optional
        Several models fitted to ``series`` and averaged
        (:func:`bayesgrowth.select.model_average`): the report shows their comparison,
        stacking weights with their uncertainty, and each model's band beside the
        average. Takes the place of ``models`` and ``models_note``.
    command : str, optional
        The command line (or call) that reproduces the report.
    fit_options : dict, optional
        Further options for :func:`bayesgrowth.inference.fit_series`; the recommended
        model (:data:`bayesgrowth.config.DEFAULT_MODEL`) fills in what they leave out.
    timestamp : str, optional
        Override the time stamp (for reproducibility tests).
    unit : str, optional
        What the values measure, e.g. "Revenue (EUR thousand)": the charts' value axis
        and the forecast table's heading (default "Value" on the charts).

    Returns
    -------
    str
        The HTML page.

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> page = bg.build_report(bg.load_demo(), 4, with_backtest=False)
    >>> page.startswith("<!DOCTYPE html>"), "not investment advice" in page
    (True, True)
    """
    return render_report(report_parts(
        series, horizon, engine=engine, seed=seed, priors=priors, levels=levels, target=target,
        target_probability=target_probability, with_backtest=with_backtest, models=models,
        models_note=models_note, average=average, command=command, fit_options=fit_options,
        timestamp=timestamp, unit=unit,
    ))


def report_parts(series: GrowthSeries, horizon: int, *, engine: str = "exact", seed: int = 1,
                 priors=None, levels=DEFAULT_LEVELS, target: float | None = None,
                 target_probability: float = 0.5, with_backtest: bool = True, models=None,
                 models_note: str | None = None, average=None, command: str | None = None,
                 fit_options: dict | None = None, timestamp: str | None = None,
                 unit: str | None = None) -> ReportParts:
    """Everything :func:`build_report` computes, before it is rendered.

    The parameters are those of :func:`build_report`; the result's ``forecast``
    lets a caller print the same headline as the page
    (:func:`~bayesgrowth.report.html.render_report` renders it).

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> parts = report_parts(bg.load_demo(), 4, with_backtest=False)
    >>> parts.forecast.periods[-1]
    '2026Q4'
    """
    import matplotlib

    matplotlib.use("Agg")

    from bayesgrowth.forecast.forecast import forecast
    from bayesgrowth.inference.run import fit_series
    from bayesgrowth.plots.fan import plot_fan

    fit_options = {**DEFAULT_MODEL, **(fit_options or {})}
    fit = fit_series(series, engine=engine, priors=priors, seed=seed, **fit_options)
    fc = forecast(fit, horizon, levels=levels)
    ax = plot_fan(fc, unit=unit, target=target)
    parts = ReportParts(
        forecast=fc,
        fan_chart=figure_data_uri(ax.figure),
        command=command or f"build_report(series, {horizon}, engine={engine!r}, seed={seed})",
        target=target,
        target_probability=target_probability,
        models=models,
        models_note=models_note,
        unit=unit,
    )
    if timestamp is not None:
        parts.timestamp = timestamp
    if average is not None:
        _add_average(parts, average, unit)
    _add_comparison(parts, fc, unit)
    settings = backtest_settings_for(series.n, horizon) if with_backtest else None
    if settings is not None:
        _add_backtest(parts, series, settings, engine=engine, seed=seed, priors=priors,
                      fit_options=fit_options)
    return parts


def _add_comparison(parts: ReportParts, fc, unit: str | None) -> None:
    """The least-squares section: variants beside the forecast (none when they fail)."""
    from bayesgrowth.comparison import compare_to_forecast
    from bayesgrowth.leastsq import LeastSquaresError
    from bayesgrowth.plots.compare import comparison_figure

    try:
        comp = compare_to_forecast(fc)
    except LeastSquaresError:
        return
    parts.comparison = comp
    parts.comparison_chart = figure_data_uri(comparison_figure(comp, unit=unit))


def _add_backtest(parts: ReportParts, series: GrowthSeries, settings: tuple[int, int], *,
                  engine: str, seed: int, priors, fit_options: dict | None) -> None:
    """The calibration section: a backtest of the model beside two plain methods.

    The model is named :data:`~bayesgrowth.report.html.BACKTEST_NAME` in the section's
    verdicts and chart, whatever its engine.
    """
    from bayesgrowth.backtest import backtest
    from bayesgrowth.plots.backtest import calibration_figure
    from bayesgrowth.report.html import BACKTEST_NAME

    min_train, bt_h = settings
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        models = {BACKTEST_NAME: {**(fit_options or {}), "engine": engine},
                  "log-linear": "log-linear", "naive": "naive"}
        result = backtest(series, models=models, horizon=bt_h, min_train=min_train,
                          levels=parts.forecast.levels, seed=seed, priors=priors)
    parts.backtest = result
    parts.calibration_chart = figure_data_uri(calibration_figure(result))


def _add_average(parts: ReportParts, average, unit: str | None) -> None:
    """The model comparison section's table, words and chart, from a ModelAverage."""
    from bayesgrowth.plots.models import plot_model_bands
    from bayesgrowth.report.averaging import models_note, models_table

    level = 80 if 80 in average.averaged.levels else max(average.averaged.levels)
    ax = plot_model_bands(average.forecasts, average.averaged, level=level, unit=unit,
                          comparison=average.comparison)
    parts.models = models_table(average.comparison)
    parts.models_note = models_note(average)
    parts.models_chart = figure_data_uri(ax.figure)


def write_report(path: str | Path, html_text: str) -> Path:
    """Write a report page (UTF-8)."""
    path = Path(path)
    path.write_text(html_text, encoding="utf-8")
    return path
