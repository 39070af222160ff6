"""The result of a backtest: forecasts, scores, verdicts, bias checks and the model ranking."""

from __future__ import annotations

from dataclasses import dataclass, field

import pandas as pd

from bayesgrowth.data.series import GrowthSeries
from bayesgrowth.display import fmt_number, fmt_percent, html_summary, text_summary
from bayesgrowth.scoring import ALL_STEPS

__all__ = ["NO_BANDS", "BacktestResult"]

#: Verdict of a method that gives a point forecast only.
NO_BANDS = "no bands (point forecast)"


@dataclass
class BacktestResult:
    """Forecasts and scores of a rolling-origin backtest.

    Every table names the model of each row in its ``method`` column: the
    model's name when the backtest was given ``models``, the method's name when
    it was given ``methods``.

    Attributes
    ----------
    forecasts : pandas.DataFrame
        One row per model, origin and step: ``method``, ``origin`` (label of
        the last training period), ``step`` (periods after the origin), ``period``
        (label of the target), ``actual``, ``median``, ``lower_L``/``upper_L``
        for each level, ``pit``, ``crps``, ``log_score``, then ``n_train``
        (training points used).
    scores : pandas.DataFrame
        :func:`bayesgrowth.scoring.score_table` of the forecasts: one row per
        model and step plus an ``"all"`` step, with ``n``, ``coverage_L`` and
        its binomial interval, ``crps``, ``log_score``, ``abs_pct_error_median``,
        ``verdict`` and more.
    diagnostics : pandas.DataFrame
        One row per origin of each Bayesian model: ``origin``, ``method``,
        ``ok``, ``max_rhat``, ``min_ess_bulk``, ``min_ess_tail``,
        ``divergences``, ``problems``.
    series : GrowthSeries
        The series backtested.
    levels : tuple of int
        Band levels in percent.
    settings : dict
        The run's settings (methods, models, horizon, min_train, stride, window,
        seed, n_draws).
    """

    forecasts: pd.DataFrame
    scores: pd.DataFrame
    diagnostics: pd.DataFrame
    series: GrowthSeries
    levels: tuple[int, ...]
    settings: dict = field(default_factory=dict)

    def _summary(self) -> tuple[str, str, list[str], list[list[str]]]:
        st = self.settings
        origins = self.forecasts["origin"].nunique()
        title = (f"Backtest of {self.series.name!r}: {len(self.methods)} models, "
                 f"{origins} origins, horizon {st.get('horizon', '?')}")
        cols = ["model", "verdict", *(f"{v}% coverage" for v in self.levels), "mean CRPS"]
        rows = []
        for method, verdict in self.verdicts().items():
            row = self._overall(method)
            cover = [fmt_percent(row[f"coverage_{v}"], 0) if verdict != NO_BANDS else "–"
                     for v in self.levels]
            rows.append([method, verdict, *cover, fmt_number(row["crps"])])
        best = min(self.methods, key=lambda m: self._overall(m)["crps"])
        headline = f"lowest mean CRPS: {best} ({self.verdicts()[best]})"
        return title, headline, cols, rows

    def __repr__(self) -> str:
        title, headline, _, rows = self._summary()
        bands = ", ".join(str(v) for v in self.levels) + "%"
        return text_summary(title, [headline] + [
            f"{r[0]}: {r[1]}; {bands} bands held {', '.join(r[2:-1])}; mean CRPS {r[-1]}"
            for r in rows
        ])

    def _repr_html_(self) -> str:
        return html_summary(*self._summary())

    @property
    def methods(self) -> tuple[str, ...]:
        """Names of the models (or methods) in the order they were run."""
        return tuple(self.settings["methods"])

    @property
    def descriptions(self) -> dict[str, str]:
        """Each model's name and what it is, in words."""
        return {m["name"]: m["description"] for m in self.settings.get("models", [])}

    def _overall(self, method: str) -> pd.Series:
        rows = self.scores[(self.scores["method"] == method) & (self.scores["step"] == ALL_STEPS)]
        return rows.iloc[0]

    def has_bands(self, method: str) -> bool:
        """Whether ``method`` gave bands (False for a point forecast)."""
        rows = self.forecasts[self.forecasts["method"] == method]
        return bool(rows[f"lower_{self.levels[0]}"].notna().any())

    def verdicts(self) -> dict[str, str]:
        """Calibration verdict of each model over all steps, in plain words.

        Returns
        -------
        dict of str to str
            ``"calibrated"``, ``"bands too narrow"``, ``"bands too wide"``,
            ``"mixed"`` (too narrow at one level, too wide at another), ``"too few
            outcomes"`` or, for a point forecast, ``"no bands (point forecast)"``.
            Decided by whether each stated level lies inside the binomial
            interval of the observed coverage
            (:func:`bayesgrowth.scoring.calibration_verdict`).
        """
        return {
            m: self._overall(m)["verdict"] if self.has_bands(m) else NO_BANDS
            for m in self.methods
        }

    def verdict_lines(self) -> list[str]:
        """One sentence per model: its verdict, coverage per level and mean CRPS."""
        lines = []
        for method, verdict in self.verdicts().items():
            row = self._overall(method)
            crps = f"mean CRPS {row['crps']:,.4g}"
            if verdict == NO_BANDS:
                lines.append(f"{method}: {verdict}; {crps} (the mean absolute error)")
                continue
            held = ", ".join(
                f"{lev}% bands held {row[f'coverage_{lev}']:.0%} "
                f"(interval {row[f'coverage_{lev}_low']:.0%}-{row[f'coverage_{lev}_high']:.0%})"
                for lev in self.levels
            )
            lines.append(f"{method}: {verdict}: {held} of {int(row['n'])} outcomes; {crps}")
        return lines

    def _bias_level(self, level: int | None) -> int:
        if level is None:
            return 80 if 80 in self.levels else self.levels[len(self.levels) // 2]
        if level not in self.levels:
            raise ValueError(f"level {level} is not in the backtest's levels {list(self.levels)}")
        return int(level)

    def bias(self) -> pd.DataFrame:
        """Outcomes below and above each model's bands, with the binomial check of bias.

        Returns
        -------
        pandas.DataFrame
            One row per banded model, step (then ``"all"``) and level: ``method``,
            ``step``, ``level``, ``n``, ``below``, ``above``, ``share_below``,
            ``share_above``, ``p_value`` (two-sided exact binomial test of the
            misses' split against 1/2, :func:`bayesgrowth.scoring.bias.band_bias`)
            and ``verdict``.
        """
        from bayesgrowth.scoring.bias import band_bias

        rows = []
        for method in (m for m in self.methods if self.has_bands(m)):
            f = self.forecasts[self.forecasts["method"] == method]
            steps = [(s, f[f["step"] == s]) for s in sorted(f["step"].unique())]
            for step, part in [*steps, (ALL_STEPS, f)]:
                for level in self.levels:
                    b = band_bias(part["actual"], part[f"lower_{level}"],
                                  part[f"upper_{level}"], level)
                    rows.append({"method": method, "step": step, "level": level, "n": b.n,
                                 "below": b.below, "above": b.above,
                                 "share_below": b.share_below, "share_above": b.share_above,
                                 "p_value": b.pvalue, "verdict": b.verdict})
        return pd.DataFrame(rows, columns=["method", "step", "level", "n", "below", "above",
                                           "share_below", "share_above", "p_value", "verdict"])

    def bias_lines(self, level: int | None = None) -> list[str]:
        """One sentence per banded model on the bias of its ``level``% band (default 80)."""
        from bayesgrowth.scoring.bias import band_bias

        level = self._bias_level(level)
        lines = []
        for method in (m for m in self.methods if self.has_bands(m)):
            f = self.forecasts[self.forecasts["method"] == method]
            b = band_bias(f["actual"], f[f"lower_{level}"], f[f"upper_{level}"], level)
            lines.append(f"{method}: {b.sentence()}")
        return lines

    def ranking(self, score: str = "crps") -> pd.DataFrame:
        """Models ranked by a proper score, each against the best with a Diebold-Mariano test.

        See :func:`bayesgrowth.backtest.ranking.rank_models`.
        """
        from bayesgrowth.backtest.ranking import rank_models

        return rank_models(self.forecasts, score=score, stride=int(self.settings.get("stride", 1)))

    def ranking_lines(self, score: str = "crps") -> list[str]:
        """The ranking over all steps in words (see :mod:`bayesgrowth.backtest.ranking`)."""
        from bayesgrowth.backtest.ranking import ranking_lines

        return ranking_lines(self.ranking(score))
