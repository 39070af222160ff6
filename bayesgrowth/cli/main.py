"""Command line: argument parsing and file writing only; the library does the work.

Exit codes: 0 done, 2 bad input or usage (one line on stderr, no output files),
1 an unexpected failure.
"""

from __future__ import annotations

import argparse
import json
import os
import sys
import warnings
from pathlib import Path

from bayesgrowth._version import __version__
from bayesgrowth.cli.output import staged_output
from bayesgrowth.config import DEFAULT_LEVELS, check_levels
from bayesgrowth.data.series import GrowthSeries, InputError, read_series

__all__ = ["main", "build_parser"]

PROG = "bayesgrowth"


class UsageError(Exception):
    """Bad usage, reported in one line with exit code 2."""


class _Parser(argparse.ArgumentParser):
    def error(self, message: str) -> None:  # one line, not argparse's usage block
        raise UsageError(f"{self.prog}: {message} (see --help)")


def _levels(text: str) -> tuple[int, ...]:
    try:
        return check_levels(float(x) for x in text.split(",") if x.strip())
    except ValueError as exc:
        raise argparse.ArgumentTypeError(f"--levels {text!r}: {exc}") from None


def _positive_int(text: str) -> int:
    try:
        value = int(text)
    except ValueError:
        raise argparse.ArgumentTypeError(f"{text!r} is not a whole number") from None
    if value < 1:
        raise argparse.ArgumentTypeError(f"{text!r} must be at least 1")
    return value


def _add_input(p: argparse.ArgumentParser) -> None:
    p.add_argument("file", type=Path, help="CSV file with a period column and a value column")
    p.add_argument("--period-col", default="period", help="name of the period column [period]")
    p.add_argument("--value-col", default="value", help="name of the value column [value]")


def _add_model(p: argparse.ArgumentParser, *, horizon_required: bool = True) -> None:
    p.add_argument("--horizon", "-H", type=_positive_int, required=horizon_required,
                   default=None if horizon_required else 8,
                   help="number of future periods to forecast" +
                   ("" if horizon_required else " [8]"))
    p.add_argument("--engine", choices=("nuts", "exact"), default="nuts",
                   help="nuts: PyMC sampler; exact: same posterior by quadrature, fast [nuts]")
    p.add_argument("--seed", type=int, default=1, help="random seed; same seed, same output [1]")
    p.add_argument("--levels", type=_levels, default=DEFAULT_LEVELS,
                   help="credible band levels in percent, comma-separated [50,80,95]")
    p.add_argument("--draws", type=_positive_int, default=1000,
                   help="posterior draws per chain [1000]")
    p.add_argument("--chains", type=_positive_int, default=4, help="chains [4]")
    g = p.add_argument_group("priors (see docs/user-guide.md)")
    g.add_argument("--initial-give-or-take", type=float, default=50.0, metavar="PCT",
                   help="initial value: the observed value give or take PCT%%; 0 fixes it [50]")
    g.add_argument("--initial-value", type=float, default=None, metavar="V",
                   help="centre of the initial-value prior [observed value]")
    g.add_argument("--reference-period", default=None, metavar="LABEL",
                   help="period the initial value refers to [first observation]")
    g.add_argument("--growth", type=float, default=0.0, metavar="PCT",
                   help="central growth per period in percent [0]")
    g.add_argument("--growth-give-or-take", type=float, default=30.0, metavar="PTS",
                   help="spread of the growth prior in percentage points [30]")
    g.add_argument("--noise", type=float, default=30.0, metavar="PCT",
                   help="typical deviation from trend in percent (half-normal scale) [30]")
    p.add_argument("--quiet", action="store_true", help="no progress output")


def build_parser() -> argparse.ArgumentParser:
    """The argument parser of the ``bayesgrowth`` command."""
    parser = _Parser(
        prog=PROG,
        description="Bayesian forecasts of business growth with credible bands. "
        "Forecasts extrapolate past growth and are not investment advice.",
    )
    parser.add_argument("--version", action="version", version=f"{PROG} {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)

    fc = sub.add_parser("forecast", help="fit a growth model and forecast with credible bands",
                        description="Fit the Bayesian exponential growth model to FILE and "
                        "write forecast.csv, summary.json, fan_chart.png and posterior.nc.")
    _add_input(fc)
    _add_model(fc)
    fc.add_argument("--out", type=Path, required=True, help="output folder")
    fc.add_argument("--target", type=float, default=None,
                    help="a budget or guidance value: report the probability of reaching it")
    fc.add_argument("--target-probability", type=float, default=0.5, metavar="P",
                    help="probability at which the target counts as reached [0.5]")
    fc.set_defaults(run=_run_forecast)

    demo = sub.add_parser("demo", help="forecast the bundled demo series (an invented company)",
                          description="Run 'forecast' on the bundled demo series.")
    _add_model(demo, horizon_required=False)
    demo.add_argument("--out", type=Path, default=Path("bayesgrowth-demo"),
                      help="output folder [bayesgrowth-demo]")
    demo.add_argument("--target", type=float, default=None, help=argparse.SUPPRESS)
    demo.add_argument("--target-probability", type=float, default=0.5, help=argparse.SUPPRESS)
    demo.set_defaults(run=_run_demo)
    return parser


def _say(args, message: str) -> None:
    if not getattr(args, "quiet", False):
        print(message, file=sys.stderr, flush=True)


def _read(args) -> GrowthSeries:
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        series = read_series(args.file, period_col=args.period_col, value_col=args.value_col)
    for w in caught:
        _say(args, f"note: {w.message}")
    return series


def _priors(args):
    from bayesgrowth.priors import GrowthPrior, InitialValuePrior, NoisePrior, Priors

    try:
        return Priors(
            initial=InitialValuePrior(args.initial_give_or_take, args.initial_value),
            growth=GrowthPrior(args.growth, args.growth_give_or_take),
            noise=NoisePrior(args.noise),
            reference_period=args.reference_period,
        )
    except ValueError as exc:
        raise UsageError(f"prior options: {exc}") from None


def _fit(args, series):
    from bayesgrowth.inference.run import fit_series

    priors = _priors(args)
    options = {"draws": args.draws, "chains": args.chains}
    if args.engine == "nuts":
        options["progressbar"] = not args.quiet
    _say(args, f"fitting {series.name} ({series.n} {series.axis.frequency} observations) "
         f"with the {args.engine} engine ...")
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        fit = fit_series(series, engine=args.engine, priors=priors, seed=args.seed, **options)
    for w in caught:
        if "diagnostics" in str(w.message):
            print(f"WARNING: {w.message}", file=sys.stderr)
    return fit


def _num(v: float) -> str:
    return f"{v:,.0f}" if abs(v) >= 1000 else f"{v:,.4g}"


def _headline(fc, summary: dict) -> list[str]:
    fin = summary["final_period"]
    g = summary["growth_per_period"]
    lines = [
        f"{summary['series']}: forecast for {fin['period']} (step {fc.horizon}): median "
        f"{_num(fin['median'])}, 80% band {_num(fin['lower_80'])} to {_num(fin['upper_80'])}"
        if "lower_80" in fin else
        f"{summary['series']}: forecast for {fin['period']}: median {_num(fin['median'])}",
        f"growth per period {100 * g['median']:.1f}% (95% interval {100 * g['lower_95']:.1f}% "
        f"to {100 * g['upper_95']:.1f}%)",
    ]
    if "growth_per_year" in summary:
        gy = summary["growth_per_year"]
        lines.append(f"growth per year {100 * gy['median']:.1f}% (95% interval "
                     f"{100 * gy['lower_95']:.1f}% to {100 * gy['upper_95']:.1f}%)")
    if "target" in summary:
        tg = summary["target"]
        p_last = tg["probability_at_least_by_period"][fin["period"]]
        reach = tg["first_period_reaching"] or f"not within {fc.horizon} periods"
        lines.append(f"target {_num(tg['value'])}: probability {p_last:.0%} by {fin['period']}; "
                     f"first reached with probability {tg['probability']:.0%}: {reach}")
    d = summary["diagnostics"]
    lines.append("diagnostics: ok" if d["ok"] else "diagnostics: FAILED - " +
                 "; ".join(d["problems"]))
    return lines


def _run_forecast(args, series: GrowthSeries | None = None) -> int:
    from bayesgrowth.forecast.forecast import forecast

    series = series or _read(args)
    if args.target is not None and not args.target > 0:
        raise UsageError(f"--target {args.target}: must be a value above 0")
    if not 0 < args.target_probability < 1:
        raise UsageError(f"--target-probability {args.target_probability}: must be between 0 "
                         "and 1")
    names = ["forecast.csv", "summary.json", "fan_chart.png", "posterior.nc"]
    protect = [args.file] if getattr(args, "file", None) else []
    with staged_output(args.out, names, protect) as stage:
        fit = _fit(args, series)
        fc = forecast(fit, args.horizon, levels=args.levels)
        summary = fc.summary(args.target, args.target_probability)
        fc.table.to_csv(stage / "forecast.csv", index=False, float_format="%.6g")
        (stage / "summary.json").write_text(json.dumps(summary, indent=2) + "\n")
        _save_fan(fc, stage / "fan_chart.png")
        fit.to_netcdf(stage / "posterior.nc", fc.predictive_groups())
    for line in _headline(fc, summary):
        print(line)
    for caution in summary["cautions"]:
        print(f"caution: {caution}")
    print(f"wrote {', '.join(names)} to {args.out}")
    return 0


def _save_fan(fc, path: Path) -> None:
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from bayesgrowth.plots.fan import plot_fan

    ax = plot_fan(fc)
    ax.figure.savefig(path, dpi=110)
    plt.close(ax.figure)


def _run_demo(args) -> int:
    from bayesgrowth.data.demo import demo_path, load_demo

    args.file = demo_path()
    _say(args, f"demo: quarterly revenue of an invented company, from {args.file.name}")
    return _run_forecast(args, load_demo())


def main(argv: list[str] | None = None) -> int:
    """Run the command line; returns the exit code."""
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
        if args.command is None:
            parser.print_help()
            return 2
        return args.run(args)
    except (UsageError, InputError) as exc:
        print(f"{PROG}: error: {exc}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print(f"{PROG}: interrupted; no output written", file=sys.stderr)
        return 130
    except Exception as exc:  # an unexpected failure: one line, traceback on request
        if os.environ.get("BAYESGROWTH_DEBUG"):
            raise
        print(f"{PROG}: unexpected failure: {type(exc).__name__}: {exc} "
              "(set BAYESGROWTH_DEBUG=1 for details)", file=sys.stderr)
        return 1


if __name__ == "__main__":
    sys.exit(main())
