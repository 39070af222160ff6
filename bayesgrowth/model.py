"""The estimator: settings in the constructor, ``fit`` returns itself, then ``forecast``."""

from __future__ import annotations

from bayesgrowth.config import DEFAULT_CHAINS, DEFAULT_DRAWS, DEFAULT_LEVELS
from bayesgrowth.data.series import as_series
from bayesgrowth.forecast.forecast import Forecast, forecast
from bayesgrowth.inference.fit import Fit
from bayesgrowth.inference.run import fit_series
from bayesgrowth.priors import Priors

__all__ = ["GrowthModel"]


class GrowthModel:
    """Bayesian exponential growth model of a positive series.

    Parameters
    ----------
    priors : Priors, optional
        Practitioner-scale priors; defaults documented in :mod:`bayesgrowth.priors`.
    engine : {"nuts", "exact"}
        ``"nuts"`` samples with PyMC; ``"exact"`` integrates the same posterior
        by quadrature (fast, no chains).
    seed : int, optional
        Seed that reproduces the draws; drawn and recorded when omitted.
    draws, chains : int
        Posterior draws per chain and number of chains.
    **engine_options
        Further NUTS options: ``tune``, ``target_accept``, ``cores``, ``progressbar``.

    Attributes
    ----------
    fit_ : Fit
        Set by :meth:`fit`: draws, priors used, diagnostics, provenance.

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> model = bg.GrowthModel(engine="exact", seed=1).fit(bg.load_demo())
    >>> model.forecast(4).table.columns[:4].tolist()
    ['period', 'step', 'mean', 'median']
    """

    def __init__(
        self,
        priors: Priors | None = None,
        *,
        engine: str = "nuts",
        seed: int | None = None,
        draws: int = DEFAULT_DRAWS,
        chains: int = DEFAULT_CHAINS,
        **engine_options,
    ) -> None:
        self.priors = priors or Priors()
        self.engine = engine
        self.seed = seed
        self.draws = draws
        self.chains = chains
        self.engine_options = engine_options

    def fit(self, data) -> GrowthModel:
        """Fit to a :class:`GrowthSeries`, a CSV path, a DataFrame or a Series."""
        self.fit_: Fit = fit_series(
            as_series(data),
            engine=self.engine,
            priors=self.priors,
            seed=self.seed,
            draws=self.draws,
            chains=self.chains,
            **self.engine_options,
        )
        return self

    def forecast(self, horizon: int, *, levels=DEFAULT_LEVELS) -> Forecast:
        """Posterior predictive forecast ``horizon`` periods past the last observation."""
        if not hasattr(self, "fit_"):
            raise RuntimeError("call fit() before forecast()")
        return forecast(self.fit_, horizon, levels=levels)

    @property
    def idata_(self):
        """The fit as :class:`arviz.InferenceData`."""
        return self.fit_.to_inference_data()
