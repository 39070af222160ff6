"""Bias of a band: whether the outcomes outside it fall mostly on one side.

A central ``L``% band leaves ``(1 - L) / 2`` of the outcomes below it and as many
above it when the forecast is calibrated. Whatever the band's width, an unbiased
forecast misses on either side equally often, so among the ``m`` outcomes outside
the band the number below is Binomial(m, 1/2). :func:`band_bias` counts both
sides and tests that with the exact two-sided binomial test
(``scipy.stats.binomtest``). A growth curve that keeps rising while the business
slows leaves its outcomes below the band; one that misses a speed-up, above.

Outcomes from overlapping backtest origins are not independent, so the test's
p-value is smaller than it should be; read it with the backtest's caution.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike

from bayesgrowth.scoring._checks import as_float

__all__ = ["BIAS_HIGH", "BIAS_LOW", "NO_CLEAR_BIAS", "FEW_OUTCOMES", "BandBias", "band_bias"]

#: Verdicts.
BIAS_HIGH = "forecasts too high: outcomes mostly below the band"
BIAS_LOW = "forecasts too low: outcomes mostly above the band"
NO_CLEAR_BIAS = "no clear bias"
FEW_OUTCOMES = "too few outcomes"


@dataclass(frozen=True)
class BandBias:
    """Outcomes below and above a band, and the binomial check of their balance.

    Attributes
    ----------
    level : int
        Band level in percent.
    n : int
        Outcomes counted (finite outcome and band).
    below, above : int
        Outcomes below the lower and above the upper limit.
    pvalue : float
        Two-sided exact binomial test of ``below`` in ``below + above`` against
        1/2 (``scipy.stats.binomtest``); 1 when nothing missed.
    verdict : str
        :data:`BIAS_HIGH`, :data:`BIAS_LOW`, :data:`NO_CLEAR_BIAS` or
        :data:`FEW_OUTCOMES`.
    """

    level: int
    n: int
    below: int
    above: int
    pvalue: float
    verdict: str

    @property
    def share_below(self) -> float:
        """Share of the outcomes below the band (NaN with none counted)."""
        return self.below / self.n if self.n else float("nan")

    @property
    def share_above(self) -> float:
        """Share of the outcomes above the band (NaN with none counted)."""
        return self.above / self.n if self.n else float("nan")

    def sentence(self) -> str:
        """One line: the shares on each side, the test, the verdict."""
        if self.n == 0:
            return f"{self.level}% band: no outcomes"
        return (f"{self.level}% band: {self.share_below:.0%} of {self.n} outcomes below it, "
                f"{self.share_above:.0%} above (binomial test of the {self.below + self.above} "
                f"misses, p = {self.pvalue:.2g}): {self.verdict}")


def band_bias(
    y: ArrayLike,
    lower: ArrayLike,
    upper: ArrayLike,
    level: int,
    *,
    alpha: float = 0.05,
    min_n: int = 10,
) -> BandBias:
    """Count outcomes below and above a band and test whether misses favour one side.

    Parameters
    ----------
    y : array_like
        Observed values.
    lower, upper : array_like
        Band limits; rows where any of the three is NaN are left out.
    level : int
        Band level in percent (recorded; the test does not depend on it).
    alpha : float, default 0.05
        Threshold of the two-sided test for a bias verdict (common practice).
    min_n : int, default 10
        Fewest outcomes for a verdict (as :func:`bayesgrowth.scoring.calibration_verdict`).

    Returns
    -------
    BandBias
    """
    from scipy import stats

    obs, lo, hi = np.broadcast_arrays(as_float(y), as_float(lower), as_float(upper))
    ok = np.isfinite(obs) & np.isfinite(lo) & np.isfinite(hi)
    n = int(ok.sum())
    below = int(np.sum(obs[ok] < lo[ok]))
    above = int(np.sum(obs[ok] > hi[ok]))
    misses = below + above
    pvalue = float(stats.binomtest(below, misses, 0.5).pvalue) if misses else 1.0
    if n < min_n:
        verdict = FEW_OUTCOMES
    elif pvalue < alpha:
        verdict = BIAS_HIGH if below > above else BIAS_LOW
    else:
        verdict = NO_CLEAR_BIAS
    return BandBias(int(level), n, below, above, pvalue, verdict)
