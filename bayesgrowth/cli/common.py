"""Pieces every subcommand shares: one-line usage errors, input and model options."""

from __future__ import annotations

import argparse
import sys
import warnings
from pathlib import Path

from bayesgrowth.config import DEFAULT_LEVELS, check_levels
from bayesgrowth.data.series import GrowthSeries, read_series

PROG = "bayesgrowth"


class UsageError(Exception):
    """Bad usage, reported in one line with exit code 2."""


class Parser(argparse.ArgumentParser):
    """An argument parser whose usage errors are one line (exit code 2)."""

    def error(self, message: str) -> None:  # noqa: D102 - one line, not a usage block
        raise UsageError(f"{self.prog}: {message} (see --help)")


def _levels(text: str) -> tuple[int, ...]:
    try:
        return check_levels(float(x) for x in text.split(",") if x.strip())
    except ValueError as exc:
        raise argparse.ArgumentTypeError(f"--levels {text!r}: {exc}") from None


def _positive_int(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number") from None
    if value < 1:
        raise argparse.ArgumentTypeError(f"{text!r} must be at least 1")
    return value


def add_input(p: argparse.ArgumentParser) -> None:
    """Options naming the input file and its columns."""
    p.add_argument("file", type=Path, help="CSV file with a period column and a value column")
    p.add_argument("--period-col", default="period", help="name of the period column [period]")
    p.add_argument("--value-col", default="value", help="name of the value column [value]")


def add_model_options(p: argparse.ArgumentParser, *, horizon_required: bool = True) -> None:
    """Horizon, engine, seed, band levels, sampler size and the prior options."""
    p.add_argument(
        "--horizon",
        "-H",
        type=_positive_int,
        required=horizon_required,
        default=None if horizon_required else 8,
        help="number of future periods to forecast" + ("" if horizon_required else " [8]"),
    )
    p.add_argument(
        "--engine",
        choices=("nuts", "exact"),
        default="nuts",
        help="nuts: PyMC sampler; exact: same posterior by quadrature, fast [nuts]",
    )
    p.add_argument("--seed", type=int, default=1, help="random seed; same seed, same output [1]")
    p.add_argument(
        "--levels",
        type=_levels,
        default=DEFAULT_LEVELS,
        help="credible band levels in percent, comma-separated [50,80,95]",
    )
    p.add_argument(
        "--draws", type=_positive_int, default=1000, help="posterior draws per chain [1000]"
    )
    p.add_argument("--chains", type=_positive_int, default=4, help="chains [4]")
    m = p.add_argument_group("model (see docs/growth-curves.md)")
    m.add_argument(
        "--model",
        choices=("exponential", "damped", "logistic", "gompertz", "local-trend"),
        default="exponential",
        help="growth curve [exponential]",
    )
    m.add_argument(
        "--errors",
        choices=("independent", "ar1"),
        default="independent",
        help="ar1: deviations from the curve persist into the next periods [independent]",
    )
    m.add_argument(
        "--noise-dist",
        choices=("normal", "student-t"),
        default="normal",
        help="student-t: heavy tails, one odd period does not bend the curve [normal]",
    )
    m.add_argument(
        "--seasonal", action="store_true", help="seasonal factors (quarterly or monthly data)"
    )
    m.add_argument(
        "--drift",
        choices=("random-walk", "mean-reverting"),
        default="random-walk",
        help="local-trend only: how the growth rate drifts [random-walk]",
    )
    g = p.add_argument_group("priors (see docs/user-guide.md)")
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
        help="central growth per period in percent [0]",
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
    g.add_argument(
        "--ceiling",
        type=float,
        default=None,
        metavar="V",
        help="logistic/gompertz: central ceiling (market size) on the data's scale",
    )
    g.add_argument(
        "--ceiling-multiple",
        type=float,
        default=3.0,
        metavar="M",
        help="logistic/gompertz: ceiling about M times the latest value, if --ceiling unset [3]",
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
        help="damped/logistic/gompertz: periods over which growth halves [two years]",
    )
    g.add_argument(
        "--half-life-factor",
        type=float,
        default=3.0,
        metavar="F",
        help="spread of the half-life prior: within a factor of F [3]",
    )
    p.add_argument("--quiet", action="store_true", help="no progress output")


def say(args, message: str) -> None:
    """Progress message on stderr, unless ``--quiet``."""
    if not getattr(args, "quiet", False):
        print(message, file=sys.stderr, flush=True)


def read_input(args) -> GrowthSeries:
    """Read the input series; data warnings (gaps) become notes on stderr."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        series = read_series(args.file, period_col=args.period_col, value_col=args.value_col)
    for w in caught:
        say(args, f"note: {w.message}")
    return series


def priors_from_args(args):
    """The :class:`~bayesgrowth.priors.Priors` the prior options describe."""
    from bayesgrowth.priors import (
        CeilingPrior,
        GrowthPrior,
        HalfLifePrior,
        InitialValuePrior,
        NoisePrior,
        Priors,
    )

    try:
        extra = {}
        if hasattr(args, "ceiling_multiple"):
            extra["ceiling"] = CeilingPrior(
                args.ceiling, args.ceiling_multiple, args.ceiling_give_or_take
            )
            extra["half_life"] = HalfLifePrior(args.half_life, args.half_life_factor)
        return Priors(
            initial=InitialValuePrior(args.initial_give_or_take, args.initial_value),
            growth=GrowthPrior(args.growth, args.growth_give_or_take),
            noise=NoisePrior(args.noise),
            reference_period=args.reference_period,
            **extra,
        )
    except ValueError as exc:
        raise UsageError(f"prior options: {exc}") from None


def model_options_from_args(args) -> dict:
    """The ``fit_series`` options choosing the model (curve, errors, noise, seasons)."""
    return {
        "model": getattr(args, "model", "exponential"),
        "errors": getattr(args, "errors", "independent"),
        "noise": getattr(args, "noise_dist", "normal"),
        "seasonal": bool(getattr(args, "seasonal", False)),
        "drift": getattr(args, "drift", "random-walk"),
    }


def checked_model_options(args, engines, option: str = "--engine") -> dict:
    """The curve and error options, refused early where an engine in ``engines`` cannot fit them.

    Returns an empty dict for the plain exponential model (the default), else the options.
    """
    from bayesgrowth.models.spec import ModelSpec

    options = model_options_from_args(args)
    try:
        spec = ModelSpec(**options)
    except ValueError as exc:
        raise UsageError(f"model options: {exc}") from None
    if "exact" in engines and not spec.is_plain_exponential:
        raise UsageError(
            f"{option}: the exact engine covers only the exponential model with independent "
            f"normal errors, not {spec.label()}; choose nuts instead of exact"
        )
    return {} if spec.is_plain_exponential else options


def fit_from_args(args, series):
    """Fit ``series`` with the engine, model and priors the options name; warn on failure."""
    from bayesgrowth.inference.run import fit_series
    from bayesgrowth.models.spec import ModelSpec

    priors = priors_from_args(args)
    spec_options = model_options_from_args(args)
    try:
        spec = ModelSpec(**spec_options)
    except ValueError as exc:
        raise UsageError(f"model options: {exc}") from None
    if args.engine == "exact" and not spec.is_plain_exponential:
        raise UsageError(
            f"--engine exact covers only the exponential model with independent normal "
            f"errors, not {spec.label()}; use --engine nuts"
        )
    options = {"draws": args.draws, "chains": args.chains, **spec_options}
    if args.engine == "nuts":
        options["progressbar"] = not args.quiet
    say(
        args,
        f"fitting {series.name} ({series.n} {series.axis.frequency} observations) "
        f"with the {args.engine} engine ({spec.label()}) ...",
    )
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            fit = fit_series(
                series, engine=args.engine, priors=priors, seed=args.seed, **options
            )
        except ValueError as exc:
            raise UsageError(f"{exc}") from None
    for w in caught:
        if "diagnostics" in str(w.message):
            print(f"WARNING: {w.message}", file=sys.stderr)
    return fit


def fmt_number(v: float) -> str:
    """A value for people: see :func:`bayesgrowth.report.words.fmt_number` (one format)."""
    from bayesgrowth.report.words import fmt_number as one_format

    return one_format(v)
