"""Would drifting seasonal factors forecast seasonal series better? A check outside the package.

For 25 randomly chosen growing series of each seasonal group of the real-data benchmark
(M1 and Tourism, quarterly and monthly; see ``realdata_data.py``), fit statsmodels'
``UnobservedComponents`` (local linear trend on the log values, maximum likelihood) twice:
with fixed seasonal dummies and with drifting ones (``stochastic_seasonal=True``), and
print the sMAPE of each forecast of the official hold-out (exp of the log forecast).

Run: ``python benchmarks/seasonal_drift_check.py`` (about 10 minutes on one core).
"""

from __future__ import annotations

import warnings

import numpy as np
import statsmodels.api as sm
from realdata_data import load_growing


def smape(actual: np.ndarray, forecast: np.ndarray) -> float:
    """Symmetric mean absolute percentage error, in percent."""
    return float(np.mean(200 * np.abs(actual - forecast) / (np.abs(actual) + np.abs(forecast))))


def one(record, stochastic: bool) -> float:
    """sMAPE of the hold-out forecast with fixed or drifting seasonal dummies (nan on failure)."""
    try:
        mod = sm.tsa.UnobservedComponents(np.log(record.train), level="local linear trend",
                                          seasonal=record.period, stochastic_seasonal=stochastic)
        res = mod.fit(disp=False, maxiter=200)
        return smape(record.test, np.exp(res.forecast(record.h)))
    except Exception:  # a fit that fails counts as missing, as in the printed means
        return float("nan")


def main(per_group: int = 25, seed: int = 0) -> None:
    """Print the mean sMAPE of both variants per seasonal group."""
    warnings.filterwarnings("ignore")
    rng = np.random.default_rng(seed)
    groups: dict[str, list] = {}
    for r in load_growing():
        if r.period > 1:
            groups.setdefault(r.group, []).append(r)
    for name, records in sorted(groups.items()):
        pick = rng.choice(len(records), size=min(per_group, len(records)), replace=False)
        fixed, drifting = [], []
        for i in pick:
            fixed.append(one(records[i], False))
            drifting.append(one(records[i], True))
        print(f"{name}: sMAPE {np.nanmean(fixed):.1f}% with fixed seasons, "
              f"{np.nanmean(drifting):.1f}% with drifting seasons ({len(pick)} series)")


if __name__ == "__main__":
    main()
