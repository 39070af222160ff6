"""``bayesgrowth pool``: fit related series together, each borrowing strength from the group.

Unlike ``batch`` (each series on its own), the series' growth rates are drawn
from one group distribution whose centre and spread are learned from all of
them, so a short series is pulled towards the group and a long one keeps its
own rate. The total is forecast draw by draw (a band of a sum is not a sum of
bands).
"""

from __future__ import annotations

from pathlib import Path

from bayesgrowth.cli.acceptance import add_accept_option, diagnostics_exit
from bayesgrowth.cli.common import (
    UsageError,
    _levels,
    _positive_int,
    add_input,
    add_quiet_option,
    add_seed_option,
    note,
    priors_from_args,
    say,
)
from bayesgrowth.cli.output import add_force_option, staged_output
from bayesgrowth.config import DEFAULT_LEVELS
from bayesgrowth.data.export import write_csv
from bayesgrowth.report.words import band_phrases, fmt_number, fmt_percent

__all__ = ["add_parser", "run"]

NAMES = ["pooled_forecast.csv", "pooled_growth.csv", "group_total.csv"]
#: Series shown one by one on the terminal; the rest are in the files.
SHOWN = 8


def add_parser(sub) -> None:
    """Register the ``pool`` subcommand."""
    p = sub.add_parser(
        "pool",
        help="fit related series together (products, regions): each borrows strength from "
        "the group",
        description="Fit every series of FILE (one row per series and period) at once: each "
        "series has its own exponential growth curve, and the growth rates come from one "
        "group whose centre and spread are learned from all the series, so a short or "
        "noisy series is pulled towards its peers. Forecasts every series and their total. "
        "Writes pooled_forecast.csv, pooled_growth.csv and group_total.csv. Uses the NUTS "
        "sampler: the first run on a machine compiles the model (about 30 s).",
    )
    add_input(p, panel=True)
    p.add_argument("--horizon", "-H", type=_positive_int, required=True,
                   help="number of future periods to forecast")
    p.add_argument("--out", type=Path, required=True, help="output folder")
    add_force_option(p)
    p.add_argument("--levels", type=_levels, default=DEFAULT_LEVELS,
                   help="credible band levels in percent, comma-separated [50,80,95]")
    add_seed_option(p)
    p.add_argument("--draws", type=_positive_int, default=1000, help="draws per chain [1000]")
    p.add_argument("--tune", type=_positive_int, default=1000,
                   help="warm-up iterations per chain [1000]")
    p.add_argument("--chains", type=_positive_int, default=4, help="chains [4]")
    p.add_argument("--errors", choices=("independent", "ar1"), default="independent",
                   help="ar1: deviations from each curve persist into the next periods "
                   "[independent]")
    g = p.add_argument_group("priors (see docs/many-series.md)")
    g.add_argument("--group-spread", type=float, default=10.0, metavar="PTS",
                   help="how far apart you believe the series' growth rates are, in "
                   "percentage points per period (half-normal scale); small values pool "
                   "harder [10]")
    g.add_argument("--growth", type=float, default=0.0, metavar="PCT",
                   help="centre of the group's growth per period in percent [0]")
    g.add_argument("--growth-give-or-take", type=float, default=30.0, metavar="PTS",
                   help="spread of the prior on the group's growth centre, in points [30]")
    g.add_argument("--initial-give-or-take", type=float, default=50.0, metavar="PCT",
                   help="each series' initial value: its first observation give or take "
                   "PCT%% [50]")
    g.add_argument("--noise", type=float, default=30.0, metavar="PCT",
                   help="typical deviation from each curve in percent [30]")
    add_quiet_option(p)
    add_accept_option(p)
    p.set_defaults(run=run, initial_value=None, reference_period=None)


def _read(args):
    from bayesgrowth.data.panel import quiet_read_panel

    panel, bad, notes = quiet_read_panel(
        args.file, series_col=args.series_col, period_col=args.period_col,
        value_col=args.value_col, decimal=args.decimal, fiscal_start=args.fiscal_start,
        sheet=args.sheet,
    )
    for text in notes:
        note(text)
    if bad:
        more = f"; {len(bad) - 1} more series refused" if len(bad) > 1 else ""
        raise UsageError(f"{bad[0][1]} (a pooled fit takes every series of the file{more})")
    if len(panel) < 2:
        raise UsageError(f"{args.file}: pooling needs at least 2 series in column "
                         f"{args.series_col!r}, found {len(panel)}; use 'forecast' for one")
    for series in panel.values():
        series.check_horizon(args.horizon)
    return panel


def _lines(fit, pf, axis) -> list[str]:
    from bayesgrowth.report.words import per_period

    g = fit.group_summary()
    c, s = g["growth_centre"], g["growth_spread"]
    lines = [
        f"{len(fit.series)} series fitted together (exponential curves, growth rates drawn "
        "from one group)",
        f"  group growth {per_period(axis)}: {fmt_percent(c['median'])} (95% interval "
        f"{fmt_percent(c['lower_95'])} to {fmt_percent(c['upper_95'])}); spread between "
        f"series {100 * s['median']:.1f} points (95% interval {100 * s['lower_95']:.1f} to "
        f"{100 * s['upper_95']:.1f})",
    ]
    growth = fit.summary()
    for row in growth.head(SHOWN).itertuples():
        last = pf.forecasts[row.series].table.iloc[-1]
        lines.append(
            f"  {row.series}: growth {fmt_percent(row.growth_median)} {per_period(axis)} "
            f"({row.n_observations} "
            f"observations); {last['period']}: median {fmt_number(last['median'])}, "
            + "; ".join(band_phrases(last.to_dict(), [80] if 80 in pf.forecasts[
                row.series].levels else [max(pf.forecasts[row.series].levels)]))
        )
    if len(growth) > SHOWN:
        lines.append(f"  ... and {len(growth) - SHOWN} more series in pooled_growth.csv")
    if pf.total is not None:
        last = pf.total.iloc[-1]
        lines.append(f"  group total {last['period']}: median {fmt_number(last['median'])}; "
                     + "; ".join(band_phrases(last.to_dict(), list(pf.forecasts[
                         next(iter(pf.forecasts))].levels))))
    else:
        lines.append(f"  no group total: {pf.note}")
    return lines


def _cautions(pf) -> list[str]:
    """Series that end earlier than the others, and means too large to be useful (once)."""
    from bayesgrowth.forecast.means import mean_caution

    out = [pf.ends_note] if pf.ends_note else []
    tables = ([("group total", pf.total)] if pf.total is not None else []) + [
        (repr(name), fc.table) for name, fc in pf.forecasts.items()]
    levels = next(iter(pf.forecasts.values())).levels
    means = [(where, text) for where, table in tables
             if (text := mean_caution(table, levels)) is not None]
    if means:
        more = f" (and {len(means) - 1} more)" if len(means) > 1 else ""
        out.append(f"{means[0][0]}{more}: {means[0][1]}")
    return out


def run(args) -> int:
    """Run ``pool``; returns the exit code."""
    import warnings

    from bayesgrowth.forecast.pooled import forecast_pooled
    from bayesgrowth.inference.pooled import fit_pooled
    from bayesgrowth.models.hierarchical import GroupPrior

    panel = _read(args)
    priors = priors_from_args(args)
    try:
        group = GroupPrior(growth_spread_pts=args.group_spread)
    except ValueError as exc:
        raise UsageError(f"--group-spread: {exc}") from None
    say(args, f"fitting {len(panel)} series of {args.file.name} together (NUTS sampler) ...")
    with staged_output(args.out, NAMES, [args.file], force=args.force) as stage:
        with warnings.catch_warnings():
            warnings.filterwarnings("ignore", "sampling diagnostics failed")
            try:
                fit = fit_pooled(panel, priors, group=group, errors=args.errors,
                                 seed=args.seed, draws=args.draws, tune=args.tune,
                                 chains=args.chains, progressbar=not args.quiet)
            except ValueError as exc:
                raise UsageError(f"{exc}") from None
        pf = forecast_pooled(fit, args.horizon, levels=args.levels, seed=args.seed)
        write_csv(pf.table, stage / "pooled_forecast.csv")
        write_csv(fit.summary(), stage / "pooled_growth.csv")
        if pf.total is not None:
            write_csv(pf.total, stage / "group_total.csv")
    axis = next(iter(panel.values())).axis
    for line in _lines(fit, pf, axis):
        print(line)
    if not fit.diagnostics.ok:
        print("  sampling checks: FAILED - " + "; ".join(fit.diagnostics.problems))
    from bayesgrowth.cli.cautions import panel_cautions, print_cautions

    last = max(s.t_last for s in panel.values())  # a series ending sooner goes further
    steps = {name: args.horizon + last - s.t_last for name, s in panel.items()}
    general = panel_cautions(panel, steps, model="exponential", errors=args.errors)
    print_cautions([*general[:-1], *_cautions(pf), general[-1]])
    written = [n for n in NAMES if n != "group_total.csv" or pf.total is not None]
    print(f"wrote {', '.join(written)} to {args.out}")
    return diagnostics_exit(args, list(fit.diagnostics.problems), args.out)
