"""A series simulated from the exponential curve with AR(1) errors, for the exact engine's tests."""

from __future__ import annotations

import math

import numpy as np

from bayesgrowth.data.periods import PeriodAxis
from bayesgrowth.data.series import GrowthSeries

QUARTERS = PeriodAxis(style="quarter", step=1, origin=2015 * 4)


def simulated_ar1(n, phi=0.6, sigma=0.05, seed=3, t=None) -> GrowthSeries:
    """Log values of ``log 500 + 0.03 t + e_t``, AR(1) errors simulated with known parameters.

    Across a gap of ``k`` periods the error is ``phi^k e + N(0, sigma^2 (1 - phi^(2k)) /
    (1 - phi^2))``, and the first one is drawn from the stationary ``N(0, sigma^2 / (1 -
    phi^2))``, as the model states.
    """
    rng = np.random.default_rng(seed)
    t = np.arange(n) if t is None else np.asarray(t)
    e = np.empty(t.size)
    e[0] = rng.normal(0, sigma / math.sqrt(1 - phi**2))
    for i in range(1, t.size):
        k = t[i] - t[i - 1]
        e[i] = phi**k * e[i - 1] + rng.normal(0, sigma * math.sqrt((1 - phi ** (2 * k))
                                                                   / (1 - phi**2)))
    y = math.log(500.0) + 0.03 * t + e
    return GrowthSeries(values=np.exp(y), t=t, axis=QUARTERS, name="simulated")
