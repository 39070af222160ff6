"""Damped growth: growth in excess of a long-run rate halves every ``h`` periods.

The log growth of period ``s`` after the reference period is ``c + (b - c)
delta^(s-1)`` with ``delta = exp(-lambda)``, ``lambda = ln 2 / h``, so with
``dt = t - t_ref`` and ``f = (1 - delta^dt) / (1 - delta)``

``log R = log a + c dt + (b - c) f``.

The curve is linear in ``(log a, b, c)`` given the half-life: its design has
columns ``1``, ``f`` and ``dt - f`` (:func:`design`), which the NUTS model
integrates out (see :mod:`bayesgrowth.models.linear`).
"""

from __future__ import annotations

import math

import numpy as np

from bayesgrowth.models.parameters import (
    GROWTH,
    HALF_LIFE,
    LONG_RUN,
    half_life_line,
    long_run_line,
)
from bayesgrowth.models.registry import ModelFamily, register

__all__ = ["FAMILY", "curve", "design", "fading"]

LN2 = math.log(2.0)


def fading(lam, dt, xp=np):
    """``f = expm1(-lambda dt) / expm1(-lambda)``: periods of growth at the first rate."""
    return xp.expm1(-lam * dt) / xp.expm1(-lam)


def curve(p: dict, dt, xp=np):
    """Log of the damped curve at offsets ``dt``, NumPy or PyTensor ``xp``."""
    lam = LN2 / p["half_life"]
    c = p["long_run"]
    # (b - c) f written out, multiplied before dividing as the fits were measured
    return p["log_a"] + c * dt + (p["log1p_g"] - c) * xp.expm1(-lam * dt) / xp.expm1(-lam)


def design(dt, half_life, xp=np):
    """Columns ``1`` (log a), ``f`` (b) and ``dt - f`` (c) at offsets ``dt``.

    With NumPy and ``half_life`` draws ``(S,)`` the design is ``(S, n, 3)``.
    """
    if xp is np:
        dt = np.asarray(dt, dtype=float)
        lam = LN2 / np.asarray(half_life, dtype=float)[:, None]
        f = fading(lam, dt)
        return np.stack([np.broadcast_to(np.ones_like(dt), f.shape), f, dt - f], axis=-1)
    lam = LN2 / half_life
    f = fading(lam, dt, xp)
    return xp.stack([xp.ones_like(dt), f, dt - f], axis=1)


def _prior_lines(resolved, spec) -> list[str]:
    return [half_life_line(resolved), long_run_line(resolved)]


FAMILY = register(ModelFamily(
    name="damped",
    summary="growth fades geometrically toward a long-run rate, with an uncertain half-life",
    parameters=(GROWTH, HALF_LIFE, LONG_RUN),
    log_mean=curve,
    prior_lines=_prior_lines,
    bends=True,
    leastsq_curve="damped",
    linear="growth",
    design=design,
))
