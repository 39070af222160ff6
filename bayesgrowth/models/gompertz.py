"""Gompertz growth toward a ceiling ``K``: ``ln(K / R)``, and the growth rate, halve every ``h``.

``R = K exp(-ln(K / a) exp(-lambda dt))`` with ``lambda = ln 2 / h`` and ``dt =
t - t_ref``; on the log scale ``log R = log K - (log K - log a) exp(-lambda dt)``.
Given ``kappa = log K - log a`` and the half-life the curve is ``log a`` plus
``kappa (1 - exp(-lambda dt))`` (:func:`ceiling_offset`), which lets the NUTS
model integrate ``log a`` out (see :mod:`bayesgrowth.models.linear`).
"""

from __future__ import annotations

import math

import numpy as np

from bayesgrowth.models.logistic import prior_lines
from bayesgrowth.models.parameters import CEILING, HALF_LIFE
from bayesgrowth.models.registry import ModelFamily, register

__all__ = ["FAMILY", "ceiling_offset", "curve"]

LN2 = math.log(2.0)


def curve(p: dict, dt, xp=np):
    """Log of the Gompertz curve at offsets ``dt``, NumPy or PyTensor ``xp``."""
    lam = LN2 / p["half_life"]
    return p["log_k"] - (p["log_k"] - p["log_a"]) * xp.exp(-lam * dt)


def ceiling_offset(kappa, decay, xp=np):
    """``log R - log a`` given ``kappa = log K - log a`` and ``decay = exp(-lambda dt)``."""
    return kappa * (1 - decay)


FAMILY = register(ModelFamily(
    name="gompertz",
    summary="growth toward a ceiling whose growth rate halves every half-life (steepest at "
    "37% of the ceiling)",
    parameters=(CEILING, HALF_LIFE),
    log_mean=curve,
    prior_lines=prior_lines,
    bends=True,
    ceiling=True,
    leastsq_curve="gompertz",
    linear="ceiling",
    ceiling_offset=ceiling_offset,
    target_accept=0.95,  # as the logistic curve (see bayesgrowth.models.logistic)
))
