"""Parameters that several model families share: declarations, PyMC priors and plain words.

Each ``sample_*`` function creates one PyMC variable inside a model context, with
the prior of :class:`~bayesgrowth.priors.ResolvedPriors` (the names in the
posterior are fixed: ``log1p_g``, ``log_k``, ``log_half_life`` and
``half_life``, ``long_run``). Each ``*_line`` function says a prior in the words
users see in ``describe`` output. PyMC is imported inside the functions only.
"""

from __future__ import annotations

import math

from bayesgrowth.models.registry import Parameter

__all__ = [
    "CEILING",
    "GROWTH",
    "HALF_LIFE",
    "LONG_RUN",
    "ceiling_line",
    "half_life_line",
    "long_run_line",
]


def sample_growth(priors):
    """``log1p_g ~ Normal(log1p_g_mu, log1p_g_sd)``."""
    import pymc as pm

    return pm.Normal("log1p_g", mu=priors.log1p_g_mu, sigma=priors.log1p_g_sd)


def sample_ceiling(priors):
    """``log_k ~ Normal(log_k_mu, log_k_sd)``."""
    import pymc as pm

    return pm.Normal("log_k", mu=priors.log_k_mu, sigma=priors.log_k_sd)


def sample_half_life(priors):
    """``log half_life ~ Normal(log_h_mu, log_h_sd)``; ``half_life`` is recorded too."""
    import pymc as pm
    import pytensor.tensor as pt

    log_h = pm.Normal("log_half_life", mu=priors.log_h_mu, sigma=priors.log_h_sd)
    return pm.Deterministic("half_life", pt.exp(log_h))


def sample_long_run(priors):
    """``long_run ~ Normal(long_run_mu, long_run_sd)``, fixed at the mean when the sd is 0."""
    import pymc as pm

    if priors.long_run_sd == 0:
        return pm.Deterministic("long_run", pm.math.constant(priors.long_run_mu))
    return pm.Normal("long_run", mu=priors.long_run_mu, sigma=priors.long_run_sd)


GROWTH = Parameter("log1p_g", "log of 1 + growth per period (at the reference period)",
                   sample_growth)
CEILING = Parameter("log_k", "log of the ceiling K the curve saturates at", sample_ceiling)
HALF_LIFE = Parameter("half_life", "periods over which growth halves", sample_half_life)
LONG_RUN = Parameter("long_run", "log of 1 + the growth rate growth settles to",
                     sample_long_run)


def ceiling_line(resolved) -> str:
    """The ceiling prior in words."""
    c = resolved.stated.get("ceiling", {})
    how = (
        f"about {c['value']:,.4g}" if c.get("value") is not None
        else f"about {c.get('multiple', 3):g} times the latest value "
        f"({math.exp(resolved.log_k_mu):,.4g})"
    )
    return f"ceiling: {how}, give or take {c.get('give_or_take_pct', 100):g}%"


def half_life_line(resolved, what: str = "half-life of growth") -> str:
    """The half-life prior in words."""
    return (f"{what}: about {math.exp(resolved.log_h_mu):.3g} periods, within a "
            f"factor of {math.exp(resolved.log_h_sd):.3g}")


def long_run_line(resolved) -> str:
    """The long-run growth prior in words."""
    lr = 100 * math.expm1(resolved.long_run_mu)
    return (f"long-run growth: fixed at {lr:.3g}% per period" if resolved.long_run_sd == 0
            else f"long-run growth: about {lr:.3g}% per period, give or take "
            f"{100 * resolved.long_run_sd:.3g} points")
