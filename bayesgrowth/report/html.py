"""One self-contained HTML page per forecast, for readers who will not run Python.

The page embeds its figures as PNG data URIs and its style inline: it loads no
script, font or image from anywhere, so it opens offline and prints as it shows.
Every piece of user-supplied text (series name, file name, period labels,
column names) passes through :func:`html.escape`.
"""

from __future__ import annotations

import base64
import html
import io
import math
from dataclasses import dataclass, field
from datetime import UTC, datetime

import pandas as pd

from bayesgrowth._version import __version__
from bayesgrowth.forecast.forecast import CAUTION, Forecast, saturates
from bayesgrowth.report.outlook import outlook_html
from bayesgrowth.report.words import (
    band_phrases,
    fades_to_zero,
    fading_phrase,
    fmt_number,
    fmt_percent,
    fmt_probability,
    per_period,
    period_noun,
)

__all__ = ["BACKTEST_NAME", "ReportParts", "render_report", "SECTIONS"]

#: The reported model's name in the backtest section (its verdicts and chart).
BACKTEST_NAME = "this model"

#: Section ids, in page order; tests check that each is present.
SECTIONS = (
    "headline",
    "fan-chart",
    "forecast-table",
    "comparison",
    "calibration",
    "models",
    "priors",
    "diagnostics",
    "cautions",
    "reproduce",
)

_STYLE = """
:root { --ink: #23272F; --muted: #5B616B; --teal: #0E4F4C; --teal-2: #4E9E95;
        --teal-3: #C4E2DD; --teal-4: #EEF7F5; --rule: #E2E5E9; --warn: #D55E00; }
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; color: var(--ink);
       max-width: 60rem; margin: 0 auto; padding: 0 1.25rem 3rem; line-height: 1.5;
       font-variant-numeric: tabular-nums; }
header { border-top: 8px solid var(--teal); padding-top: 1.1rem; margin-bottom: 1.2rem; }
h1 { font-family: Georgia, "Times New Roman", serif; font-weight: normal; font-size: 1.85rem;
     color: var(--teal); margin: 0 0 .25rem; }
h2 { font-size: .8rem; text-transform: uppercase; letter-spacing: .12em; color: var(--teal);
     border-top: 1px solid var(--teal-3); padding-top: .6rem; margin: 2.2rem 0 .6rem; }
.sub { color: var(--muted); margin: 0; font-size: .95rem; }
.headline { font-size: 1.12rem; background: var(--teal-4); border: 1px solid var(--teal-3);
            border-radius: 6px; padding: .8rem 1.1rem; }
.headline strong { color: var(--teal); }
.warn { border-left: 4px solid var(--warn); background: #FDF1EA; padding: .5rem 1rem; }
.ok { border-left: 4px solid var(--teal-2); background: var(--teal-4); padding: .5rem 1rem; }
figure { margin: 1rem 0; }
figure img { max-width: 100%; height: auto; }
figcaption { font-size: .88rem; color: var(--muted); border-left: 2px solid var(--teal-3);
             padding-left: .6rem; }
.table-wrap { max-width: 100%; overflow-x: auto; }
table { border-collapse: collapse; font-size: .86rem; margin: .5rem 0; }
th, td { border-bottom: 1px solid var(--rule); padding: .25rem .6rem; text-align: right; }
th { border-bottom: 2px solid var(--teal); font-weight: 600; vertical-align: bottom; }
tbody tr:nth-child(even) { background: #F7F9FA; }
td:first-child, th:first-child { text-align: left; }
code { background: var(--teal-4); padding: 0 .2rem; }
@media print { body { max-width: none; font-size: 10pt; } h2 { break-after: avoid; }
               figure, table { break-inside: avoid; } .table-wrap { overflow: visible; } }
"""


def _e(text) -> str:
    return html.escape(str(text), quote=True)


def figure_data_uri(fig) -> str:
    """A matplotlib figure as a PNG data URI (the figure is closed)."""
    import matplotlib.pyplot as plt

    buf = io.BytesIO()
    # Fixed metadata so the same figure gives the same bytes on every run.
    fig.savefig(buf, format="png", dpi=100, metadata={"Software": None})
    plt.close(fig)
    return "data:image/png;base64," + base64.b64encode(buf.getvalue()).decode("ascii")


def _num(v) -> str:
    if isinstance(v, bool):
        return _e(v)
    if v is None or (isinstance(v, float) and not math.isfinite(v)):
        return "–"
    if isinstance(v, int | float):
        return fmt_number(v)
    return _e(v)


def _table(frame: pd.DataFrame, formats: dict | None = None) -> str:
    formats = formats or {}
    head = "".join(f"<th>{_e(c)}</th>" for c in frame.columns)
    rows = []
    for _, row in frame.iterrows():
        cells = []
        for c in frame.columns:
            fmt = formats.get(c)
            cells.append(f"<td>{fmt(row[c]) if fmt else _num(row[c])}</td>")
        rows.append("<tr>" + "".join(cells) + "</tr>")
    return (f'<div class="table-wrap"><table><thead><tr>{head}</tr></thead><tbody>'
            + "".join(rows) + "</tbody></table></div>")


def _pct(v) -> str:
    return fmt_percent(v)


@dataclass
class ReportParts:
    """Everything the page shows, computed beforehand.

    Attributes
    ----------
    forecast : Forecast
    fan_chart : str
        Data URI of the fan chart.
    command : str
        The command (or call) that reproduces the report.
    target : float, optional
    comparison : object, optional
        A :class:`~bayesgrowth.comparison.Comparison` and ``comparison_chart`` URI.
    backtest : object, optional
        A :class:`~bayesgrowth.backtest.BacktestResult` and ``calibration_chart`` URI.
    models : pandas.DataFrame, optional
        A model comparison table, shown when several models were fitted, with
        ``models_note`` (words) and ``models_chart`` (data URI of each model's band
        and their average).
    unit : str, optional
        What the values measure, e.g. "Revenue (EUR thousand)"; named above the tables.
    timestamp : str
        When the report was made (the only part that changes between runs).
    """

    forecast: Forecast
    fan_chart: str
    command: str
    target: float | None = None
    target_probability: float = 0.5
    comparison: object | None = None
    comparison_chart: str | None = None
    backtest: object | None = None
    calibration_chart: str | None = None
    models: pd.DataFrame | None = None
    models_note: str | None = None
    models_chart: str | None = None
    unit: str | None = None
    timestamp: str = field(
        default_factory=lambda: datetime.now(UTC).strftime("%Y-%m-%d %H:%M UTC")
    )


def _headline(p: ReportParts, summary: dict) -> str:
    fin = summary["final_period"]
    axis = p.forecast.fit.series.axis
    bands = band_phrases(fin, summary["levels"])
    parts = [
        f"Median forecast for <strong>{_e(fin['period'])}</strong>: <strong>"
        f"{fmt_number(fin['median'])}</strong>"
        + (f"; {_e('; '.join(bands))}." if bands else ".")
    ]
    g, gy = summary["growth_per_period"], summary.get("growth_per_year")
    parts.append(f"Growth {per_period(axis)} <strong>{_pct(g['median'])}</strong> (95% interval "
                 f"{_pct(g['lower_95'])} to {_pct(g['upper_95'])})"
                 + (f", per year {_pct(gy['median'])} (95% interval {_pct(gy['lower_95'])} to "
                    f"{_pct(gy['upper_95'])})." if gy and period_noun(axis) != "year" else "."))
    fading = fading_phrase(summary, axis, fades_to_zero(p.forecast.fit.priors))
    if fading:
        parts.append(_e(fading[0].upper() + fading[1:]) + ".")
    if "target" in summary:
        tg = summary["target"]
        p_last = tg["probability_at_least_by_period"][fin["period"]]
        parts.append(f"Probability of reaching {fmt_number(tg['value'])} by "
                     f"{_e(fin['period'])}: <strong>{fmt_probability(p_last)}</strong>.")
    out = '<p class="headline">' + " ".join(parts) + "</p>"
    if p.backtest is not None:
        verdict = p.backtest.verdicts().get(BACKTEST_NAME)
        if verdict and verdict != "calibrated":
            out += (f'<p class="warn">The backtest on this history judged this model\'s bands: '
                    f"<strong>{_e(verdict)}</strong>. Read the band above with that in mind "
                    "(see Backtest calibration below).</p>")
    return out


def _forecast_table(fc: Forecast) -> str:
    tab = fc.table
    ahead = f"{period_noun(fc.fit.series.axis).capitalize()}s ahead"
    cols = ["period", "step", "median"]
    for level in fc.levels:
        cols += [f"lower_{level}", f"upper_{level}"]
    shown = tab[cols].rename(columns={
        "period": "Period", "step": ahead, "median": "Median",
        **{f"lower_{lv}": f"{lv}% band, low" for lv in fc.levels},
        **{f"upper_{lv}": f"{lv}% band, high" for lv in fc.levels},
    })
    down = {f"{lv}% band, low": lambda v: fmt_number(v, direction="down") for lv in fc.levels}
    up = {f"{lv}% band, high": lambda v: fmt_number(v, direction="up") for lv in fc.levels}
    return _table(shown, {ahead: lambda v: str(int(v)), **down, **up})


def _fan_caption(p: ReportParts) -> str:
    spec = getattr(p.forecast.fit, "spec", None)
    fitted = (" the fitted curve over the history (dashed, with its band)," if spec is not None
              and not spec.family.states else "")
    target = (" The dash-dotted line is the target." if p.target is not None else "")
    return ("Observed history (dark line with dots)," + fitted + " the forecast median (thick "
            "teal line) and its credible bands (nested shades: darker = narrower); the vertical "
            "rule marks where the forecast starts." + target)


def _intervals_note() -> str:
    return ("<p>Values have three significant figures; band limits are rounded outward (low "
            "down, high up), so a printed band always contains the computed one.</p>")


def _comparison(p: ReportParts) -> str:
    if p.comparison is None:
        return "<p>Not computed for this report.</p>"
    comp = p.comparison
    sp = comp.spread
    tab = comp.table
    growth = f"Growth {per_period(comp.forecast.fit.series.axis)}"
    shown = tab[["variant", "n_points", "growth_per_period", "value_at_horizon",
                 "prob_at_least"]].rename(columns={
        "variant": "Least-squares variant", "n_points": "Points used",
        "growth_per_period": growth, "value_at_horizon": "Point forecast",
        "prob_at_least": "Posterior probability of at least this"})
    intro = (
        f"<p>The usual least-squares exponential fits, made with small differences of method and "
        f"data window, forecast {_e(comp.forecast.periods[-1])} between <strong>"
        f"{_num(sp['min'])}</strong> ({_e(sp['lowest_variant'])}) and <strong>"
        f"{_num(sp['max'])}</strong> ({_e(sp['highest_variant'])}): a ratio of "
        f"{sp['max_over_min']:.2f}. The last column is the Bayesian probability of a value at "
        "least as high as each point forecast.</p>"
    )
    fig = (f'<figure><img alt="Least-squares curves and the Bayesian band" '
           f'src="{p.comparison_chart}"><figcaption>Every least-squares curve (coloured and thin '
           "grey lines), the range they span (sand) and the Bayesian credible bands (nested teal "
           "shades, darker = narrower).</figcaption></figure>" if p.comparison_chart else "")
    return intro + fig + _table(shown, {
        growth: _pct, "Points used": lambda v: str(int(v)),
        "Posterior probability of at least this": fmt_probability})


def _calibration(p: ReportParts) -> str:
    bt = p.backtest
    if bt is None:
        return "<p>Not computed for this report (too short a history for a backtest, or " \
               "switched off).</p>"
    s = bt.settings
    lines = "".join(f"<li>{_e(line)}</li>" for line in bt.verdict_lines())
    fig = (f'<figure><img alt="Backtest calibration" src="{p.calibration_chart}">'
           "<figcaption>Share of outcomes inside each band against the stated level, with "
           "binomial intervals; a calibrated method sits on the diagonal.</figcaption></figure>"
           if p.calibration_chart else "")
    return (
        f"<p>Rolling-origin backtest on this history: each method refitted on the first "
        f"{_e(s.get('min_train'))} or more periods and scored on the next "
        f"{_e(s.get('horizon'))} actual values, origin by origin. Verdicts come from binomial "
        "intervals around the observed coverage, not from judgement.</p>"
        f"<ul>{lines}</ul>{fig}"
    )


def _models(p: ReportParts) -> str:
    if p.models is None:
        return (f"<p>One model was fitted: "
                f"{_e(p.forecast.fit.spec.label())}.</p>")
    note = f"<p>{_e(p.models_note)}</p>" if p.models_note else ""
    fig = (f'<figure><img alt="Each model\'s forecast band and their average" '
           f'src="{p.models_chart}"></figure>' if p.models_chart else "")
    return note + _table(p.models) + fig


def _priors(summary: dict) -> str:
    items = "".join(f"<li>{_e(line)}</li>" for line in summary["priors"]["in_words"])
    return f"<ul>{items}</ul>"


def _diagnostics(summary: dict) -> str:
    d = summary["diagnostics"]
    if summary["engine"] == "exact":  # no chains: R-hat and divergences do not apply
        status = ('<p class="ok">Computed exactly: no sampling, so no sampling checks are '
                  'needed.</p>' if d["ok"] else
                  '<p class="warn">' + _e("; ".join(d["problems"])) + ": the numbers read "
                  "from the draws are imprecise.</p>")
        rows = pd.DataFrame({"Check": ["Method", "Independent draws"],
                             "Value": [d["method"], f"{d['min_ess_bulk']:.0f}"]})
        return status + _table(rows, {"Value": _e})
    status = ('<p class="ok">Sampling checks passed.</p>' if d["ok"] else
              '<p class="warn">Sampling checks FAILED: ' + _e("; ".join(d["problems"])) +
              ". Do not rely on this forecast.</p>")
    rows = pd.DataFrame({
        "Check": ["Method", "Largest R-hat (want ≤ 1.01)", "Smallest bulk ESS (want ≥ 400)",
                  "Divergent transitions (want 0)"],
        "Value": [d["method"], f"{d['max_rhat']:.3f}", f"{d['min_ess_bulk']:.0f}",
                  str(d["divergences"])],
    })
    return status + _table(rows, {"Value": _e})


def _extrapolation_item(p: ReportParts) -> str:
    """The extrapolation caution; a curve with a ceiling does model saturation."""
    if saturates(p.forecast.fit):
        return ("Extrapolation: the forecast carries past growth forward on a fitted curve "
                "toward its ceiling. Competition and shocks are not in the model.")
    return ("Extrapolation: the forecast carries past growth forward on a fitted curve. "
            "Saturation, competition and shocks are not in the model.")


def _cautions(p: ReportParts, summary: dict) -> str:
    # notes about the input first (a value far out of line, a date moved into its period)
    items = [f"About the data: {n}" for n in summary["input"].get("notes", [])]
    items += [c for c in summary["cautions"] if c != CAUTION]
    items.append(_extrapolation_item(p))
    items.append("Calibration evidence from a short history is weak: a backtest on a few "
                 "origins cannot prove bands honest, only show when they were not.")
    items.append("This report is not investment advice. It supports a judgement; it does not "
                 "replace one.")
    return "<ul>" + "".join(f"<li>{_e(c)}</li>" for c in items) + "</ul>"


def _reproduce(p: ReportParts, summary: dict) -> str:
    inp = summary["input"]
    rows = pd.DataFrame({
        "Item": ["Command", "bayesgrowth version", "Engine", "Seed", "Input file",
                 "Input fingerprint (SHA-256)", "Observations", "Made"],
        "Value": [p.command, summary["bayesgrowth_version"], summary["engine"],
                  str(summary["seed"]), inp["source"], inp["fingerprint_sha256"],
                  f"{inp['n_observations']} ({inp['first_period']} to "
                  f"{summary['last_observed_period']})", p.timestamp],
    })
    return _table(rows, {"Value": lambda v: f"<code>{_e(v)}</code>"})


def _periods_words(frequency: str) -> str:
    """"; quarterly periods" for the table's heading; nothing for plain numbered periods."""
    return "" if frequency == "per period" else f"; {_e(frequency)} periods"


def render_report(p: ReportParts) -> str:
    """The whole HTML page as a string."""
    fc = p.forecast
    summary = fc.summary(p.target, p.target_probability)
    name = _e(fc.fit.series.name)
    section = {
        "headline": ("Forecast in one paragraph", _headline(p, summary)),
        "fan-chart": ("Fan chart", f'<figure><img alt="Fan chart of {name}" src="{p.fan_chart}">'
                      f"<figcaption>{_fan_caption(p)}</figcaption></figure>"
                      + outlook_html(fc, summary, figure_data_uri)),
        "forecast-table": (
            f"Forecast table ({_e(p.unit or 'values in the input’s units')}"
            f"{_periods_words(fc.fit.series.axis.frequency)})",
            _intervals_note() + _forecast_table(fc),
        ),
        "comparison": ("Least-squares comparison", _comparison(p)),
        "calibration": ("Backtest calibration", _calibration(p)),
        "models": ("Model comparison", _models(p)),
        "priors": ("Priors used", _priors(summary)),
        "diagnostics": ("Sampling diagnostics", _diagnostics(summary)),
        "cautions": ("Cautions", _cautions(p, summary)),
        "reproduce": ("How to reproduce this report", _reproduce(p, summary)),
    }
    body = "".join(
        f'<section id="{sid}"><h2>{title}</h2>{content}</section>'
        for sid, (title, content) in ((s, section[s]) for s in SECTIONS)
    )
    return (
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
        '<meta name="viewport" content="width=device-width, initial-scale=1">'
        f"<title>{name}: growth forecast</title><style>{_STYLE}</style></head><body>"
        f"<header><h1>{name}: growth forecast to {_e(fc.periods[-1])}</h1>"
        f'<p class="sub">Bayesian model: {_e(summary["model_description"])}; '
        f'{_e(summary["engine"])} engine; {summary["input"]["n_observations"]} observations. '
        f"Made with bayesgrowth {_e(__version__)}.</p></header>{body}</body></html>\n"
    )
