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
    assert (fc.groupby("series").size() == 3).all()
    total = pd.read_csv(out / "group_total.csv")
    assert len(total) == 3
    # The total's median exceeds every series' median in the same period (values > 0).
    last = total.iloc[-1]
    same = fc[fc["period"] == last["period"]]
    assert (same["median"] < last["median"]).all()
    printed = capsys.readouterr().out
    assert "group growth per quarter" in printed and "not investment advice" in printed
