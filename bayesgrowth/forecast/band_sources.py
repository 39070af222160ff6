"""Where a state-space forecast's band comes from: estimation, future shocks, noise.

For a fit by the exact state-space engine the predictive distribution of each
future log value is a mixture over the grid nodes ``theta`` of normals, and
within a node the variance is a sum of independent parts (see
:meth:`bayesgrowth.inference.statespace.StateSpacePosterior.predictive`):

* ``g' Cov(beta) g + z' P z``: the coefficients ``beta`` (level, growth, long-run
  growth, seasons) and the filtered deviation of today's level and growth, i.e.
  not knowing where the series stands and how fast it grows now;
* ``sigma_level^2 h + sigma_growth^2 sum_{k=1..h} ((1 - rho^k) / (1 - rho))^2``: the
  shocks to the level and the drift of the growth rate between now and step ``h``
  (with drifting seasons, also the seasonal shocks, counted with them);
* ``sigma^2``: the noise of a single period around the trend.

By the law of total variance the mixture's variance is the weighted mean of the
within-node variances plus the variance of the node means; the between-node
part is uncertainty about the parameters ``theta`` and is counted with the
estimation part. The decomposition is exact (no draws); it is of the variance of
the log value, which sets the band's width on the log scale (a ratio band on
the value scale).
"""

from __future__ import annotations

import numpy as np
import pandas as pd

__all__ = ["SOURCES", "SOURCE_LABELS", "band_sources", "shock_variance", "source_labels",
           "variance_parts"]

#: The three sources, in stacking order.
SOURCES = ("estimation", "shocks", "noise")

#: How the sources are named for people (legends, report, printed lines).
SOURCE_LABELS = {
    "estimation": "not knowing the parameters and today's level and growth",
    "shocks": "future shocks to the level and the growth rate",
    "noise": "period-to-period noise",
}


def source_labels(season_drift: bool = False) -> dict:
    """:data:`SOURCE_LABELS`, the shocks naming the seasonal factors too when they drift."""
    if not season_drift:
        return dict(SOURCE_LABELS)
    return {**SOURCE_LABELS,
            "shocks": "future shocks to the level, the growth rate and the seasonal factors"}


def shock_variance(params: dict, steps: np.ndarray, seasons: int = 0) -> np.ndarray:
    """Variance added by future level shocks and growth drift, ``(G, H)``.

    A growth shock ``k`` periods before step ``h`` (counting itself) loads
    ``(1 - rho^k) / (1 - rho)`` on the level (``k`` when ``rho = 1``). With drifting
    seasons (``sigma_season`` in ``params``, ``seasons`` of them) their shocks add too:
    the sum of :func:`bayesgrowth.inference.statespace_paths.shock_terms`.
    """
    from bayesgrowth.inference.statespace_paths import shock_terms

    return sum(shock_terms(params, np.asarray(steps), seasons))


def variance_parts(post, t_future: np.ndarray, t_last: int) -> dict:
    """The predictive variance of each future log value, split by source.

    Parameters
    ----------
    post : StateSpacePosterior
    t_future : numpy.ndarray
        Future time indices (after ``t_last``).
    t_last : int
        Time index of the last observation.

    Returns
    -------
    dict of numpy.ndarray, each ``(H,)``
        ``estimation_within`` (coefficients and filtered state, node-weighted),
        ``estimation_between`` (spread of the node means), ``estimation`` (their
        sum), ``shocks``, ``noise`` and ``total``.
    """
    steps = np.asarray(t_future, dtype=int) - int(t_last)
    if steps.min() < 1:
        raise ValueError("the periods must all lie after the last observation")
    pred = post.predictive(np.asarray(t_future), joint=False)
    w, p = post.weight, post.params
    shocks = shock_variance(p, steps, post._ctx.n_seasons)
    noise = np.broadcast_to(p["sigma"][:, None] ** 2, shocks.shape)
    within_est = pred["curve_var"] - shocks  # coefficients and filtered state
    centre = w @ pred["mean"]
    between = w @ (pred["mean"] - centre) ** 2
    out = {"estimation_within": w @ within_est, "estimation_between": between,
           "shocks": w @ shocks, "noise": w @ noise}
    out["estimation"] = out["estimation_within"] + between
    out["total"] = out["estimation"] + out["shocks"] + out["noise"]
    return out


def band_sources(fc) -> pd.DataFrame:
    """Each future period's predictive variance (log scale) by source, as a tidy table.

    Parameters
    ----------
    fc : Forecast
        A forecast from a fit by the exact state-space engine.

    Returns
    -------
    pandas.DataFrame
        One row per period and source: ``period``, ``step``, ``source`` (one of
        :data:`SOURCES`), ``label`` (the source in words, :func:`source_labels`: with
        drifting seasons the shocks include theirs), ``variance`` and ``share`` (of the
        period's total; the shares of a period sum to 1).

    Raises
    ------
    ValueError
        When the forecast does not come from the exact state-space engine.
    """
    post = getattr(fc.fit, "state_space", None)
    if post is None:
        raise ValueError("band sources need a fit by the exact state-space engine "
                         "(engine='exact' with the local trend model)")
    parts = variance_parts(post, fc.t, fc.fit.series.t_last)
    labels = source_labels("sigma_season" in post.params)  # as shock_variance counts them
    rows = []
    for h, period in enumerate(fc.periods):
        for source in SOURCES:
            v = float(parts[source][h])
            rows.append({"period": period, "step": h + 1, "source": source,
                         "label": labels[source], "variance": v,
                         "share": v / float(parts["total"][h])})
    return pd.DataFrame(rows)
