"""Fit and forecast every series of a panel independently, resumably, on any executor."""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path

import pandas as pd

from bayesgrowth.batch.executors import Executor, LocalExecutor
from bayesgrowth.batch.store import RunStore
from bayesgrowth.batch.work import BatchSettings, SeriesOutcome, fit_chunk
from bayesgrowth.data.series import GrowthSeries

__all__ = ["BatchResult", "run_batch", "plan_chunks"]


@dataclass
class BatchResult:
    """What a batch run left in its output folder.

    Attributes
    ----------
    out : pathlib.Path
    forecast, summary, failures : pandas.DataFrame
        The merged tables, as written.
    n_fitted, n_skipped : int
        Series forecast in this run, and series forecast by an earlier run and skipped.
    """

    out: Path
    forecast: pd.DataFrame
    summary: pd.DataFrame
    failures: pd.DataFrame
    n_fitted: int = 0
    n_skipped: int = 0

    @property
    def ok(self) -> bool:
        """Whether every series of the input has a forecast."""
        return len(self.failures) == 0


def plan_chunks(series: list[GrowthSeries], workers: int, engine: str,
                chunk_size: int | None = None) -> list[list[GrowthSeries]]:
    """Split ``series`` into chunks of ``chunk_size`` (default automatic).

    Small enough to lose little on interruption and to keep every worker busy, large
    enough that scheduling costs little.
    """
    if chunk_size is None:
        cap = 25 if engine == "exact" else 4
        chunk_size = max(1, min(cap, math.ceil(len(series) / (4 * max(1, workers)))))
    return [series[i:i + chunk_size] for i in range(0, len(series), chunk_size)]


def pending_any(panel: dict[str, GrowthSeries], store: RunStore) -> bool:
    """Whether any series of ``panel`` is not finished in ``store``."""
    current = {name: s.fingerprint() for name, s in panel.items()}
    done = store.finished(current)
    return any(done.get(name) != fp for name, fp in current.items())


def _compile_before_fork(series: GrowthSeries, settings: BatchSettings) -> None:
    """Compile the batch's NUTS model here, so forked workers inherit it.

    Otherwise each worker would compile its own.
    """
    from bayesgrowth.batch.compiled import compiled_for
    from bayesgrowth.priors import Priors

    priors = settings.priors or Priors()
    resolved = priors.resolve(series)
    if not resolved.fixed_initial:
        compiled_for(priors, resolved, settings.padded_length, draws=settings.draws,
                     tune=settings.tune, chains=settings.chains, cores=settings.threads)


def run_batch(
    panel: dict[str, GrowthSeries],
    out_dir: str | Path,
    settings: BatchSettings,
    *,
    executor: Executor | None = None,
    read_failures: list[tuple[str, str]] | None = None,
    order: list[str] | None = None,
    protect: list[Path] | None = None,
    chunk_size: int | None = None,
    save_posteriors: bool = False,
    progress: bool = False,
    on_chunk: Callable[[list[SeriesOutcome]], None] | None = None,
) -> BatchResult:
    """Fit and forecast every series of ``panel``, writing the results into ``out_dir``.

    Parameters
    ----------
    panel : dict of str to GrowthSeries
        The series, by name (e.g. from :func:`bayesgrowth.data.panel.read_panel`).
    out_dir : path
        Output folder; a folder holding an earlier run with the same settings is
        resumed: its finished series are skipped.
    settings : BatchSettings
        Horizon, engine, seed, priors, sampler sizes, model options.
    executor : Executor, optional
        Default a :class:`~bayesgrowth.batch.executors.LocalExecutor` on all CPUs.
        The caller keeps ownership (and closes it).
    read_failures : list of (str, str), optional
        Series that failed validation, listed in ``failures.csv``.
    order : list of str, optional
        Every series name in input order; default the panel's order then the failures'.
    protect : list of Path, optional
        Files that must never be overwritten (the input file).
    chunk_size : int, optional
        Series per chunk; the unit of work that an interruption can lose.
    save_posteriors : bool
        Also write each series' posterior and forecast draws to ``posteriors/``.
    progress : bool
        Show a progress bar with the counts of finished and failed series.
    on_chunk : callable, optional
        Called with the outcomes of each chunk after it is recorded (a hook for
        progress reports; an exception it raises stops the run, keeping what is
        recorded).

    Returns
    -------
    BatchResult

    Examples
    --------
    >>> import tempfile
    >>> from pathlib import Path
    >>> import bayesgrowth as bg
    >>> out = Path(tempfile.mkdtemp()) / "batch"
    >>> result = bg.run_batch({"demo": bg.load_demo()}, out, bg.BatchSettings(horizon=2))
    >>> result.n_fitted, sorted(p.name for p in out.glob("*.csv"))
    (1, ['failures.csv', 'forecast.csv', 'summary.csv'])
    """
    read_failures = list(read_failures or [])
    if order is None:
        order = list(panel) + [n for n, _ in read_failures if n not in panel]
    own = executor is None
    executor = executor or LocalExecutor()
    store = RunStore(out_dir, settings.to_record(), protect or [])
    try:
        settings = _worker_settings(panel, settings, executor, store, save_posteriors)
        current = {name: s.fingerprint() for name, s in panel.items()}
        done = store.finished(current)
        pending = [s for name, s in panel.items() if done.get(name) != current[name]]
        skipped = len(panel) - len(pending)
        if pending:  # no finished-looking file of an earlier run beside this run's new ones
            store.clear_results([s.name for s in pending])
        chunks = plan_chunks(pending, executor.workers, settings.engine, chunk_size)
        bar = _progress_bar(len(panel), skipped) if progress else None
        try:
            results = executor.run(fit_chunk, chunks, settings)
            n_ok, failed = _record_results(results, chunks, store, on_chunk, bar)
        finally:
            if bar is not None:
                bar.close()
            if own:
                executor.close()
        forecast, summary, failures = store.merge(current, order, read_failures + failed)
    except BaseException:  # interrupted: the chunks in flight are lost, stop their workers
        executor.abort()
        raise
    finally:
        store.release()
    return BatchResult(
        out=store.out, forecast=forecast, summary=summary, failures=failures,
        n_fitted=n_ok, n_skipped=skipped,
    )


def _worker_settings(panel, settings: BatchSettings, executor: Executor, store: RunStore,
                     save_posteriors: bool) -> BatchSettings:
    """The settings the workers get: padded length, threads and where posteriors go."""
    padded = 0
    if settings.engine == "nuts" and panel:
        from bayesgrowth.batch.compiled import padded_length

        padded = padded_length(max(s.n for s in panel.values()))
    threads = 1 if executor.workers > 1 else min(settings.chains, 2)
    settings = BatchSettings(
        **{**settings.__dict__, "padded_length": padded, "threads": threads,
           "posterior_dir": str(store.posterior_dir()) if save_posteriors else None}
    )
    if (settings.uses_compiled_nuts() and isinstance(executor, LocalExecutor)
            and executor.workers > 1 and pending_any(panel, store)):
        _compile_before_fork(next(iter(panel.values())), settings)
    return settings


def _progress_bar(total: int, initial: int):
    from tqdm import tqdm

    class _Bar(tqdm):
        monitor_interval = 0  # no monitor thread: worker processes are forked

    bar = _Bar(total=total, initial=initial, unit="series", desc="batch", dynamic_ncols=True)
    bar.set_postfix(finished=0, failed=0)
    return bar


def _record_results(results, chunks, store: RunStore, on_chunk, bar) -> tuple[int, list]:
    """Record each chunk's outcomes as it finishes; the fitted count and the failures."""
    failed: list[tuple[str, str]] = []
    n_ok = 0
    for i, outcome in results:
        if isinstance(outcome, BaseException):
            reason = (f"worker failed: {type(outcome).__name__}: {outcome}; "
                      "run the batch again to retry")
            failed.extend((s.name, f"{s.name}: {reason}") for s in chunks[i])
        else:
            store.write_chunk(outcome)
            bad = [(o.name, o.failure) for o in outcome if o.failure is not None]
            failed.extend(bad)
            n_ok += len(outcome) - len(bad)
            if on_chunk is not None:
                on_chunk(outcome)
        if bar is not None:
            bar.set_postfix(finished=n_ok, failed=len(failed), refresh=False)
            bar.update(len(chunks[i]))
    return n_ok, failed
