"""The report's model comparison: a readable table, what it says in words, and its chart."""

from __future__ import annotations

import pandas as pd

from bayesgrowth.display import fmt_weight
from bayesgrowth.report.words import band_phrases, fmt_number

__all__ = ["models_note", "models_table"]


def models_table(comparison) -> pd.DataFrame:
    """The comparison as a reader sees it: rank, model, elpd, difference, weight and interval.

    Parameters
    ----------
    comparison : ModelComparison

    Returns
    -------
    pandas.DataFrame
        Column names in words.
    """
    t = comparison.table
    return pd.DataFrame({
        "Rank": t["rank"].astype(int).astype(str),
        "Model": t["description"],
        "elpd (LOO)": t["elpd_loo"].map(lambda v: f"{v:.1f}"),
        "Below the best": [f"{d:.1f} (se {s:.1f})" for d, s in zip(t["elpd_diff"], t["dse"],
                                                                    strict=True)],
        "Stacking weight (90% interval)": [
            f"{fmt_weight(w)} ({fmt_weight(lo)} to {fmt_weight(hi)})" for w, lo, hi in zip(
                t["weight"], t["weight_lower_90"], t["weight_upper_90"], strict=True)],
        "Largest Pareto k": t["max_pareto_k"].map(lambda v: f"{v:.2f}"),
        "Sampling checks": t["diagnostics_ok"].map({True: "passed", False: "FAILED"}),
    })


def models_note(average) -> str:
    """What the comparison and the averaged forecast say, in a few sentences.

    Parameters
    ----------
    average : ModelAverage
    """
    comp, avg = average.comparison, average.averaged
    row = avg.table.iloc[-1]
    parts = [
        f"{len(comp.table)} models were fitted to the same history and compared by PSIS-LOO "
        "(how well each predicts every observed period when that period is left out).",
        *comp.reading(),
        comp.weights_reading() + ".",
        f"The forecast mixing the models by their weights gives for {row['period']}: median "
        f"{fmt_number(row['median'])}; " + "; ".join(band_phrases(row.to_dict(), avg.levels))
        + ".",
    ]
    if average.excluded:
        parts.append("Left out because their sampling checks failed: "
                     + ", ".join(average.excluded) + ".")
    parts.append("LOO measures fit to the observed periods, not extrapolation: curves that "
                 "agree over the history can part far beyond it.")
    return " ".join((p[0].upper() + p[1:]).rstrip(".") + "." for p in parts)
