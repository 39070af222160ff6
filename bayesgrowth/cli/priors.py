"""``bayesgrowth priors`` and ``sensitivity``: check the priors before and after fitting.

``priors`` draws from the priors alone (no fit) and shows what they imply about
the history and the forecast; ``sensitivity`` refits with each prior varied in
turn and shows how far the forecast at the horizon moves.
"""

from __future__ import annotations

from pathlib import Path

from bayesgrowth.cli.common import (
    UsageError,
    add_input,
    add_model_options,
    checked_model_options,
    model_options_from_args,
    priors_from_args,
    read_input,
    say,
)
from bayesgrowth.cli.output import add_force_option, staged_output
from bayesgrowth.cli.text import add_unit_option, unit_from_args
from bayesgrowth.data.export import write_csv
from bayesgrowth.report.words import fmt_interval, fmt_number

__all__ = ["add_parsers", "prior_lines", "sensitivity_lines"]

PRIOR_NAMES = ["prior_predictive.csv", "prior_predictive.png"]
SENSITIVITY_NAMES = ["prior_sensitivity.csv", "prior_sensitivity.png"]

#: Below this share of observed values inside the widest prior band, the priors are said
#: to contradict the data (common practice, no single source: a prior predictive band
#: should hold nearly all of the history).
CONTRADICTS = 0.5
#: A factor whose medians span less than this share of the base band's width is said to
#: move the forecast little (common practice, no single source).
LITTLE = 0.25


def add_parsers(sub) -> None:
    """Register the ``priors`` and ``sensitivity`` subcommands."""
    p = sub.add_parser(
        "priors",
        help="show what the priors imply before fitting (prior predictive check)",
        description="Draw the model's parameters from the priors alone, without fitting "
        "FILE, and show the values they imply over the history and the next periods. "
        "Good priors hold the observed values inside their bands and allow every outcome "
        "you find plausible; bands that miss the data or reach absurd values show a "
        "prior option to change. Writes prior_predictive.csv and prior_predictive.png.",
    )
    _common(p)
    p.add_argument("--prior-draws", type=int, default=4000, metavar="N",
                   help="draws from the priors [4000]")
    p.set_defaults(run=run_priors)
    s = sub.add_parser(
        "sensitivity",
        help="refit with each prior varied in turn: how much does the forecast depend on them?",
        description="Fit FILE again for each of several settings of one prior at a time "
        "(how firmly the initial value is anchored, the centre and the spread of the growth "
        "prior and, for the logistic and Gompertz curves, the ceiling), the others kept at "
        "your options, and show the forecast for the last period of the horizon under each. "
        "A forecast that barely moves is driven by the data; one that follows a prior "
        "rests on that prior. Writes prior_sensitivity.csv and prior_sensitivity.png.",
    )
    _common(s)
    s.set_defaults(run=run_sensitivity)


def _common(p) -> None:
    add_input(p)
    add_model_options(p)
    add_unit_option(p)
    p.add_argument("--out", type=Path, required=True, help="output folder")
    add_force_option(p)


def _model(args, series) -> dict:
    """The model options as the library functions take them (seasons decided for ``series``)."""
    from bayesgrowth.models.spec import resolve_seasonal

    checked_model_options(args, (args.engine,))
    options = model_options_from_args(args)
    try:
        options["seasonal"] = resolve_seasonal(options["seasonal"], series.axis, series.t,
                                               options["model"])
    except ValueError as exc:
        raise UsageError(f"--seasonal: {exc}") from None
    return options


def _save(ax_or_axes, path: Path) -> None:
    import matplotlib.pyplot as plt
    import numpy as np

    fig = np.atleast_1d(np.asarray(ax_or_axes, dtype=object))[0].figure
    fig.savefig(path, dpi=110)
    plt.close(fig)


def prior_lines(prior) -> list[str]:
    """What a prior predictive check shows, in words.

    Parameters
    ----------
    prior : PriorPredictive

    Returns
    -------
    list of str
    """
    top = max(prior.levels)
    tab = prior.table
    hist = tab[tab["part"] == "history"].dropna(subset=["observed"])
    inside = ((hist["observed"] >= hist[f"lower_{top}"])
              & (hist["observed"] <= hist[f"upper_{top}"]))
    last = tab.iloc[-1]
    lines = [
        f"{prior.series.name}: what the priors alone imply, before the values are used "
        f"({prior.spec.label()})",
        f"  history: {int(inside.sum())} of {len(hist)} observed values inside the {top}% "
        "prior band",
        f"  {last['period']}: {top}% prior band "
        f"{fmt_interval(last[f'lower_{top}'], last[f'upper_{top}'])}, median "
        f"{fmt_number(last['median'])}",
    ]
    if len(hist) and inside.mean() < CONTRADICTS:
        lines.append(f"warning: most observed values lie outside the {top}% prior band: the "
                     "priors contradict the data; widen them (e.g. --growth-give-or-take, "
                     "--initial-give-or-take) or recentre them")
    else:
        lines.append(f"  reading: the priors allow the observed values; a wide band "
                     f"in {last['period']} is expected (the data narrow it), but a band "
                     "reaching values you find absurd calls for a narrower prior")
    from bayesgrowth.forecast.means import mean_caution

    means = mean_caution(tab, prior.levels)  # the csv's mean column, empty where too large
    return lines + ([f"caution: {means}"] if means else [])


def run_priors(args) -> int:
    """Run ``priors``; returns the exit code."""
    import matplotlib

    matplotlib.use("Agg")
    from bayesgrowth.forecast.prior import prior_predictive
    from bayesgrowth.plots.models import plot_prior_predictive

    series = read_input(args)
    series.check_horizon(args.horizon)
    if args.prior_draws < 100:
        raise UsageError(f"--prior-draws {args.prior_draws}: give at least 100 draws")
    priors = priors_from_args(args)
    options = _model(args, series)
    say(args, f"drawing {args.prior_draws} times from the priors of {series.name} ...")
    with staged_output(args.out, PRIOR_NAMES, [args.file], force=args.force) as stage:
        try:
            prior = prior_predictive(series, args.horizon, priors=priors, levels=args.levels,
                                     draws=args.prior_draws, seed=args.seed, **options)
        except ValueError as exc:
            raise UsageError(f"prior options: {exc}") from None
        write_csv(prior.table, stage / "prior_predictive.csv")
        _save(plot_prior_predictive(prior, unit=unit_from_args(args)),
              stage / "prior_predictive.png")
    for line in prior_lines(prior):
        print(line)
    print(f"wrote {', '.join(PRIOR_NAMES)} to {args.out}")
    return 0


def sensitivity_lines(result) -> list[str]:
    """How far the forecast moves with each prior, in words.

    Parameters
    ----------
    result : SensitivityResult

    Returns
    -------
    list of str
    """
    tab, lev = result.table, result.level
    base = tab[tab["is_base"]].iloc[0]
    width = float(base[f"upper_{lev}"] - base[f"lower_{lev}"])
    lines = [
        f"{result.series_name}: forecast for {result.period} as each prior varies "
        f"({result.model})",
        f"  your priors: median {fmt_number(base['median'])}, {lev}% band "
        f"{fmt_interval(base[f'lower_{lev}'], base[f'upper_{lev}'])}",
    ]
    for factor, rows in tab.groupby("factor", sort=False):
        lo, hi = rows["median"].min(), rows["median"].max()
        share = (hi - lo) / width if width > 0 else float("inf")
        verdict = ("moves it little: the data decide" if share < LITTLE else
                   f"moves it by {share:.0%} of the band's width: this prior matters")
        settings = f"from {rows['setting'].iloc[0]} to {rows['setting'].iloc[-1]}"
        lines.append(f"  {factor} ({settings}): median {fmt_interval(lo, hi)}; {verdict}")
    if not tab["diagnostics_ok"].all():
        lines.append("warning: sampling diagnostics failed for some settings (column "
                     "diagnostics_ok); their rows are doubtful")
    return lines


def run_sensitivity(args) -> int:
    """Run ``sensitivity``; returns the exit code."""
    import matplotlib

    matplotlib.use("Agg")
    from bayesgrowth.forecast.sensitivity import prior_sensitivity
    from bayesgrowth.plots.models import plot_sensitivity

    series = read_input(args)
    series.check_horizon(args.horizon)
    priors = priors_from_args(args)
    options = _model(args, series)
    level = 80 if 80 in args.levels else max(args.levels)
    settings = {"draws": args.draws, "chains": args.chains}
    if args.engine == "nuts":
        settings["progressbar"] = False
        if args.target_accept is not None:
            settings["target_accept"] = args.target_accept
    say(args, f"fitting {series.name} once per prior setting ({args.engine} engine) ...")
    with staged_output(args.out, SENSITIVITY_NAMES, [args.file], force=args.force) as stage:
        try:
            result = prior_sensitivity(series, args.horizon, priors=priors, engine=args.engine,
                                       level=level, seed=args.seed, **options, **settings)
        except ValueError as exc:
            raise UsageError(f"{exc}") from None
        from bayesgrowth.report.words import per_period

        # Growth centres in the calendar's words ("5% per quarter").
        result.table["setting"] = result.table["setting"].str.replace(
            "% per period", f"% {per_period(series.axis)}", regex=False)
        write_csv(result.table, stage / "prior_sensitivity.csv")
        _save(plot_sensitivity(result), stage / "prior_sensitivity.png")
    for line in sensitivity_lines(result):
        print(line)
    from bayesgrowth.cli.cautions import forecast_cautions, print_cautions

    print_cautions(forecast_cautions(series, args.horizon, options["model"], options["errors"]))
    print(f"wrote {', '.join(SENSITIVITY_NAMES)} to {args.out}")
    from bayesgrowth.cli.acceptance import diagnostics_exit

    failed = [f"setting {r.factor}: {r.setting}" for r in result.table.itertuples()
              if not r.diagnostics_ok]
    return diagnostics_exit(args, failed, args.out)
