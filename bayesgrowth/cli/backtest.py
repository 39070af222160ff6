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
    checked_model_options,
    model_options_from_args,
    priors_from_args,
    read_input,
    say,
)
from bayesgrowth.cli.output import add_force_option, check_output, staged_output
from bayesgrowth.cli.text import add_unit_option, unit_from_args
from bayesgrowth.data.export import write_csv

__all__ = ["OUTPUT_FILES", "add_parser"]

#: Files every run writes into ``--out``.
OUTPUT_FILES = [
    "backtest_forecasts.csv",
    "backtest_scores.csv",
    "backtest_diagnostics.csv",
    "calibration.png",
    "backtest_fans.png",
]

DEFAULT_METHODS = "exact,log-linear,naive"


class _NotForBacktest(argparse.Action):
    """``--engine`` comes with the shared model options; the backtest names engines in --methods."""

    def __call__(self, parser, namespace, values, option_string=None):
        raise UsageError(
            f"{option_string} is not used by backtest; name the engines to compare in --methods "
            "(e.g. --methods nuts,exact,naive)"
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
        description="Refit each method at every forecast origin of FILE, score its forecasts "
        "of the next H periods, and write backtest_forecasts.csv, backtest_scores.csv, "
        "backtest_diagnostics.csv, calibration.png and backtest_fans.png.",
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
        "--methods",
        default=None,
        help=f"comma-separated methods from {', '.join(METHODS)} "
        f"(write log-linear-anchored for 'log-linear, anchored') [{DEFAULT_METHODS}; "
        "nuts in place of exact when a model option needs more than the exact engine covers]",
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

    for option, value in (("--min-train", args.min_train), ("--window", args.window)):
        if value is not None and value < MIN_OBSERVATIONS:
            raise UsageError(f"{option} {value}: must be at least {MIN_OBSERVATIONS}")
    if args.stride < 1:
        raise UsageError(f"--stride {args.stride}: must be at least 1")
    if args.window is not None and args.window > args.min_train:
        raise UsageError(f"--window {args.window}: may not exceed --min-train ({args.min_train})")
    if n <= args.min_train:
        raise UsageError(
            f"--min-train {args.min_train}: {args.file} has only {n} points; choose at most "
            f"{n - 1} so that at least one period is left to forecast"
        )
    RollingOrigin(args.horizon, args.min_train, stride=args.stride, window=args.window)


def _default_methods(args) -> tuple[str, ...]:
    """The default methods, with ``nuts`` for ``exact`` when the model options need NUTS."""
    from bayesgrowth.cli.common import exact_covers, spec_from_options

    methods = _methods(DEFAULT_METHODS)
    try:
        covered = exact_covers(spec_from_options(model_options_from_args(args)))
    except UsageError:
        return methods  # checked_model_options reports the bad option
    return methods if covered else tuple("nuts" if m == "exact" else m for m in methods)


def run(args) -> int:
    """Run the backtest subcommand; returns the exit code."""
    methods = _default_methods(args) if args.methods is None else _methods(args.methods)
    series = read_input(args)
    _check_settings(args, series.n)
    check_output(args.out, OUTPUT_FILES, [args.file], force=args.force)
    priors = priors_from_args(args)
    priors.resolve(series.head(args.min_train))  # a bad --reference-period fails here, early
    spec_options = checked_model_options(args, methods, option="--methods")
    from bayesgrowth.backtest.runner import BACKTEST_CAUTION, backtest

    say(args, f"backtesting {', '.join(methods)} on {series.name} ({series.n} points) ...")
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        result = backtest(
            series,
            methods=methods,
            horizon=args.horizon,
            min_train=args.min_train,
            stride=args.stride,
            window=args.window,
            levels=args.levels,
            seed=args.seed,
            priors=priors,
            model_options={"draws": args.draws, "chains": args.chains, **spec_options},
            n_draws=args.draws * args.chains,
            progress=not args.quiet,
        )
    for w in caught:
        if issubclass(w.category, UserWarning) and "BLAS" not in str(w.message):
            print(f"WARNING: {w.message}", file=sys.stderr)
    with staged_output(args.out, OUTPUT_FILES, [args.file], force=args.force) as stage:
        write_csv(result.forecasts, stage / "backtest_forecasts.csv")
        write_csv(result.scores, stage / "backtest_scores.csv")
        write_csv(result.diagnostics, stage / "backtest_diagnostics.csv")
        _save_figures(result, stage, unit=unit_from_args(args))
    print(f"{series.name}: {result.settings['n_origins']} origins, horizon {args.horizon}")
    for line in result.verdict_lines():
        print(line)
    print(f"caution: {BACKTEST_CAUTION}")
    print(f"wrote {', '.join(OUTPUT_FILES)} to {args.out}")
    bad = result.diagnostics[~result.diagnostics["ok"].astype(bool)]
    failed = [f"{r.method} at origin {r.origin}: {r.problems}" for r in bad.itertuples()]
    return diagnostics_exit(args, failed, args.out)


def _save_figures(result, stage: Path, *, unit: str | None = None) -> None:
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from bayesgrowth.plots.backtest import calibration_figure, fans_figure

    level = 80 if 80 in result.levels else result.levels[len(result.levels) // 2]
    for name, fig in (("calibration.png", calibration_figure(result)),
                      ("backtest_fans.png", fans_figure(result, level=level, unit=unit))):
        fig.savefig(stage / name, dpi=110)
        plt.close(fig)
