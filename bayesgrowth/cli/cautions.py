"""The cautions a command prints beside a forecast it shows, as ``forecast`` prints them.

Every command that prints a forecast (a median and bands for a future period) ends
with the same cautions as ``bayesgrowth forecast``: the fixed curve's, when the
model is one; the long horizon's, when the horizon is more than half the history;
and the general one (a forecast extrapolates past growth; it is not investment
advice).
"""

from __future__ import annotations

__all__ = ["forecast_cautions", "panel_cautions", "print_cautions"]


def forecast_cautions(series, horizon: int, model: str | None = None,
                      errors: str = "independent") -> list[str]:
    """The cautions of a forecast of ``series`` ``horizon`` periods ahead.

    Parameters
    ----------
    series : GrowthSeries
        The history the forecast starts from.
    horizon : int
        Periods forecast.
    model : str, optional
        The model family's name (:mod:`bayesgrowth.models.registry`); ``None`` for
        the default model.
    errors : {"independent", "ar1"}
        The model's errors.

    Returns
    -------
    list of str
        The cautions, the general one last.

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> len(forecast_cautions(bg.load_demo(), 4))
    1
    >>> forecast_cautions(bg.load_demo(), 12, "exponential")[1][:26]
    'The horizon (12 periods) i'
    """
    from bayesgrowth.forecast.forecast import CAUTION, extrapolation_caution

    family = _family(model)
    span = series.t_last - int(series.t[0]) + 1
    long = extrapolation_caution(span, horizon, saturates=bool(family.ceiling))
    return [c for c in (_fixed_curve(model, errors), long, CAUTION) if c]


def _family(model: str | None):
    """The registered family of ``model`` (``None``: the default model's)."""
    from bayesgrowth.config import DEFAULT_MODEL
    from bayesgrowth.models.registry import get_family

    return get_family(model or DEFAULT_MODEL["model"])


def _fixed_curve(model: str | None, errors: str) -> str | None:
    """The fixed curve's caution for a curve with independent errors, else ``None``."""
    from bayesgrowth.forecast.forecast import fixed_curve_caution

    return fixed_curve_caution(_family(model), errors)


def panel_cautions(panel: dict, horizon, done=None, model: str | None = None,
                   errors: str = "independent") -> list[str]:
    """The cautions of forecasts of many series (``batch``, ``pool``), one line each.

    Parameters
    ----------
    panel : dict
        Series names to :class:`~bayesgrowth.data.series.GrowthSeries`.
    horizon : int or dict
        Periods forecast: one number for every series, or one per series name (a
        series that ends sooner is forecast further).
    done : iterable, optional
        Names of the series forecast (compared as text); default every series.
    model : str, optional
        The model family's name; ``None`` for the default model.
    errors : {"independent", "ar1"}
        The model's errors.

    Returns
    -------
    list of str
        The fixed curve's caution when the model is one; the long horizon's, naming
        the series whose history (first to last period) is less than twice the
        horizon; the general one, last.

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> panel = {"a": bg.load_demo()}
    >>> panel_cautions(panel, 12)[0][:58]
    'The horizon (12 periods) is more than half the history of '
    """
    from bayesgrowth.forecast.forecast import CAUTION, HORIZON_SHARE

    names = {str(name) for name in (panel if done is None else done)}
    steps = horizon if isinstance(horizon, dict) else dict.fromkeys(panel, horizon)
    long = [name for name, s in panel.items() if str(name) in names
            and steps[name] > HORIZON_SHARE * (s.t_last - int(s.t[0]) + 1)]
    said = None
    if long:
        shown = ", ".join(repr(name) for name in long[:5]) + (", ..." if len(long) > 5 else "")
        size = (f" ({steps[long[0]]} periods)" if len({steps[n] for n in long}) == 1 else "")
        said = (f"The horizon{size} is more than half the history of {len(long)} "
                f"of {len(names)} series ({shown}): their forecasts are extrapolated far beyond "
                "the data, so treat their later periods as scenarios.")
    return [c for c in (_fixed_curve(model, errors), said, CAUTION) if c]


def print_cautions(cautions) -> None:
    """Print each caution on its own line, after ``caution:``.

    Parameters
    ----------
    cautions : iterable of str
    """
    for caution in cautions:
        print(f"caution: {caution}")
