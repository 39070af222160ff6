"""One entry point for both engines."""

from __future__ import annotations

import secrets

from bayesgrowth.config import DEFAULT_ENGINE, DEFAULT_MODEL, check_count
from bayesgrowth.data.series import GrowthSeries, as_series
from bayesgrowth.inference.exact import fit_exact
from bayesgrowth.inference.fit import Fit
from bayesgrowth.models.spec import ModelSpec, resolve_seasonal
from bayesgrowth.priors import Priors

__all__ = ["ENGINES", "fit_series"]

ENGINES = ("nuts", "exact")

#: Sampler settings that are counts, and the least each may be.
COUNTS = {"draws": 1, "chains": 1, "tune": 0, "cores": 1}


def check_settings(priors, seed, settings: dict) -> None:
    """Refuse priors that are no :class:`Priors`, and seeds or counts that are no whole numbers.

    Raises
    ------
    TypeError
        For ``priors`` of another type (a dict, say).
    ValueError
        Naming the setting: ``seed`` below 0 or not whole, ``draws``, ``chains``,
        ``cores`` below 1, ``tune`` below 0.
    """
    if priors is not None and not isinstance(priors, Priors):
        raise TypeError(
            f"priors must be a bayesgrowth.Priors, not {type(priors).__name__}; for example "
            "Priors(growth=GrowthPrior(center_pct=5, give_or_take_pts=10))"
        )
    if seed is not None:
        check_count(seed, "seed", 0)
    for name, least in COUNTS.items():
        if name in settings:
            check_count(settings[name], name, least)


def _checked_input(series, engine: str, priors, seed, settings: dict) -> GrowthSeries:
    """The series read (a path, a DataFrame, a Series) once the settings are checked."""
    if engine not in ENGINES:
        raise ValueError(f"engine must be one of {', '.join(ENGINES)}, got {engine!r}")
    check_settings(priors, seed, settings)
    return as_series(series, "series")


def fit_series(
    series: GrowthSeries,
    *,
    engine: str = DEFAULT_ENGINE,
    priors: Priors | None = None,
    seed: int | None = None,
    model: str = DEFAULT_MODEL["model"],
    errors: str = "independent",
    noise: str = "normal",
    seasonal: bool | str = DEFAULT_MODEL["seasonal"],
    drift: str = DEFAULT_MODEL["drift"],
    season_drift: bool = False,
    **settings,
) -> Fit:
    """Fit a growth model to ``series`` with the chosen engine.

    The building block under :class:`bayesgrowth.GrowthModel` and the commands, with
    the same defaults: the recommended model (:data:`bayesgrowth.config.DEFAULT_MODEL`,
    a damped local trend with seasonal factors when the calendar has them) on the exact
    engine. ``model="exponential"`` fits the plain exponential curve, whose bands
    assume that deviations do not persist and were far too narrow on real series.

    Parameters
    ----------
    series : GrowthSeries
        Or what :func:`~bayesgrowth.data.series.read_series` reads (a path, a
        DataFrame, a Series).
    engine : {"exact", "nuts"}
        The exact engine (the default) covers the local trend with normal noise and independent
        errors, and the exponential model with normal noise, independent or AR(1)
        errors, with or without seasonal factors.
    priors : Priors, optional
        Defaults documented in :mod:`bayesgrowth.priors`.
    seed : int, optional
        A fresh seed is drawn (and recorded in the result) when omitted.
    model : str
        A registered model family (see :mod:`bayesgrowth.models.registry`):
        ``"local-trend"`` (the default), ``"exponential"``, ``"damped"``,
        ``"logistic"``, ``"gompertz"``.
    errors : {"independent", "ar1"}
        Whether deviations from the curve persist (AR(1) on the log scale).
    noise : {"normal", "student-t"}
        Noise distribution; Student-t tolerates outlying periods.
    seasonal : bool, "auto" or "drifting"
        Multiplicative seasonal factors (quarterly or monthly data); ``"auto"`` (the
        default) uses
        them for the local trend when the calendar has seasons and two full years
        are observed; ``"drifting"`` (local trend only) lets them drift slowly, a
        seasonal random walk around them (see :class:`ModelSpec`).
    drift : {"mean-reverting", "random-walk", "adaptive"}
        For ``local-trend``: how the growth rate drifts; by default it fades towards
        a long-run rate (a damped trend).
    season_drift : bool
        The same as ``seasonal="drifting"`` when ``seasonal`` is true (the form of
        :meth:`ModelSpec.to_dict`).
    **settings
        Passed to the engine (``draws``, ``chains``; for NUTS also ``tune``,
        ``target_accept``, ``cores``, ``progressbar``).

    Returns
    -------
    Fit
        With diagnostics checked; a failed check warns (:class:`SamplingWarning`).

    Examples
    --------
    >>> import numpy as np
    >>> import bayesgrowth as bg
    >>> fit = bg.fit_series(bg.load_demo(), seed=1)
    >>> fit.engine, fit.diagnostics.ok
    ('exact', True)
    >>> round(float(np.median(fit.derived()["growth_per_period"])), 3)
    0.06
    """
    series = _checked_input(series, engine, priors, seed, settings)
    seasonal = resolve_seasonal(seasonal, series.axis, series.t, model)
    spec = ModelSpec(model=model, errors=errors, noise=noise, seasonal=seasonal, drift=drift,
                     season_drift=season_drift)
    if engine == "exact" and not spec.exact_fits:
        from bayesgrowth.models.registry import exact_coverage

        raise ValueError(
            f"engine='exact' covers {exact_coverage()}, not {spec.label()}; use engine='nuts'"
        )
    if engine == "nuts" and spec.adaptive:
        raise ValueError(
            "drift='adaptive' averages drifting and fading growth by their exact evidence, "
            "which only the exact engine computes; use engine='exact', or drift='random-walk' "
            "or 'mean-reverting' with engine='nuts'"
        )
    if spec.seasonal:
        from bayesgrowth.models.spec import season_index

        season_index(series.axis, series.t)  # refuses calendars without seasons
    seed = secrets.randbits(32) if seed is None else int(seed)
    resolved = (priors or Priors()).resolve(series)
    if spec.family.states and resolved.t_ref != int(series.t[0]):
        raise ValueError(
            f"the {spec.model} model anchors its level at the first observation; "
            "leave the reference period unset"
        )
    if engine == "exact":
        settings = {k: v for k, v in settings.items() if k in ("draws", "chains")}
        if spec.is_state_space:
            from bayesgrowth.inference.statespace import fit_state_space

            fit = fit_state_space(series, resolved, spec, seed=seed, **settings)
        elif spec.is_gaussian_ar1:
            from bayesgrowth.inference.ar1_grid import fit_ar1_exact

            fit = fit_ar1_exact(series, resolved, spec, seed=seed, **settings)
        else:
            fit = fit_exact(series, resolved, seed=seed, spec=spec, **settings)
    else:
        from bayesgrowth.inference.nuts import fit_nuts

        fit = fit_nuts(series, resolved, seed=seed, spec=spec, **settings)
    fit.diagnostics.warn_if_failed()
    return fit
