"""The ``batch`` subcommand: fit and forecast every series of a long-format file.

Exit codes: 0 every series has a forecast; 3 some series failed (listed in
failures.csv, the others have forecasts); 2 bad input or usage (nothing written);
1 an unexpected failure; 130 interrupted, 143 terminated (finished chunks are kept
in a hidden folder, results of earlier runs are removed; the same command resumes).
"""

from __future__ import annotations

import argparse
import sys
from dataclasses import replace
from pathlib import Path

from bayesgrowth.cli.acceptance import diagnostics_exit
from bayesgrowth.cli.common import (
    PROG,
    UsageError,
    _positive_int,
    add_input,
    add_model_options,
    checked_model_options,
    model_options_from_args,
    note,
    priors_from_args,
    say,
)
from bayesgrowth.cli.progress import show_bars
from bayesgrowth.cli.recalibration import (
    add_recalibrate_options,
    check_batch_out,
    panel_recalibration,
    recalibration_line,
)
from bayesgrowth.cli.signals import Terminated, exit_code

__all__ = ["add_parser", "EXIT_SOME_FAILED"]

#: Exit code when some series failed and the others finished.
EXIT_SOME_FAILED = 3

def add_parser(subparsers) -> argparse.ArgumentParser:
    """Register ``batch`` on the ``bayesgrowth`` command's subparsers."""
    p = subparsers.add_parser(
        "batch",
        help="fit and forecast many series of one long-format file, each on its own",
        description="Fit and forecast every series of FILE (one row per series and period) "
        "independently, and write forecast.csv, summary.csv and failures.csv to --out. "
        "Results are recorded as they finish: run the same command again to resume an "
        "interrupted batch. Exit code 0: all series done; 3: some series failed (see "
        "failures.csv); 4: sampling diagnostics failed for some series (forecasts written; "
        "--accept-warnings makes it 0); 2: bad input or usage.",
    )
    add_input(p, panel=True)
    add_model_options(p)
    p.add_argument("--out", type=Path, required=True, help="output folder (resumed if it "
                   "holds an interrupted batch with the same options)")
    p.add_argument("--executor", choices=("local", "dask"), default="local",
                   help="local: processes on this machine; dask: a Dask cluster [local]")
    p.add_argument("--scheduler", default=None, metavar="ADDRESS",
                   help="Dask scheduler address, e.g. tcp://10.0.0.5:8786 [start a local "
                   "cluster]")
    p.add_argument("--workers", type=_positive_int, default=None, metavar="N",
                   help="worker processes (local executor or local Dask cluster) [CPUs]")
    p.add_argument("--chunk-size", type=_positive_int, default=None, metavar="N",
                   help="series per unit of work, the most an interruption loses [automatic]")
    p.add_argument("--save-posteriors", action="store_true",
                   help="also write each series' posterior to posteriors/ (NetCDF)")
    add_recalibrate_options(p, panel=True)
    p.set_defaults(run=run)
    return p


def _executor(args):
    from bayesgrowth.batch.executors import make_executor

    if args.scheduler and args.executor != "dask":
        raise UsageError("--scheduler: only with --executor dask")
    try:
        return make_executor(args.executor, args.workers, args.scheduler)
    except ImportError as exc:
        raise UsageError(f"--executor dask: {exc}") from None
    except (OSError, TimeoutError, ValueError) as exc:
        raise UsageError(
            f"--scheduler {args.scheduler}: could not connect ({type(exc).__name__}: {exc}); "
            "check the address and that the scheduler is running"
        ) from None


def run(args) -> int:
    """Run the batch subcommand; returns the exit code."""
    from bayesgrowth.batch.runner import run_batch
    from bayesgrowth.batch.work import BatchSettings
    from bayesgrowth.data.panel import quiet_read_panel

    if args.min_train is not None and not args.recalibrate:
        raise UsageError("--min-train: only with --recalibrate")
    panel, bad, notes = quiet_read_panel(
        args.file, series_col=args.series_col, period_col=args.period_col,
        value_col=args.value_col, decimal=args.decimal, fiscal_start=args.fiscal_start,
        sheet=args.sheet,
    )
    for text in notes:
        note(text)
    if panel:  # the longest series, in every worker at once
        from bayesgrowth.batch.executors import available_cores
        from bayesgrowth.cli.limits import check_run_size

        check_run_size(args, max(s.n for s in panel.values()),
                       parallel=min(len(panel), args.workers or available_cores()))
    priors = priors_from_args(args)
    options = model_options_from_args(args)
    checked_model_options(args, (args.engine,))
    settings = BatchSettings(
        horizon=args.horizon, engine=args.engine, seed=args.seed, levels=tuple(args.levels),
        priors=priors, draws=args.draws, chains=args.chains, model_options=options,
    )
    order = list(dict.fromkeys([*panel, *(name for name, _ in bad)]))
    say(args, f"{len(order)} series in {args.file.name}: {len(panel)} to fit, "
        f"{len(bad)} refused at reading; engine {args.engine}, executor {args.executor}")
    if args.recalibrate:
        check_batch_out(args.out, [args.file])
    executor = _executor(args)
    try:
        if args.recalibrate:
            settings = replace(settings, recalibration=panel_recalibration(
                args, panel, settings, executor))
        result = run_batch(
            panel, args.out, settings, executor=executor, read_failures=bad, order=order,
            protect=[args.file], chunk_size=args.chunk_size,
            save_posteriors=args.save_posteriors, progress=show_bars(args),
        )
    except KeyboardInterrupt as exc:
        what = "terminated" if isinstance(exc, Terminated) else "interrupted"
        print(f"{PROG}: {what}; no results written, finished series are kept in {args.out}: "
              "run the same command again to resume", file=sys.stderr)
        return exit_code(exc)
    finally:
        executor.close()
    return _report(args, result, order, settings, panel)


def _report(args, result, order: list[str], settings, panel: dict) -> int:
    """Print what the run did (counts, recalibration, failures); returns the exit code."""
    from bayesgrowth.batch.store import OUTPUTS

    n_bad = len(result.failures)
    n_done = len(result.summary)
    print(f"{n_done} of {len(order)} series forecast ({result.n_fitted} fitted now, "
          f"{result.n_skipped} finished earlier), {n_bad} failed")
    for freq, (qmap, source) in sorted((settings.recalibration or {}).items()):
        print(recalibration_line({**qmap.describe(), **source}, prefix=f"{freq} series: "))
    if n_done and "diagnostics_ok" in result.summary:
        n_diag = int((~result.summary["diagnostics_ok"].astype(bool)).sum())
        if n_diag:
            print(f"WARNING: sampling diagnostics failed for {n_diag} series; do not trust "
                  "their forecasts (see diagnostics_ok in summary.csv)", file=sys.stderr)
    for _, row in result.failures.head(5).iterrows():
        print(f"failed: {row['reason']}", file=sys.stderr)
    if n_bad > 5:
        print(f"... and {n_bad - 5} more in failures.csv", file=sys.stderr)
    if n_done:
        from bayesgrowth.cli.cautions import panel_cautions, print_cautions

        options = settings.model_options
        print_cautions(panel_cautions(panel, settings.horizon, result.summary["series"],
                                      options.get("model"), options.get("errors",
                                                                        "independent")))
    print(f"wrote {', '.join(OUTPUTS)} to {args.out}")
    if n_bad:
        return EXIT_SOME_FAILED
    bad = (result.summary[~result.summary["diagnostics_ok"].astype(bool)]
           if n_done and "diagnostics_ok" in result.summary else result.summary.iloc[:0])
    return diagnostics_exit(args, [f"series {s}" for s in bad["series"]], args.out)
