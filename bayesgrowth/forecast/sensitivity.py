"""Prior sensitivity: how the forecast at the horizon moves as the priors change.

One prior at a time is varied over a grid while the others stay at the base
setting: the strength of the initial-value anchor, the centre and the spread of
the growth prior and, for the curves with a ceiling, the ceiling. Each setting
is a fresh fit; the table reports the forecast at the horizon (median and a
central band). A forecast that moves much less than its band across reasonable
settings is driven by the data; one that follows the prior is not (the data
cannot settle that question, and the report should say so).

The exact engine makes the grid cheap for the plain exponential model; the other
models are sampled with NUTS.
"""

from __future__ import annotations

import dataclasses
import warnings
from dataclasses import dataclass

import numpy as np
import pandas as pd

from bayesgrowth.config import DEFAULT_MODEL
from bayesgrowth.data.series import GrowthSeries, as_series
from bayesgrowth.forecast.bands import check_horizon
from bayesgrowth.models.spec import ModelSpec, resolve_seasonal
from bayesgrowth.priors import CeilingPrior, Priors

__all__ = [
    "DEFAULT_ANCHORS",
    "DEFAULT_CEILINGS",
    "DEFAULT_GROWTH_CENTRES",
    "DEFAULT_GROWTH_SPREADS",
    "FACTORS",
    "SensitivityResult",
    "prior_sensitivity",
]

#: Initial-value give-or-take in percent (0 fixes the initial value).
DEFAULT_ANCHORS = (0.0, 10.0, 50.0, 200.0)
#: Growth prior centres in percent per period.
DEFAULT_GROWTH_CENTRES = (-10.0, 0.0, 10.0, 20.0)
#: Growth prior give-or-take in percentage points.
DEFAULT_GROWTH_SPREADS = (3.0, 10.0, 30.0, 100.0)
#: Ceiling centres as multiples of the latest observed value.
DEFAULT_CEILINGS = (1.5, 2.0, 3.0, 5.0, 10.0)

#: Factor names, in table order.
FACTORS = ("initial-value anchor", "growth centre", "growth spread", "ceiling")


@dataclass(frozen=True)
class SensitivityResult:
    """The forecast at the horizon under each prior setting.

    Attributes
    ----------
    table : pandas.DataFrame
        One row per setting: ``factor``, ``setting`` (in words), ``value`` (the
        number varied), ``is_base``, ``engine``, ``period``, ``median``,
        ``lower_L``, ``upper_L`` (the central ``L``% band of the value at the
        horizon), ``diagnostics_ok``.
    series_name : str
    model : str
        The model in words.
    horizon : int
    period : str
        The forecast period reported (the last of the horizon).
    level : int
        Band level in percent.
    """

    table: pd.DataFrame
    series_name: str
    model: str
    horizon: int
    period: str
    level: int

    def spread(self) -> pd.DataFrame:
        """Per factor: lowest and highest median across its settings, and their ratio."""
        g = self.table.groupby("factor", sort=False)["median"]
        out = pd.DataFrame({"lowest_median": g.min(), "highest_median": g.max()})
        out["ratio"] = out["highest_median"] / out["lowest_median"]
        return out


def _grid(base: Priors, spec: ModelSpec, anchors, centres, spreads, ceilings) -> list[tuple]:
    """``(factor, setting, value, priors)`` for every setting, the base included per factor."""
    rows = []

    def add(factor, values, current, make, word):
        values = sorted({float(v) for v in values} | {float(current)})
        for v in values:
            rows.append((factor, word(v), v, make(v)))

    r = dataclasses.replace
    add("initial-value anchor", anchors, base.initial.give_or_take_pct,
        lambda v: r(base, initial=r(base.initial, give_or_take_pct=v)),
        lambda v: "fixed" if v == 0 else f"give or take {v:g}%")
    add("growth centre", centres, base.growth.center_pct,
        lambda v: r(base, growth=r(base.growth, center_pct=v)),
        lambda v: f"{v:g}% per period")
    add("growth spread", spreads, base.growth.give_or_take_pts,
        lambda v: r(base, growth=r(base.growth, give_or_take_pts=v)),
        lambda v: f"give or take {v:g} points")
    if spec.family.ceiling:  # declared in the model registry
        if base.ceiling.value is None:
            add("ceiling", ceilings, base.ceiling.multiple,
                lambda v: r(base, ceiling=CeilingPrior(
                    multiple=v, give_or_take_pct=base.ceiling.give_or_take_pct)),
                lambda v: f"{v:g} x latest value")
        else:
            rows.append(("ceiling", f"about {base.ceiling.value:,.6g}", base.ceiling.value, base))
            for v in sorted(float(c) for c in ceilings):
                rows.append(("ceiling", f"{v:g} x latest value", v, r(base, ceiling=CeilingPrior(
                    multiple=v, give_or_take_pct=base.ceiling.give_or_take_pct))))
    return rows


def prior_sensitivity(
    series: GrowthSeries,
    horizon: int,
    *,
    model: str = DEFAULT_MODEL["model"],
    errors: str = "independent",
    noise: str = "normal",
    seasonal: bool | str = DEFAULT_MODEL["seasonal"],
    drift: str = DEFAULT_MODEL["drift"],
    priors: Priors | None = None,
    anchors=DEFAULT_ANCHORS,
    growth_centres=DEFAULT_GROWTH_CENTRES,
    growth_spreads=DEFAULT_GROWTH_SPREADS,
    ceilings=DEFAULT_CEILINGS,
    engine: str = "auto",
    level: int = 80,
    seed: int = 1,
    **settings,
) -> SensitivityResult:
    """Refit over a one-at-a-time grid of priors and report the forecast at the horizon.

    Parameters
    ----------
    series : GrowthSeries
        Or what :func:`~bayesgrowth.data.series.read_series` reads (a path, a
        DataFrame, a Series).
    horizon : int
        The forecast period reported is the last of ``horizon`` periods.
    model, errors, noise, seasonal, drift
        The model, as in :func:`bayesgrowth.inference.fit_series`; by default the
        recommended model (:data:`bayesgrowth.config.DEFAULT_MODEL`), seasonal factors
        decided from the calendar.
    priors : Priors, optional
        The base setting (default :class:`~bayesgrowth.priors.Priors()`); each factor
        varies from it, and its own value is always one of the settings.
    anchors : sequence of float
        Initial-value give-or-take in percent (0 fixes it).
    growth_centres : sequence of float
        Growth prior centres in percent per period.
    growth_spreads : sequence of float
        Growth prior give-or-take in points (> 0).
    ceilings : sequence of float
        Ceiling prior centres as multiples of the latest value (> 1); used only
        by the logistic and Gompertz curves.
    engine : {"auto", "exact", "nuts"}
        ``auto``: the exact engine wherever it fits (the local trend, and the
        exponential model with normal noise, independent or AR(1) errors, no
        seasonal factors), NUTS otherwise.
    level : int
        Band level in percent.
    seed : int
        One seed for every fit and forecast, so settings differ only by the prior.
    **settings
        Engine settings (``draws``, ``chains``, ``tune``, ...).

    Returns
    -------
    SensitivityResult

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> result = bg.prior_sensitivity(bg.load_demo(), 4, anchors=(0.0, 50.0),
    ...                               growth_centres=(0.0,), growth_spreads=(10.0,),
    ...                               engine="exact")
    >>> result.period
    '2026Q4'
    """
    series = as_series(series, "series")
    seasonal = resolve_seasonal(seasonal, series.axis, series.t, model)
    spec = ModelSpec(model=model, errors=errors, noise=noise, seasonal=seasonal, drift=drift)
    engine = _engine(spec, engine)
    horizon = check_horizon(horizon)
    if not 0 < level < 100 or int(level) != level:
        raise ValueError(f"level must be a whole percentage between 1 and 99, got {level}")
    level = int(level)
    base = priors or Priors()
    grid = _grid(base, spec, anchors, growth_centres, growth_spreads, ceilings)
    options = dict(settings)
    if engine == "nuts":
        options.setdefault("progressbar", False)
    cache: dict = {}
    rows = []
    period = series.future_labels(horizon)[-1]
    for factor, setting, value, pr in grid:
        if pr not in cache:
            cache[pr] = _final_band(series, spec, engine, pr, seed, horizon, level, options)
        q, ok = cache[pr]
        rows.append({
            "factor": factor, "setting": setting, "value": value, "is_base": pr == base,
            "engine": engine, "period": period, "median": q[0],
            f"lower_{level}": q[1], f"upper_{level}": q[2], "diagnostics_ok": ok,
        })
    return SensitivityResult(
        table=pd.DataFrame(rows), series_name=series.name, model=spec.label(),
        horizon=horizon, period=period, level=level,
    )


def _engine(spec: ModelSpec, engine: str) -> str:
    if engine not in ("auto", "exact", "nuts"):
        raise ValueError(f"engine must be auto, exact or nuts, got {engine!r}")
    if engine == "auto":
        return "exact" if spec.exact_fits else "nuts"
    return engine


def _final_band(series, spec: ModelSpec, engine: str, priors, seed: int, horizon: int,
                level: int, options: dict) -> tuple[np.ndarray, bool]:
    """Median and band at the horizon under ``priors``, and whether the fit's checks passed."""
    from bayesgrowth.forecast.forecast import forecast
    from bayesgrowth.inference.run import fit_series

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # diagnostics are reported in the table
        fit = fit_series(series, engine=engine, priors=priors, seed=seed, model=spec.model,
                         errors=spec.errors, noise=spec.noise, seasonal=spec.seasonal,
                         drift=spec.drift, **options)
    # The forecast's own table: for the exact state-space engine its bands come from the
    # exact mixture, so the numbers match what `forecast` reports for the same priors.
    row = forecast(fit, horizon, levels=(level,), seed=seed).table.iloc[-1]
    band = np.array([row["median"], row[f"lower_{level}"], row[f"upper_{level}"]], dtype=float)
    return band, bool(fit.diagnostics.ok)
