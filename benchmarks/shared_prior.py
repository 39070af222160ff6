"""Does learning the local trend's prior from many series help? (empirical Bayes)

For each frequency, the prior means of the level shocks and the growth drift are
learned from the *training parts* of up to 60 growing M1 and Tourism series of that
frequency (every k-th series, no hold-out values seen), by
:func:`bayesgrowth.inference.shared_prior.learn_shared_prior`. The learned
multipliers are written to ``docs/benchmark/shared_prior.json``; the benchmark's
``shared-prior`` method then fits every series with them.

Run: ``python benchmarks/shared_prior.py`` then
``python benchmarks/realdata.py --methods shared-prior --keep docs/benchmark --out DIR``.
"""

from __future__ import annotations

import json
import sys
import time
from pathlib import Path

sys.path.insert(0, str(Path(__file__).parent))

from realdata_data import FREQUENCIES, load_growing  # noqa: E402
from realdata_methods import growth_series  # noqa: E402

OUT = Path(__file__).parent.parent / "docs" / "benchmark" / "shared_prior.json"


def main() -> int:
    from bayesgrowth.inference.shared_prior import learn_shared_prior

    result = {}
    for freq, period in FREQUENCIES.items():
        records = load_growing(["M1", "Tourism"], [freq])
        series = [growth_series(r.train, period, name=r.name) for r in records]
        t0 = time.perf_counter()
        learned = learn_shared_prior(series)
        result[freq] = {"level_factor": learned.level_factor,
                        "drift_factor": learned.drift_factor,
                        "n_series": learned.n_series,
                        "seconds": round(time.perf_counter() - t0, 1)}
        print(freq, result[freq], flush=True)
        print(learned.table.pivot(index="level_factor", columns="drift_factor",
                                  values="log_evidence").round(1).to_string(), flush=True)
    OUT.write_text(json.dumps(result, indent=2) + "\n", encoding="utf-8")
    print(f"wrote {OUT}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
