"""PSIS-LOO for fitted growth models, Pareto-k warnings in plain words, comparison table.

PSIS-LOO (Vehtari, Gelman & Gabry 2017, "Practical Bayesian model evaluation
using leave-one-out cross-validation and WAIC", *Statistics and Computing* 27)
estimates the expected log predictive density of each observation had it been
left out of the fit, from one fit, by Pareto-smoothed importance sampling.
ArviZ computes it (:func:`arviz.loo`); this module adds the reading.

Pareto k of each observation tells whether its estimate can be trusted; the
thresholds of Vehtari, Gelman & Gabry (2017, section 2.1): below 0.5 good, 0.5
to 0.7 usable but less precise, above 0.7 unreliable (the observation is so
influential that the fit without it differs a lot from the fit with it), above
1 the importance sampling breaks down.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import dataclass

import numpy as np
import pandas as pd

from bayesgrowth.display import fmt_weight, html_summary, text_summary
from bayesgrowth.select.stacking import bootstrap_stacking_weights, stacking_weights

__all__ = [
    "K_OK",
    "K_BAD",
    "K_VERY_BAD",
    "SMALL_DIFF",
    "LooResult",
    "ModelComparison",
    "check_named",
    "compare_models",
    "loo",
]

#: Pareto-k thresholds of Vehtari, Gelman & Gabry (2017).
K_OK, K_BAD, K_VERY_BAD = 0.5, 0.7, 1.0
#: elpd differences below this are "small" (common practice; see ModelComparison.reading).
SMALL_DIFF = 4.0


@dataclass(frozen=True)
class LooResult:
    """The PSIS-LOO estimate for one fitted model.

    Attributes
    ----------
    name : str
        The model's name in a comparison.
    description : str
        The model in words (curve, errors, noise).
    elpd_loo : float
        Estimated expected log predictive density, summed over observations
        (higher is better; on the data's scale, so comparable across models of the
        same series).
    se : float
        Its standard error.
    p_loo : float
        Effective number of parameters: how much the fit adapts to the data.
    pointwise : numpy.ndarray
        ``elpd_loo`` of each observation.
    pareto_k : numpy.ndarray
        Pareto k of each observation.
    periods : list of str
        Labels of the observations.
    n_draws : int
        Posterior draws the estimate uses.
    """

    name: str
    description: str
    elpd_loo: float
    se: float
    p_loo: float
    pointwise: np.ndarray
    pareto_k: np.ndarray
    periods: list[str]
    n_draws: int

    @property
    def n_unreliable(self) -> int:
        """Observations with Pareto k above 0.7."""
        return int(np.sum(self.pareto_k > K_BAD))

    @property
    def max_k(self) -> float:
        """The largest Pareto k."""
        return float(np.max(self.pareto_k))

    def messages(self) -> list[str]:
        """Pareto-k warnings in plain words (empty when every k is at most 0.5)."""
        out = []
        for period, k in zip(self.periods, self.pareto_k, strict=True):
            if k > K_VERY_BAD:
                out.append(
                    f"{self.name}: the LOO estimate for period {period} is unreliable "
                    f"(Pareto k {k:.2f}, above 1): that observation is very influential, and "
                    "leaving it out changes the fit too much for one fit to tell; "
                    "treat this model's elpd as doubtful"
                )
            elif k > K_BAD:
                out.append(
                    f"{self.name}: the LOO estimate for period {period} is unreliable "
                    f"(Pareto k {k:.2f}, above 0.7): that observation is very influential"
                )
        middling = [p for p, k in zip(self.periods, self.pareto_k, strict=True)
                    if K_OK < k <= K_BAD]
        if middling:
            out.append(
                f"{self.name}: the LOO estimate for period(s) {', '.join(middling)} is usable "
                "but less precise (Pareto k between 0.5 and 0.7): those observations weigh "
                "heavily on the fit"
            )
        return out


def loo(fit, name: str | None = None) -> LooResult:
    """PSIS-LOO of a fitted model, computed by :func:`arviz.loo`.

    Parameters
    ----------
    fit : Fit
        Its :meth:`~bayesgrowth.inference.Fit.to_inference_data` carries the
        pointwise log likelihood of the observations (data scale).
    name : str, optional
        Name in messages; default the curve's name.

    Returns
    -------
    LooResult
    """
    import warnings

    import arviz as az

    with warnings.catch_warnings():
        # ArviZ warns about high Pareto k in its own words; LooResult.messages says it in ours.
        warnings.simplefilter("ignore", UserWarning)
        res = az.loo(fit.to_inference_data(), pointwise=True, var_name="value")
    return LooResult(
        name=name or fit.model,
        description=fit.spec.label(),
        elpd_loo=float(res["elpd_loo"]),
        se=float(res["se"]),
        p_loo=float(res["p_loo"]),
        pointwise=np.asarray(res["loo_i"], dtype=float),
        pareto_k=np.asarray(res["pareto_k"], dtype=float),
        periods=list(fit.series.labels),
        n_draws=int(res["n_samples"]),
    )


@dataclass(frozen=True)
class ModelComparison:
    """PSIS-LOO of several models fitted to one series, with stacking weights.

    Attributes
    ----------
    table : pandas.DataFrame
        One row per model, best first: ``model``, ``rank`` (1 for the best),
        ``elpd_loo``, ``se``, ``elpd_diff`` (how far below the best), ``dse``
        (standard error of that difference), ``p_loo``, ``weight`` (stacking),
        ``weight_lower_90`` and ``weight_upper_90`` (a 90% interval of the weight
        under a Bayesian bootstrap of the observations, see
        :func:`~bayesgrowth.select.stacking.bootstrap_stacking_weights`), ``max_pareto_k``,
        ``n_unreliable_k`` (k above 0.7), ``diagnostics_ok``, ``engine``,
        ``description``.
    results : dict of str to LooResult
    weights : dict of str to float
        Stacking weights, summing to 1.
    """

    table: pd.DataFrame
    results: dict[str, LooResult]
    weights: dict[str, float]

    def _rows(self) -> list[list[str]]:
        return [[r.model, f"{r.elpd_loo:.1f}", f"{r.elpd_diff:.1f}", f"{r.dse:.1f}",
                 fmt_weight(r.weight)] for r in self.table.itertuples()]

    def _headline(self) -> str:
        weight = fmt_weight(self.weights[self.best])
        return f"best by PSIS-LOO: {self.best} (stacking weight {weight})"

    def __repr__(self) -> str:
        title = f"Model comparison of {len(self.table)} models"
        return text_summary(title, [self._headline()] + [
            f"{m}: elpd {e} (below the best by {d}, se {se}); weight {w}"
            for m, e, d, se, w in self._rows()
        ])

    def _repr_html_(self) -> str:
        return html_summary(f"Model comparison of {len(self.table)} models", self._headline(),
                            ["model", "elpd_loo", "elpd_diff", "dse", "weight"], self._rows())

    @property
    def best(self) -> str:
        """Name of the model with the highest elpd_loo."""
        return str(self.table["model"].iloc[0])

    def messages(self) -> list[str]:
        """Plain-word warnings: Pareto k of every model, failed sampling diagnostics."""
        out = []
        for name in self.table["model"]:
            out += self.results[name].messages()
        bad = self.table.loc[~self.table["diagnostics_ok"], "model"].tolist()
        if bad:
            out.append(
                f"sampling diagnostics failed for {', '.join(bad)}: their LOO values rest on "
                "draws that may not represent the posterior; sample longer before trusting them"
            )
        return out

    def indistinguishable(self) -> list[str]:
        """Models that :meth:`reading` calls not distinguishable from the best, and the best.

        Those less than 4 below the best in elpd, or less than 2 standard errors of
        the difference below it (the rules of :meth:`reading`). The best model comes
        first when any other is listed. Between such models the stacking weights are
        not a verdict: the data do not tell them apart.
        """
        close = [r.model for r in self.table.iloc[1:].itertuples()
                 if r.elpd_diff < SMALL_DIFF or r.elpd_diff <= 2 * r.dse]
        return [self.best, *close] if close else []

    def weight_phrases(self) -> list[str]:
        """Each model's stacking weight with its 90% bootstrap interval, in words."""
        return [f"{r.model} {fmt_weight(r.weight)} (90% interval {fmt_weight(r.weight_lower_90)} "
                f"to {fmt_weight(r.weight_upper_90)})" for r in self.table.itertuples()]

    def weights_reading(self) -> str:
        """One line: the weights with their uncertainty, and which models are indistinguishable."""
        text = "stacking weights: " + "; ".join(self.weight_phrases())
        close = self.indistinguishable()
        if close:
            text += (f". {', '.join(close[:-1])} and {close[-1]} are indistinguishable by "
                     "LOO: the split of weight between them is not a verdict")
        return text

    def reading(self) -> list[str]:
        """What the table says, in words (differences measured in their standard errors).

        A difference of less than 4 in elpd is called small whatever its standard
        error, since that standard error is unreliable for small differences
        (Sivula, Magnusson, Matamoros & Vehtari 2022, cited from memory); above
        4, a difference below 2 standard errors counts as "not distinguishable",
        2 to 4 as "probably worse" and above 4 as "clearly worse". These are
        rules of thumb from common practice, not thresholds from a single source.
        """
        out = []
        best = self.best
        for row in self.table.iloc[1:].itertuples():
            ratio = row.elpd_diff / row.dse if row.dse > 0 else math.inf
            if row.elpd_diff < SMALL_DIFF:
                verdict = "a small difference: not distinguishable from it"
            elif ratio > 4:
                verdict = "clearly worse"
            elif ratio > 2:
                verdict = "probably worse"
            else:
                verdict = "not distinguishable from it"
            out.append(
                f"{row.model}: elpd {row.elpd_diff:.1f} below {best} "
                f"(se of the difference {row.dse:.1f}): {verdict}"
            )
        return out


def check_named(items, what: str = "fits", kind: str = "fit") -> None:
    """Refuse ``items`` that are no mapping of model names to results, saying what to give.

    Raises
    ------
    TypeError
        For a list, a tuple or a single result: the names label the table's rows.
    """
    if not isinstance(items, Mapping):
        raise TypeError(
            f"{what} must be a mapping of model names to {kind}s, such as "
            f"{{'default': {kind}_a, 'exponential': {kind}_b}} (the names label the rows), "
            f"got {type(items).__name__}"
        )


def _check_same_data(fits: Mapping) -> None:
    prints = {name: fit.series.fingerprint() for name, fit in fits.items()}
    if len(set(prints.values())) > 1:
        raise ValueError(
            "models can be compared by LOO only on the same observations; these fits were "
            "made to different series"
        )


def compare_models(fits: Mapping) -> ModelComparison:
    """Compare models fitted to the same series by PSIS-LOO, with stacking weights.

    Differences follow ArviZ's :func:`arviz.compare`: ``elpd_diff`` is the best
    model's elpd_loo minus this one's, and ``dse = sqrt(n * var(d_i))`` over the
    pointwise differences ``d_i`` (Vehtari, Gelman & Gabry 2017, eq. 24). The
    weights are stacking weights (Yao, Vehtari, Simpson & Gelman 2018), computed
    by :func:`~bayesgrowth.select.stacking.stacking_weights`.

    Parameters
    ----------
    fits : mapping of str to Fit
        At least one fitted model, keyed by the name to show.

    Returns
    -------
    ModelComparison

    Examples
    --------
    >>> import bayesgrowth as bg
    >>> series = bg.load_demo()
    >>> flat = bg.Priors(growth=bg.GrowthPrior(0, 0.5))  # growth held near zero
    >>> fits = {"free": bg.fit_series(series, model="exponential", seed=1),
    ...         "flat": bg.fit_series(series, model="exponential", seed=1, priors=flat)}
    >>> bg.compare_models(fits).best
    'free'
    """
    check_named(fits)
    if not fits:
        raise ValueError("give at least one fitted model to compare")
    _check_same_data(fits)
    results = {name: loo(fit, name) for name, fit in fits.items()}
    names = list(results)
    lpd = np.column_stack([results[n].pointwise for n in names])
    w = stacking_weights(lpd)
    weights = {n: float(x) for n, x in zip(names, w, strict=True)}
    boot = np.quantile(bootstrap_stacking_weights(lpd), [0.05, 0.95], axis=0)
    spread = {n: (float(boot[0, i]), float(boot[1, i])) for i, n in enumerate(names)}
    order = sorted(names, key=lambda n: -results[n].elpd_loo)
    best = results[order[0]].pointwise
    rows = []
    for rank, name in enumerate(order, start=1):
        r = results[name]
        diff = best - r.pointwise
        fit = fits[name]
        rows.append({
            "model": name,
            "rank": rank,
            "elpd_loo": r.elpd_loo,
            "se": r.se,
            "elpd_diff": float(diff.sum()),
            "dse": float(np.sqrt(diff.size * np.var(diff))),
            "p_loo": r.p_loo,
            "weight": weights[name],
            "weight_lower_90": spread[name][0],
            "weight_upper_90": spread[name][1],
            "max_pareto_k": r.max_k,
            "n_unreliable_k": r.n_unreliable,
            "diagnostics_ok": bool(fit.diagnostics.ok),
            "engine": fit.engine,
            "description": r.description,
        })
    return ModelComparison(table=pd.DataFrame(rows), results=results, weights=weights)
