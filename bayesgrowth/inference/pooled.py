"""Fit the hierarchical (partially pooled) growth model to many series with PyMC NUTS.

:func:`fit_pooled` samples the joint posterior of every series' curve and the
group's growth centre and spread (see :mod:`bayesgrowth.models.hierarchical`).
:meth:`PooledFit.fit_for` gives one series' marginal posterior as an ordinary
:class:`~bayesgrowth.inference.fit.Fit`, so the single-series forecast, summaries
and plots apply to it; :func:`bayesgrowth.forecast.pooled.forecast_pooled` forecasts
every series and the group total.
"""

from __future__ import annotations

import secrets
from dataclasses import dataclass, replace

import numpy as np
import pandas as pd

from bayesgrowth.config import DEFAULT_CHAINS, DEFAULT_DRAWS, DEFAULT_TUNE
from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.display import fmt_percent, html_summary, text_summary
from bayesgrowth.inference.diagnostics import Diagnostics
from bayesgrowth.inference.fit import Fit
from bayesgrowth.inference.interrupt import check_complete, stoppable
from bayesgrowth.inference.nuts import SHORT_SERIES, sample_pymc
from bayesgrowth.models.hierarchical import ERRORS, GroupPrior, build_pymc_model, stack_panel
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.priors import Priors, ResolvedPriors

__all__ = ["PooledFit", "fit_pooled"]

#: Step-size target: the group spread makes a funnel-shaped posterior when the
#: group is tight; a small step keeps NUTS out of divergences there.
TARGET_ACCEPT = 0.95
#: With any series of ``SHORT_SERIES`` points or fewer: a 4-point series that fits a
#: line closely leaves its noise level near 0 plausible, a second funnel. Measured on
#: 24 simulated series (12 of 4-6 points): at 0.95 R-hat 1.010 and tail ESS 352 for a
#: 4-point series' level; at 0.99 R-hat 1.00 and tail ESS 563.
TARGET_ACCEPT_SHORT = 0.99


@dataclass
class PooledFit:
    """The posterior of the pooled model.

    Attributes
    ----------
    series : dict of str to GrowthSeries
    priors : dict of str to ResolvedPriors
        Each series' resolved priors (the growth prior is the group centre's).
    group : GroupPrior
    errors : str
    seed : int
    posterior : dict of str to numpy.ndarray
        ``log_a``, ``log1p_g``, ``sigma`` (and ``phi``) with shape
        ``(chain, draw, series)``; ``mu_growth`` and ``tau_growth`` ``(chain, draw)``.
    diagnostics : Diagnostics
        Over every free parameter of the joint model.
    settings : dict
    """

    series: dict[str, GrowthSeries]
    priors: dict[str, ResolvedPriors]
    group: GroupPrior
    errors: str
    seed: int
    posterior: dict[str, np.ndarray]
    diagnostics: Diagnostics
    settings: dict

    def _headline(self) -> str:
        g = self.group_summary()["growth_centre"]
        return (f"group growth centre {fmt_percent(g['median'])} per period (95% interval "
                f"{fmt_percent(g['lower_95'])} to {fmt_percent(g['upper_95'])})")

    def __repr__(self) -> str:
        d = self.diagnostics
        return text_summary(
            f"Pooled fit of {len(self.series)} series: {d.method}, {self.errors} errors",
            [self._headline(),
             "diagnostics ok" if d.ok else "diagnostics failed: " + "; ".join(d.problems)])

    def _repr_html_(self) -> str:
        rows = [[r.series, str(r.n_observations), fmt_percent(r.growth_median),
                 f"{fmt_percent(r.growth_lower_95)} to {fmt_percent(r.growth_upper_95)}"]
                for r in self.summary().itertuples()]
        return html_summary(f"Pooled fit of {len(self.series)} series", self._headline(),
                            ["series", "observations", "growth", "95% interval"], rows)

    @property
    def names(self) -> list[str]:
        """Series names, in order."""
        return list(self.series)

    def fit_for(self, name: str) -> Fit:
        """One series' marginal posterior as a single-series :class:`Fit`."""
        if name not in self.series:
            raise KeyError(f"no series {name!r} in the pooled fit")
        i = self.names.index(name)
        keys = ("log_a", "log1p_g", "sigma") + (("phi",) if self.errors == "ar1" else ())
        return Fit(
            series=self.series[name],
            priors=self.priors[name],
            engine="nuts",
            seed=self.seed,
            posterior={k: self.posterior[k][:, :, i] for k in keys},
            diagnostics=self.diagnostics,
            settings={**self.settings, "pooled": True},
            spec=ModelSpec(errors=self.errors),
        )

    def group_summary(self) -> dict:
        """Posterior median and 95% interval of the group's growth centre and spread.

        Both on the growth-per-period scale: the centre as ``exp(mu) - 1``, the
        spread as ``tau`` (points of ``log(1+g)``).
        """
        out = {}
        for key, f in (("growth_centre", np.expm1), ("growth_spread", lambda x: x)):
            src = "mu_growth" if key == "growth_centre" else "tau_growth"
            x = f(self.posterior[src].ravel())
            lo, med, hi = np.quantile(x, [0.025, 0.5, 0.975])
            out[key] = {"median": float(med), "lower_95": float(lo), "upper_95": float(hi)}
        return out

    def summary(self) -> pd.DataFrame:
        """A row per series: observations and pooled growth (median, 95% interval)."""
        rows = []
        for i, (name, s) in enumerate(self.series.items()):
            g = np.expm1(self.posterior["log1p_g"][:, :, i].ravel())
            lo, med, hi = np.quantile(g, [0.025, 0.5, 0.975])
            rows.append({"series": name, "n_observations": s.n, "growth_median": med,
                         "growth_lower_95": lo, "growth_upper_95": hi})
        return pd.DataFrame(rows)


def fit_pooled(
    panel: dict[str, GrowthSeries] | list[GrowthSeries],
    priors: Priors | None = None,
    *,
    group: GroupPrior | None = None,
    errors: str = "independent",
    seed: int | None = None,
    draws: int = DEFAULT_DRAWS,
    tune: int = DEFAULT_TUNE,
    chains: int = DEFAULT_CHAINS,
    target_accept: float | None = None,
    cores: int = 1,
    progressbar: bool = False,
    sampler: str = "auto",
) -> PooledFit:
    """Fit the hierarchical growth model to a panel of series with PyMC NUTS.

    Parameters
    ----------
    panel : dict of str to GrowthSeries, or list of GrowthSeries
        The series (e.g. from :func:`bayesgrowth.data.panel.read_panel`); a list is
        keyed by each series' name, which must then be unique.
    priors : Priors, optional
        Single-series priors: the growth prior becomes the prior of the group
        centre; initial-value and noise priors apply to each series.
    group : GroupPrior, optional
        How alike the series are believed to be (defaults documented in
        :mod:`bayesgrowth.models.hierarchical`).
    errors : {"independent", "ar1"}
    seed : int, optional
        A fresh seed is drawn (and recorded) when omitted.
    draws, tune, chains : int
    target_accept : float, optional
        Default :data:`TARGET_ACCEPT`, or :data:`TARGET_ACCEPT_SHORT` when a series
        has ``SHORT_SERIES`` points or fewer.
    cores : int
        Parallel chains (threads with nutpie, processes with PyMC).
    progressbar : bool
    sampler : {"auto", "nutpie", "pymc"}
        NUTS implementation. ``"auto"`` takes nutpie when it is installed: on this
        model it samples 20-60 times faster than PyMC's own sampler (measured on 24
        series: 2.4 s against about 50 s for 4 x 2,000 iterations), for a one-off
        compile of 20-30 s. Both sample the same model.

    Returns
    -------
    PooledFit
        A failed diagnostic check warns (:class:`~bayesgrowth.inference.SamplingWarning`).

    Examples
    --------
    Sampling takes seconds to minutes, so it is shown, not run, here:

    >>> import bayesgrowth as bg
    >>> demo = bg.load_demo()
    >>> panel = {"older": demo, "newer": demo.head(6)}
    >>> fit = bg.fit_pooled(panel, seed=1)  # doctest: +SKIP
    >>> bg.forecast(fit, 4).total[["period", "median"]]  # doctest: +SKIP
    >>> bg.fit_pooled({})
    Traceback (most recent call last):
    ...
    ValueError: the panel has no series
    """
    from bayesgrowth.inference.nuts import diagnose

    panel = _as_panel(panel, errors)
    priors = priors or Priors()
    group = group or GroupPrior()
    resolved = {name: priors.resolve(s) for name, s in panel.items()}
    if any(p.fixed_initial for p in resolved.values()):
        raise ValueError("the pooled model estimates every initial value; give it a spread > 0")
    seed = secrets.randbits(32) if seed is None else int(seed)
    if target_accept is None:
        short = min(s.n for s in panel.values()) <= SHORT_SERIES
        target_accept = TARGET_ACCEPT_SHORT if short else TARGET_ACCEPT
    data = stack_panel(list(panel.values()), list(resolved.values()), group.tau_scale)
    model = build_pymc_model(data, next(iter(resolved.values())), group, errors)
    sampler = _sampler(sampler)
    idata = _sample(model, sampler, seed=seed, draws=draws, tune=tune, chains=chains,
                    cores=cores, target_accept=target_accept, progressbar=progressbar)
    post = idata.posterior
    keys = ["log_a", "log1p_g", "sigma", "mu_growth", "tau_growth"]
    keys += ["phi"] if errors == "ar1" else []
    posterior = {k: np.asarray(post[k].values, dtype=float) for k in keys}
    free = [v.name for v in model.free_RVs]
    diagnostics = diagnose(post[free], int(idata.sample_stats["diverging"].sum()))
    label = "nutpie" if sampler == "nutpie" else "PyMC"
    diagnostics = replace(diagnostics, method=f"NUTS ({label}), pooled model")
    fit = PooledFit(
        series=dict(panel), priors=resolved, group=group, errors=errors, seed=seed,
        posterior=posterior, diagnostics=diagnostics,
        settings={"draws": draws, "tune": tune, "chains": chains, "sampler": sampler,
                  "target_accept": target_accept, "cores": cores,
                  "centred_series": [n for n, c in zip(panel, data.centred, strict=True) if c]},
    )
    diagnostics.warn_if_failed()
    return fit


def _as_panel(panel, errors: str) -> dict[str, GrowthSeries]:
    """The panel as a dict keyed by unique names; refuse an empty one or unknown errors."""
    if isinstance(panel, list):
        names = [s.name for s in panel]
        if len(set(names)) != len(names):
            raise ValueError("series names must be unique; pass a dict keyed by name")
        panel = dict(zip(names, panel, strict=True))
    if not panel:
        raise ValueError("the panel has no series")
    if errors not in ERRORS:
        raise ValueError(f"errors must be one of {', '.join(ERRORS)}, got {errors!r}")
    return panel


def _sampler(sampler: str) -> str:
    """``"nutpie"`` or ``"pymc"``: ``"auto"`` takes nutpie when it is installed."""
    if sampler not in ("auto", "nutpie", "pymc"):
        raise ValueError(f"sampler must be auto, nutpie or pymc, got {sampler!r}")
    if sampler != "auto":
        return sampler
    try:
        import nutpie  # noqa: F401
    except ImportError:
        return "pymc"
    return "nutpie"


def _sample(model, sampler: str, *, seed, draws, tune, chains, cores, target_accept,
            progressbar):
    if sampler == "nutpie":
        import nutpie

        compiled = nutpie.compile_pymc_model(model)
        with stoppable():  # nutpie returns the draws so far on Ctrl-C: stop instead
            idata = nutpie.sample(
                compiled, draws=draws, tune=tune, chains=chains, cores=cores, seed=seed,
                target_accept=target_accept, save_warmup=False, progress_bar=progressbar,
            )
        check_complete(idata, chains, draws)
        return idata
    return sample_pymc(model, seed=seed, draws=draws, tune=tune, chains=chains, cores=cores,
                       target_accept=target_accept, progressbar=progressbar)
