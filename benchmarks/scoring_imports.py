"""What importing the scoring layer costs, beside importing the scoring-rule library.

Prints, over a few fresh processes each: the time to import ``bayesgrowth.scoring``,
to import ``scoringrules`` (the scoring-rule library the tests compare against),
and to import ``scoringrules`` when numba is already loaded (as in a backtest of
the default model). The scoring layer keeps its own closed forms while importing
the library costs seconds (it compiles numba gufuncs when imported): a backtest
would pay that on every run.

Run: ``python benchmarks/scoring_imports.py [--repeats N]``.
"""

from __future__ import annotations

import argparse
import statistics
import subprocess
import sys

CASES = {
    "bayesgrowth.scoring": ("", "import bayesgrowth.scoring"),
    "scoringrules": ("", "import scoringrules"),
    "scoringrules after numba": ("import numba, scipy.stats", "import scoringrules"),
}

CHILD = """
import time
{setup}
t0 = time.perf_counter()
{stmt}
print(time.perf_counter() - t0)
"""


def seconds(setup: str, stmt: str) -> float:
    """Wall time of ``stmt`` in a fresh process after ``setup``."""
    out = subprocess.run([sys.executable, "-c", CHILD.format(setup=setup, stmt=stmt)],
                         capture_output=True, text=True, check=True).stdout
    return float(out.strip().splitlines()[-1])


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeats", type=int, default=3)
    args = parser.parse_args()
    for name, (setup, stmt) in CASES.items():
        times = [seconds(setup, stmt) for _ in range(args.repeats)]
        print(f"{name:28s} median {statistics.median(times):6.2f} s   "
              f"(min {min(times):.2f}, max {max(times):.2f}, {args.repeats} processes)")


if __name__ == "__main__":
    main()
