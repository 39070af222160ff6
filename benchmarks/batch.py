"""Batch speed and memory: many invented series, exact engine and NUTS.

Prints three figures:

1. 1,000 invented series of 12-40 quarters (``invented_panel``, seed 1), exact
   engine, 8-quarter horizon, local executor on every CPU: wall time and peak
   resident memory of the whole ``bayesgrowth batch`` command in a new process
   (parent and workers). Goal: under 30 s and 1 GB on 2 cores.
2. 50 of those series with NUTS (4 chains x 1,000 tuning + 1,000 kept draws): wall
   time per series of the batch command, against the pure sampling time of one
   ordinary single-series NUTS fit (``fit_series(engine="nuts")`` on one series,
   model already compiled; PyMC's sampler). Goal: batch seconds per series under
   1.5 x that sampling time.
3. The one-off compile of the batch's NUTS model (nutpie), for the record.

Run: ``python benchmarks/batch.py [--series 1000] [--nuts-series 50]``.
"""

from __future__ import annotations

import argparse
import subprocess
import sys
import tempfile
import time
from pathlib import Path

CHILD = r"""
import resource, sys
from bayesgrowth.cli import main
rc = main(sys.argv[1:])
me = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
kids = resource.getrusage(resource.RUSAGE_CHILDREN).ru_maxrss
print("MAXRSS_KB", me, kids, file=sys.stderr)
sys.exit(rc)
"""


def run_cli(csv: Path, out: Path, *extra: str) -> tuple[float, float, float]:
    """Seconds, parent peak MB and largest worker peak MB of one batch command."""
    t0 = time.perf_counter()
    proc = subprocess.run(
        [sys.executable, "-c", CHILD, "batch", str(csv), "--horizon", "8", "--out", str(out),
         "--quiet", *extra],
        capture_output=True, text=True,
    )
    seconds = time.perf_counter() - t0
    if proc.returncode != 0:
        raise SystemExit(f"batch failed ({proc.returncode}): {proc.stderr}")
    line = next(x for x in proc.stderr.splitlines() if x.startswith("MAXRSS_KB"))
    _, me, kids = line.split()
    return seconds, int(me) / 1024, int(kids) / 1024


def single_nuts_sampling_seconds(series) -> float:
    """Pure sampling time of one single-series NUTS fit (best of 2, after a warm-up)."""
    import logging

    import pymc as pm

    from bayesgrowth.inference.nuts import default_target_accept

    logging.getLogger("pymc").setLevel(logging.ERROR)  # after import: PyMC sets its own
    from bayesgrowth.models import exponential
    from bayesgrowth.priors import Priors

    resolved = Priors().resolve(series)
    model = exponential.build_pymc_model(resolved, series.t, series.log_values)
    kw = dict(draws=1000, tune=1000, chains=4, cores=1, progressbar=False,
              target_accept=default_target_accept(series.n), compute_convergence_checks=False)
    with model:
        step = pm.NUTS(target_accept=kw.pop("target_accept"))  # compiled once, here
        pm.sample(step=step, random_seed=0, **kw)  # warm-up
        best = float("inf")
        for seed in (1, 2):
            t0 = time.perf_counter()
            pm.sample(step=step, random_seed=seed, **kw)
            best = min(best, time.perf_counter() - t0)
    return best


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--series", type=int, default=1000)
    parser.add_argument("--nuts-series", type=int, default=50)
    args = parser.parse_args()

    from bayesgrowth.data.panel import invented_panel, read_panel

    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        frame = invented_panel(args.series, min_periods=12, max_periods=40, seed=1)
        csv = tmp / "panel.csv"
        frame.to_csv(csv, index=False)
        s, me, kid = run_cli(csv, tmp / "exact", "--engine", "exact")
        print(f"exact engine, {args.series} series of 12-40 quarters: {s:.1f} s "
              f"({1000 * s / args.series:.1f} ms per series), peak memory parent {me:.0f} MB, "
              f"largest worker {kid:.0f} MB (goal: under 30 s, under 1 GB)")

        if args.nuts_series < 1:
            return
        names = frame["series"].unique()[: args.nuts_series]
        small = tmp / "panel_nuts.csv"
        frame[frame["series"].isin(names)].to_csv(small, index=False)
        s, me, kid = run_cli(small, tmp / "nuts", "--engine", "nuts")
        per = s / len(names)
        panel, _ = read_panel(small)
        series = next(iter(panel.values()))
        single = single_nuts_sampling_seconds(series)
        print(f"NUTS, {len(names)} series: {s:.1f} s in all, {per:.2f} s per series "
              f"(compile included); one single-series NUTS fit samples in {single:.2f} s: "
              f"ratio {per / single:.2f} (goal: under 1.5); peak memory parent {me:.0f} MB, "
              f"largest worker {kid:.0f} MB")

        from bayesgrowth.batch.compiled import CompiledBatchNuts, padded_length
        from bayesgrowth.priors import Priors

        t0 = time.perf_counter()
        CompiledBatchNuts(Priors().resolve(series), padded_length(40))
        print(f"one-off compile of the batch NUTS model (nutpie): {time.perf_counter() - t0:.1f} s"
              " (paid once per worker process; local workers inherit the parent's)")


if __name__ == "__main__":
    main()
