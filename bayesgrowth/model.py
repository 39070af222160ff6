"""The estimator: settings in the constructor, ``fit`` returns itself, then ``forecast``."""

from __future__ import annotations

import re

from bayesgrowth.config import (
    DEFAULT_CHAINS,
    DEFAULT_DRAWS,
    DEFAULT_ENGINE,
    DEFAULT_LEVELS,
    DEFAULT_MODEL,
    DEFAULT_TUNE,
)
from bayesgrowth.data.series import as_series
from bayesgrowth.forecast.forecast import Forecast, forecast
from bayesgrowth.inference.fit import Fit
from bayesgrowth.inference.run import fit_series
from bayesgrowth.priors import Priors

__all__ = ["GrowthModel"]


class GrowthModel:
    """Bayesian growth model of a positive series, fitted on the log scale.

    The defaults are the recommended model: a local trend whose growth rate drifts
    and fades towards a long-run rate with an uncertain half-life (a damped trend),
    seasonal factors when the calendar has them and two full years are observed, on
    the exact engine. See
    :data:`bayesgrowth.config.DEFAULT_MODEL` for why.

    Parameters
    ----------
    priors : Priors, optional
        Practitioner-scale priors; defaults documented in :mod:`bayesgrowth.priors`.
    model : str
        A registered model family (see :mod:`bayesgrowth.models.registry`):
        ``"local-trend"``, ``"exponential"``, ``"damped"``, ``"logistic"``, ``"gompertz"``.
    drift : {"mean-reverting", "random-walk", "adaptive"}
        For the local trend: how its growth rate moves.
    seasonal : bool, "auto" or "drifting"
        Seasonal factors; ``"auto"`` uses them when the calendar has seasons and two
        full years are observed; ``"drifting"`` (local trend only) lets them change
        slowly over the years.
    errors : {"independent", "ar1"}
        Whether deviations from a curve persist.
    noise_dist : {"normal", "student-t"}
        Distribution of the noise on the log scale.
    engine : {"exact", "nuts"}
        ``"exact"`` integrates the posterior deterministically (the local trend and
        the exponential curve with independent normal errors); ``"nuts"`` samples
        with PyMC and fits every model.
    seed : int, optional
        Seed that reproduces the draws; drawn and recorded when omitted.
    draws, chains : int
        Posterior draws per chain and number of chains.
    tune : int
        NUTS warm-up draws per chain.
    target_accept : float, optional
        NUTS step-size target; default per model (see :mod:`bayesgrowth.inference.nuts`).
    cores : int
        Chains sampled in parallel by NUTS.

    Attributes
    ----------
    fit_ : Fit
        Set by :meth:`fit`: draws, priors used, diagnostics, provenance.

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> model = bg.GrowthModel(seed=1).fit(bg.load_demo())
    >>> model.fit_.spec.label()
    'local-trend (mean-reverting), independent errors, normal noise, seasonal factors'
    >>> model.forecast(4).table.columns[:4].tolist()
    ['period', 'step', 'mean', 'median']
    """

    def __init__(
        self,
        priors: Priors | None = None,
        *,
        model: str = DEFAULT_MODEL["model"],
        drift: str = DEFAULT_MODEL["drift"],
        seasonal: bool | str = DEFAULT_MODEL["seasonal"],
        errors: str = "independent",
        noise_dist: str = "normal",
        engine: str = DEFAULT_ENGINE,
        seed: int | None = None,
        draws: int = DEFAULT_DRAWS,
        chains: int = DEFAULT_CHAINS,
        tune: int = DEFAULT_TUNE,
        target_accept: float | None = None,
        cores: int = 1,
    ) -> None:
        self.priors = priors
        self.model = model
        self.drift = drift
        self.seasonal = seasonal
        self.errors = errors
        self.noise_dist = noise_dist
        self.engine = engine
        self.seed = seed
        self.draws = draws
        self.chains = chains
        self.tune = tune
        self.target_accept = target_accept
        self.cores = cores

    def _settings(self) -> dict:
        if self.engine != "nuts":
            return {"draws": self.draws, "chains": self.chains}
        return {"draws": self.draws, "chains": self.chains, "tune": self.tune,
                "target_accept": self.target_accept, "cores": self.cores}

    def fit(self, data) -> GrowthModel:
        """Fit to a :class:`GrowthSeries`, a CSV path, a DataFrame or a Series.

        A DataFrame has a period and a value column, or periods in its index (a
        DatetimeIndex or a PeriodIndex); see :func:`bayesgrowth.read_series`, which
        also takes other column names.
        """
        try:
            self.fit_: Fit = fit_series(
                as_series(data),
                engine=self.engine,
                priors=self.priors or Priors(),
                seed=self.seed,
                model=self.model,
                drift=self.drift,
                seasonal=self.seasonal,
                errors=self.errors,
                noise=self.noise_dist,
                **self._settings(),
            )
        except ValueError as err:  # the library says noise=, this class's keyword is noise_dist=
            words = re.sub(r"\bnoise(=| must be)", r"noise_dist\1", str(err))
            if words == str(err):
                raise
            raise ValueError(words) from err
        return self

    def forecast(self, horizon: int, *, levels=DEFAULT_LEVELS, seed: int | None = None) -> Forecast:
        """Posterior predictive forecast ``horizon`` periods past the last observation.

        ``seed`` seeds the predictive draws (default: the fit's seed).
        """
        if not hasattr(self, "fit_"):
            raise RuntimeError("call fit() before forecast()")
        return forecast(self.fit_, horizon, levels=levels, seed=seed)

    @property
    def idata_(self):
        """The fit as :class:`arviz.InferenceData`."""
        return self.fit_.to_inference_data()

    def __repr__(self) -> str:
        state = "fitted" if hasattr(self, "fit_") else "not fitted"
        return (f"GrowthModel(model={self.model!r}, drift={self.drift!r}, "
                f"seasonal={self.seasonal!r}, engine={self.engine!r}, seed={self.seed!r}; "
                f"{state})")
