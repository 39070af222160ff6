"""Recalibration benchmark: do recalibrated bands hold what they state on real hold-outs?

For every growing M1 and Tourism series (:mod:`realdata_data`; only these two collections)
and each model (the package's default and the exponential curve, both on the exact engine):

1. **Learn, inside the training part only.** A rolling-origin backtest of the model on the
   series' training part (first training set half of it, at most :data:`MAX_ORIGINS`
   origins spread evenly, horizon the collection's), through
   :func:`bayesgrowth.backtest.recalibrate.backtest_model`. Its PIT values feed two maps:
   the series' own (:func:`~bayesgrowth.forecast.recalibration_map.learn_map`, what
   ``forecast --recalibrate`` does) and one pooled over every series of the same frequency
   (what ``batch --recalibrate`` does).
2. **Score on the official hold-out**, which no map saw: the model is fitted to the whole
   training part and its hold-out forecast is scored before and after each map
   (coverage of the 80% and 95% bands, MSIS, scaled CRPS, sMAPE, MASE;
   :mod:`realdata_scores`), quantiles from the exact predictive (log-normal mixture) or,
   for the exponential curve, its draws.

Run::

    python benchmarks/recalibration.py --max-per-group 60 --jobs 2 --out docs/recalibration

It writes ``scores_by_series.csv``, ``maps.csv`` (outcomes and effective numbers per
frequency, model and step), ``summary.csv`` and ``summary.md`` into ``--out``.
"""

from __future__ import annotations

import argparse
import math
import time
import warnings
import zlib
from collections.abc import Sequence
from pathlib import Path

import numpy as np
import pandas as pd
import realdata_runs as runs
from realdata_data import FREQUENCIES, SeriesRecord
from realdata_scores import PROBS, SCORE_COLUMNS, score_series, summarise

__all__ = ["MODELS", "backtest_task", "main", "score_task"]

#: The models compared: options of fit_series over the package's default model.
MODELS = {"default": {}, "exponential": {"model": "exponential"}}
#: Most backtest origins per series (spread evenly over the second half of the training part).
MAX_ORIGINS = 6
#: Labels of the three versions of each model's forecast.
VARIANTS = {"before": "{}", "own": "{}, recalibrated (own series)",
            "pooled": "{}, recalibrated (pooled)"}
_FILES = ["scores_by_series.csv", "maps.csv", "summary.csv", "summary.md"]


def _fit(record: SeriesRecord, model: str):
    from realdata_methods import growth_series

    from bayesgrowth.config import DEFAULT_ENGINE, DEFAULT_MODEL
    from bayesgrowth.inference.run import fit_series

    values = np.ascontiguousarray(record.train, dtype=float)
    series = growth_series(values, record.period, name=record.name)
    options = {"engine": DEFAULT_ENGINE, **DEFAULT_MODEL, **MODELS[model]}
    return fit_series(series, seed=zlib.crc32(values.tobytes()), **options)


def backtest_task(task: tuple[SeriesRecord, str]) -> dict:
    """Backtest one model inside one series' training part: its steps and PIT values."""
    from bayesgrowth.backtest.recalibrate import backtest_model, default_min_train

    record, model = task
    out = {"key": (record.collection, record.name, model), "step": np.zeros(0, int),
           "pit": np.zeros(0), "error": ""}
    start = time.process_time()
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            fit = _fit(record, model)
            n = record.train.size
            min_train = default_min_train(n)
            stride = max(1, math.ceil((n - min_train) / MAX_ORIGINS))
            result = backtest_model(fit, horizon=record.h, min_train=min_train, stride=stride)
        rows = result.forecasts[np.isfinite(result.forecasts["pit"])]
        out["step"], out["pit"] = rows["step"].to_numpy(int), rows["pit"].to_numpy(float)
    except Exception as exc:  # a failed backtest gives no outcomes; the row says why
        out["error"] = f"{type(exc).__name__}: {exc}"[:300]
    out["cpu_seconds"] = time.process_time() - start
    return out


def score_task(task: tuple) -> list[dict]:
    """Fit one model to one training part and score its hold-out before and after the maps."""
    from bayesgrowth.forecast.forecast import forecast
    from bayesgrowth.forecast.recalibrated import base_quantiles

    record, model, maps = task
    base = {"collection": record.collection, "series": record.name,
            "frequency": record.frequency, "period": record.period,
            "n_train": int(record.train.size), "h": record.h}
    start = time.process_time()
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            fc = forecast(_fit(record, model), record.h)
            probs = {"before": np.tile(PROBS[:, None], (1, record.h))}
            for variant, qmap in maps.items():
                probs[variant] = np.column_stack([qmap.inverse(PROBS, h + 1)
                                                  for h in range(record.h)])
            quantiles = {v: base_quantiles(fc, p) for v, p in probs.items()}
    except Exception as exc:  # a failed fit is a row per variant, not a crash
        error = f"{type(exc).__name__}: {exc}"[:300]
        return [{**base, "method": VARIANTS[v].format(model), "ok": False, "error": error,
                 **dict.fromkeys(SCORE_COLUMNS, np.nan)} for v in VARIANTS]
    seconds = time.process_time() - start
    rows = []
    for variant, q in quantiles.items():
        scores = score_series(record.train, record.test, record.period, q)
        rows.append({**base, "method": VARIANTS[variant].format(model), "ok": True, "error": "",
                     "seconds": seconds, "cpu_seconds": seconds, **scores})
    return rows


def learn_maps(records: Sequence[SeriesRecord], backtests: list[dict], models: Sequence[str]):
    """The own map of every series and model, the pooled map of every frequency and model.

    Returns
    -------
    own : dict
        ``(collection, name, model) -> QuantileMap`` (the identity without outcomes).
    pooled : dict
        ``(frequency, model) -> QuantileMap``.
    table : pandas.DataFrame
        Per frequency, model and step: outcomes, effective number.
    """
    from bayesgrowth.forecast.recalibration_map import learn_map

    by_key = {b["key"]: b for b in backtests}
    own, pooled, rows = {}, {}, []
    floor = 0.5 / 4000  # the backtest's 4,000 draws per forecast
    for model in models:
        for freq in FREQUENCIES:
            members = [r for r in records if r.frequency == freq]
            if not members:
                continue
            horizon = max(r.h for r in members)
            parts = [by_key[(r.collection, r.name, model)] for r in members]
            for r, b in zip(members, parts, strict=True):
                own[(r.collection, r.name, model)] = learn_map(b["pit"], b["step"], horizon=r.h,
                                                               pit_floor=floor)
            qmap = learn_map(np.concatenate([b["pit"] for b in parts]),
                             np.concatenate([b["step"] for b in parts]), horizon=horizon,
                             pit_floor=floor)
            pooled[(freq, model)] = qmap
            rows += [{"frequency": freq, "model": model, "step": h + 1,
                      "outcomes": int(qmap.own_outcomes[h]),
                      "pooled_outcomes": int(qmap.n_outcomes[h]),
                      "effective_n": float(qmap.effective_n[h])} for h in range(horizon)]
    return own, pooled, pd.DataFrame(rows)


def compact_table(summary: pd.DataFrame, models: Sequence[str]) -> str:
    """Markdown: per group and model, coverage and MSIS before and after each map."""
    head = ("| group | model | 80% band: before / own / pooled | 95% band: before / own / pooled"
            " | MSIS mean (median): before / pooled |")
    lines = [head, "|---|---|---|---|---|"]
    groups = ["pooled"] + [g for g in dict.fromkeys(summary["group"]) if g != "pooled"]
    for group in groups:
        rows = summary[summary["group"] == group].set_index("method")
        for model in models:
            names = [VARIANTS[v].format(model) for v in VARIANTS]
            if not all(n in rows.index for n in names):
                continue
            cover = [" / ".join(f"{100 * rows.loc[n, col]:.1f}" for n in names)
                     for col in ("inside_80", "inside_95")]
            msis = " / ".join(f"{rows.loc[n, 'msis']:.1f} ({rows.loc[n, 'msis_median']:.1f})"
                              for n in (names[0], names[2]))
            label = "all series" if group == "pooled" else group
            lines.append(f"| {label} | {model} | {cover[0]} | {cover[1]} | {msis} |")
    return "\n".join(lines)


def _parse(argv: Sequence[str] | None) -> argparse.Namespace:
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--models", default=",".join(MODELS))
    runs.add_data_options(p, out="docs/recalibration")
    args = p.parse_args(argv)
    args.models = runs.names(args.models, list(MODELS), "--models")
    return runs.check_data_options(args, _FILES)


def _notes(args, records, maps: pd.DataFrame, minutes: float) -> list[str]:
    totals = maps.groupby(["frequency", "model"])["outcomes"].sum()
    learned = "; ".join(f"{f} {m}: {n:,}" for (f, m), n in totals.items())
    return [
        runs.data_note(args, records),
        "",
        f"Maps learned from backtests inside the training parts (first training set half of "
        f"it, at most {MAX_ORIGINS} origins); backtest outcomes per frequency and model: "
        f"{learned}. Scored on the official hold-outs; {args.jobs} process(es), "
        f"{minutes:.1f} min wall time.",
    ]


def _write(out: Path, scores, maps, summary, notes, models, force: bool = False) -> None:
    from realdata_report import markdown_summary

    from bayesgrowth.cli.output import staged_output

    with staged_output(out, _FILES, protect=[], force=force) as stage:
        scores.to_csv(stage / "scores_by_series.csv", index=False, float_format="%.6g")
        maps.to_csv(stage / "maps.csv", index=False, float_format="%.6g")
        summary.to_csv(stage / "summary.csv", index=False, float_format="%.6g")
        text = markdown_summary(summary, "Recalibrated bands on growing M1 and Tourism series",
                                notes)
        (stage / "summary.md").write_text(text + "\n" + compact_table(summary, models) + "\n",
                                          encoding="utf-8")


def main(argv: Sequence[str] | None = None) -> int:
    return runs.guarded("recalibration", _parse, _run_all, argv)


def _run_all(args: argparse.Namespace) -> int:
    records = runs.load_records_of(args)
    start = time.perf_counter()
    tasks = [(r, m) for r in records for m in args.models]
    backtests = runs.run_tasks(backtest_task, tasks, args.jobs, "backtests")
    own, pooled, maps = learn_maps(records, backtests, args.models)
    score_tasks = [(r, m, {"own": own[(r.collection, r.name, m)],
                           "pooled": pooled[(r.frequency, m)]}) for r, m in tasks]
    scored = runs.run_tasks(score_task, score_tasks, args.jobs, "hold-outs")
    scores = pd.DataFrame([row for rows in scored for row in rows])
    minutes = (time.perf_counter() - start) / 60
    methods = [VARIANTS[v].format(m) for m in args.models for v in VARIANTS]
    summary = summarise(scores, n_boot=args.bootstrap, seed=args.seed, methods=methods)
    notes = _notes(args, records, maps, minutes)
    _write(Path(args.out), scores, maps, summary, notes, args.models, args.force)
    failed = sum(1 for b in backtests if b["error"])
    print(compact_table(summary, args.models))
    print(f"{len(records)} series, {failed} backtests failed; wrote {', '.join(_FILES)} to "
          f"{args.out} ({minutes:.1f} min)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
