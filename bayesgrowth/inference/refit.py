"""Refit the NUTS engine to many subsets of one series, compiling the model once.

A rolling-origin backtest refits the model at every origin. Each fit differs
only in which rows of the series count, so the model is built once on the full
series with a 0/1 weight per row (see
:func:`bayesgrowth.models.exponential.build_pymc_model`), compiled once by
nutpie, and each origin only swaps the data (``weight``, ``dt``, ``log_y``)
and samples again.

Why nutpie, measured
--------------------
On the project's 2-core test machine, for the bundled demo series, 16 origins
(4 to 19 training points), 4 chains of 1,000 tuning and 1,000 kept draws each
(pymc 5.28, nutpie 0.16.8, numba 0.65, warm compile caches):

==========================================  =====================================
route                                        cost
==========================================  =====================================
``fit_series`` per origin (model rebuilt)    2.4-3.0 s per origin, 5.6 s for the first
one model, ``pm.set_data`` + ``pm.sample``   2.0-2.5 s per origin
one model and one ``pm.NUTS`` step reused    2.2-2.8 s per origin (no recompile, but
                                             PyMC's sampler loop itself costs ~2 s)
all origins as blocks of one stacked model   11-13 s in all; divergences cannot be
                                             told apart by origin
nutpie, compiled once, ``with_data``          4.8-8.2 s to compile, then 0.08-0.15 s
                                             per origin
==========================================  =====================================

PyMC's own sampler spends about 2 s per origin in its Python loop whatever is
reused, so only a compiled sampler meets the goal of a backtest costing at most
twice a single forecast; nutpie does (about 8 s in all against 7 s for one
fresh-process forecast), and it keeps separate chains, R-hat, ESS and
divergences for every origin. At nutpie's default ``target_accept`` of 0.8 the
fits to 4-10 points diverged (74 divergences at 4 points); at 0.95 none did and
sampling was no slower, so 0.95 is the default here.

One compiled model serves every origin, also with a moving window: the time
offset ``dt = t - t_ref`` is data, and the only prior setting that moves with the
window, the centre of the ``log a`` prior (the value at the reference period),
is absorbed by shifting the log data by the same constant and shifting the
``log a`` draws back. The shift is exact for the exponential model, where
``log a`` enters the log mean additively. A change in any other prior setting
compiles a second model (cached by those settings).
"""

from __future__ import annotations

import dataclasses
import os

import numpy as np

from bayesgrowth.config import DEFAULT_CHAINS, DEFAULT_DRAWS, DEFAULT_TUNE
from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.inference.fit import Fit
from bayesgrowth.models import exponential, linear
from bayesgrowth.priors import Priors, ResolvedPriors

__all__ = ["NutsRefitter", "SPEC_OPTIONS", "TARGET_ACCEPT", "supports"]

#: Step-size target: measured divergence-free on 4-19 point fits (see module docstring).
TARGET_ACCEPT = 0.95

#: Sampler settings of ``fit_series`` this refitter understands.
_SETTINGS = ("draws", "chains", "tune", "target_accept", "cores", "progressbar")
#: ``fit_series`` options that choose the model (see :class:`~bayesgrowth.models.spec.ModelSpec`).
SPEC_OPTIONS = ("model", "errors", "noise", "seasonal", "drift", "season_drift")


def supports(options: dict | None) -> bool:
    """Whether :class:`NutsRefitter` can stand in for ``fit_series`` with these options.

    Parameters
    ----------
    options : dict or None
        Keyword options meant for :func:`bayesgrowth.inference.fit_series`.

    Returns
    -------
    bool
        True when nutpie is importable and the options choose a valid model
        (:class:`~bayesgrowth.models.spec.ModelSpec`) and otherwise only sampler
        settings.
    """
    options = dict(options or {})
    try:
        _spec(options)
    except (TypeError, ValueError):
        return False
    if any(k not in _SETTINGS + SPEC_OPTIONS for k in options):
        return False
    try:
        import nutpie  # noqa: F401
    except ImportError:
        return False
    return True


def _spec(options: dict):
    from bayesgrowth.models.spec import ModelSpec

    return ModelSpec(**{k: options[k] for k in SPEC_OPTIONS if k in options})


def sample_compiled(
    data,
    *,
    draws: int,
    tune: int,
    chains: int,
    cores: int,
    seed: int,
    target_accept: float,
    diagnose_names: list[str] | None = None,
    names: tuple[str, ...] = exponential.PARAMETERS,
) -> tuple[dict[str, np.ndarray], object, dict]:
    """Sample a nutpie model compiled once (with its data already swapped in) and diagnose it.

    Parameters
    ----------
    data : nutpie compiled model
        The result of ``compiled.with_data(...)``.
    draws, tune, chains, cores, seed, target_accept
        Sampler settings.
    diagnose_names : list of str, optional
        Posterior variables to diagnose (default: all that ``diagnose`` checks).
    names : tuple of str
        Variables to return, those of them that the model has.

    Returns
    -------
    posterior : dict of str to numpy.ndarray
        Draws of ``names``, shape ``(chain, draw, ...)``.
    diagnostics : Diagnostics
    settings : dict
        The settings, for :attr:`Fit.settings`.
    """
    import nutpie

    from bayesgrowth.inference.interrupt import check_complete, stoppable
    from bayesgrowth.inference.nuts import diagnose

    with stoppable():  # nutpie returns the draws so far on Ctrl-C: stop instead
        idata = nutpie.sample(
            data,
            draws=draws,
            tune=tune,
            chains=chains,
            cores=cores,
            seed=int(seed),
            target_accept=target_accept,
            save_warmup=False,
            progress_bar=False,
        )
    check_complete(idata, chains, draws)
    post = idata.posterior
    posterior = {k: np.asarray(post[k].values, dtype=float) for k in names if k in post}
    divergences = int(idata.sample_stats["diverging"].sum())
    checked = post if diagnose_names is None else post[diagnose_names]
    diagnostics = dataclasses.replace(
        diagnose(checked, divergences), method="NUTS (nutpie, model compiled once)"
    )
    settings = {"draws": draws, "tune": tune, "chains": chains, "target_accept": target_accept,
                "cores": cores, "sampler": "nutpie"}
    return posterior, diagnostics, settings


class NutsRefitter:
    """NUTS fits of one model to subsets of one series, compiled once.

    Parameters
    ----------
    series : GrowthSeries
        The full series; each fit uses some of its rows.
    priors : Priors, optional
        Stated priors, resolved afresh for every subset (as ``fit_series`` does).
    draws, tune, chains : int
        Kept draws and tuning steps per chain, and the number of chains.
    target_accept : float, optional
        Default :data:`TARGET_ACCEPT`.
    cores : int, optional
        Chains run in parallel threads; default the CPUs available, at most ``chains``.
    spec : ModelSpec, optional
        The model; default the plain exponential. Other models are compiled on the
        full series with 0/1 row weights too, and serve subsets that start at the
        first row and have no holes (an expanding window); any other subset is
        fitted by ``fit_series``. A change in the resolved priors (a ceiling set
        as a multiple of the latest value moves with it) compiles another model.

    Examples
    --------
    >>> import bayesgrowth as bg  # doctest: +SKIP
    >>> refit = NutsRefitter(bg.load_demo())  # doctest: +SKIP
    >>> fit = refit.fit(np.arange(12), seed=1)  # doctest: +SKIP
    """

    def __init__(
        self,
        series: GrowthSeries,
        priors: Priors | None = None,
        *,
        draws: int = DEFAULT_DRAWS,
        tune: int = DEFAULT_TUNE,
        chains: int = DEFAULT_CHAINS,
        target_accept: float | None = None,
        cores: int | None = None,
        spec=None,
    ) -> None:
        from bayesgrowth.models.spec import ModelSpec

        self.series = series
        self.priors = priors or Priors()
        self.spec = spec or ModelSpec()
        self.draws = int(draws)
        self.tune = int(tune)
        self.chains = int(chains)
        self.target_accept = float(target_accept or TARGET_ACCEPT)
        available = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else None
        self.cores = int(cores or min(self.chains, available or os.cpu_count() or 1))
        self._compiled: dict[tuple, tuple[object, ResolvedPriors]] = {}

    @property
    def n_compiled(self) -> int:
        """How many models have been compiled so far (one unless prior settings changed)."""
        return len(self._compiled)

    def _compiled_for(self, resolved: ResolvedPriors, weight: np.ndarray):
        plain = self.spec.is_plain_exponential
        key = resolved.compile_key() if plain else _full_key(self.spec, resolved)
        if key not in self._compiled:
            import nutpie

            from bayesgrowth.models import general

            s = self.series
            if plain:
                model = exponential.build_pymc_model(resolved, s.t, s.log_values, weight)
            else:
                model = general.build_pymc_model(self.spec, resolved, s.t, s.log_values, weight,
                                                 axis=s.axis)
            compiled = nutpie.compile_pymc_model(model, freeze_model=False)
            self._compiled[key] = (compiled, resolved)
        return self._compiled[key]

    def fit(self, positions: np.ndarray, seed: int) -> Fit:
        """Fit the rows at ``positions`` of the series.

        Parameters
        ----------
        positions : numpy.ndarray of int
            Positions of the training rows.
        seed : int
            Sampler seed; the same seed gives the same draws.

        Returns
        -------
        Fit
            For the subset, with its own diagnostics. Failed checks are not
            warned about here; the caller decides how to report them.
        """
        s = self.series
        positions = np.sort(np.asarray(positions, dtype=int))
        train = s.take(positions)
        resolved = self.priors.resolve(train)
        if not self.spec.is_plain_exponential:
            return self._fit_model(positions, train, resolved, seed)
        weight = np.zeros(s.n)
        weight[positions] = 1.0
        compiled, base = self._compiled_for(resolved, weight)
        shift = resolved.log_a_mu - base.log_a_mu
        dt = (s.t - resolved.t_ref).astype(float)
        extra = {} if resolved.fixed_initial else {"centre": float(np.average(dt, weights=weight))}
        data = compiled.with_data(weight=weight, dt=dt, log_y=s.log_values - shift, **extra)
        posterior, diagnostics, settings = sample_compiled(
            data, draws=self.draws, tune=self.tune, chains=self.chains, cores=self.cores,
            seed=seed, target_accept=self.target_accept,
        )
        if resolved.fixed_initial:
            posterior["log_a"] = np.full_like(posterior["sigma"], resolved.log_a_mu)
        else:
            posterior["log_a"] = posterior["log_a"] + shift
        return Fit(series=train, priors=resolved, engine="nuts", seed=int(seed),
                   posterior=posterior, diagnostics=diagnostics, settings=settings)

    def _fit_model(self, positions, train, resolved, seed) -> Fit:
        """Any other model: an expanding window swaps the weights, other subsets refit."""
        from bayesgrowth.inference.nuts import complete_posterior

        spec = self.spec
        if not np.array_equal(positions, np.arange(positions.size)):
            from bayesgrowth.inference.run import fit_series

            return fit_series(train, engine="nuts", priors=self.priors, seed=int(seed),
                              draws=self.draws, tune=self.tune, chains=self.chains,
                              target_accept=self.target_accept, **spec.to_dict())
        weight = np.zeros(self.series.n)
        weight[positions] = 1.0
        compiled, _ = self._compiled_for(resolved, weight)
        names = spec.parameters() + spec.vector_parameters() + linear.STAND_INS
        posterior, diagnostics, settings = sample_compiled(
            compiled.with_data(weight=weight), draws=self.draws, tune=self.tune,
            chains=self.chains, cores=self.cores, seed=seed, target_accept=self.target_accept,
            names=names,
        )
        posterior = complete_posterior(spec, resolved, train, posterior, int(seed))
        return Fit(series=train, priors=resolved, engine="nuts", seed=int(seed),
                   posterior=posterior, diagnostics=diagnostics, settings=settings,
                   model=spec.model, spec=spec)


def _full_key(spec, resolved: ResolvedPriors) -> tuple:
    """The resolved prior settings that a compiled model of ``spec`` bakes in.

    The ceiling's centre moves with the latest value when it is stated as a
    multiple; it counts only for the curves that have a ceiling.
    """
    skip = {"stated", "reference_period"}
    if not spec.family.ceiling:
        skip |= {"log_k_mu", "log_k_sd"}
    return tuple((f.name, getattr(resolved, f.name)) for f in dataclasses.fields(resolved)
                 if f.name not in skip)
