"""A toy model family, written as a contributor would add one under ``bayesgrowth/models/``.

Power-law growth ``R_t = a (1 + t - t_ref)^p``: on the log scale ``log a + p log(1 + dt)``,
so growth slows as the business ages. Only the tests register it
(``tests/models/test_registry.py``); it is not part of the package.
"""

from __future__ import annotations

import numpy as np

from bayesgrowth.models.registry import ModelFamily, Parameter, register


def curve(p: dict, dt, xp=np):
    """Log of the power-law curve at offsets ``dt``, NumPy or PyTensor ``xp``."""
    return p["log_a"] + p["power"] * xp.log1p(dt)


def sample_power(priors):
    """``power ~ Normal(1, 1)``: about linear growth, anything from flat to cubic."""
    import pymc as pm

    return pm.Normal("power", mu=1.0, sigma=1.0)


def prior_lines(resolved, spec) -> list[str]:
    """The toy's own prior in words."""
    return ["power of the growth curve: about 1, give or take 1"]


FAMILY = register(ModelFamily(
    name="power-law",
    summary="growth that slows as a power of the business's age",
    parameters=(Parameter("power", "exponent of the business's age", sample_power),),
    log_mean=curve,
    prior_lines=prior_lines,
    bends=True,
))
