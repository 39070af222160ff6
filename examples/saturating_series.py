"""A series that is filling its market: exponential versus logistic and Gompertz curves.

The data are invented: monthly subscribers of *Harrowgate Lanes*, a fictional
bowling-league app, generated below from a logistic curve (ceiling 12,000,
growth rate 0.18 per month, 5% noise) for 36 months, well past its inflection.
Run::

    python examples/saturating_series.py --out example-output          # NUTS curves + LOO
    python examples/saturating_series.py --out example-output --fast   # least squares + exact

An exponential forecast of a maturing business runs too high exactly when it
matters. Nothing here is investment advice.
"""

from __future__ import annotations

import argparse
from pathlib import Path

import matplotlib

matplotlib.use("Agg")
import numpy as np  # noqa: E402
import pandas as pd  # noqa: E402

import bayesgrowth as bg  # noqa: E402
from bayesgrowth.leastsq import fit_log_linear  # noqa: E402
from bayesgrowth.leastsq.curves import fit_curve  # noqa: E402

CEILING, A0, RATE, NOISE, MONTHS, SEED = 12_000.0, 600.0, 0.18, 0.05, 36, 7


def invented_subscribers() -> pd.DataFrame:
    """The invented monthly series: a logistic curve times log-normal noise."""
    rng = np.random.default_rng(SEED)
    t = np.arange(MONTHS)
    curve = CEILING / (1 + (CEILING - A0) / A0 * np.exp(-RATE * t))
    values = np.round(curve * np.exp(rng.normal(0, NOISE, MONTHS)))
    periods = [f"{2023 + i // 12}-{i % 12 + 1:02d}" for i in range(MONTHS)]
    return pd.DataFrame({"period": periods, "value": values})


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path, default=Path("example-output"))
    parser.add_argument("--fast", action="store_true", help="least squares and exact engine only")
    args = parser.parse_args()
    args.out.mkdir(parents=True, exist_ok=True)
    frame = invented_subscribers()
    frame.to_csv(args.out / "subscribers.csv", index=False)
    series = bg.read_series(frame, name="Harrowgate Lanes subscribers (invented)")
    horizon = 12
    t_future = series.t_last + horizon

    exp_fit = fit_log_linear(series.t, series.values)
    print(f"least-squares exponential, {series.future_labels(horizon)[-1]}: "
          f"{exp_fit.value_at(t_future):,.0f}")
    for curve in ("logistic", "gompertz"):
        fit = fit_curve(curve, series.t, series.values)
        print(f"least-squares {curve}: {fit.value_at(t_future):,.0f}")

    exact = bg.GrowthModel(engine="exact", seed=1).fit(series).forecast(horizon)
    print(f"Bayesian exponential (exact) median {exact.table['median'].iloc[-1]:,.0f}, "
          f"80% band {exact.table['lower_80'].iloc[-1]:,.0f} to "
          f"{exact.table['upper_80'].iloc[-1]:,.0f}")
    ax = bg.plot_fan(exact, title="Exponential curve on a saturating series")
    ax.figure.savefig(args.out / "saturating_exponential.png", dpi=110)

    if not args.fast:
        fits = bg.fit_models(series, ["exponential", "logistic", "gompertz"], seed=1)
        average = bg.model_average(fits, horizon, seed=1)
        print(average.comparison.table.round(2).to_string())
        print(average.averaged.table[["period", "median", "lower_80", "upper_80"]].tail(3))
    print(f"wrote subscribers.csv and saturating_exponential.png to {args.out}")


if __name__ == "__main__":
    main()
