"""``bayesgrowth pool``: related series fitted together (one small NUTS run, marked slow)."""

import pandas as pd
import pytest

from bayesgrowth.cli import main
from bayesgrowth.cli.output import MANIFEST
from bayesgrowth.data.panel import invented_panel


@pytest.fixture
def panel_csv(tmp_path):
    path = tmp_path / "panel.csv"
    invented_panel(3, min_periods=8, max_periods=10, seed=1).to_csv(path, index=False)
    return path


def test_pool_refuses_a_single_series_before_any_work(tmp_path, panel_csv, capsys):
    one = tmp_path / "one.csv"
    frame = pd.read_csv(panel_csv)
    frame[frame["series"] == "s0001"].to_csv(one, index=False)
    out = tmp_path / "p"
    assert main(["pool", str(one), "-H", "2", "--out", str(out), "--quiet"]) == 2
    assert not out.exists()
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "at least 2 series" in err[0]


def test_pool_names_a_refused_series_once_with_its_row(tmp_path, capsys):
    bad = tmp_path / "bad.csv"
    bad.write_text("series,period,value\nA,2024Q1,100\nA,2024Q2,-5\nA,2024Q3,120\n"
                   "B,2024Q1,100\nB,2024Q2,110\n")
    out = tmp_path / "p"
    assert main(["pool", str(bad), "-H", "2", "--out", str(out), "--quiet"]) == 2
    assert not out.exists()
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and err[0].count("bad.csv") == 1, err
    assert "bad.csv, series 'A', row 3, column 'value': value -5 is not above zero" in err[0]
    assert err[0].endswith("(a pooled fit takes every series of the file; 1 more series "
                           "refused)")


@pytest.mark.slow
def test_pool_forecasts_every_series_and_their_total(tmp_path, panel_csv, capsys):
    out = tmp_path / "p"
    rc = main(["pool", str(panel_csv), "-H", "3", "--out", str(out), "--draws", "150",
               "--tune", "150", "--chains", "2", "--quiet", "--accept-warnings"])
    assert rc == 0
    assert sorted(p.name for p in out.iterdir()) == sorted(
        [MANIFEST, "pooled_forecast.csv", "pooled_growth.csv", "group_total.csv"])
    fc = pd.read_csv(out / "pooled_forecast.csv")
    assert sorted(set(fc["series"])) == ["s0001", "s0002", "s0003"]
    total = pd.read_csv(out / "group_total.csv")
    assert len(total) == 3
    # every series has a forecast for each period the total adds (one that ends sooner is
    # forecast further), and the series ending last exactly the three asked for
    sizes = fc.groupby("series").size()
    assert (fc[fc["period"].isin(total["period"])].groupby("series").size() == 3).all()
    assert sizes.min() == 3
    assert (fc.groupby("series")["period"].last() == total["period"].iloc[-1]).all()
    # The total's median exceeds every series' median in the same period (values > 0).
    last = total.iloc[-1]
    same = fc[fc["period"] == last["period"]]
    assert (same["median"] < last["median"]).all()
    printed = capsys.readouterr().out
    assert "group growth per quarter" in printed and "not investment advice" in printed


def _pool_written(tmp_path, monkeypatch, horizon: int) -> int:
    """``pool`` on 'late' (16 quarters) and 'early' (13) with the written-down fit, to p/."""
    from written_pooled import quarters, written_pooled_fit

    import bayesgrowth.inference.pooled as pooled

    rows = [("late", p, 100.0 * 1.05**i) for i, p in enumerate(quarters(2022, 16))]
    rows += [("early", p, 400.0 * 1.05**i) for i, p in enumerate(quarters(2022, 13))]
    path = tmp_path / "panel.csv"
    pd.DataFrame(rows, columns=["series", "period", "value"]).to_csv(path, index=False)
    monkeypatch.setattr(pooled, "fit_pooled", lambda panel, priors, **_: written_pooled_fit(
        dict(panel)))
    return main(["pool", str(path), "-H", str(horizon), "--out", str(tmp_path / "p"),
                 "--quiet"])


def test_pool_total_covers_periods_every_series_has_a_forecast_for(tmp_path, monkeypatch,
                                                                   capsys):
    # The fit is written down (tests/written_pooled.py), so no sampling: what is checked is
    # which periods the command adds up and writes, with one series ending sooner.
    out = tmp_path / "p"
    assert _pool_written(tmp_path, monkeypatch, 3) == 0
    total = pd.read_csv(out / "group_total.csv")
    assert total["period"].tolist() == ["2026Q1", "2026Q2", "2026Q3"]
    fc = pd.read_csv(out / "pooled_forecast.csv")
    for name in ("late", "early"):
        assert set(total["period"]) <= set(fc.loc[fc["series"] == name, "period"]), name
    assert fc.loc[fc["series"] == "early", "period"].iloc[0] == "2025Q2"
    printed = capsys.readouterr().out
    assert "caution: 'early' ends in 2025Q1, 3 period(s) before the latest series (2025Q4)" \
        in printed  # a caution about the result: --quiet keeps it


def test_pool_prints_the_cautions_a_forecast_of_its_curves_prints(tmp_path, monkeypatch,
                                                                  capsys):
    # The pooled model is the exponential curve: with independent errors its bands get the
    # fixed curve's caution, as forecast --model exponential does. A horizon of 6 is not
    # more than half of the 16-quarter series' history; the 13-quarter series ends 3
    # quarters sooner and is forecast 9 quarters, more than half of its history.
    from bayesgrowth.forecast.forecast import CAUTION, FIXED_CURVE_CAUTION

    assert _pool_written(tmp_path, monkeypatch, 6) == 0
    cautions = [line.removeprefix("caution: ") for line in capsys.readouterr().out.splitlines()
                if line.startswith("caution: ")]
    assert cautions[0] == FIXED_CURVE_CAUTION and cautions[-1] == CAUTION
    assert cautions[1].startswith("The horizon (9 periods) is more than half the history "
                                  "of 1 of 2 series ('early')")
