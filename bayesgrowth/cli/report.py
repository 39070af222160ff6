"""``bayesgrowth report``: one self-contained HTML page for readers who do not run Python."""

from __future__ import annotations

import shlex
import sys
import warnings
from pathlib import Path

from bayesgrowth.cli.acceptance import diagnostics_exit
from bayesgrowth.cli.common import add_input, add_model_options, read_input, say
from bayesgrowth.cli.output import add_force_option, check_output, staged_output
from bayesgrowth.cli.report_models import add_models_option, average_from_args
from bayesgrowth.cli.target import add_target_options, check_target_options
from bayesgrowth.cli.text import add_unit_option, forecast_lines, unit_from_args

__all__ = ["add_parser"]


def add_parser(sub) -> None:
    """Register the ``report`` subcommand."""
    p = sub.add_parser(
        "report",
        help="write one self-contained HTML report of a forecast",
        description="Fit, forecast, compare with least-squares fits, backtest, and write "
        "report.html: one page with figures embedded, viewable offline and printable.",
    )
    add_input(p)
    add_model_options(p)
    add_unit_option(p)
    p.add_argument("--out", type=Path, required=True, help="output folder")
    add_force_option(p)
    add_target_options(p)
    p.add_argument("--no-backtest", action="store_true", help="leave out the backtest section")
    add_models_option(p)
    p.set_defaults(run=run)


def run(args) -> int:
    """Run ``report``; returns the exit code."""
    from bayesgrowth.cli.common import check_seasons, checked_model_options, priors_from_args
    from bayesgrowth.inference.diagnostics import SamplingWarning
    from bayesgrowth.report import render_report, write_report
    from bayesgrowth.report.build import report_parts

    series = read_input(args)
    check_target_options(args)
    priors = priors_from_args(args)
    spec_options = checked_model_options(args, (args.engine,))
    check_seasons(args, series, spec_options.get("seasonal") in (True, "drifting"))
    command = "bayesgrowth " + " ".join(shlex.quote(a) for a in sys.argv[1:])
    names = ["report.html"]
    check_output(args.out, names, [args.file], force=args.force)
    say(args, f"building the report for {series.name} ({args.engine} engine) ...")
    staged = staged_output(args.out, names, [args.file], force=args.force)
    with staged as stage, warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", SamplingWarning)  # the forecast's own fit
        average = average_from_args(args, series, priors)
        parts = report_parts(
            series, args.horizon, engine=args.engine, seed=args.seed, priors=priors,
            levels=args.levels, target=args.target, target_probability=args.target_probability,
            with_backtest=not args.no_backtest, command=command, unit=unit_from_args(args),
            fit_options={"draws": args.draws, "chains": args.chains, **spec_options},
            average=average,
        )
        write_report(stage / "report.html", render_report(parts))
    failed = [str(w.message) for w in caught if issubclass(w.category, SamplingWarning)]
    failed += [f"{m}: diagnostics failed, left out of the comparison"
               for m in (average.excluded if average is not None else ())]
    for w in caught:
        if not issubclass(w.category, SamplingWarning):
            warnings.warn_explicit(w.message, w.category, w.filename, w.lineno)
    fc = parts.forecast
    summary = fc.summary(args.target, args.target_probability)
    for line in forecast_lines(fc, summary)[:-1]:
        print(line)  # the page's headline; its sampling checks are in its diagnostics section
    print(f"wrote report.html to {args.out}")
    from bayesgrowth.forecast.forecast import CAUTION

    for caution in summary["cautions"]:  # the page's own (long horizon, fixed curve, ...)
        if caution != CAUTION:
            print(f"caution: {caution}")
    print("caution: the report extrapolates past growth; it is not investment advice")
    return diagnostics_exit(args, failed, args.out)
