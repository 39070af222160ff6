"""Pieces every subcommand shares: one-line usage errors, input and model options."""

from __future__ import annotations

import argparse
import os
import sys
import warnings
from pathlib import Path

from bayesgrowth.cli.acceptance import add_accept_option
from bayesgrowth.cli.model_words import (  # noqa: F401 - also used from here
    check_ceiling,
    cli_spelling,
    exact_covers,
    exact_refusal,
)
from bayesgrowth.cli.parser import Parser, UsageError  # noqa: F401 - also from here
from bayesgrowth.cli.prior_options import (
    add_common_priors,
    add_curve_priors,
    add_season_drift_prior,
)
from bayesgrowth.cli.progress import add_quiet_option, note, say  # noqa: F401 - also from here
from bayesgrowth.cli.sheet import add_sheet_option
from bayesgrowth.config import DEFAULT_ENGINE, DEFAULT_LEVELS, DEFAULT_MODEL, check_levels
from bayesgrowth.data.series import GrowthSeries, read_series
from bayesgrowth.display import observations

PROG = "bayesgrowth"

def _levels(text: str) -> tuple[int, ...]:
    try:
        return check_levels(float(x) for x in text.split(",") if x.strip())
    except ValueError as exc:
        raise argparse.ArgumentTypeError(f"--levels {text!r}: {exc}") from None


def _probability(text: str) -> float:
    try:
        value = float(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a number") from None
    if not 0 < value < 1:
        raise argparse.ArgumentTypeError(f"{text!r} must be between 0 and 1 (exclusive)")
    return value


def _whole_number(text: str, least: int, words: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number") from None
    if value < least:
        raise argparse.ArgumentTypeError(f"{text!r} must be {words}")
    return value


def _positive_int(text: str) -> int:
    return _whole_number(text, 1, "at least 1")


def _seed(text: str) -> int:
    return _whole_number(text, 0, "0 or more")


def add_seed_option(p: argparse.ArgumentParser) -> None:
    """``--seed``: a whole number of 0 or more, refused at parsing otherwise (exit code 2)."""
    p.add_argument("--seed", type=_seed, default=1, metavar="N",
                   help="random seed, 0 or more; same seed, same output [1]")


def whole_range(low: int, high: int) -> str:
    """Allowed whole numbers in words: ``"of 3"`` or ``"from 3 to 6"``."""
    return f"of {low}" if low == high else f"from {low} to {high}"


def _month(text: str) -> int:
    from bayesgrowth.data.fiscal import month_number

    month = month_number(text)
    if month is None:
        raise argparse.ArgumentTypeError(
            f"{text!r} is not a month; give its number 1-12 (4 for April) or its name")
    return month


def add_format_options(p: argparse.ArgumentParser) -> None:
    """How the input writes numbers and fiscal periods: ``--decimal`` and ``--fiscal-start``."""
    p.add_argument("--decimal", choices=("auto", ".", ","), default="auto",
                   help="decimal mark of the values. auto: told from the values, and a column "
                   "where every value reads either way (1,234) is refused; '.' reads 1,234.5; "
                   "',' reads 1.234,5 [auto]")
    p.add_argument("--fiscal-start", type=_month, default=None, metavar="MONTH",
                   help="month the fiscal year starts in (1-12 or a name), needed for labels "
                   "like 'FY24 Q1'; a fiscal year is named by the year it ends in: with "
                   "--fiscal-start 4, FY24 runs April 2023 to March 2024 and FY24 Q1 is "
                   "April-June 2023")


def add_input(p: argparse.ArgumentParser, *, panel: bool = False) -> None:
    """Options naming the input file and its columns, and how it writes numbers and periods.

    With ``panel``, the file holds many series: a series column names each row's.
    """
    what = ("series, period and value columns" if panel
            else "a period column and a value column")
    p.add_argument("file", type=Path, help="CSV file (comma, semicolon or tab separated) or "
                   f".xlsx workbook with {what}")
    if panel:
        p.add_argument("--series-col", default="series",
                       help="name of the series column [series]")
    p.add_argument("--period-col", default="period", help="name of the period column [period]")
    p.add_argument("--value-col", default="value", help="name of the value column [value]")
    add_format_options(p)
    add_sheet_option(p)


def add_model_options(p: argparse.ArgumentParser, *, horizon_required: bool = True) -> None:
    """Horizon, engine, seed, band levels, sampler size, the model and the prior options."""
    _add_run_options(p, horizon_required)
    _add_model_choice(p)
    g = p.add_argument_group("priors (see docs/user-guide.md)")
    add_common_priors(g)
    add_curve_priors(g)
    add_season_drift_prior(g)
    add_quiet_option(p)
    add_accept_option(p)


def model_choices() -> tuple[str, ...]:
    """``--model`` choices: the registered families, the default first."""
    from bayesgrowth.models import registry

    default = DEFAULT_MODEL["model"]
    return (default, *(n for n in registry.names() if n != default))


def _others() -> str:
    """The summaries the model registry gives of the families not described above."""
    from bayesgrowth.models import registry

    described = (DEFAULT_MODEL["model"], "exponential")
    text = " ".join(f"{f.name}: {f.summary}." for f in registry.families()
                    if f.name not in described)
    return text.replace("%", "%%")  # argparse formats help texts with %


def _add_run_options(p: argparse.ArgumentParser, horizon_required: bool) -> None:
    """Horizon, engine, seed, band levels and sampler settings."""
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
        choices=("exact", "nuts"),
        default=DEFAULT_ENGINE,
        help=f"exact: deterministic integration, milliseconds (the local trend, and the "
        f"exponential curve with normal noise, independent or AR(1) errors, seasonal "
        f"factors or not); nuts: PyMC sampler, every model [{DEFAULT_ENGINE}]",
    )
    add_seed_option(p)
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
    p.add_argument("--target-accept", type=_probability, default=None, metavar="P",
                   help="nuts: step-size target between 0 and 1; raise it (e.g. 0.99) when "
                   "divergent transitions are reported [0.95 for the ceiling curves and "
                   "series of 6 points or fewer, else 0.9]")
    p.add_argument("--cores", type=_positive_int, default=1, metavar="N",
                   help="nuts: chains sampled in parallel, up to the cores available [1]")


def _add_model_choice(p: argparse.ArgumentParser) -> None:
    """The model family and its options: errors, noise, seasons, drift."""
    m = p.add_argument_group("model (see docs/growth-curves.md)")
    m.add_argument(
        "--model",
        choices=model_choices(),
        default=DEFAULT_MODEL["model"],
        help="growth model. local-trend (default): level and growth rate move over time; its "
        "bands held close to their stated coverage on real competition series. exponential: "
        "one fixed curve; with independent errors it assumes deviations do not persist, and "
        f"its bands were far too narrow on real series (docs/benchmark.md). {_others()} "
        f"[{DEFAULT_MODEL['model']}]",
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
        "--seasonal",
        choices=("auto", "yes", "no", "drifting"),
        nargs="?",
        const="yes",
        default=DEFAULT_MODEL["seasonal"],
        help="seasonal factors (quarterly or monthly data). auto: for the local trend when at "
        "least two full years are observed; other curves only with 'yes'. drifting: "
        "local-trend only, seasonal factors that drift slowly over the years (a seasonal "
        "random walk; slower to fit, several seconds for a long monthly series) [auto]",
    )
    m.add_argument(
        "--drift",
        choices=("mean-reverting", "random-walk", "adaptive"),
        default=DEFAULT_MODEL["drift"],
        help="local-trend only: how the growth rate moves. mean-reverting: it drifts and fades "
        "towards the long-run rate with an uncertain half-life (a damped trend); random-walk: "
        "it drifts without fading; adaptive: either, weighted by the evidence (exact engine) "
        f"[{DEFAULT_MODEL['drift']}]",
    )


def read_input(args) -> GrowthSeries:
    """Read the input series; data warnings (gaps) become notes on stderr."""
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        series = read_series(args.file, period_col=args.period_col, value_col=args.value_col,
                             decimal=getattr(args, "decimal", "auto"),
                             fiscal_start=getattr(args, "fiscal_start", None),
                             sheet=getattr(args, "sheet", None))
    for w in caught:
        note(str(w.message))
    from bayesgrowth.cli.limits import check_run_size
    from bayesgrowth.cli.reference import check_reference_period

    check_run_size(args, series.n)  # before any work: the memory the options ask for
    # backtest checks its models against its first training set itself
    model = getattr(args, "model", None) if getattr(args, "command", "") != "backtest" else None
    check_reference_period(args, series, models=[model] if isinstance(model, str) else [])
    return series


def priors_from_args(args):
    """The :class:`~bayesgrowth.priors.Priors` the prior options describe."""
    from bayesgrowth.priors import (
        CeilingPrior,
        GrowthPrior,
        HalfLifePrior,
        InitialValuePrior,
        LocalTrendPrior,
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
        if getattr(args, "season_drift", None) is not None:
            extra["local_trend"] = LocalTrendPrior(season_drift_pct=args.season_drift)
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
    seasonal = getattr(args, "seasonal", DEFAULT_MODEL["seasonal"])
    seasonal = {"yes": True, "no": False}.get(seasonal, seasonal) if isinstance(
        seasonal, str) else bool(seasonal)
    return {
        "model": getattr(args, "model", DEFAULT_MODEL["model"]),
        "errors": getattr(args, "errors", "independent"),
        "noise": getattr(args, "noise_dist", "normal"),
        "seasonal": seasonal,
        "drift": getattr(args, "drift", DEFAULT_MODEL["drift"]),
    }


def spec_from_options(options: dict):
    """The :class:`ModelSpec` of the options, ``seasonal="auto"`` read as no seasons.

    ``"drifting"`` is kept, so a curve without states is refused before any work.

    Enough to check what an engine can fit before any series is read.
    """
    from bayesgrowth.models.spec import ModelSpec

    try:
        seasonal = options["seasonal"] if options["seasonal"] in (True, "drifting") else False
        return ModelSpec(**{**options, "seasonal": seasonal})
    except ValueError as exc:
        raise UsageError(f"model options: {cli_spelling(str(exc))}") from None


def checked_model_options(args, engines, option: str = "--engine") -> dict:
    """The curve and error options, refused early where an engine in ``engines`` cannot fit them.

    Returns an empty dict for the plain exponential model, else the options.
    """
    options = model_options_from_args(args)
    spec = spec_from_options(options)
    check_ceiling(args, [spec.model])
    if "exact" in engines and not exact_covers(spec):
        raise UsageError(exact_refusal(spec, option))
    if "nuts" in engines and spec.adaptive:
        raise UsageError(
            f"{option}: --drift adaptive needs the exact engine (it weighs drifting and fading "
            "growth by their exact evidence); with nuts choose --drift random-walk or "
            "mean-reverting"
        )
    return {} if spec.is_plain_exponential and options["seasonal"] is not True else options


def check_seasons(args, series, seasonal: bool) -> None:
    """Refuse seasonal factors (``--seasonal yes`` or ``drifting``) on a calendar without them."""
    from bayesgrowth.models.spec import season_index

    if not seasonal:
        return
    try:
        season_index(series.axis, series.t)
    except ValueError:
        raise UsageError(
            f"--seasonal {getattr(args, 'seasonal', 'yes')}: "
            f"{getattr(getattr(args, 'file', None), 'name', None) or series.name} is not "
            "quarterly or monthly, and seasonal factors need quarters or months; leave "
            "--seasonal at auto or give no") from None


def fit_from_args(args, series):
    """Fit ``series`` with the engine, model and priors the options name; warn on failure."""
    from bayesgrowth.inference.run import fit_series
    from bayesgrowth.models.spec import ModelSpec, resolve_seasonal

    priors = priors_from_args(args)
    spec_options = model_options_from_args(args)
    checked_model_options(args, (args.engine,))
    spec = ModelSpec(**{**spec_options, "seasonal": resolve_seasonal(
        spec_options["seasonal"], series.axis, series.t, spec_options["model"])})
    check_seasons(args, series, spec.seasonal)
    options = {"draws": args.draws, "chains": args.chains, **spec_options}
    if args.engine == "nuts":
        options["progressbar"] = not args.quiet  # PyMC draws no bar off a terminal
        options["target_accept"] = getattr(args, "target_accept", None)
        options["cores"] = min(getattr(args, "cores", 1), os.cpu_count() or 1)
    say(
        args,
        f"fitting {series.name} ({observations(series.n, series.axis.frequency)}) "
        f"with the {args.engine} engine ({spec.label()}) ...",
    )
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        try:
            fit = fit_series(
                series, engine=args.engine, priors=priors, seed=args.seed, **options
            )
        except ValueError as exc:
            raise UsageError(cli_spelling(str(exc))) from None
    for w in caught:
        if "diagnostics" in str(w.message):
            print(f"WARNING: {w.message}", file=sys.stderr)
    return fit


def fmt_number(v: float) -> str:
    """A value for people: see :func:`bayesgrowth.report.words.fmt_number` (one format)."""
    from bayesgrowth.report.words import fmt_number as one_format

    return one_format(v)
