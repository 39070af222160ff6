"""One entry point for both engines."""

from __future__ import annotations

import secrets

from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.inference.exact import fit_exact
from bayesgrowth.inference.fit import Fit
from bayesgrowth.priors import Priors

__all__ = ["ENGINES", "fit_series"]

ENGINES = ("nuts", "exact")


def fit_series(
    series: GrowthSeries,
    *,
    engine: str = "nuts",
    priors: Priors | None = None,
    seed: int | None = None,
    **settings,
) -> Fit:
    """Fit the exponential growth model to ``series`` with the chosen engine.

    Parameters
    ----------
    series : GrowthSeries
    engine : {"nuts", "exact"}
    priors : Priors, optional
        Defaults documented in :mod:`bayesgrowth.priors`.
    seed : int, optional
        A fresh seed is drawn (and recorded in the result) when omitted.
    **settings
        Passed to the engine (``draws``, ``chains``; for NUTS also ``tune``,
        ``target_accept``, ``cores``, ``progressbar``).

    Returns
    -------
    Fit
        With diagnostics checked; a failed check warns (:class:`SamplingWarning`).
    """
    if engine not in ENGINES:
        raise ValueError(f"engine must be one of {', '.join(ENGINES)}, got {engine!r}")
    seed = secrets.randbits(32) if seed is None else int(seed)
    resolved = (priors or Priors()).resolve(series)
    if engine == "exact":
        settings = {k: v for k, v in settings.items() if k in ("draws", "chains")}
        fit = fit_exact(series, resolved, seed=seed, **settings)
    else:
        from bayesgrowth.inference.nuts import fit_nuts

        fit = fit_nuts(series, resolved, seed=seed, **settings)
    fit.diagnostics.warn_if_failed()
    return fit
