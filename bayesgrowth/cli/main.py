"""Command line: argument parsing and file writing only; the library does the work.

Exit codes: 0 done, 2 bad input or usage (one line on stderr, no output files),
1 an unexpected failure, 4 outputs written but the sampling diagnostics failed
(``--accept-warnings`` makes that 0), 3 (batch) some series failed, 130 interrupted
(Ctrl-C), 143 terminated (SIGTERM).
"""

from __future__ import annotations

import argparse
import importlib
import os
import sys
from pathlib import Path

from bayesgrowth._version import __version__
from bayesgrowth.cli.acceptance import diagnostics_exit
from bayesgrowth.cli.common import (
    PROG,
    Parser,
    UsageError,
    add_input,
    add_model_options,
    fit_from_args,
    read_input,
    say,
)
from bayesgrowth.cli.library_notes import library_warnings
from bayesgrowth.cli.limits import check_run_size
from bayesgrowth.cli.output import add_force_option, earlier_outputs, staged_output
from bayesgrowth.cli.recalibration import (
    add_recalibrate_options,
    check_min_train,
    recalibrate_forecast,
    recalibration_line,
)
from bayesgrowth.cli.scenario import (
    add_scenario_options,
    scenario_from_args,
    scenario_lines,
    scenario_summary,
    scenario_table,
)
from bayesgrowth.cli.signals import exit_code, handled_signals, stop_line
from bayesgrowth.cli.target import add_target_options, check_target_options
from bayesgrowth.cli.text import add_unit_option, forecast_lines, outlook_lines, unit_from_args
from bayesgrowth.data.export import NOT_AVAILABLE_KEY, json_ready, json_text, write_csv
from bayesgrowth.data.series import GrowthSeries, InputError

__all__ = ["main", "build_parser"]

#: Every file ``forecast`` may write into ``--out``, in the order it lists them.
OUTPUTS = ("forecast.csv", "summary.json", "fan_chart.png", "posterior.nc", "scenario.csv")


#: The subcommands in the order ``--help`` lists them, each with the module and function
#: that declare its options (imported only when needed: declaring the options of some
#: commands reads the model registry or the backtest methods).
COMMANDS = {
    "forecast": (__name__, "_add_forecast_parser"),
    "demo": (__name__, "_add_demo_parser"),
    "compare": ("bayesgrowth.cli.compare", "add_parser"),
    "backtest": ("bayesgrowth.cli.backtest", "add_parser"),
    "report": ("bayesgrowth.cli.report", "add_parser"),
    "batch": ("bayesgrowth.cli.batch", "add_parser"),
    "models": ("bayesgrowth.cli.models", "add_parser"),
    "priors": ("bayesgrowth.cli.priors", "add_parsers"),  # priors and sensitivity
    "sensitivity": ("bayesgrowth.cli.priors", "add_parsers"),
    "pool": ("bayesgrowth.cli.pool", "add_parser"),
}


def build_parser(command: str | None = None) -> argparse.ArgumentParser:
    """The argument parser of the ``bayesgrowth`` command.

    Parameters
    ----------
    command : str, optional
        Declare only this subcommand (the one a command line names first), so that a
        run does not pay for the options of the others; by default all of them.
    """
    parser = Parser(
        prog=PROG,
        description="Bayesian forecasts of business growth with credible bands. "
        "Forecasts extrapolate past growth and are not investment advice.",
    )
    parser.add_argument("--version", action="version", version=f"{PROG} {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=Parser)
    declared = set()
    for name, home in COMMANDS.items():
        if (command is None or name == command) and home not in declared:
            getattr(importlib.import_module(home[0]), home[1])(sub)
            declared.add(home)
    return parser


def _add_forecast_parser(sub) -> None:
    """The ``forecast`` command's options."""
    fc = sub.add_parser(
        "forecast",
        help="fit a growth model and forecast with credible bands",
        description="Fit a growth model to FILE and write forecast.csv, summary.json and "
        "fan_chart.png (and posterior.nc with the nuts engine or --save-posterior). The "
        "default model is a damped local trend on the log scale (level and growth rate both "
        "move; growth fades towards a long-run rate), computed exactly: on 1,905 real growing "
        "series (M1 and Tourism competitions) its 80% and 95% bands held 83% and 95% of "
        "outcomes (docs/benchmark.md). Use --model to choose another.",
    )
    add_input(fc)
    add_model_options(fc)
    add_unit_option(fc)
    fc.add_argument("--out", type=Path, required=True, help="output folder")
    add_force_option(fc)
    _add_posterior_option(fc)
    add_target_options(fc)
    add_recalibrate_options(fc)
    add_scenario_options(fc)
    fc.set_defaults(run=_run_forecast)


def _add_demo_parser(sub) -> None:
    """The ``demo`` command's options: ``forecast`` on the bundled demo series."""
    demo = sub.add_parser(
        "demo",
        help="forecast the bundled demo series (an invented company)",
        description="Run 'forecast' on the bundled demo series.",
    )
    add_model_options(demo, horizon_required=False)
    add_unit_option(demo)
    demo.add_argument(
        "--out",
        type=Path,
        default=Path("bayesgrowth-demo"),
        help="output folder [bayesgrowth-demo]",
    )
    add_force_option(demo)
    _add_posterior_option(demo)
    add_target_options(demo)
    add_recalibrate_options(demo)
    add_scenario_options(demo)
    demo.set_defaults(run=_run_demo)


def _add_posterior_option(p: argparse.ArgumentParser) -> None:
    """``--save-posterior``: posterior.nc also from the exact engine."""
    p.add_argument(
        "--save-posterior",
        action="store_true",
        help="also write posterior.nc (NetCDF in the layout ArviZ reads: posterior, "
        "predictive, log likelihood, observed data). The exact engine computes its bands "
        "without draws, so the file then holds draws taken from its exact posterior; the nuts "
        "engine always writes it, its draws being the posterior",
    )


def _output_names(args, scenario) -> list[str]:
    """The files this ``forecast`` run writes, in the order of :data:`OUTPUTS`."""
    names = ["forecast.csv", "summary.json", "fan_chart.png"]
    if args.engine == "nuts" or getattr(args, "save_posterior", False):
        names.append("posterior.nc")
    return names + ([] if scenario is None else ["scenario.csv"])


def _wrote_line(names: list[str], out: Path, removed: list[str], kept: list[str]) -> str:
    """What the run wrote, and what it did with files of an earlier run it did not write."""
    notes = [f"removed {', '.join(removed)} of an earlier run"] if removed else []
    if kept:
        notes.append(f"{', '.join(kept)} there: of an earlier run and changed since, left as "
                     "it is")
    return f"wrote {', '.join(names)} to {out}" + (f" ({'; '.join(notes)})" if notes else "")


def _run_forecast(args, series: GrowthSeries | None = None) -> int:
    from bayesgrowth.forecast.forecast import forecast
    from bayesgrowth.forecast.misfit import misfit_lines

    series = series or read_input(args)
    series.check_horizon(args.horizon)
    check_target_options(args)
    min_train = check_min_train(args, series.n)
    scenario = scenario_from_args(args, series.future_labels(args.horizon))
    names = _output_names(args, scenario)
    earlier = earlier_outputs(args.out, [n for n in OUTPUTS if n not in names])
    protect = [args.file] if getattr(args, "file", None) else []
    with staged_output(args.out, names, protect, force=args.force, retire=earlier[0]) as stage:
        fit = fit_from_args(args, series)
        fc = forecast(fit, args.horizon, levels=args.levels)
        misfit = misfit_lines(fc)  # the model's own bands, before any recalibration
        if min_train is not None:
            fc = recalibrate_forecast(args, fc, min_train)
        summary = fc.summary(args.target, args.target_probability)
        scen = None
        if scenario is not None:
            from bayesgrowth.forecast.scenario import apply_scenario

            scen = (apply_scenario(fc, scenario), scenario.describe(fc.periods))
            summary["scenario"] = scenario_summary(fc, *scen)
            write_csv(scenario_table(fc, scen[0]), stage / "scenario.csv")
        write_csv(fc.table, stage / "forecast.csv")
        (stage / "summary.json").write_text(json_text(summary))
        _save_fan(fc, stage / "fan_chart.png", unit=unit_from_args(args), target=args.target,
                  scenario=scen)
        if "posterior.nc" in names:
            fit.to_netcdf(stage / "posterior.nc", fc.predictive_groups())
    for line in forecast_lines(fc, summary):
        print(line)
    for line in outlook_lines(fc, summary):  # time to target, band sources
        print(line)
    if "scenario" in summary:
        for line in scenario_lines(summary["scenario"], fc.levels):
            print(line)
    if "recalibrated" in summary:
        print(recalibration_line(summary["recalibrated"]))
    for caution in summary["cautions"]:
        print(f"caution: {caution}")
    for line in misfit:
        print(line)
    from bayesgrowth.forecast.means import mean_caution

    said = mean_caution(fc.table, fc.levels) is not None  # a printed caution names the mean
    missing = [m for m in json_ready(summary)[1]
               if not (said and m["field"] == "final_period.mean")]
    if missing:
        print(f"caution: {len(missing)} number(s) of the summary do not exist (first "
              f"{missing[0]['field']}: {missing[0]['reason']}); summary.json holds null for "
              f"them and lists them under {NOT_AVAILABLE_KEY}")
    print(_wrote_line(names, args.out, *earlier))
    return diagnostics_exit(args, fit.diagnostics.problems, args.out)


def _save_fan(fc, path: Path, *, unit: str | None = None, target: float | None = None,
              scenario=None) -> None:
    """The fan chart as PNG, drawn on a figure of its own (no pyplot: nothing is shown)."""
    from matplotlib.figure import Figure

    from bayesgrowth.plots.fan import FAN_SIZE, plot_fan

    ax = plot_fan(fc, ax=Figure(figsize=FAN_SIZE, layout="constrained").add_subplot(),
                  unit=unit, target=target)
    if scenario is not None:
        from bayesgrowth.plots.scenario import draw_scenario

        draw_scenario(ax, *scenario, base_fc=fc)
    ax.figure.savefig(path, dpi=110)


def _run_demo(args) -> int:
    from bayesgrowth.data.demo import demo_path, load_demo

    args.file = demo_path()
    series = load_demo()
    check_run_size(args, series.n)
    say(args, f"demo: quarterly revenue of an invented company, from {args.file.name}")
    return _run_forecast(args, series)


def main(argv: list[str] | None = None) -> int:
    """Run the command line; returns the exit code.

    Without ``argv`` it is the program (the ``bayesgrowth`` command, ``python -m
    bayesgrowth``: the arguments come from ``sys.argv``), and once the command is done it
    ends the process itself (:func:`end_process`). With ``argv`` it runs the command in
    this process and returns its exit code.
    """
    code = _run(argv)
    if argv is None:
        end_process(code)
    return code


def end_process(code: int) -> None:
    """End the process with ``code``, skipping the interpreter's teardown if nothing else runs.

    Python's own exit frees the objects of every loaded module one by one: about 0.2 s once
    pandas and matplotlib are loaded, a fifth of a forecast's command. The command's files
    are in place when it returns, so with no other thread running the exit handlers run
    (what an ordinary exit runs first: logging, temporary folders), the printed output is
    flushed and the process ends at once. With other threads that an ordinary exit waits
    for (not daemon threads: a Dask cluster, a pool) it exits as usual. Daemon threads,
    such as a progress bar's monitor, do not hold it back (an ordinary exit ends the
    process under them too): after a Ctrl-C the command had handled, the ordinary exit
    sometimes ended a backtest with signal 2 instead of 130 under load, Python re-sending
    SIGINT to itself when it counts an interrupt as unhandled.
    """
    import atexit
    import threading

    main = threading.main_thread()
    if any(t is not main and not t.daemon for t in threading.enumerate()):
        sys.exit(code)
    atexit._run_exitfuncs()
    for stream in (sys.stdout, sys.stderr):
        try:
            stream.flush()
        except (OSError, ValueError):  # the reader went away, or the stream was closed
            pass
    os._exit(code)


def _run(argv: list[str] | None) -> int:
    first = (sys.argv[1:] if argv is None else argv)[:1]
    parser = build_parser(first[0] if first and first[0] in COMMANDS else None)
    try:
        with handled_signals():  # a termination request cleans up like Ctrl-C
            try:
                args = parser.parse_args(argv)
            finally:  # --help and --version print, then exit: a closed pipe shows here
                sys.stdout.flush()
            if args.command is None:
                parser.print_help()
                return 2
            with library_warnings(debug=bool(os.environ.get("BAYESGROWTH_DEBUG"))):
                code = args.run(args)
            sys.stdout.flush()
            return code
    except (UsageError, InputError) as exc:
        print(f"{PROG}: error: {exc}", file=sys.stderr)
        return 2
    except KeyboardInterrupt as exc:
        print(f"{PROG}: {stop_line(exc)}", file=sys.stderr)
        return exit_code(exc)
    except BrokenPipeError:
        # the reader of the printed output went away (`... | head`): stop quietly, as a
        # program killed by SIGPIPE would (128 + 13); unfinished outputs were cleaned up
        # on the way out, and nothing more is printed to the closed pipe
        os.dup2(os.open(os.devnull, os.O_WRONLY), sys.stdout.fileno())
        return 141
    except Exception as exc:  # an unexpected failure: one line, traceback on request
        if os.environ.get("BAYESGROWTH_DEBUG"):
            raise
        print(
            f"{PROG}: unexpected failure: {type(exc).__name__}: {exc} "
            "(set BAYESGROWTH_DEBUG=1 for details)",
            file=sys.stderr,
        )
        return 1


if __name__ == "__main__":
    sys.exit(main())
