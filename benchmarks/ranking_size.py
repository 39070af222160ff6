"""How often the backtest ranking's Diebold-Mariano test says "better" when neither model is.

Loss differences with mean zero and moving-average dependence over ``H`` origins
(``d_o = e_o + ... + e_{o+H-1}``, the overlap of H-step forecasts from neighbouring
origins) are tested at a nominal 5%, three ways: the package's test (Newey-West
variance over H - 1 lags, Harvey-Leybourne-Newbold factor, Student's t), the same
without the factor, and the plain variance that ignores the dependence. Printed:
the share of runs that rejected (the test's true size), per number of origins.

Run: ``python benchmarks/ranking_size.py [--runs N]``. The module docstring of
:mod:`bayesgrowth.backtest.ranking` quotes these figures (seed 1, 3,000 runs).
"""

from __future__ import annotations

import argparse

import numpy as np

from bayesgrowth.backtest.ranking import diebold_mariano


def size(n_origins: int, horizon: int, runs: int, rng: np.random.Generator) -> dict:
    """Rejection rates at 5% under no true difference."""
    hits = {"package test": 0, "without small-sample factor": 0, "dependence ignored": 0}
    for _ in range(runs):
        d = np.convolve(rng.standard_normal(n_origins + horizon - 1), np.ones(horizon),
                        mode="valid")
        hits["package test"] += diebold_mariano(d, lags=horizon - 1).pvalue < 0.05
        hits["without small-sample factor"] += diebold_mariano(
            d, lags=horizon - 1, small_sample=False).pvalue < 0.05
        hits["dependence ignored"] += diebold_mariano(d, lags=0, small_sample=False).pvalue < 0.05
    return {k: v / runs for k, v in hits.items()}


def main() -> None:
    """Print the size table."""
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--runs", type=int, default=3000)
    args = parser.parse_args()
    rng = np.random.default_rng(1)
    for n_origins in (60, 12):
        rates = size(n_origins, 4, args.runs, rng)
        text = ", ".join(f"{k} {v:.1%}" for k, v in rates.items())
        print(f"{n_origins} origins, horizon 4: {text}")


if __name__ == "__main__":
    main()
