"""Why do the default's bands miss more on long M1 quarterly series? A one-step check.

On the growing M1 quarterly series of the real-data benchmark (``realdata_data.py``), the
default's 80% bands held far fewer hold-out values on the series with 40 or more training
quarters than on shorter ones (docs/benchmark.md). This script compares, for both groups,
how often the one-step-ahead 80% band held the next value

* inside the training part: the filter's one-step predictive of each value from the values
  before it, mixed over 400 posterior draws (the fit has seen the whole training part, so
  this is slightly optimistic), and
* in the hold-out: the exact predictive of the first and of every hold-out quarter,

and whether the one-step errors of the last eight training quarters were larger than the
earlier ones (volatility rising towards the forecast origin).

If the training parts' one-step bands hold about 80% while the hold-out's first quarter
holds much less, the hold-out quarters were more volatile than the histories that precede
them, which no model fitted to those histories alone can foresee.

Run: ``python benchmarks/one_step_check.py`` (about 10 seconds).
"""

from __future__ import annotations

import numpy as np
from realdata_data import load_growing
from realdata_methods import growth_series

from bayesgrowth.config import DEFAULT_MODEL
from bayesgrowth.forecast.forecast import forecast
from bayesgrowth.inference.mixture import mixture_cdf
from bayesgrowth.inference.normal import ndtr
from bayesgrowth.inference.run import fit_series

DRAWS = 400
LONG = 40  # training quarters from which a series counts as long


def one(record) -> tuple[float, np.ndarray, float, float]:
    """In-sample one-step share inside the 80% band, the hold-out's PIT values, and the mean
    squared standardized one-step error over the last eight training values and before them.
    """
    fit = fit_series(growth_series(np.asarray(record.train, float), record.period),
                     engine="exact", seed=1, **DEFAULT_MODEL)
    post = fit.state_space
    nodes = fit.extra["nodes"].reshape(-1)[:DRAWS]
    flat = {k: v[:DRAWS] for k, v in fit.flat().items()}
    e, f = post.one_step(nodes, post.beta_of(flat))
    pit_in = ndtr(e / np.sqrt(f)).mean(axis=0)[1:]  # the first value has no past
    fc = forecast(fit, record.h)
    x = fc.exact
    pit_out = mixture_cdf(x["weight"], x["mean"], x["value_sd"], np.log(record.test))
    z2 = (e**2 / f).mean(axis=0)[1:]
    return (float(((pit_in > 0.1) & (pit_in < 0.9)).mean()), pit_out, float(z2[-8:].mean()),
            float(z2[:-8].mean()))


def main() -> None:
    """Print both groups' one-step coverage in the training parts and in the hold-outs."""
    records = load_growing(["M1"], ["quarterly"])
    rows = [(r.train.size >= LONG, *one(r)) for r in records]
    print("M1 quarterly, default model: share of values inside the one-step-ahead 80% band")
    for long in (False, True):
        group = [r for r in rows if r[0] == long]
        inside = np.array([((g[2] > 0.1) & (g[2] < 0.9)) for g in group])
        label = f"{'>=' if long else '< '} {LONG} training quarters ({len(group)} series)"
        print(f"  {label}: training parts {np.mean([g[1] for g in group]):.1%}, "
              f"first hold-out quarter {inside[:, 0].mean():.1%} (below it "
              f"{np.mean([g[2][0] < 0.1 for g in group]):.1%}, above it "
              f"{np.mean([g[2][0] > 0.9 for g in group]):.1%}), "
              f"all hold-out quarters {inside.mean():.1%}; median squared standardized "
              f"one-step error {np.median([g[4] for g in group]):.2f} before the last eight "
              f"training quarters, {np.median([g[3] for g in group]):.2f} over them")


if __name__ == "__main__":
    main()
