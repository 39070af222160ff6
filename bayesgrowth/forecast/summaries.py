"""Summaries of a forecast: the JSON-ready summary, its ``repr`` and its notebook table."""

from __future__ import annotations

import math

import numpy as np

from bayesgrowth.display import fmt_interval, fmt_number, html_summary, text_summary
from bayesgrowth.forecast.bands import interval_summary
from bayesgrowth.forecast.means import mean_caution
from bayesgrowth.inference.fit import Fit
from bayesgrowth.seeds import stream

__all__ = ["forecast_headline", "forecast_html", "forecast_summary", "forecast_text"]


def _title(fc) -> str:
    fit = fc.fit
    spec = getattr(fit, "spec", None)
    model = f"{spec.label()}; {fit.engine} engine" if spec is not None else fit.engine
    return f"Forecast of {fit.series.name!r}: {model}"


def forecast_headline(fc) -> str:
    """The last period's median and widest band, in one line."""
    row = fc.table.iloc[-1]
    level = max(fc.levels)
    band = fmt_interval(row[f"lower_{level}"], row[f"upper_{level}"])
    return f"{row['period']}: median {fmt_number(row['median'])}, {level}% band {band}"


def forecast_text(fc) -> str:
    """A few lines: the model and series, the periods, and the last period's band."""
    levels = ", ".join(str(v) for v in fc.levels)
    return text_summary(_title(fc), [
        f"{fc.horizon} periods, {fc.periods[0]} to {fc.periods[-1]}; bands {levels}%; "
        f"{fc.draws.shape[0]:,} draws; seed {fc.seed}",
        forecast_headline(fc),
    ])


def forecast_html(fc) -> str:
    """The title, the last period's band and a table of every period's bands."""
    table = fc.table
    cols = ["period", "median"] + [f"{v}% band" for v in fc.levels]
    rows = [
        [row["period"], fmt_number(row["median"])]
        + [fmt_interval(row[f"lower_{v}"], row[f"upper_{v}"]) for v in fc.levels]
        for _, row in table.iterrows()
    ]
    return html_summary(_title(fc), forecast_headline(fc), cols, rows)


def forecast_summary(fc, target: float | None = None, target_probability: float = 0.5) -> dict:
    """A JSON-ready summary of a forecast: parameters, growth, diagnostics, provenance, cautions.

    Parameters
    ----------
    fc : Forecast
    target : float, optional
        A value whose probability of being reached is summarised per period.
    target_probability : float
        The probability at which the target counts as reached.

    Returns
    -------
    dict
    """
    from bayesgrowth.forecast.forecast import CAUTION, model_caution

    fit = fc.fit
    out = {
        "series": fit.series.name,
        "engine": fit.engine,
        "model": fit.model,
        "model_options": fit.spec.to_dict(),
        "model_description": fit.spec.label(),
        "seed": fit.seed,
        "forecast_seed": fc.seed,
        "horizon": fc.horizon,
        "levels": list(fc.levels),
        "frequency": fit.series.axis.frequency,
        "last_observed_period": fit.series.labels[-1],
        **_parameters(fc),
        "final_period": _final_period(fc),
    }
    if target is not None:
        out.update(_target(fc, target, target_probability))
    out.update(_provenance(fit))
    means = mean_caution(fc.table, fc.levels)
    out["cautions"] = [c for c in (model_caution(fit), fc.caution, means, CAUTION) if c]
    return out


def _parameters(fc) -> dict:
    """Initial value, growth (per period and year, doubling time), ceiling, half-life."""
    derived, flat, growth = fc.fit.derived(), fc.fit.flat(), fc.growth()
    out = {
        "initial_value": {"reference_period": fc.fit.priors.reference_period,
                          **interval_summary(derived["initial_value"])},
        "growth_per_period": interval_summary(derived["growth_per_period"]),
    }
    if "ceiling" in derived:
        out["ceiling"] = interval_summary(derived["ceiling"])
    if fc.fit.state_space is not None and fc.fit.spec.growth_fades:
        out["growth_fades"] = _fading_summary(fc.fit)
    elif "half_life" in flat:
        out["half_life_periods"] = interval_summary(flat["half_life"])
    for name in ("growth_per_year", "doubling_time_periods"):
        if name in growth.index:
            out[name] = {k: _finite(v) for k, v in growth.loc[name].items()}
    out["prob_growth_positive"] = float(growth.loc["prob_growth_positive", "median"])
    return out


def _final_period(fc) -> dict:
    """The last forecast period: median, mean and bands (the exact mixture's, if any).

    A mean too large to compute (left empty in the table) is infinite here, so the JSON
    writer lists it among the numbers not available, with that reason;
    :func:`~bayesgrowth.forecast.means.mean_caution` says among the cautions what to read
    instead.
    """
    last = fc.table.iloc[-1]
    if fc.exact is not None:  # the exact mixture's numbers, as in the table: no draws needed
        keys = ["median", "mean"] + [f"{side}_{level}" for level in fc.levels
                                     for side in ("lower", "upper")]
        out = {"period": fc.periods[-1], **{k: float(last[k]) for k in keys}}
    else:
        with np.errstate(over="ignore", invalid="ignore"):
            out = {"period": fc.periods[-1], **interval_summary(fc.draws[:, -1], fc.levels)}
    if "mean" in last.index:
        mean = float(last["mean"])
        out["mean"] = mean if math.isfinite(mean) else math.inf
    return out


def _target(fc, target: float, target_probability: float) -> dict:
    """The probability of reaching ``target`` by each period, and the time to reach it."""
    return {
        "target": {
            "value": target,
            "probability_at_least_by_period": {
                k: float(v) for k, v in fc.prob_exceeds(target).items()
            },
            "probability": target_probability,
            "first_period_reaching": fc.first_period_reaching(target, target_probability),
        },
        "time_to_target": fc.time_to_target(target).to_dict((0.5, 0.8, target_probability)),
    }


def _provenance(fit: Fit) -> dict:
    """Diagnostics, priors, settings, the input's fingerprint and the package version."""
    return {
        "diagnostics": fit.diagnostics.to_dict(),
        "priors": {"used": fit.priors.to_dict(), "in_words": fit.priors.describe(fit.spec)},
        "settings": fit.settings,
        "input": {
            "source": fit.series.source,
            "n_observations": fit.series.n,
            "first_period": fit.series.labels[0],
            "missing_periods": list(fit.series.gaps),
            "notes": list(fit.series.notes),  # what the reader noted, as the terminal said it
            "fingerprint_sha256": fit.series.fingerprint(),
        },
        "bayesgrowth_version": fit.attrs()["bayesgrowth_version"],
    }


def _fading_summary(fit: Fit) -> dict:
    """How likely growth fades, and its half-life among the draws where it does."""
    post = fit.state_space
    # the half-life spread over each node's grid cell, so its interval is not stuck on the
    # grid's few values (the draws themselves stay at the nodes)
    half_life = post.spread("half_life", fit.extra["nodes"].reshape(-1),
                            stream(fit.seed, "theta_cells"))
    fades = np.isfinite(half_life)
    out = {"probability": float(post.branch_weight.get("fading", fades.mean()))}
    if fades.sum() >= 20:
        out["half_life_periods_if_fading"] = interval_summary(half_life[fades])
    return out


def _finite(v: float) -> float | None:
    return float(v) if math.isfinite(v) else None
