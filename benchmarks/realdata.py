"""Real-data benchmark: forecast the growing M1 and Tourism series and score the hold-outs.

Every method forecasts each growing series' official hold-out from its training part
(see :mod:`realdata_data` for the data and the growing filter, :mod:`realdata_methods` for
the methods, :mod:`realdata_scores` for the scores). Run::

    python benchmarks/realdata.py --methods rw-drift,ets-damped,theta,arima011 \
        --collections M1,Tourism --out docs/benchmark --jobs 2

It writes ``scores_by_series.csv`` (one row per series and method, failed fits included
with their error), ``summary.csv`` and ``summary.md`` (per collection and frequency, and
pooled) and ``coverage.png`` into ``--out``, all at once when the run is done. To add a
method, add one line to :data:`METHODS`: a name and a callable
``(train, h, period) -> Predictive``. Times depend on the machine and its load.
"""

from __future__ import annotations

import argparse
import sys
import time
import warnings
from collections.abc import Sequence
from pathlib import Path

import numpy as np
import pandas as pd
from realdata_data import SeriesRecord, count_table
from realdata_methods import (
    arima011,
    bayesgrowth_method,
    drifting_seasons_method,
    ets_damped,
    rw_drift,
    shared_prior_method,
    theta,
)
from realdata_runs import (
    add_data_options,
    check_data_options,
    data_note,
    guarded,
    load_records_of,
    names,
    run_tasks,
)
from realdata_scores import PROBS, SCORE_COLUMNS, score_series, summarise

__all__ = ["METHODS", "main", "run_benchmark", "run_one"]

#: Method registry: the name used on the command line and the callable.
METHODS = {
    "rw-drift": rw_drift,
    "ets-damped": ets_damped,
    "theta": theta,
    "arima011": arima011,
    "exponential": bayesgrowth_method(engine="exact", model="exponential"),
    "exponential-ar1": bayesgrowth_method(engine="exact", model="exponential", errors="ar1"),
    # the package's default model (bayesgrowth.config.DEFAULT_MODEL: a damped local trend)
    # and the two other growth dynamics of the local trend
    "default": bayesgrowth_method(engine="exact"),
    "local-trend": bayesgrowth_method(engine="exact", model="local-trend", drift="random-walk",
                                      seasonal="auto"),
    "adaptive": bayesgrowth_method(engine="exact", model="local-trend", drift="adaptive",
                                   seasonal="auto"),
    # the default with drifting seasonal factors where it fits seasons
    "default-drifting": drifting_seasons_method(),
    # the default with its prior scales learned per frequency (benchmarks/shared_prior.py)
    "shared-prior": shared_prior_method(),
}

_FILES = ["scores_by_series.csv", "summary.csv", "summary.md", "coverage.png"]


def run_one(record: SeriesRecord, method: str) -> dict:
    """Fit one method to one series and score its hold-out; a failure is a row, not a crash."""
    row = {
        "collection": record.collection, "series": record.name, "frequency": record.frequency,
        "period": record.period, "n_train": int(record.train.size), "h": record.h,
        "method": method, "ok": False, "error": "", "seconds": float("nan"),
        "cpu_seconds": float("nan"),
        **dict.fromkeys(SCORE_COLUMNS, float("nan")),
    }
    start, cpu_start = time.perf_counter(), time.process_time()
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            quantiles = METHODS[method](record.train, record.h, record.period).quantiles(PROBS)
        row["seconds"] = time.perf_counter() - start
        row["cpu_seconds"] = time.process_time() - cpu_start
        row.update(score_series(record.train, record.test, record.period, quantiles))
        row["ok"] = True
    except Exception as exc:  # any failure of a method is recorded as a failed fit
        if np.isnan(row["seconds"]):
            row["seconds"] = time.perf_counter() - start
            row["cpu_seconds"] = time.process_time() - cpu_start
        row["error"] = f"{type(exc).__name__}: {' '.join(str(exc).split())}"[:300]
    return row


def _run_task(task: tuple[SeriesRecord, str]) -> dict:
    return run_one(*task)


def run_benchmark(records: Sequence[SeriesRecord], methods: Sequence[str],
                  jobs: int = 1) -> pd.DataFrame:
    """Run every method on every record, in ``jobs`` processes; one row per pair."""
    tasks = [(r, m) for r in records for m in methods]
    return pd.DataFrame(run_tasks(_run_task, tasks, jobs, "fits", reports=20, chunksize=4))


def _parse(argv: Sequence[str] | None) -> argparse.Namespace:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--methods", default="rw-drift,ets-damped,theta,arima011")
    add_data_options(p, out="docs/benchmark")
    p.add_argument("--keep", type=Path, default=None, metavar="DIR",
                   help="also summarise the other methods' rows of DIR/scores_by_series.csv "
                   "(an earlier run on the same series), so slow references need not rerun")
    args = p.parse_args(argv)
    args.methods = names(args.methods, list(METHODS), "--methods")
    return check_data_options(args, _FILES)


def _notes(args: argparse.Namespace, records: Sequence[SeriesRecord], wall: float,
           kept: Sequence[str] = ()) -> list[str]:
    import statsmodels

    earlier = (f" Rows of {', '.join(kept)} kept from an earlier run on the same series "
               f"({args.keep}/scores_by_series.csv)." if kept else "")

    return [
        f"{data_note(args, records)} A series is growing when every value is above zero and "
        "the mean of its last four training values exceeds 1.1 times the mean of its first "
        "four. Each method forecasts the official hold-out from the training part.",
        "",
        f"Methods run: {', '.join(args.methods)} (statsmodels {statsmodels.__version__}); "
        f"{args.jobs} process(es), {wall / 60:.1f} min wall time; {args.bootstrap} bootstrap "
        f"resamples.{earlier}",
    ]


def _write(out: Path, scores: pd.DataFrame, summary: pd.DataFrame, notes: list[str],
           force: bool = False) -> None:
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt
    from realdata_report import coverage_figure, markdown_summary

    from bayesgrowth.cli.output import staged_output

    with staged_output(out, _FILES, protect=[], force=force) as stage:
        scores.to_csv(stage / "scores_by_series.csv", index=False, float_format="%.6g")
        summary.to_csv(stage / "summary.csv", index=False, float_format="%.6g")
        text = markdown_summary(summary, "Forecasts of growing M1 and Tourism series", notes)
        (stage / "summary.md").write_text(text, encoding="utf-8")
        fig = coverage_figure(summary)
        fig.savefig(stage / "coverage.png", dpi=110)
        plt.close(fig)


def main(argv: Sequence[str] | None = None) -> int:
    return guarded("realdata", _parse, _run, argv)


def _run(args: argparse.Namespace) -> int:
    records = load_records_of(args)
    print(count_table(records), file=sys.stderr)
    start = time.perf_counter()
    scores = run_benchmark(records, args.methods, args.jobs)
    wall = time.perf_counter() - start
    methods = list(args.methods)
    if args.keep is not None:  # earlier rows of other methods, same series, kept beside
        earlier = pd.read_csv(args.keep / "scores_by_series.csv")
        earlier = earlier[~earlier["method"].isin(methods)]
        methods += [m for m in dict.fromkeys(earlier["method"]) if m not in methods]
        scores = pd.concat([scores, earlier], ignore_index=True)
    summary = summarise(scores, n_boot=args.bootstrap, seed=args.seed, methods=methods)
    kept = methods[len(args.methods):]
    _write(Path(args.out), scores, summary, _notes(args, records, wall, kept), args.force)
    shown = summary[summary["group"] == "pooled"]
    cols = ["method", "series", "failed", "inside_80", "inside_95", "msis", "scaled_crps",
            "smape", "mase", "seconds_mean", "cpu_seconds_mean"]
    print(shown[cols].to_string(index=False, float_format=lambda v: f"{v:.3f}"))
    print(f"wrote {', '.join(_FILES)} to {args.out} ({wall / 60:.1f} min)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
