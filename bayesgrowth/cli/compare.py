"""``bayesgrowth compare``: least-squares point forecasts beside the Bayesian band."""

from __future__ import annotations

import sys

from bayesgrowth.cli.acceptance import diagnostics_exit
from bayesgrowth.cli.common import (
    add_input,
    add_model_options,
    fit_from_args,
    fmt_number,
    read_input,
)
from bayesgrowth.cli.output import add_force_option, staged_output
from bayesgrowth.cli.text import add_unit_option, unit_from_args
from bayesgrowth.data.export import write_csv
from bayesgrowth.report.words import band_phrases, period_words

__all__ = ["add_parser"]


def add_parser(sub) -> None:
    """Register the ``compare`` subcommand."""
    p = sub.add_parser(
        "compare",
        help="least-squares growth fits, their spread, and the Bayesian band beside them",
        description="Fit the exponential curve by least squares in the ways analysts usually "
        "do (log scale or revenue scale, anchored or not, dropping periods) and set their "
        "point forecasts beside the Bayesian credible band for the same period. Writes "
        "comparison.csv and comparison.png.",
    )
    add_input(p)
    add_model_options(p)
    add_unit_option(p)
    p.add_argument("--out", required=True, help="output folder")
    add_force_option(p)
    p.add_argument("--max-drop", type=int, default=None, metavar="K",
                   help="drop up to K periods from either end in the window variants "
                   "[min(3, n-3)]")
    p.set_defaults(run=run)


def run(args) -> int:
    """Run ``compare``; returns the exit code."""
    from pathlib import Path

    from bayesgrowth.cli.cautions import forecast_cautions, print_cautions
    from bayesgrowth.cli.common import UsageError
    from bayesgrowth.comparison import compare_to_forecast
    from bayesgrowth.forecast.forecast import forecast
    from bayesgrowth.leastsq import LeastSquaresError

    series = read_input(args)
    if args.max_drop is not None and not 0 <= args.max_drop <= series.n - 3:
        raise UsageError(f"--max-drop {args.max_drop}: must be between 0 and {series.n - 3} "
                         f"for {series.n} observations (every fit keeps 3)")
    names = ["comparison.csv", "comparison.png"]
    with staged_output(Path(args.out), names, [args.file], force=args.force) as stage:
        fit = fit_from_args(args, series)
        fc = forecast(fit, args.horizon, levels=args.levels)
        try:
            comp = compare_to_forecast(fc, max_drop=args.max_drop)
        except LeastSquaresError as exc:
            raise UsageError(f"{args.file}: least-squares fit failed: {exc}") from None
        write_csv(comp.table, stage / "comparison.csv")
        _save_plot(comp, stage / "comparison.png", unit=unit_from_args(args))
    sp = comp.spread
    last = fc.table.iloc[-1]
    final = period_words(fc.periods[-1], series.axis)
    print(f"{series.name}: point forecasts for {final} from {len(comp.fits)} "
          f"least-squares variants range from {fmt_number(sp['min'])} ({sp['lowest_variant']}) "
          f"to {fmt_number(sp['max'])} ({sp['highest_variant']}), a ratio of "
          f"{sp['max_over_min']:.2f}")
    print(f"Bayesian forecast for {final} (model: {fit.spec.label()}): "
          + "; ".join([f"median {fmt_number(last['median'])}",
                       *band_phrases(last.to_dict(), fc.levels)]))
    if not fit.diagnostics.ok:
        print("diagnostics: FAILED - " + "; ".join(fit.diagnostics.problems), file=sys.stderr)
    print_cautions(forecast_cautions(series, args.horizon, fit.spec.model, fit.spec.errors))
    print(f"wrote {', '.join(names)} to {args.out}")
    return diagnostics_exit(args, fit.diagnostics.problems, args.out)


def _save_plot(comp, path, *, unit: str | None = None) -> None:
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from bayesgrowth.plots.compare import comparison_figure

    fig = comparison_figure(comp, unit=unit)
    fig.savefig(path, dpi=110)
    plt.close(fig)
