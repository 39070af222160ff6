"""End to end on one quarterly series: forecast, target, comparison, backtest, report.

The series is the bundled demo: quarterly revenue of *Larkspur Instruments*, an
invented company (see ``bayesgrowth/data/make_demo.py``). Run::

    python examples/quarterly_forecast.py --out example-output          # NUTS engine
    python examples/quarterly_forecast.py --out example-output --fast   # exact engine

Forecasts extrapolate past growth; nothing here is investment advice.
"""

from __future__ import annotations

import argparse
from pathlib import Path

import matplotlib

matplotlib.use("Agg")

import bayesgrowth as bg  # noqa: E402
from bayesgrowth.backtest import backtest  # noqa: E402
from bayesgrowth.comparison import compare_to_forecast  # noqa: E402
from bayesgrowth.report import build_report, write_report  # noqa: E402

BUDGET = 9000.0  # an invented budget figure for 2027Q4


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--out", type=Path, default=Path("example-output"))
    parser.add_argument("--fast", action="store_true", help="exact engine (no sampling)")
    args = parser.parse_args()
    engine = "exact" if args.fast else "nuts"
    args.out.mkdir(parents=True, exist_ok=True)

    series = bg.load_demo()
    model = bg.GrowthModel(engine=engine, seed=1).fit(series)
    print("diagnostics ok:", model.fit_.diagnostics.ok)
    fc = model.forecast(8)
    print(fc.table[["period", "median", "lower_80", "upper_80"]].round(0).to_string(index=False))
    print(f"P(revenue >= {BUDGET:,.0f} in 2027Q4) = {fc.prob_exceeds(BUDGET).iloc[-1]:.0%}")
    print("first quarter reaching it with 80% probability:",
          fc.first_period_reaching(BUDGET, probability=0.8))
    print(fc.growth().round(3))

    comp = compare_to_forecast(fc)
    print("least-squares spread:", {k: v for k, v in comp.spread.items()})

    result = backtest(series, methods=(engine, "log-linear", "naive"), horizon=4, min_train=10,
                      seed=1)
    for line in result.verdict_lines():
        print(line)

    ax = bg.plot_fan(fc)
    ax.figure.savefig(args.out / "fan_chart.png", dpi=110)
    write_report(args.out / "report.html",
                 build_report(series, 8, engine=engine, seed=1, target=BUDGET,
                              command="python examples/quarterly_forecast.py"))
    print(f"wrote fan_chart.png and report.html to {args.out}")


if __name__ == "__main__":
    main()
