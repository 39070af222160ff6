"""The prior options of the commands that fit: stated the way a practitioner thinks.

Each option maps to a field of :class:`bayesgrowth.priors.Priors`
(:func:`bayesgrowth.cli.common.priors_from_args` builds it).
"""

from __future__ import annotations

import argparse
import math

__all__ = ["add_common_priors", "add_curve_priors", "add_season_drift_prior"]


def _positive_pct(text: str) -> float:
    """A percentage above 0 (argparse type: the error names the option)."""
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number") from None
    if not (math.isfinite(value) and value > 0):
        raise argparse.ArgumentTypeError(f"{text!r} must be a percentage above 0")
    return value


def add_common_priors(g) -> None:
    """Priors every model has: initial value, growth, noise."""
    g.add_argument(
        "--initial-give-or-take",
        type=float,
        default=50.0,
        metavar="PCT",
        help="initial value: the observed value give or take PCT%%; 0 fixes it [50]",
    )
    g.add_argument(
        "--initial-value",
        type=float,
        default=None,
        metavar="V",
        help="centre of the initial-value prior [observed value]",
    )
    g.add_argument(
        "--reference-period",
        default=None,
        metavar="LABEL",
        help="period the initial value refers to [first observation]",
    )
    g.add_argument(
        "--growth",
        type=float,
        default=0.0,
        metavar="PCT",
        help="central growth per period in percent: of the curves, the rate they carry "
        "forward; of the local trend (the default model), the growth at the first "
        "observation, which then drifts or fades [0]",
    )
    g.add_argument(
        "--growth-give-or-take",
        type=float,
        default=30.0,
        metavar="PTS",
        help="spread of the growth prior in percentage points [30]",
    )
    g.add_argument(
        "--noise",
        type=float,
        default=30.0,
        metavar="PCT",
        help="typical deviation from trend in percent (half-normal scale) [30]",
    )


def add_curve_priors(g) -> None:
    """Priors of the bending curves: ceiling and half-life of growth.

    The help texts name the families that have each parameter (from the model registry).
    """
    from bayesgrowth.models import registry

    ceiling = "/".join(f.name for f in registry.families() if f.ceiling)
    fading = "/".join(f.name for f in registry.families()
                      if "half_life" in f.parameter_names() and not f.drifts)
    g.add_argument(
        "--ceiling",
        type=float,
        default=None,
        metavar="V",
        help=f"{ceiling}: central ceiling (market size) on the data's scale",
    )
    g.add_argument(
        "--ceiling-multiple",
        type=float,
        default=3.0,
        metavar="M",
        help=f"{ceiling}: ceiling about M times the latest value, if --ceiling unset [3]",
    )
    g.add_argument(
        "--ceiling-give-or-take",
        type=float,
        default=100.0,
        metavar="PCT",
        help="spread of the ceiling prior in percent [100]",
    )
    g.add_argument(
        "--half-life",
        type=float,
        default=None,
        metavar="PERIODS",
        help=f"{fading}, and the local trend when growth fades: periods over "
        "which growth halves [two years]",
    )
    g.add_argument(
        "--half-life-factor",
        type=float,
        default=3.0,
        metavar="F",
        help="spread of the half-life prior: within a factor of F [3]",
    )


def add_season_drift_prior(g) -> None:
    """The prior of drifting seasonal factors (``--seasonal drifting`` only)."""
    from bayesgrowth.priors import LocalTrendPrior

    default = LocalTrendPrior().season_drift_pct
    g.add_argument(
        "--season-drift",
        type=_positive_pct,
        default=None,
        metavar="PCT",
        help="with --seasonal drifting only (ignored otherwise): typical shock to a season's "
        f"factor per period in percent, the prior mean of its sd [{default:.3g}: a factor "
        "drifts about 3.3%% a year]",
    )
