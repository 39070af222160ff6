"""The result of fitting a growth model: posterior draws, priors, diagnostics, provenance."""

from __future__ import annotations

import json
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from bayesgrowth._version import __version__
from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.display import fmt_number, fmt_percent, html_summary, text_summary
from bayesgrowth.inference.diagnostics import Diagnostics
from bayesgrowth.lazy import LazyField
from bayesgrowth.models import exponential, general
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.priors import ResolvedPriors

__all__ = ["Fit"]


def as_chains(flat: dict, names, chains: int, draws: int) -> dict:
    """The flat draws named ``names`` as ``(chains, draws, ...)`` arrays, the NUTS engine's shape.

    For the exact engines, whose draws are independent: the chains are only blocks.
    """
    return {k: np.asarray(flat[k]).reshape(chains, draws, *np.shape(flat[k])[1:]) for k in names}


@dataclass
class Fit:
    """A fitted growth model.

    Attributes
    ----------
    series : GrowthSeries
        The data the model was fitted to.
    priors : ResolvedPriors
        The priors actually used, on the log scale (with the stated ones).
    engine : str
        ``"nuts"`` or ``"exact"``.
    seed : int
        Seed that reproduces the draws.
    posterior : dict of str to numpy.ndarray
        Draws of each parameter with shape ``(chain, draw)`` (``log_a``, ``log1p_g``,
        ``sigma``, and the further parameters of ``spec``), or ``(chain, draw, k)``
        for vectors (the seasonal factors ``season``). The local trend's states are
        integrated out, so its posterior holds only scalar parameters.
        The exact engine draws them when they are first read.
    diagnostics : Diagnostics
        Convergence checks.
    settings : dict
        Engine settings (draws, chains, target_accept, ...).
    model : str
        The curve's name (``spec.model``).
    spec : ModelSpec, optional
        The full model choice (curve, errors, noise, seasonal factors); default the
        exponential model with independent normal errors, or ``model`` if given.
    state_space : StateSpacePosterior, optional
        For a local trend fitted by the exact engine: the grid posterior that gives
        exact bands (:mod:`bayesgrowth.inference.statespace`).
    extra : dict
        Per-draw quantities that are not parameters (the exact engine's grid node of
        each draw, ``nodes``, and the latest growth, ``latest_log_growth``).
    """

    series: GrowthSeries
    priors: ResolvedPriors
    engine: str
    seed: int
    posterior: dict[str, np.ndarray] = LazyField(0)
    diagnostics: Diagnostics
    settings: dict = field(default_factory=dict)
    model: str = "exponential"
    spec: ModelSpec | None = None
    state_space: object | None = None
    extra: dict = field(default_factory=dict)

    def __post_init__(self) -> None:
        if self.spec is None:
            self.spec = ModelSpec(model=self.model)
        self.model = self.spec.model

    def _summary(self) -> tuple[str, list[str], list[list[str]]]:
        s = self.series
        title = f"Fit of {s.name!r}: {self.spec.label()}; {self.engine} engine"
        lines = [f"{s.n} observations, {s.labels[0]} to {s.labels[-1]}; "
                 f"{self.n_draws:,} draws; seed {self.seed}"]
        rows = []
        for name, draws in self.derived().items():
            lo, med, hi = np.quantile(draws, [0.025, 0.5, 0.975])
            write = fmt_percent if name == "growth_per_period" else fmt_number
            rows.append([name.replace("_", " "), write(med), f"{write(lo)} to {write(hi)}"])
        growth = next(r for r in rows if r[0] == "growth per period")
        lines.append(f"growth per period {growth[1]} (95% interval {growth[2]})")
        d = self.diagnostics
        lines.append("diagnostics ok" if d.ok else "diagnostics failed: " + "; ".join(d.problems))
        return title, lines, rows

    def __repr__(self) -> str:
        title, lines, _ = self._summary()
        return text_summary(title, lines)

    def _repr_html_(self) -> str:
        title, lines, rows = self._summary()
        return html_summary(title, " · ".join(lines[1:]), ["quantity", "median", "95% interval"],
                            rows)

    @property
    def _shape(self) -> tuple[int, int]:
        c, d = next(iter(self.posterior.values())).shape[:2]
        return int(c), int(d)

    @property
    def n_draws(self) -> int:
        """Total number of posterior draws (chains times draws)."""
        c, d = self._shape
        return c * d

    def flat(self) -> dict[str, np.ndarray]:
        """Draws with chains stacked: scalars as 1-D arrays, vectors as ``(n_draws, k)``."""
        n = self.n_draws
        return {k: v.reshape(n, *v.shape[2:]) for k, v in self.posterior.items()}

    def derived(self) -> dict[str, np.ndarray]:
        """Flat draws of quantities in the data's terms.

        ``initial_value`` (``a``) and ``growth_per_period``: ``g`` for the exponential
        model; for the other curves the growth of the trend over the last observed
        period (the current growth rate, seasons excluded). Also ``ceiling``
        (``K``) and ``half_life`` for the curves that have them.
        """
        d = self.flat()
        if not self.spec.family.bends:  # growth is log1p_g throughout
            g = np.expm1(d["log1p_g"])
        elif "latest_log_growth" in self.extra:
            g = np.expm1(self.extra["latest_log_growth"].reshape(-1))
        else:
            g = np.expm1(general.latest_growth(
                self.spec, d, self.series.t_last, self.priors.t_ref, self.series, self.seed
            ))
        out = {"initial_value": np.exp(d["log_a"]), "growth_per_period": g}
        if "log_k" in d:
            out["ceiling"] = np.exp(d["log_k"])
        return out

    def log_likelihood(self) -> np.ndarray:
        """Pointwise log likelihood of the observations, ``(chain, draw, obs)``.

        With AR(1) errors each term is the density of an observation given the one
        before it (see :func:`bayesgrowth.models.general.log_likelihood`).
        """
        s = self.series
        if self.state_space is not None:
            post = self.state_space
            nodes = self.extra["nodes"].reshape(-1)
            flat = post.pointwise_loglik(nodes, post.beta_of(self.flat()))
            flat = flat - np.log(s.values)[None, :]
        elif self.spec.is_plain_exponential:
            flat = exponential.log_likelihood(self.flat(), s.t, s.values, self.priors.t_ref)
        else:
            flat = general.log_likelihood(
                self.spec, self.flat(), s.t, s.values, self.priors.t_ref, s.axis
            )
        c, d = self._shape
        return flat.reshape(c, d, -1)

    def attrs(self) -> dict[str, str]:
        """Provenance written into saved files: model, priors, version, input fingerprint."""
        axis = self.series.axis
        return {
            "bayesgrowth_version": __version__,
            "model": self.model,
            "errors": self.spec.errors,
            "noise": self.spec.noise,
            "seasonal": str(self.spec.seasonal).lower(),
            "model_spec": json.dumps(self.spec.to_dict()),
            "engine": self.engine,
            "seed": str(self.seed),
            "series_name": self.series.name,
            "source": self.series.source,
            "input_fingerprint": self.series.fingerprint(),
            "priors": json.dumps(self.priors.to_dict()),
            "settings": json.dumps(self.settings),
            "diagnostics": json.dumps(self.diagnostics.to_dict()),
            "period_axis": json.dumps(
                {"style": axis.style, "step": axis.step, "origin": axis.origin,
                 "month_end": axis.month_end, "day": axis.day}
            ),
        }

    def _datasets(self, predictive: dict | None = None):
        import xarray as xr

        c, d = self._shape
        coords = {"chain": np.arange(c), "draw": np.arange(d)}
        derived = {k: v.reshape(c, d) for k, v in self.derived().items()}
        variables = {}
        for k, v in {**self.posterior, **derived}.items():
            dims = ("chain", "draw") + tuple(f"{k}_dim_{i}" for i in range(v.ndim - 2))
            variables[k] = (dims, v)
        post = xr.Dataset(variables, coords=coords, attrs=self.attrs())
        obs_coords = {"period": self.series.labels}
        observed = xr.Dataset(
            {"value": (("period",), self.series.values), "t": (("period",), self.series.t)},
            coords=obs_coords,
        )
        loglik = xr.Dataset(
            {"value": (("chain", "draw", "period"), self.log_likelihood())},
            coords={**coords, **obs_coords},
        )
        groups = {"posterior": post, "observed_data": observed, "log_likelihood": loglik}
        if predictive is not None:
            groups["posterior_predictive"] = xr.Dataset(
                {
                    name: (("chain", "draw", "future_period"), arr.reshape(c, d, -1))
                    for name, arr in predictive["draws"].items()
                },
                coords={**coords, "future_period": predictive["periods"]},
            )
        return groups

    def to_inference_data(self, predictive: dict | None = None):
        """An :class:`arviz.InferenceData` with posterior, log likelihood and observed data.

        Parameters
        ----------
        predictive : dict, optional
            ``{"periods": labels, "draws": {name: array (n_draws, H)}}`` to add a
            posterior predictive group (see :meth:`Forecast.predictive_groups`).
        """
        import arviz as az

        return az.InferenceData(**self._datasets(predictive))

    def to_netcdf(self, path: str | Path, predictive: dict | None = None) -> Path:
        """Save as NetCDF in the InferenceData layout (readable by ``arviz.from_netcdf``).

        Written with xarray alone so that saving does not pay ArviZ's import.
        """
        path = Path(path)
        for i, (name, ds) in enumerate(self._datasets(predictive).items()):
            ds.to_netcdf(path, mode="w" if i == 0 else "a", group=name, engine="h5netcdf")
        return path
