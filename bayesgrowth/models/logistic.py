"""Logistic growth toward a ceiling ``K``: the odds ``(K - R) / R`` halve every ``h`` periods.

``R = K / (1 + ((K - a) / a) exp(-lambda dt))`` with ``lambda = ln 2 / h`` and
``dt = t - t_ref``; on the log scale ``log R = log K - log1p(expm1(log K - log a)
exp(-lambda dt))``. Given ``kappa = log K - log a`` and the half-life the curve is
``log a`` plus an offset (:func:`ceiling_offset`), which lets the NUTS model
integrate ``log a`` out (see :mod:`bayesgrowth.models.linear`).
"""

from __future__ import annotations

import math

import numpy as np

from bayesgrowth.models.parameters import CEILING, HALF_LIFE, ceiling_line, half_life_line
from bayesgrowth.models.registry import ModelFamily, register

__all__ = ["FAMILY", "ceiling_offset", "curve"]

LN2 = math.log(2.0)


def curve(p: dict, dt, xp=np):
    """Log of the logistic curve at offsets ``dt``, NumPy or PyTensor ``xp``."""
    lam = LN2 / p["half_life"]
    return p["log_k"] - xp.log1p(xp.expm1(p["log_k"] - p["log_a"]) * xp.exp(-lam * dt))


def ceiling_offset(kappa, decay, xp=np):
    """``log R - log a`` given ``kappa = log K - log a`` and ``decay = exp(-lambda dt)``."""
    return kappa - xp.log1p(xp.expm1(kappa) * decay)


def prior_lines(resolved, spec) -> list[str]:
    """Ceiling and half-life priors in words (shared with the Gompertz curve)."""
    return [ceiling_line(resolved), half_life_line(resolved)]


FAMILY = register(ModelFamily(
    name="logistic",
    summary="S-shaped growth toward a ceiling, steepest at half the ceiling",
    parameters=(CEILING, HALF_LIFE),
    log_mean=curve,
    prior_lines=prior_lines,
    bends=True,
    ceiling=True,
    leastsq_curve="logistic",
    linear="ceiling",
    ceiling_offset=ceiling_offset,
    # the ceiling curves diverged at 0.9 (Gompertz with AR(1) errors on the demo: 3 and 2
    # divergent transitions in 3 seeds), none at 0.95, no slower
    target_accept=0.95,
))
