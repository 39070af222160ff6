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
from bayesgrowth.forecast.forecast import CAUTION, Forecast

__all__ = ["ReportParts", "render_report", "SECTIONS"]

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
body { font-family: system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; color: #111;
       max-width: 60rem; margin: 0 auto; padding: 1rem 1.25rem 3rem; line-height: 1.45; }
h1 { font-size: 1.6rem; margin-bottom: .2rem; }
h2 { font-size: 1.2rem; border-bottom: 1px solid #999; padding-bottom: .2rem; margin-top: 2rem; }
.sub { color: #444; margin-top: 0; }
.headline { font-size: 1.1rem; background: #f3f3f3; border-left: 6px solid #0072B2;
            padding: .6rem 1rem; }
.warn { border-left: 6px solid #D55E00; background: #fbeee6; padding: .5rem 1rem; }
.ok { border-left: 6px solid #009E73; background: #e9f6f1; padding: .5rem 1rem; }
figure { margin: 1rem 0; }
figure img { max-width: 100%; height: auto; border: 1px solid #ddd; }
figcaption { font-size: .9rem; color: #333; }
.table-wrap { max-width: 100%; overflow-x: auto; }
table { border-collapse: collapse; font-size: .85rem; margin: .5rem 0; }
th, td { border: 1px solid #bbb; padding: .2rem .45rem; text-align: right; }
th { background: #e8e8e8; }
td:first-child, th:first-child { text-align: left; }
code { background: #f3f3f3; padding: 0 .2rem; }
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
    if v is None or (isinstance(v, float) and not math.isfinite(v)):
        return "–"
    if isinstance(v, int | float):
        return f"{v:,.0f}" if abs(v) >= 1000 else f"{v:,.4g}"
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
    return "–" if v is None or not math.isfinite(float(v)) else f"{100 * float(v):.1f}%"


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
        A model comparison table, shown when several models were fitted.
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
    timestamp: str = field(
        default_factory=lambda: datetime.now(UTC).strftime("%Y-%m-%d %H:%M UTC")
    )


def _headline(p: ReportParts, summary: dict) -> str:
    fin = summary["final_period"]
    parts = [
        f"Expected value in <strong>{_e(fin['period'])}</strong>: <strong>"
        f"{_num(fin['median'])}</strong> (median), 80% credible band "
        f"<strong>{_num(fin.get('lower_80'))} to {_num(fin.get('upper_80'))}</strong>."
    ]
    gy = summary.get("growth_per_year")
    gp = summary["growth_per_period"]
    if gy:
        parts.append(f"Growth per year {_pct(gy['median'])} (95% interval {_pct(gy['lower_95'])} "
                     f"to {_pct(gy['upper_95'])}).")
    else:
        parts.append(f"Growth per period {_pct(gp['median'])} (95% interval "
                     f"{_pct(gp['lower_95'])} to {_pct(gp['upper_95'])}).")
    if "target" in summary:
        tg = summary["target"]
        p_last = tg["probability_at_least_by_period"][fin["period"]]
        parts.append(f"Probability of reaching {_num(tg['value'])} by {_e(fin['period'])}: "
                     f"<strong>{p_last:.0%}</strong>.")
    out = '<p class="headline">' + " ".join(parts) + "</p>"
    if p.backtest is not None:
        verdict = p.backtest.verdicts().get(summary["engine"])
        if verdict and verdict != "calibrated":
            out += (f'<p class="warn">The backtest on this history judged this model\'s bands: '
                    f"<strong>{_e(verdict)}</strong>. Read the band above with that in mind "
                    "(see Backtest calibration below).</p>")
    return out


def _forecast_table(fc: Forecast) -> str:
    tab = fc.table
    cols = ["period", "step", "median"]
    for level in fc.levels:
        cols += [f"lower_{level}", f"upper_{level}"]
    shown = tab[cols].rename(columns={
        "period": "Period", "step": "Periods ahead", "median": "Median",
        **{f"lower_{lv}": f"{lv}% band, low" for lv in fc.levels},
        **{f"upper_{lv}": f"{lv}% band, high" for lv in fc.levels},
    })
    return _table(shown, {"Periods ahead": lambda v: str(int(v))})


def _comparison(p: ReportParts) -> str:
    if p.comparison is None:
        return "<p>Not computed for this report.</p>"
    comp = p.comparison
    sp = comp.spread
    tab = comp.table
    shown = tab[["variant", "n_points", "growth_per_period", "value_at_horizon",
                 "prob_at_least"]].rename(columns={
        "variant": "Least-squares variant", "n_points": "Points used",
        "growth_per_period": "Growth per period", "value_at_horizon": "Point forecast",
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
           f'src="{p.comparison_chart}"><figcaption>Every least-squares curve (thin lines), the '
           "range they span (shaded) and the Bayesian credible bands.</figcaption></figure>"
           if p.comparison_chart else "")
    return intro + fig + _table(shown, {
        "Growth per period": _pct, "Points used": lambda v: str(int(v)),
        "Posterior probability of at least this": lambda v: f"{float(v):.0%}"})


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
        return "<p>One model was fitted (exponential growth).</p>"
    note = f"<p>{_e(p.models_note)}</p>" if p.models_note else ""
    return note + _table(p.models)


def _priors(summary: dict) -> str:
    items = "".join(f"<li>{_e(line)}</li>" for line in summary["priors"]["in_words"])
    return f"<ul>{items}</ul>"


def _diagnostics(summary: dict) -> str:
    d = summary["diagnostics"]
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


def _cautions(p: ReportParts, summary: dict) -> str:
    items = [c for c in summary["cautions"] if c != CAUTION]
    items.append("Extrapolation: the forecast carries past growth forward on a fitted curve. "
                 "Saturation, competition and shocks are not in the model.")
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


def render_report(p: ReportParts) -> str:
    """The whole HTML page as a string."""
    fc = p.forecast
    summary = fc.summary(p.target, p.target_probability)
    name = _e(fc.fit.series.name)
    section = {
        "headline": ("Forecast in one paragraph", _headline(p, summary)),
        "fan-chart": ("Fan chart", f'<figure><img alt="Fan chart of {name}" src="{p.fan_chart}">'
                      "<figcaption>Observed values (black), forecast median and credible bands "
                      "(shaded, darker = more likely).</figcaption></figure>"),
        "forecast-table": (
            f"Forecast table (values in the input's units; {fc.fit.series.axis.frequency} "
            "periods)",
            _forecast_table(fc),
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
        f"<h1>{name}: growth forecast to {_e(fc.periods[-1])}</h1>"
        f'<p class="sub">Bayesian {_e(summary["model"])} growth model, {_e(summary["engine"])} '
        f"engine, {summary['input']['n_observations']} observations. Made with bayesgrowth "
        f"{_e(__version__)}.</p>{body}</body></html>\n"
    )
