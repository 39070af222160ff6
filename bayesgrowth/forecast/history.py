"""What a local trend expected over the history: one-step-ahead forecasts of each period.

A local trend has no single fitted curve (its level path is integrated out), so the
fair picture of its fit is what it forecast for each observed period from the
periods before it. Given a posterior draw, the Kalman filter gives that forecast
exactly (:meth:`~bayesgrowth.inference.statespace.StateSpacePosterior.one_step`);
one predictive draw per posterior draw makes a band. Periods whose forecast rests
mostly on the prior (the first ``p`` observations, ``p`` the number of linear
coefficients: level, growth, long-run growth, seasons) are left out.
"""

from __future__ import annotations

import numpy as np

__all__ = ["one_step_history"]


def one_step_history(fit, *, draws: int = 1000, seed: int = 0) -> tuple[np.ndarray, int] | None:
    """Predictive draws of each observed value from the values before it.

    Parameters
    ----------
    fit : Fit
        A fit by the exact state-space engine.
    draws : int
        Number of predictive draws (at most the fit's draws).
    seed : int
        Seed of the predictive noise.

    Returns
    -------
    (numpy.ndarray, int) or None
        Draws ``(draws, n_obs)`` of the values (``nan`` before the first shown
        period) and the index of that first period; ``None`` when the fit has no
        state-space posterior or the history is too short to show any period.

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> fit = bg.GrowthModel(seed=1).fit(bg.load_demo()).fit_
    >>> values, first = one_step_history(fit, draws=200)
    >>> values.shape, first
    ((200, 20), 6)
    """
    post = getattr(fit, "state_space", None)
    if post is None:
        return None
    first = int(post.beta_mean.shape[1])
    n = fit.series.n
    if first >= n:
        return None
    nodes = fit.extra["nodes"].reshape(-1)
    take = np.linspace(0, nodes.size - 1, min(draws, nodes.size)).astype(int)
    flat = {k: v.reshape(-1, *v.shape[2:])[take] for k, v in fit.posterior.items()}
    err, var = post.one_step(nodes[take], post.beta_of(flat))
    rng = np.random.default_rng([seed, 11])
    log_pred = fit.series.log_values[None, :] - err
    values = np.exp(log_pred + np.sqrt(var) * rng.standard_normal(err.shape))
    values[:, :first] = np.nan
    return values, first
