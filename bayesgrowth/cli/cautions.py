"""The cautions a command prints beside a forecast it shows, as ``forecast`` prints them.

Every command that prints a forecast (a median and bands for a future period) ends
with the same cautions as ``bayesgrowth forecast``: the fixed curve's, when the
model is one; the long horizon's, when the horizon is more than half the history;
and the general one (a forecast extrapolates past growth; it is not investment
advice).
"""

from __future__ import annotations

__all__ = ["forecast_cautions", "print_cautions"]


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
    from bayesgrowth.config import DEFAULT_MODEL
    from bayesgrowth.forecast.forecast import (
        CAUTION,
        FIXED_CURVE_CAUTION,
        extrapolation_caution,
    )
    from bayesgrowth.models.registry import get_family

    family = get_family(model or DEFAULT_MODEL["model"])
    fixed = FIXED_CURVE_CAUTION if not family.states and errors == "independent" else None
    span = series.t_last - int(series.t[0]) + 1
    long = extrapolation_caution(span, horizon, saturates=bool(family.ceiling))
    return [c for c in (fixed, long, CAUTION) if c]


def print_cautions(cautions) -> None:
    """Print each caution on its own line, after ``caution:``.

    Parameters
    ----------
    cautions : iterable of str
    """
    for caution in cautions:
        print(f"caution: {caution}")
