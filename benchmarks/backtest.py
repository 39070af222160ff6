"""Cost of a rolling-origin backtest on the demo series, each case in a fresh process.

Cases (4-step horizon, every origin from --min-train on; the demo has 20 quarters,
so the default --min-train 4 gives 16 origins):

* single   - one NUTS fit of the whole demo and its forecast (the yardstick);
* loop     - the naive refit loop: one ``fit_series(engine="nuts")`` per origin;
* nuts     - ``backtest(methods=("nuts",))``: the model compiled once (nutpie);
* exact    - ``backtest(methods=("exact",))``.

Goals: nuts <= 2 x single, loop / nuts >= 5, exact < 2 s per process.
Run: ``python benchmarks/backtest.py [--min-train N]``. Figures depend on the
machine and its load (and on warm compile caches: run it twice).
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import time

HORIZON = 4


def _case(name: str, min_train: int) -> dict:
    import warnings

    warnings.simplefilter("ignore")
    t0 = time.perf_counter()
    import bayesgrowth as bg
    from bayesgrowth.backtest import RollingOrigin, backtest

    demo = bg.load_demo()
    t1 = time.perf_counter()
    origins = RollingOrigin(HORIZON, min_train).n_splits(demo.n)
    if name == "single":
        fit = bg.fit_series(demo, engine="nuts", seed=1, model="exponential")
        bg.forecast(fit, HORIZON)
    elif name == "loop":
        for train_idx, _ in RollingOrigin(HORIZON, min_train).split(demo.n):
            fit = bg.fit_series(demo.take(train_idx),
                                engine="nuts", seed=int(train_idx[-1]), model="exponential")
            bg.forecast(fit, HORIZON)
    else:
        backtest(demo, methods=(name,), horizon=HORIZON, min_train=min_train)
    t2 = time.perf_counter()
    return {"case": name, "origins": origins, "import": t1 - t0, "work": t2 - t1}


def _run(name: str, min_train: int) -> dict:
    t0 = time.perf_counter()
    proc = subprocess.run(
        [sys.executable, __file__, "--case", name, "--min-train", str(min_train)],
        capture_output=True, text=True, check=True,
    )
    wall = time.perf_counter() - t0
    result = json.loads(proc.stdout.strip().splitlines()[-1])
    result["process"] = wall
    return result


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--min-train", type=int, default=4)
    parser.add_argument("--case", choices=("single", "loop", "nuts", "exact"))
    parser.add_argument("--skip-loop", action="store_true",
                        help="leave out the slow naive loop (its ratio is then not printed)")
    args = parser.parse_args()
    if args.case:
        print(json.dumps(_case(args.case, args.min_train)))
        return
    print(f"load average before: {os.getloadavg()[0]:.2f} on {os.cpu_count()} CPUs")
    cases = ("single", "exact", "nuts") + (() if args.skip_loop else ("loop",))
    res = {name: _run(name, args.min_train) for name in cases}
    origins = res["nuts"]["origins"]
    print(f"demo series, {origins} origins, horizon {HORIZON}")
    print(f"{'case':8} {'process s':>10} {'import s':>9} {'work s':>8}")
    for name, r in res.items():
        print(f"{name:8} {r['process']:10.2f} {r['import']:9.2f} {r['work']:8.2f}")
    single, nuts = res["single"]["process"], res["nuts"]["process"]
    print(f"nuts backtest / single NUTS forecast: {nuts / single:.2f} (goal <= 2)")
    print(f"per origin: nuts {res['nuts']['work'] / origins:.2f} s (incl. one compile)")
    if "loop" in res:
        print(f"naive loop / nuts backtest:           {res['loop']['process'] / nuts:.2f} "
              f"(goal >= 5); loop {res['loop']['work'] / origins:.2f} s per origin")
    print(f"exact backtest, whole process: {res['exact']['process']:.2f} s (goal < 2), "
          f"backtest call {res['exact']['work']:.2f} s")
    print(f"load average after: {os.getloadavg()[0]:.2f}")


if __name__ == "__main__":
    main()
