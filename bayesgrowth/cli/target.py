"""``--target`` and ``--target-probability``: a budget or guidance figure to reach."""

from __future__ import annotations

import argparse
import math

from bayesgrowth.cli.parser import UsageError
from bayesgrowth.display import fmt_given

__all__ = ["add_target_options", "check_target_options"]


def add_target_options(p: argparse.ArgumentParser) -> None:
    """``--target`` and ``--target-probability`` (``forecast``, ``demo`` and ``report``)."""
    p.add_argument("--target", type=float, default=None,
                   help="a budget or guidance value: report the probability of reaching it")
    p.add_argument("--target-probability", type=float, default=0.5, metavar="P",
                   help="probability at which the target counts as reached [0.5]")


def check_target_options(args) -> None:
    """Refuse a target that is not above 0 or a probability outside (0, 1), in one line.

    Raises
    ------
    UsageError
        Naming the option, the value as typed and what it must be.
    """
    if args.target is not None and not (args.target > 0 and math.isfinite(args.target)):
        raise UsageError(f"--target {fmt_given(args.target)}: must be a finite value above 0")
    if not 0 < args.target_probability < 1:
        raise UsageError(f"--target-probability {fmt_given(args.target_probability)}: must "
                         "be between 0 and 1")
