"""Sampling diagnostics checked on every fit: R-hat, bulk and tail ESS, divergences.

Thresholds follow Vehtari, Gelman, Simpson, Carpenter & Bürkner (2021),
"Rank-normalization, folding, and localization: an improved R-hat for assessing
convergence of MCMC", *Bayesian Analysis* 16(2): R-hat below 1.01 and at least
100 effective draws per chain (400 for four chains) in the bulk and the tails.
"""

from __future__ import annotations

import warnings
from dataclasses import asdict, dataclass, field

__all__ = ["Diagnostics", "SamplingWarning", "RHAT_MAX", "ESS_MIN"]

RHAT_MAX = 1.01
ESS_MIN = 400


class SamplingWarning(UserWarning):
    """A fit whose sampling diagnostics fail the thresholds."""


@dataclass(frozen=True)
class Diagnostics:
    """Convergence summary of one fit.

    ``ok`` is False when any threshold fails; ``problems`` says which, in words.
    """

    max_rhat: float
    min_ess_bulk: float
    min_ess_tail: float
    divergences: int
    ok: bool
    method: str
    problems: tuple[str, ...] = field(default=())

    @classmethod
    def from_values(
        cls, max_rhat: float, min_ess_bulk: float, min_ess_tail: float, divergences: int,
        method: str,
    ) -> Diagnostics:
        """Apply the thresholds to measured values."""
        problems = []
        if not max_rhat <= RHAT_MAX:
            problems.append(f"R-hat {max_rhat:.3f} above {RHAT_MAX} (chains disagree)")
        if not min_ess_bulk >= ESS_MIN:
            problems.append(f"bulk ESS {min_ess_bulk:.0f} below {ESS_MIN}")
        if not min_ess_tail >= ESS_MIN:
            problems.append(f"tail ESS {min_ess_tail:.0f} below {ESS_MIN}")
        if divergences > 0:
            problems.append(f"{divergences} divergent transition(s)")
        return cls(
            max_rhat=float(max_rhat),
            min_ess_bulk=float(min_ess_bulk),
            min_ess_tail=float(min_ess_tail),
            divergences=int(divergences),
            ok=not problems,
            method=method,
            problems=tuple(problems),
        )

    @classmethod
    def independent(cls, n: int, method: str) -> Diagnostics:
        """For ``n`` independent draws of an exact posterior: no chains to disagree."""
        return cls.from_values(1.0, n, n, 0, method=method)

    def warn_if_failed(self) -> None:
        """Raise a :class:`SamplingWarning` naming every failed check."""
        if not self.ok:
            warnings.warn(
                "sampling diagnostics failed: " + "; ".join(self.problems)
                + ". Do not trust this forecast: sample longer (more draws), raise target_accept, "
                "or use the exact engine.",
                SamplingWarning,
                stacklevel=3,
            )

    def to_dict(self) -> dict:
        """JSON-ready form."""
        d = asdict(self)
        d["problems"] = list(self.problems)
        return d
