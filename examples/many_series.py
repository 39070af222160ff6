"""Many series: a batch of independent forecasts, and (full run) a pooled model.

The data are invented by :func:`bayesgrowth.data.panel.invented_panel`: quarterly
revenue of 12 imaginary regional branches, 12 to 40 quarters each. Run::

    python examples/many_series.py --out example-output          # batch + pooled (NUTS)
    python examples/many_series.py --out example-output --fast   # batch, exact engine

Nothing here describes a real business or is investment advice.
"""

from __future__ import annotations

import argparse
from pathlib import Path

import bayesgrowth as bg
from bayesgrowth.batch.executors import LocalExecutor
from bayesgrowth.data.panel import invented_panel


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path, default=Path("example-output"))
    parser.add_argument("--fast", action="store_true", help="batch with the exact engine only")
    args = parser.parse_args()
    args.out.mkdir(parents=True, exist_ok=True)

    frame = invented_panel(12, seed=3)
    csv = args.out / "branches.csv"
    frame.to_csv(csv, index=False)
    panel, failures = bg.read_panel(csv)
    print(f"{len(panel)} series read, {len(failures)} rejected")

    settings = bg.BatchSettings(horizon=4, engine="exact", seed=1)
    executor = LocalExecutor(workers=1)
    try:
        result = bg.run_batch(panel, args.out / "batch", settings, executor=executor)
    finally:
        executor.close()
    cols = ["series", "n_observations", "growth_median", "growth_lower_95", "growth_upper_95"]
    summary = result.summary
    print(summary[[c for c in cols if c in summary]].round(3).to_string(index=False))

    if not args.fast:
        # Pretend the first four branches opened recently: keep only their first 5
        # quarters, so they must borrow strength from the others.
        group = {name: (s.head(5) if i < 4 else s) for i, (name, s) in enumerate(panel.items())}
        pooled = bg.fit_pooled(group, seed=1)
        print("pooled diagnostics ok:", pooled.diagnostics.ok)
        fc = bg.forecast(pooled, 4)
        if fc.total is not None:
            print("group total:")
            print(fc.total[["period", "median", "lower_80", "upper_80"]].round(0))
    print(f"wrote branches.csv and batch/ to {args.out}")


if __name__ == "__main__":
    main()
