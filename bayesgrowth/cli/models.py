"""``bayesgrowth models``: fit several growth curves, compare them by PSIS-LOO, average them."""

from __future__ import annotations

import argparse
import time

from bayesgrowth.cli.acceptance import diagnostics_exit
from bayesgrowth.cli.common import (
    UsageError,
    add_input,
    add_model_options,
    fmt_number,
    model_options_from_args,
    priors_from_args,
    read_input,
    say,
)
from bayesgrowth.cli.output import add_force_option, staged_output
from bayesgrowth.cli.text import add_unit_option, unit_from_args
from bayesgrowth.data.export import write_csv
from bayesgrowth.display import fmt_weight
from bayesgrowth.report.words import band_phrases, period_words

__all__ = ["add_parser", "run"]

NAMES = ["model_comparison.csv", "averaged_forecast.csv", "models.png"]
#: Columns of model_comparison.csv written to three decimals.
WEIGHT_COLUMNS = ("weight", "weight_lower_90", "weight_upper_90")

#: Printed with every comparison: what LOO weights do and do not measure.
CURVE_CAUTION = (
    "Curves that agree over the history can part far beyond it. LOO and the stacking weights "
    "measure how well each model predicts the observed periods one at a time, not how well it "
    "extrapolates; a long horizon rests on the assumption that the chosen curves describe the "
    "future, which no fit to the past can check (backtest to see how the bands held up)."
)


def slow_by_default() -> tuple[str, ...]:
    """Curves left out unless named: the families that do not declare ``compare_by_default``.

    The local trend's NUTS fit is the slowest; it took minutes until its
    coefficients were integrated out, and takes about 10-25 s on the demo now.
    Whether to include it by default is an open question (see docs/choosing-models.md).
    """
    from bayesgrowth.models import registry

    return tuple(f.name for f in registry.families() if not f.compare_by_default)


def add_parser(sub) -> None:
    """Register the ``models`` subcommand."""
    from bayesgrowth.select.averaging import registered_models

    available = ", ".join(registered_models())
    p = sub.add_parser(
        "models",
        help="fit several growth curves, compare them by PSIS-LOO and average their forecasts",
        description="Fit each growth curve to FILE, compare them by PSIS-LOO (with Pareto-k "
        "checks), weigh them by stacking and forecast from the weighted mixture of their "
        "predictive draws. Writes model_comparison.csv, averaged_forecast.csv and models.png. "
        f"Curves available: {available}.",
    )
    add_input(p)
    add_model_options(p)
    add_unit_option(p)
    for action in p._actions:  # one curve per fit does not apply here: --models names them
        if "--model" in action.option_strings:
            action.help = argparse.SUPPRESS
            action.default = None
    p.add_argument("--out", required=True, help="output folder")
    add_force_option(p)
    p.add_argument(
        "--models",
        default=None,
        metavar="LIST",
        help=f"comma-separated curves to compare, from {available} (default: the default "
        f"model, with the shared options) [all but "
        f"{', '.join(slow_by_default())}]. With --engine exact the curves an exact engine "
        f"fits ({', '.join(exact_families())}) use it and the others NUTS",
    )
    p.set_defaults(run=run)


def exact_families() -> tuple[str, ...]:
    """The families an exact engine fits (with normal noise; the errors each allows differ)."""
    from bayesgrowth.models import registry

    return tuple(f.name for f in registry.families() if f.exact_engine is not None)


def _model_list(text: str | None) -> list[str]:
    from bayesgrowth.config import DEFAULT_MODEL
    from bayesgrowth.models.spec import ModelSpec
    from bayesgrowth.select.averaging import registered_models

    known = registered_models()
    if text is None:
        return [m for m in known if m not in slow_by_default()]
    names = []
    for raw in text.split(","):
        raw = raw.strip()
        if not raw:
            continue
        if raw == "default":  # as in backtest --models: the default model's family
            raw = DEFAULT_MODEL["model"]
        try:
            name = ModelSpec(model=raw).model
        except ValueError:
            name = raw
        if name not in known:
            raise UsageError(f"--models: unknown model {raw!r}; available: {', '.join(known)} "
                             f"(default: {DEFAULT_MODEL['model']})")
        if name in names:
            raise UsageError(f"--models: {name} is named twice")
        names.append(name)
    if not names:
        raise UsageError(f"--models: name at least one of {', '.join(known)}")
    return names


def _spec_options(args) -> dict:
    """Error structure, noise, seasons and drift: shared by every curve compared."""
    options = model_options_from_args(args)
    options.pop("model", None)
    return options


def _spec(name: str, series, spec_options: dict):
    """The model ``name`` with the shared options, its seasons resolved for ``series``."""
    from bayesgrowth.models.spec import ModelSpec, resolve_seasonal

    seasonal = resolve_seasonal(spec_options["seasonal"], series.axis, series.t, name)
    return ModelSpec(model=name, **{**spec_options, "seasonal": seasonal})


def engine_of(name: str, series, spec_options: dict, engine: str) -> str:
    """The engine ``fit_models`` uses for ``name``: exact wherever an exact engine fits it."""
    return "exact" if engine == "auto" and _spec(name, series, spec_options).exact_fits else "nuts"


def _check_models(names: list[str], series, priors, spec_options: dict, engine: str) -> None:
    """Refuse, before any fitting, combinations the models cannot take."""
    from bayesgrowth.models.spec import season_index

    try:
        resolved = priors.resolve(series)
    except ValueError as exc:
        raise UsageError(f"prior options: {exc}") from None
    for name in names:
        try:
            spec = _spec(name, series, spec_options)
            if spec.seasonal:
                season_index(series.axis, series.t)
        except ValueError as exc:
            raise UsageError(f"--models {name}: {exc}") from None
        if engine == "nuts" and spec.adaptive:
            raise UsageError(
                f"--models {name} with --engine nuts: --drift adaptive needs the exact "
                "engine; choose --drift random-walk or mean-reverting, or --engine exact"
            )
        if spec.family.states and resolved.t_ref != int(series.t[0]):
            raise UsageError(
                f"--models {name}: the {name} model anchors its level at the first "
                f"observation; leave --reference-period unset or drop {name}"
            )


def _table_lines(table) -> list[str]:
    head = (f"{'rank':<5}{'model':<14}{'elpd_loo':>10}{'se':>7}{'elpd_diff':>11}{'dse':>7}"
            f"{'p_loo':>7}{'weight':>8}{'(90% interval)':>20}{'max k':>7}")
    lines = [head]
    for r in table.itertuples():
        flag = "" if r.diagnostics_ok else "  (diagnostics failed)"
        spread = f"({fmt_weight(r.weight_lower_90)} to {fmt_weight(r.weight_upper_90)})"
        lines.append(
            f"{r.rank:<5}{r.model:<14}{r.elpd_loo:>10.1f}{r.se:>7.1f}{r.elpd_diff:>11.1f}"
            f"{r.dse:>7.1f}{r.p_loo:>7.1f}{fmt_weight(r.weight):>8}{spread:>20}"
            f"{r.max_pareto_k:>7.2f}"
            f"{flag}"
        )
    return lines


def run(args) -> int:
    """Run ``models``; returns the exit code."""
    from pathlib import Path

    from bayesgrowth.forecast.forecast import CAUTION
    from bayesgrowth.select.averaging import fit_models, model_average

    if getattr(args, "model", None) is not None:
        raise UsageError("models compares the curves named by --models; --model does not apply")
    series = read_input(args)
    names = _model_list(args.models)
    priors = priors_from_args(args)
    spec_options = _spec_options(args)
    engine = "auto" if args.engine == "exact" else "nuts"
    _check_models(names, series, priors, spec_options, engine)
    settings = {"draws": args.draws, "chains": args.chains}
    start = time.monotonic()

    def progress(name):
        say(args, f"fitting {name} ({engine_of(name, series, spec_options, engine)} engine) "
                  f"to {series.name} ... "
                  f"[{time.monotonic() - start:.0f} s]")

    with staged_output(Path(args.out), NAMES, [args.file], force=args.force) as stage:
        fits = fit_models(series, names, engine=engine, seed=args.seed, priors=priors,
                          on_fit=progress, **spec_options, **settings)
        ma = model_average(fits, args.horizon, levels=args.levels, seed=args.seed)
        table = ma.comparison.table
        # weights to 3 decimals: an optimiser's 1e-17 for "none" is no figure to read
        write_csv(table.round({c: 3 for c in WEIGHT_COLUMNS}), stage / "model_comparison.csv")
        write_csv(ma.averaged.table, stage / "averaged_forecast.csv")
        _save_plot(ma, stage / "models.png", level=_plot_level(args.levels),
                   unit=unit_from_args(args))
    comp, avg = ma.comparison, ma.averaged
    print(f"{series.name}: {len(names)} model(s) compared by PSIS-LOO "
          f"({series.n} observations); higher elpd_loo predicts the observed periods better")
    for line in _table_lines(table):
        print(line)
    for line in comp.reading():
        print(line)
    if len(names) > 1:
        print(comp.weights_reading())
    for msg in comp.messages():
        print(f"warning: {msg}")
    for name, why in ma.excluded.items():
        print(f"warning: {name} left out of the comparison and the average: its sampling "
              f"checks failed ({why})")
    row = avg.table.iloc[-1]
    mixture = ", ".join(f"{m} {w:.0%}" for m, w in comp.weights.items() if w >= 0.005)
    final = period_words(row["period"], series.axis)
    print(f"model-averaged forecast for {final} (mixed by weight: {mixture}): "
          + "; ".join([f"median {fmt_number(row['median'])}",
                       *band_phrases(row.to_dict(), avg.levels)]))
    for caution in (avg.caution, CURVE_CAUTION, CAUTION):
        if caution:
            print(f"caution: {caution}")
    print(f"wrote {', '.join(NAMES)} to {args.out}")
    failed = [f"{m}: diagnostics failed" for m, ok in zip(table["model"], table["diagnostics_ok"],
                                                          strict=True) if not ok]
    failed += [f"{m}: diagnostics failed, left out" for m in ma.excluded]
    return diagnostics_exit(args, failed, args.out)


def _plot_level(levels) -> int:
    return 80 if 80 in levels else max(levels)


def _save_plot(ma, path, *, level: int, unit: str | None = None) -> None:
    import matplotlib

    matplotlib.use("Agg")
    import matplotlib.pyplot as plt

    from bayesgrowth.plots.models import plot_model_bands

    ax = plot_model_bands(ma.forecasts, ma.averaged, level=level, unit=unit,
                          comparison=ma.comparison)
    ax.figure.savefig(path, dpi=110)
    plt.close(ax.figure)
