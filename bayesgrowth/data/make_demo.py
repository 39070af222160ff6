"""Generate the bundled demo series: quarterly revenue of an invented company.

The scenario is fiction. *Larkspur Instruments* is an imaginary maker of lab
sensors sold by subscription; its revenue (thousands of a currency unit) starts
near 1,200 in 2021Q1 and grows about 9% a quarter, with growth easing slowly and
deviations from trend that persist for a few quarters (AR(1) on the log scale),
as real revenue series do. No real company's figures are used.

Run ``python -m bayesgrowth.data.make_demo`` to rewrite
``bayesgrowth/data/demo_revenue.csv``; the output is the same on every run
(fixed seed), and a test checks that the bundled file matches it.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

__all__ = ["make_demo_frame", "DEMO_PATH"]

DEMO_PATH = Path(__file__).with_name("demo_revenue.csv")

SEED = 20261201
N_QUARTERS = 20
START_YEAR = 2021
INITIAL = 1200.0
GROWTH = 0.09  # per quarter at the start
GROWTH_DECAY = 0.985  # growth rate multiplies by this each quarter
NOISE_SD = 0.035  # log scale innovations
NOISE_AR = 0.5  # persistence of deviations


def make_demo_frame(seed: int = SEED) -> pd.DataFrame:
    """Return the demo series as a DataFrame with columns ``period`` and ``value``.

    Parameters
    ----------
    seed : int
        Seed of the random generator; the default reproduces the bundled file.
    """
    rng = np.random.default_rng(seed)
    log_growth = np.log1p(GROWTH) * GROWTH_DECAY ** np.arange(N_QUARTERS)
    trend = np.log(INITIAL) + np.concatenate([[0.0], np.cumsum(log_growth[:-1])])
    dev = np.zeros(N_QUARTERS)
    dev[0] = rng.normal(0, NOISE_SD / np.sqrt(1 - NOISE_AR**2))
    for i in range(1, N_QUARTERS):
        dev[i] = NOISE_AR * dev[i - 1] + rng.normal(0, NOISE_SD)
    values = np.round(np.exp(trend + dev), 1)
    periods = [f"{START_YEAR + i // 4}Q{i % 4 + 1}" for i in range(N_QUARTERS)]
    return pd.DataFrame({"period": periods, "value": values})


def main() -> None:
    """Write the demo CSV next to this module."""
    make_demo_frame().to_csv(DEMO_PATH, index=False)
    print(f"wrote {DEMO_PATH}")


if __name__ == "__main__":
    main()
