"""Sampling health of every model: the demo series and data simulated from each model.

For each curve (exponential, damped, logistic, Gompertz, local trend) with
independent and with AR(1) errors, one NUTS fit at the package defaults (4 chains,
1,000 tuning and 1,000 kept draws) to

* the bundled demo series, and
* 20 quarters simulated from that model at parameters near the demo's (3% noise).

Prints R-hat, bulk and tail ESS, divergent transitions and the time of each fit.
Goal: no divergences, R-hat <= 1.01, ESS >= 400 everywhere.
Run: ``python benchmarks/health.py [--only demo|simulated]``; expect several minutes.
"""

from __future__ import annotations

import argparse
import math
import time
import warnings

import numpy as np
import pandas as pd

ERRORS = ("independent", "ar1")

# Truths for the simulated series (log scale, quarterly; our choice, near the demo's shape).
# Every registered model family is checked on the demo; give a new one a truth here too.
TRUTH = {
    "exponential": {"log_a": math.log(1000.0), "log1p_g": 0.08},
    "damped": {"log_a": math.log(1000.0), "log1p_g": 0.15, "half_life": 6.0, "long_run": 0.0},
    "logistic": {"log_a": math.log(1000.0), "log_k": math.log(15000.0), "half_life": 4.0},
    "gompertz": {"log_a": math.log(1000.0), "log_k": math.log(15000.0), "half_life": 6.0},
    "local-trend": {"log_a": math.log(1000.0), "log1p_g": 0.08, "sigma_growth": 0.01,
                    "sigma_level": 0.0},
}


def simulate(curve: str, errors: str, seed: int = 5, n: int = 20):
    """20 quarters from ``curve`` with 3% noise (AR(1) with phi 0.6 when asked)."""
    import bayesgrowth as bg
    from bayesgrowth.models import general
    from bayesgrowth.models.spec import ModelSpec

    rng = np.random.default_rng(seed)
    t = np.arange(n)
    truth = {k: np.array([v]) for k, v in TRUTH[curve].items()}
    if curve == "local-trend":
        growth = truth["log1p_g"][0] + truth["sigma_growth"][0] * np.cumsum(rng.standard_normal(n))
        mean = truth["log_a"][0] + np.r_[0.0, np.cumsum(growth[1:])]
    else:
        mean = general.log_trend(ModelSpec(model=curve), truth, t, 0)[0]
    e = 0.03 * rng.standard_normal(n)
    if errors == "ar1":
        for i in range(1, n):
            e[i] += 0.6 * e[i - 1]
    labels = [f"{2020 + i // 4}Q{i % 4 + 1}" for i in range(n)]
    frame = pd.DataFrame({"period": labels, "value": np.exp(mean + e)})
    return bg.read_series(frame, name=f"simulated {curve}")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--only", choices=("demo", "simulated"))
    args = parser.parse_args()
    warnings.simplefilter("ignore")
    import bayesgrowth as bg
    from bayesgrowth.models import registry

    rows = []
    for data in ("demo", "simulated"):
        if args.only and data != args.only:
            continue
        for curve in registry.names():
            if data == "simulated" and curve not in TRUTH:
                print(f"{curve}: no truth in TRUTH to simulate from; demo only")
                continue
            for errors in ERRORS:
                s = bg.load_demo() if data == "demo" else simulate(curve, errors)
                t0 = time.perf_counter()
                fit = bg.fit_series(s, model=curve, errors=errors, seed=1,
                                    engine="nuts", drift="random-walk", seasonal=False)
                d = fit.diagnostics
                rows.append({"data": data, "model": curve, "errors": errors,
                             "rhat": round(d.max_rhat, 3), "ess_bulk": round(d.min_ess_bulk),
                             "ess_tail": round(d.min_ess_tail), "divergences": d.divergences,
                             "seconds": round(time.perf_counter() - t0, 1)})
                print(pd.DataFrame(rows[-1:]).to_string(header=len(rows) == 1, index=False),
                      flush=True)
    table = pd.DataFrame(rows)
    print()
    print(table.to_markdown(index=False) if _has_tabulate() else table.to_string(index=False))


def _has_tabulate() -> bool:
    try:
        import tabulate  # noqa: F401
    except ImportError:
        return False
    return True


if __name__ == "__main__":
    main()
