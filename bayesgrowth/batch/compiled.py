"""NUTS fits of the exponential model to many series, compiling the model once per process.

Every series of a batch is fitted by one compiled model: the data are padded to
a common length (rows past a series' end carry weight 0 in the likelihood), and
everything that differs between series is data, not code: the time offsets
``dt``, the log values, the 0/1 weights, the centre of the initial-value prior
(``anchor``, the log of the value at the reference period) and the centre of the
observed times (``centre``, where the level is sampled so that level and slope
are nearly uncorrelated, as in
:func:`bayesgrowth.models.exponential.build_pymc_model`). The prior is exactly
the single-series one; only the prior spreads are compiled in, so one model per
prior setting and padded length serves the batch.

The compiled sampler is nutpie (as in :mod:`bayesgrowth.inference.refit`, whose
measurements and step-size target this module shares); when nutpie is missing
or the model options are not the plain exponential model, the batch falls back
to :func:`bayesgrowth.inference.fit_series` per series.
"""

from __future__ import annotations

import numpy as np

from bayesgrowth.config import DEFAULT_CHAINS, DEFAULT_DRAWS, DEFAULT_TUNE
from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.inference.fit import Fit
from bayesgrowth.inference.refit import TARGET_ACCEPT, sample_compiled
from bayesgrowth.priors import Priors, ResolvedPriors

__all__ = ["CompiledBatchNuts", "padded_length", "compiled_for"]

#: Padded lengths are rounded up to a multiple of this, so a few more points do not
#: force another compile.
LENGTH_STEP = 8

_CACHE: dict[tuple, CompiledBatchNuts] = {}


def padded_length(n_max: int) -> int:
    """The padded data length for series of at most ``n_max`` observations."""
    return int(-(-int(n_max) // LENGTH_STEP) * LENGTH_STEP)


def build_padded_model(priors: ResolvedPriors, length: int):
    """The exponential model on ``length`` padded rows, with every per-series quantity as data.

    Parameters
    ----------
    priors : ResolvedPriors
        Supplies the prior spreads (and the growth prior's centre); the anchor
        and reference period come in as data.
    length : int
        Number of rows.

    Returns
    -------
    pymc.Model
    """
    import pymc as pm

    with pm.Model() as model:
        dt = pm.Data("dt", np.arange(length, dtype=float))
        y = pm.Data("log_y", np.zeros(length))
        w = pm.Data("weight", np.ones(length))
        anchor = pm.Data("anchor", 0.0)
        centre = pm.Data("centre", (length - 1) / 2)
        b = pm.Normal("log1p_g", mu=priors.log1p_g_mu, sigma=priors.log1p_g_sd)
        # log_a ~ Normal(anchor, sd) independent of b, sampled at the data's centre.
        level = pm.Normal("level", mu=anchor + b * centre, sigma=priors.log_a_sd)
        log_a = pm.Deterministic("log_a", level - b * centre)
        sigma = pm.HalfNormal("sigma", sigma=priors.sigma_scale)
        mu = log_a + b * dt
        pm.Potential("loglik", (w * pm.logp(pm.Normal.dist(mu=mu, sigma=sigma), y)).sum())
    return model


class CompiledBatchNuts:
    """One compiled exponential model that fits any series of up to ``length`` points.

    Parameters
    ----------
    priors : ResolvedPriors
        Priors resolved on any series of the batch (only their spreads are used).
    length : int
        Padded length.
    draws, tune, chains : int
    target_accept : float, optional
        Default :data:`bayesgrowth.inference.refit.TARGET_ACCEPT`.
    cores : int
        Threads for the chains.
    """

    def __init__(
        self,
        priors: ResolvedPriors,
        length: int,
        *,
        draws: int = DEFAULT_DRAWS,
        tune: int = DEFAULT_TUNE,
        chains: int = DEFAULT_CHAINS,
        target_accept: float | None = None,
        cores: int = 1,
    ) -> None:
        import nutpie

        self.length = int(length)
        self.draws, self.tune, self.chains = int(draws), int(tune), int(chains)
        self.target_accept = float(target_accept or TARGET_ACCEPT)
        self.cores = int(cores)
        model = build_padded_model(priors, self.length)
        self._compiled = nutpie.compile_pymc_model(model, freeze_model=False)

    def fit(self, series: GrowthSeries, resolved: ResolvedPriors, seed: int) -> Fit:
        """Fit ``series`` (at most ``length`` points) with priors ``resolved``.

        Returns
        -------
        Fit
            Diagnostics are not warned about here; the caller reports them.
        """
        n, pad = series.n, self.length - series.n
        if pad < 0:
            raise ValueError(f"series of {n} points is longer than the compiled {self.length}")
        dt = (series.t - resolved.t_ref).astype(float)
        data = self._compiled.with_data(
            dt=np.concatenate([dt, np.zeros(pad)]),
            log_y=np.concatenate([series.log_values, np.zeros(pad)]),
            weight=np.concatenate([np.ones(n), np.zeros(pad)]),
            anchor=np.asarray(resolved.log_a_mu, dtype=float),
            centre=np.asarray(dt.mean(), dtype=float),
        )
        posterior, diagnostics, settings = sample_compiled(
            data, draws=self.draws, tune=self.tune, chains=self.chains, cores=self.cores,
            seed=seed, target_accept=self.target_accept,
            diagnose_names=["level", "log1p_g", "sigma"],
        )
        return Fit(
            series=series,
            priors=resolved,
            engine="nuts",
            seed=int(seed),
            posterior=posterior,
            diagnostics=diagnostics,
            settings=settings,
        )


def compiled_for(priors: Priors | None, resolved: ResolvedPriors, length: int, **settings):
    """The process's compiled model for these prior spreads, length and settings (cached)."""
    key = (resolved.compile_key(), int(length), tuple(sorted(settings.items())))
    if key not in _CACHE:
        _CACHE[key] = CompiledBatchNuts(resolved, length, **settings)
    return _CACHE[key]
