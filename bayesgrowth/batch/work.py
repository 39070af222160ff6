"""The work of one series and of one chunk of series; runs in the worker processes.

Everything here is a top-level function of picklable arguments so that any
executor (a local process pool, a Dask cluster) can run it. A worker returns
small tables only (forecast rows and one summary row per series); posteriors are
written to files by the worker itself when asked, never sent back.
"""

from __future__ import annotations

import hashlib
import re
import warnings
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from bayesgrowth.config import (
    DEFAULT_CHAINS,
    DEFAULT_DRAWS,
    DEFAULT_LEVELS,
    DEFAULT_MODEL,
    DEFAULT_TUNE,
)
from bayesgrowth.data.export import atomic_write
from bayesgrowth.data.series import GrowthSeries, InputError
from bayesgrowth.priors import Priors

__all__ = ["BatchSettings", "SeriesOutcome", "fit_chunk", "fit_one", "posterior_file_name"]

#: Summary columns, in order.
SUMMARY_COLUMNS = [
    "series", "n_observations", "first_period", "last_period", "reference_period",
    "initial_value_median", "initial_value_lower_95", "initial_value_upper_95",
    "growth_median", "growth_lower_95", "growth_upper_95",
    "diagnostics_ok", "max_rhat", "min_ess_bulk", "divergences", "engine", "seed",
]


@dataclass(frozen=True)
class BatchSettings:
    """Everything a worker needs to fit and forecast one series, the same for all series.

    Parameters
    ----------
    horizon : int
        Future periods to forecast.
    engine : {"exact", "nuts"}
    seed : int
        Global seed; each series' seed is derived from it and the series name.
    levels : tuple of int
        Band levels in percent.
    priors : Priors, optional
    draws, chains, tune : int
        Posterior draws per chain, chains, and NUTS tuning steps per chain.
    model_options : dict
        Further options of :func:`bayesgrowth.inference.fit_series` (``model``,
        ``errors``, ...); by default the recommended model
        (:data:`bayesgrowth.config.DEFAULT_MODEL`), and its choices fill in what a dict
        given leaves out. On NUTS, any but the plain exponential model fits series one
        by one.
    padded_length : int
        Length the compiled NUTS model is padded to (from the whole batch, so that it
        does not depend on which series a worker meets first).
    posterior_dir : str, optional
        Folder for per-series posterior files; ``None`` saves none.
    threads : int
        Threads a NUTS fit may use for its chains.
    recalibration : dict, optional
        Per frequency, a recalibration map and where it was learned,
        ``{frequency: (QuantileMap, source)}``
        (:func:`bayesgrowth.forecast.recalibrated.apply_map`); each forecast is
        recalibrated with its frequency's map. ``None`` recalibrates nothing.
    """

    horizon: int
    engine: str = "exact"
    seed: int = 1
    levels: tuple[int, ...] = DEFAULT_LEVELS
    priors: Priors | None = None
    draws: int = DEFAULT_DRAWS
    chains: int = DEFAULT_CHAINS
    tune: int = DEFAULT_TUNE
    model_options: dict = field(default_factory=dict)
    padded_length: int = 0
    posterior_dir: str | None = None
    threads: int = 1
    recalibration: dict | None = None

    def __post_init__(self) -> None:
        # the recommended model fills in what the options leave out, once for every use
        object.__setattr__(self, "model_options", {**DEFAULT_MODEL, **self.model_options})

    def to_record(self) -> dict:
        """The settings that decide the results, JSON-ready (to check a resumed run)."""
        from dataclasses import asdict

        record = {
            "horizon": self.horizon, "engine": self.engine, "seed": self.seed,
            "levels": list(self.levels),
            "priors": None if self.priors is None else asdict(self.priors),
            "draws": self.draws, "chains": self.chains,
            "tune": self.tune if self.engine == "nuts" else None,
            "model_options": dict(sorted(self.model_options.items())),
        }
        if self.recalibration is not None:  # the maps' fingerprints: same maps, same results
            record["recalibration"] = {freq: qmap.fingerprint() for freq, (qmap, _)
                                       in sorted(self.recalibration.items())}
        return record

    def uses_compiled_nuts(self) -> bool:
        """Whether NUTS fits go through one compiled model (nutpie, plain exponential)."""
        if self.engine != "nuts" or self.padded_length <= 0:
            return False
        from bayesgrowth.inference.refit import supports
        from bayesgrowth.models import exponential
        from bayesgrowth.models.spec import ModelSpec

        plain = ("model", "errors", "noise")
        options = self.model_options
        try:  # the compiled model is the exponential family's plain model
            spec = ModelSpec(**{k: options[k] for k in plain if k in options})
        except ValueError:
            return False
        # "auto" gives the exponential family no seasons (resolve_seasonal)
        if options["seasonal"] not in (False, "auto"):
            return False
        if spec.family is not exponential.FAMILY or not spec.is_plain_exponential:
            return False
        extra = {k: v for k, v in options.items() if k not in (*plain, "seasonal", "drift")}
        return supports(extra)


@dataclass
class SeriesOutcome:
    """What one series gave: forecast rows and a summary row, or a failure reason."""

    name: str
    fingerprint: str
    forecast: pd.DataFrame | None = None
    summary: dict | None = None
    failure: str | None = None


def posterior_file_name(name: str) -> str:
    """A file name for a series' posterior: the name made safe, plus a short hash of it."""
    safe = re.sub(r"[^A-Za-z0-9_.-]+", "_", name).strip("._")[:60] or "series"
    return f"{safe}-{hashlib.sha256(name.encode('utf-8')).hexdigest()[:8]}.nc"


def _q(x: np.ndarray) -> tuple[float, float, float]:
    lo, med, hi = np.quantile(x, [0.025, 0.5, 0.975])
    return float(med), float(lo), float(hi)


def _fit(series: GrowthSeries, settings: BatchSettings, seed: int):
    if settings.uses_compiled_nuts():
        priors = settings.priors or Priors()
        resolved = priors.resolve(series)
        if not resolved.fixed_initial:
            from bayesgrowth.batch.compiled import compiled_for

            model = compiled_for(
                priors, resolved, settings.padded_length, draws=settings.draws,
                tune=settings.tune, chains=settings.chains, cores=settings.threads,
            )
            return model.fit(series, resolved, seed)
    from bayesgrowth.inference.run import fit_series

    options = dict(settings.model_options)
    if settings.engine == "nuts":
        options.setdefault("progressbar", False)
        options.setdefault("cores", 1)
        options.setdefault("tune", settings.tune)
    return fit_series(
        series, engine=settings.engine, priors=settings.priors, seed=seed,
        draws=settings.draws, chains=settings.chains, **options,
    )


def _recalibrated(fc, maps: dict):
    """``fc`` recalibrated with its frequency's map (an input error if there is none)."""
    from bayesgrowth.forecast.recalibrated import apply_map

    freq = fc.fit.series.axis.frequency
    if freq not in maps:
        raise InputError(f"no backtest of a {freq} series gave outcomes to recalibrate from")
    qmap, source = maps[freq]
    return apply_map(fc, qmap, source)


def fit_one(series: GrowthSeries, settings: BatchSettings) -> SeriesOutcome:
    """Fit and forecast one series; any error becomes the outcome's failure reason.

    Parameters
    ----------
    series : GrowthSeries
    settings : BatchSettings

    Returns
    -------
    SeriesOutcome
    """
    from bayesgrowth.forecast.forecast import forecast
    from bayesgrowth.seeds import series_seed

    outcome = SeriesOutcome(name=series.name, fingerprint=series.fingerprint())
    seed = series_seed(settings.seed, series.name)
    try:
        series.check_horizon(settings.horizon)  # before fitting: a calendar past 9999
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")  # diagnostics go to the summary instead
            fit = _fit(series, settings, seed)
            fc = forecast(fit, settings.horizon, levels=settings.levels)
            if settings.recalibration is not None:
                fc = _recalibrated(fc, settings.recalibration)
            table = fc.table
    except InputError as exc:  # the series' data or the options: the message says which
        outcome.failure = f"{series.name}: {exc}"
        return outcome
    except Exception as exc:  # a series that cannot be fitted must not stop the batch
        outcome.failure = f"{series.name}: {type(exc).__name__}: {exc}"
        return outcome
    table.insert(0, "series", series.name)
    outcome.forecast = table
    d = fit.derived()
    a, g = _q(d["initial_value"]), _q(d["growth_per_period"])
    diag = fit.diagnostics
    outcome.summary = {
        "series": series.name, "n_observations": series.n,
        "first_period": series.labels[0], "last_period": series.labels[-1],
        "reference_period": fit.priors.reference_period,
        "initial_value_median": a[0], "initial_value_lower_95": a[1],
        "initial_value_upper_95": a[2],
        "growth_median": g[0], "growth_lower_95": g[1], "growth_upper_95": g[2],
        "diagnostics_ok": bool(diag.ok), "max_rhat": diag.max_rhat,
        "min_ess_bulk": diag.min_ess_bulk, "divergences": diag.divergences,
        "engine": fit.engine, "seed": seed,
    }
    if settings.recalibration is not None:
        outcome.summary["recalibration_outcomes"] = fc.recalibrated["n_outcomes"]
    if settings.posterior_dir is not None:
        folder = Path(settings.posterior_dir)
        target = folder / posterior_file_name(series.name)
        atomic_write(target, lambda tmp: fit.to_netcdf(tmp, fc.predictive_groups()),
                     suffix=".nc")
        outcome.summary["posterior_file"] = f"posteriors/{target.name}"
    return outcome


def fit_chunk(chunk: list[GrowthSeries], settings: BatchSettings) -> list[SeriesOutcome]:
    """Fit every series of ``chunk`` in turn (see :func:`fit_one`)."""
    return [fit_one(series, settings) for series in chunk]
