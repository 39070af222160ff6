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
#: How the one problem independent draws can have begins (too few of them).
_FEW_DRAWS = "only"


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
        """For ``n`` independent draws of an exact posterior: no chains to disagree.

        Nothing can fail but the number of draws: fewer than ``ESS_MIN`` leave the numbers
        read from the draws (time to a target, a backtest's scores, and the bands of the
        engines that take them from draws) imprecise.
        """
        problems = () if n >= ESS_MIN else (
            f"{_FEW_DRAWS} {n} independent draws of the exact posterior (numbers read from "
            f"the draws need at least {ESS_MIN})",)
        return cls(max_rhat=1.0, min_ess_bulk=float(n), min_ess_tail=float(n), divergences=0,
                   ok=not problems, method=method, problems=problems)

    def warn_if_failed(self) -> None:
        """Raise a :class:`SamplingWarning` naming every failed check."""
        if not self.ok:
            if self.problems[0].startswith(_FEW_DRAWS + " "):  # independent draws, too few
                advice = "Ask for more draws (draws per chain times chains)."
            else:
                advice = ("Do not trust this forecast: sample longer (more draws), raise "
                          "target_accept, or use the exact engine where it covers the model.")
            warnings.warn(
                "sampling diagnostics failed: " + "; ".join(self.problems) + ". " + advice,
                SamplingWarning,
                stacklevel=3,
            )

    def to_dict(self) -> dict:
        """JSON-ready form."""
        d = asdict(self)
        d["problems"] = list(self.problems)
        return d
