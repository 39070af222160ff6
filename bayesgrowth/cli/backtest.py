"""The ``backtest`` subcommand: rolling-origin backtest, scores, verdicts and figures."""

from __future__ import annotations

import argparse
import sys
import warnings
from pathlib import Path

from bayesgrowth.cli.acceptance import diagnostics_exit
from bayesgrowth.cli.common import (
    UsageError,
    add_input,
    add_model_options,
    check_ceiling,
    checked_model_options,
    model_options_from_args,
    priors_from_args,
    read_input,
    say,
    whole_range,
)
from bayesgrowth.cli.output import add_force_option, check_output, staged_output
from bayesgrowth.cli.progress import show_bars
from bayesgrowth.cli.reference import check_reference_period
from bayesgrowth.cli.text import add_unit_option, unit_from_args
from bayesgrowth.data.export import write_csv

__all__ = ["OUTPUT_FILES", "add_parser", "output_files"]

#: Files every run writes into ``--out``; each model adds ``backtest_model_<name>.png``.
OUTPUT_FILES = [
    "backtest_forecasts.csv",
    "backtest_scores.csv",
    "backtest_ranking.csv",
    "backtest_bias.csv",
    "backtest_diagnostics.csv",
    "calibration.png",
    "backtest_fans.png",
]

#: The models compared when neither --models nor --methods is given.
DEFAULT_MODELS_TEXT = "default,exponential,log-linear"


def output_files(names) -> list[str]:
    """Every file a run comparing the models ``names`` writes, one figure per model."""
    from bayesgrowth.backtest.models import file_stem

    return OUTPUT_FILES + [f"backtest_model_{stem}.png" for stem in file_stem(names).values()]


class _NotForBacktest(argparse.Action):
    """``--engine`` comes with the shared model options; the backtest names engines in --methods."""

    def __call__(self, parser, namespace, values, option_string=None):
        raise UsageError(
            f"{option_string} is not used by backtest; name each model's engine in --models "
            "(e.g. --models default,exponential/nuts,log-linear)"
        )


def add_parser(subparsers) -> argparse.ArgumentParser:
    """Register ``bayesgrowth backtest`` on the ``bayesgrowth`` command's subparsers.

    Parameters
    ----------
    subparsers : argparse._SubParsersAction
        From :func:`bayesgrowth.cli.main.build_parser`.

    Returns
    -------
    argparse.ArgumentParser
        The subcommand's parser.
    """
    from bayesgrowth.backtest.methods import METHODS

    p = subparsers.add_parser(
        "backtest",
        help="rolling-origin backtest: do the bands hold what they state?",
        description="Refit each model at every forecast origin of FILE, score its forecasts "
        f"of the next H periods, and write {', '.join(OUTPUT_FILES[:-1])} and "
        f"{OUTPUT_FILES[-1]}, and backtest_model_NAME.png for each model.",
        conflict_handler="resolve",
    )
    add_input(p)
    add_model_options(p)
    add_unit_option(p)
    p.add_argument("--engine", action=_NotForBacktest, help=argparse.SUPPRESS)
    p.add_argument("--min-train", type=int, required=True, metavar="N",
                   help="training points at the first origin (at least 3)")
    p.add_argument("--out", type=Path, required=True, help="output folder")
    add_force_option(p)
    p.add_argument(
        "--models",
        default=None,
        metavar="LIST",
        help="comma-separated models to compare on the same origins, each NAME[/MODIFIER...]: "
        "default, local-trend, exponential, damped, logistic, gompertz, log-linear, "
        "log-linear-anchored, revenue-scale, naive; modifiers ar1, student-t, seasonal, "
        "no-seasons, random-walk, mean-reverting, adaptive, exact, nuts (e.g. exponential/ar1). "
        f"Rows, scores and figures are labelled by these names [{DEFAULT_MODELS_TEXT}, the "
        "first replaced by the model the model options describe when they are given]",
    )
    p.add_argument(
        "--methods",
        default=None,
        help=f"instead of --models: methods from {', '.join(METHODS)} (write "
        "log-linear-anchored for 'log-linear, anchored'), the engines fitting the model the "
        "model options describe",
    )
    p.add_argument("--stride", type=int, default=1, help="points between origins [1]")
    p.add_argument("--window", type=int, default=None, metavar="W",
                   help="train on the last W points only [all points before the origin]")
    p.set_defaults(run=run)
    return p


def _methods(text: str) -> tuple[str, ...]:
    from bayesgrowth.backtest.methods import check_methods

    text = text.replace("log-linear, anchored", "log-linear-anchored")
    try:
        return check_methods([m for m in text.split(",") if m.strip()])
    except ValueError as exc:
        raise UsageError(f"--methods {text!r}: {exc}") from None


def _check_settings(args, n: int) -> None:
    from bayesgrowth.backtest.split import RollingOrigin
    from bayesgrowth.data.series import MIN_OBSERVATIONS

    if n <= MIN_OBSERVATIONS:
        raise UsageError(
            f"{args.file} has only {n} points, too short for a backtest: it needs at least "
            f"{MIN_OBSERVATIONS + 1} (a first training set of {MIN_OBSERVATIONS} and one "
            "period to forecast)"
        )
    for option, value in (("--min-train", args.min_train), ("--window", args.window)):
        if value is not None and value < MIN_OBSERVATIONS:
            raise UsageError(f"{option} {value}: must be at least {MIN_OBSERVATIONS}")
    if args.stride < 1:
        raise UsageError(f"--stride {args.stride}: must be at least 1")
    if args.window is not None and args.window > args.min_train:
        raise UsageError(f"--window {args.window}: may not exceed --min-train ({args.min_train})")
    if n <= args.min_train:
        raise UsageError(
            f"--min-train {args.min_train}: {args.file} has only {n} points; choose a "
            f"--min-train {whole_range(MIN_OBSERVATIONS, n - 1)} so that at least one period "
            "is left to forecast"
        )
    RollingOrigin(args.horizon, args.min_train, stride=args.stride, window=args.window)


def _models_from_options(args) -> str:
    """The default list, its first model the one the model options describe if given."""
    from bayesgrowth.backtest.models import label_for_options
    from bayesgrowth.cli.common import spec_from_options

    options = model_options_from_args(args)
    if options == model_options_from_args(argparse.Namespace()):
        return DEFAULT_MODELS_TEXT
    spec_from_options(options)  # a bad combination is refused as "model options: ..."
    first = label_for_options(options)
    return ",".join(dict.fromkeys([first, *DEFAULT_MODELS_TEXT.split(",")[1:]]))


def _choices(args):
    """The models to run (named as the output labels them) and the runner's model options."""
    from bayesgrowth.backtest.models import choices_from_methods, resolve_models

    sampler = {"draws": args.draws, "chains": args.chains}
    if args.models is not None and args.methods is not None:
        raise UsageError("--models and --methods: give one of them (--models names each model "
                         "with its engine; --methods is the earlier form)")
    if args.methods is not None:
        methods = _methods(args.methods)
        spec_options = checked_model_options(args, methods, option="--methods")
        return choices_from_methods(methods, {**sampler, **spec_options}), sampler
    if args.models is None:
        text = _models_from_options(args)
    elif model_options_from_args(args) != model_options_from_args(argparse.Namespace()):
        raise UsageError(
            "--models: name each model's curve and errors in the list (e.g. --models "
            "default,logistic/ar1,log-linear) instead of --model, --errors, --noise-dist, "
            "--seasonal or --drift, which apply to --methods"
        )
    else:
        text = args.models
    try:
        return resolve_models(text), sampler
    except ValueError as exc:
        raise UsageError(f"--models {text!r}: {exc}") from None


def run(args) -> int:
    """Run the backtest subcommand; returns the exit code."""
    choices, sampler = _choices(args)
    check_ceiling(args, [c.options["model"] for c in choices if c.bayesian])
    series = read_input(args)
    _check_settings(args, series.n)
    names = output_files([c.name for c in choices])
    check_output(args.out, names, [args.file], force=args.force)
    priors = priors_from_args(args)
    check_reference_period(args, series, first_train=args.min_train,
                           models=[c.options["model"] for c in choices if c.bayesian])
    priors.resolve(series.head(args.min_train))  # bad priors fail here, early
    from bayesgrowth.backtest.runner import BACKTEST_CAUTION, backtest

    say(args, f"backtesting {', '.join(c.name for c in choices)} on {series.name} "
        f"({series.n} points) ...")
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        result = backtest(
            series, models=choices, horizon=args.horizon, min_train=args.min_train,
            stride=args.stride, window=args.window, levels=args.levels, seed=args.seed,
            priors=priors, model_options=sampler, n_draws=args.draws * args.chains,
            progress=show_bars(args),
        )
    for w in caught:
        if issubclass(w.category, UserWarning) and "BLAS" not in str(w.message):
            print(f"WARNING: {w.message}", file=sys.stderr)
    ranking = _ranking(result)
    with staged_output(args.out, names, [args.file], force=args.force) as stage:
        write_csv(result.forecasts, stage / "backtest_forecasts.csv")
        write_csv(result.scores, stage / "backtest_scores.csv")
        write_csv(ranking, stage / "backtest_ranking.csv")
        write_csv(result.bias(), stage / "backtest_bias.csv")
        write_csv(result.diagnostics, stage / "backtest_diagnostics.csv")
        _save_figures(result, stage, unit=unit_from_args(args))
    _print_summary(result, ranking, args)
    print(f"caution: {BACKTEST_CAUTION}")
    print(f"wrote {len(names)} files ({', '.join(names)}) to {args.out}")
    bad = result.diagnostics[~result.diagnostics["ok"].astype(bool)]
    failed = [f"{r.method} at origin {r.origin}: {r.problems}" for r in bad.itertuples()]
    return diagnostics_exit(args, failed, args.out)


def _ranking(result):
    """The CRPS ranking, or an empty table (with a note) when no case has every model's CRPS."""
    import pandas as pd

    try:
        return result.ranking()
    except ValueError as exc:
        print(f"note: no ranking: {exc}", file=sys.stderr)
        return pd.DataFrame(columns=["step", "score", "rank", "method", "mean"])


def _print_summary(result, ranking, args) -> None:
    from bayesgrowth.backtest.ranking import ranking_lines

    print(f"{result.series.name}: {result.settings['n_origins']} origins, horizon "
          f"{args.horizon}; models:")
    for name, about in result.descriptions.items():
        print(f"  {name}: {about}")
    print("calibration:")
    for line in result.verdict_lines():
        print(f"  {line}")
    print("bias:")
    for line in result.bias_lines():
        print(f"  {line}")
    for line in ranking_lines(ranking) if len(ranking) else []:
        print(line)


def _save_figures(result, stage: Path, *, unit: str | None = None) -> None:
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from bayesgrowth.backtest.models import file_stem
    from bayesgrowth.plots.backtest import calibration_figure, fans_figure, model_figure

    level = 80 if 80 in result.levels else result.levels[len(result.levels) // 2]
    figures = [("calibration.png", lambda: calibration_figure(result)),
               ("backtest_fans.png", lambda: fans_figure(result, level=level, unit=unit))]
    figures += [(f"backtest_model_{stem}.png",
                 lambda m=model: model_figure(result, m, level=level, unit=unit))
                for model, stem in file_stem(result.methods).items()]
    for name, draw in figures:
        fig = draw()
        fig.savefig(stage / name, dpi=110)
        plt.close(fig)
