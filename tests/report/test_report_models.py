"""The report's model comparison section, filled from a model average (exact engine)."""

import html
import re

import pytest

from bayesgrowth.cli import main
from bayesgrowth.data.demo import demo_path
from bayesgrowth.display import fmt_weight
from bayesgrowth.inference import fit_series
from bayesgrowth.priors import InitialValuePrior, Priors
from bayesgrowth.report import build_report
from bayesgrowth.select import model_average


@pytest.fixture(scope="module")
def average(demo):
    # Two exact exponential fits that differ by the initial-value prior (fast).
    fits = {"default": fit_series(demo, engine="exact", seed=2, model="exponential"),
            "fixed start": fit_series(demo, engine="exact", seed=2,
                                      priors=Priors(initial=InitialValuePrior(0)),
                                      model="exponential")}
    return model_average(fits, 4, seed=2)


def _section(page, sid):
    return re.search(rf'<section id="{sid}">(.*?)</section>', page, re.S).group(1)


def test_report_shows_ranks_weights_with_intervals_and_the_models_chart(demo, average):
    page = build_report(demo, 4, engine="exact", seed=2, with_backtest=False, average=average,
                        timestamp="t")
    models = _section(page, "models")
    table = average.comparison.table
    assert "Stacking weight (90% interval)" in models
    for row in table.itertuples():
        assert f"<td>{row.rank}</td>" in models  # ranks from 1
        assert (f"{fmt_weight(row.weight)} ({fmt_weight(row.weight_lower_90)} to "
                f"{fmt_weight(row.weight_upper_90)})") in html.unescape(models)
    assert "<td>0</td>" not in models
    assert models.count("<img") == 1
    avg_last = average.averaged.table.iloc[-1]
    assert f"for {avg_last['period']}: median" in models


def test_report_refuses_an_unknown_model_and_writes_nothing(tmp_path, capsys):
    out = tmp_path / "rep"
    rc = main(["report", str(demo_path()), "-H", "4", "--out", str(out), "--models",
               "exponential,cubic", "--quiet"])
    assert rc == 2 and not out.exists()
    assert "unknown model 'cubic'" in capsys.readouterr().err


def test_cli_report_prints_the_pages_headline(tmp_path, capsys):
    import re as _re

    out = tmp_path / "rep"
    assert main(["report", str(demo_path()), "-H", "4", "--target", "9000", "--out", str(out),
                 "--no-backtest", "--quiet"]) == 0
    printed = capsys.readouterr().out
    page = (out / "report.html").read_text()
    headline = _re.search(r'<p class="headline">(.*?)</p>', page, _re.S).group(1)
    median = _re.search(r"<strong>([\d,]+)</strong>", headline).group(1)
    assert f"median {median};" in printed  # the same number on the terminal and the page
    assert "target 9,000: probability" in printed and "not investment advice" in printed
