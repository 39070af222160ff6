"""``--recalibrate`` for ``forecast``, ``demo`` and ``batch``: bands corrected by a backtest.

The option runs a rolling-origin backtest of the chosen model on each series' own
history (first training set ``--min-train`` points, by default half the history; the
backtest's horizon is ``--horizon``) and applies the quantile recalibration map learned
from its outcomes (:mod:`bayesgrowth.backtest.recalibrate`). ``batch`` learns one map
per frequency from every series' backtest together and applies it to each series.
"""

from __future__ import annotations

import argparse
from pathlib import Path

from bayesgrowth.cli.common import UsageError, _positive_int, note, say, whole_range
from bayesgrowth.cli.progress import show_bars
from bayesgrowth.config import PREDICTIVE_DRAWS
from bayesgrowth.data.series import MIN_OBSERVATIONS

__all__ = [
    "add_recalibrate_options",
    "backtest_chunk",
    "check_batch_out",
    "check_min_train",
    "panel_recalibration",
    "recalibrate_forecast",
    "recalibration_line",
]

#: The band level whose backtest coverage the printed line reports.
REPORTED_LEVEL = 80
#: Predictive draws per backtest forecast in a batch (the PIT's resolution is one over it).
BACKTEST_DRAWS = PREDICTIVE_DRAWS
#: Fewest observations ``--recalibrate`` can backtest: the smallest first training set
#: and two origins after it (:data:`bayesgrowth.backtest.recalibrate.MIN_ORIGINS`).
SHORTEST_RECALIBRATED = MIN_OBSERVATIONS + 2


def add_recalibrate_options(p: argparse.ArgumentParser, *, panel: bool = False) -> None:
    """Register ``--recalibrate`` and ``--min-train``."""
    where = ("every series' backtest pooled per frequency" if panel else
             "the backtest of this series")
    p.add_argument(
        "--recalibrate", action="store_true",
        help="backtest the model on the history (rolling origins) and correct the bands by "
        f"how its forecasts missed there, learned from {where} (quantile recalibration, "
        "shrunk towards no change when outcomes are few); the output says from how many "
        "outcomes",
    )
    p.add_argument(
        "--min-train", type=_positive_int, default=None, metavar="N",
        help="with --recalibrate: training points at the backtest's first origin "
        f"[half the history, at least {MIN_OBSERVATIONS}]",
    )


def check_min_train(args, n: int, name: str | None = None) -> int | None:
    """The backtest's first training size for a series of ``n`` points, or ``None``.

    Raises
    ------
    UsageError
        If ``--min-train`` is given without ``--recalibrate``, is below 3, or leaves
        fewer than two points to backtest on.
    """
    if not getattr(args, "recalibrate", False):
        if getattr(args, "min_train", None) is not None:
            raise UsageError("--min-train: only with --recalibrate")
        return None
    from bayesgrowth.backtest.recalibrate import MIN_ORIGINS, default_min_train

    min_train = default_min_train(n) if args.min_train is None else int(args.min_train)
    if min_train < MIN_OBSERVATIONS:
        raise UsageError(f"--min-train {min_train}: must be at least {MIN_OBSERVATIONS}")
    where = f"series {name!r} has" if name else "the series has"
    if n < SHORTEST_RECALIBRATED:
        raise UsageError(f"--recalibrate: {where} {n} observations, too short for its "
                         f"backtest; {too_short_reason()}")
    if n - min_train < MIN_ORIGINS:
        raise UsageError(
            f"--recalibrate: {where} {n} observations, and a backtest with --min-train "
            f"{min_train} leaves {max(n - min_train, 0)} to score (it needs {MIN_ORIGINS}); "
            f"give a --min-train {whole_range(MIN_OBSERVATIONS, n - MIN_ORIGINS)}"
        )
    return min_train


def too_short_reason() -> str:
    """Why a series shorter than :data:`SHORTEST_RECALIBRATED` cannot be recalibrated."""
    from bayesgrowth.backtest.recalibrate import MIN_ORIGINS

    return (f"it needs at least {SHORTEST_RECALIBRATED} (a first training set of "
            f"{MIN_OBSERVATIONS} and {MIN_ORIGINS} more to score); leave out "
            "--recalibrate")


def recalibrate_forecast(args, fc, min_train: int):
    """Backtest the forecast's model on its series and return the recalibrated forecast."""
    import warnings

    from bayesgrowth.backtest.recalibrate import recalibrate

    series = fc.fit.series
    say(args, f"recalibrating: backtest of the same model from {series.n - min_train} "
        f"origin(s), first training set {min_train} points ...")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")  # per-origin diagnostics: the forecast's own are shown
        try:
            return recalibrate(fc, min_train=min_train, progress=show_bars(args))
        except ValueError as exc:
            raise UsageError(f"--recalibrate: {exc}") from None


def recalibration_line(info: dict, prefix: str = "  ") -> str:
    """One printed line: bands recalibrated, from how many outcomes, and the backtest's miss."""
    eff = info.get("effective_n") or [0.0]
    held = info.get("backtest_coverage", {}).get(str(REPORTED_LEVEL))
    miss = (f"; before, {REPORTED_LEVEL}% bands held {held:.0%} of them" if held is not None
            else "")
    return (f"{prefix}bands recalibrated from {info['n_outcomes']} backtest outcomes "
            f"({info.get('where', 'rolling origins')}; effective number per step "
            f"{min(eff):.0f}-{max(eff):.0f}){miss}")


def backtest_chunk(chunk: list, settings) -> list:
    """Backtest each series of ``chunk`` for a pooled map; runs in the batch's workers.

    Parameters
    ----------
    chunk : list of (GrowthSeries, int, int)
        Series, the first training size of its backtest, and its seed.
    settings : BatchSettings
        The batch's model and engine settings.

    Returns
    -------
    list of (str, pandas.DataFrame or str)
        Per series its name and its outcomes (``step``, ``pit``), or the reason it
        gave none.
    """
    import warnings

    from bayesgrowth.backtest import backtest
    from bayesgrowth.backtest.recalibrate import outcomes_of

    out = []
    for series, min_train, seed in chunk:
        options, n_draws = dict(settings.model_options), BACKTEST_DRAWS
        if settings.engine == "nuts":
            options.update(draws=settings.draws, chains=settings.chains, tune=settings.tune)
            n_draws = min(n_draws, settings.draws * settings.chains)
        try:
            with warnings.catch_warnings():
                warnings.simplefilter("ignore")
                result = backtest(series, methods=(settings.engine,), horizon=settings.horizon,
                                  min_train=min_train, seed=seed,
                                  priors=settings.priors, model_options=options,
                                  n_draws=n_draws)
            rows = outcomes_of(result)[["step", "pit"]]
            out.append((series.name, rows.astype({"step": int, "pit": float})))
        except Exception as exc:  # one series' backtest must not stop the batch
            out.append((series.name, f"{type(exc).__name__}: {exc}"))
    return out


def check_batch_out(out: Path, protect: list[Path]) -> None:
    """The batch folder checks that need no settings, before the backtests' work.

    The same refusals as :class:`bayesgrowth.batch.store.RunStore`, without creating
    anything (the store's record needs the maps, so it comes after them).
    """
    from bayesgrowth.batch.store import OUTPUTS, STATE_DIR

    if out.exists() and not out.is_dir():
        raise UsageError(f"--out {out}: exists and is not a folder; name a folder")
    if not out.resolve().parent.is_dir():
        raise UsageError(f"--out {out}: parent folder {out.resolve().parent} does not exist")
    protected = {p.resolve() for p in protect}
    for name in OUTPUTS:
        if (out / name).resolve() in protected:
            raise UsageError(f"--out {out}: writing {name} there would overwrite the input "
                             "file; choose another folder")
        if (out / name).exists() and not (out / STATE_DIR / "run.json").exists():
            raise UsageError(f"--out {out}: holds {name} that no batch run wrote there; "
                             "choose another folder so it is not overwritten")


def _backtest_plan(args, panel: dict, settings) -> list[list]:
    from bayesgrowth.backtest.recalibrate import MIN_ORIGINS, default_min_train
    from bayesgrowth.seeds import series_seed

    if args.min_train is not None and args.min_train < MIN_OBSERVATIONS:
        raise UsageError(f"--min-train {args.min_train}: must be at least {MIN_OBSERVATIONS}")
    jobs = []
    for name, s in panel.items():
        mt = default_min_train(s.n) if args.min_train is None else int(args.min_train)
        if s.n - mt >= MIN_ORIGINS:
            jobs.append((s, mt, series_seed(settings.seed, name)))
    if panel and not jobs:
        longest = max(s.n for s in panel.values())
        if longest < SHORTEST_RECALIBRATED:
            raise UsageError(f"--recalibrate: every series is too short for its backtest (the "
                             f"longest has {longest} observations); {too_short_reason()}")
        raise UsageError(
            f"--recalibrate: no series is long enough for a backtest with --min-train "
            f"{args.min_train or 'half the history'} (the longest has {longest} observations); "
            f"give a --min-train {whole_range(MIN_OBSERVATIONS, longest - MIN_ORIGINS)}"
        )
    size = max(1, min(10, -(-len(jobs) // 8)))
    return [jobs[i:i + size] for i in range(0, len(jobs), size)]


def panel_recalibration(args, panel: dict, settings, executor) -> dict:
    """Backtest every long-enough series and learn one map per frequency from them all.

    Returns
    -------
    dict
        ``{frequency: (QuantileMap, source)}`` for :class:`BatchSettings`; the source
        names the series pooled and their coverage before recalibration.
    """
    import pandas as pd

    from bayesgrowth.backtest.recalibrate import pooled_source
    from bayesgrowth.forecast.recalibration_map import learn_map

    chunks = _backtest_plan(args, panel, settings)
    n_jobs = sum(len(c) for c in chunks)
    say(args, f"recalibrating: backtests of {n_jobs} of {len(panel)} series ...")
    rows: dict[str, list] = {}
    failed = []
    results = executor.run(backtest_chunk, chunks, settings)
    if show_bars(args):
        from tqdm import tqdm

        class _Bar(tqdm):
            monitor_interval = 0  # no monitor thread: worker processes are forked

        results = _Bar(results, total=len(chunks), desc="backtests", unit="chunk")
    for i, result in results:
        if isinstance(result, BaseException):
            failed.extend(s.name for s, _, _ in chunks[i])
            continue
        for name, got in result:
            if isinstance(got, str):
                failed.append(name)
            else:
                rows.setdefault(panel[name].axis.frequency, []).append(got)
    if failed:
        note(f"{len(failed)} series gave no backtest (first {failed[0]!r}); the others' maps "
             "apply to them")
    maps = {}
    for freq, frames in rows.items():
        pooled = pd.concat(frames, ignore_index=True)
        pit = pooled["pit"].to_numpy(dtype=float)
        qmap = learn_map(pit, pooled["step"].to_numpy(dtype=int), horizon=settings.horizon,
                         pit_floor=0.5 / BACKTEST_DRAWS)
        maps[freq] = (qmap, pooled_source(freq, len(frames), pit, settings.levels))
    if not maps:
        raise UsageError("--recalibrate: no series gave backtest outcomes to learn from; "
                         "check the series (or run without --recalibrate)")
    return maps
