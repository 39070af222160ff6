"""``forecast --scenario-growth/--scenario-shock``: files, summary and refusals (exact engine)."""

import json

import numpy as np
import pandas as pd

from bayesgrowth.cli import main
from bayesgrowth.data.demo import demo_path


def test_scenario_written_beside_the_forecast(tmp_path, capsys):
    out = tmp_path / "out"
    rc = main(["forecast", str(demo_path()), "-H", "6", "--out", str(out), "--quiet",
               "--scenario-shock", "-10", "--scenario-shock-in", "2026Q3",
               "--scenario-growth", "0.5", "--scenario-growth-from", "2027Q1"])
    assert rc == 0
    scen = pd.read_csv(out / "scenario.csv")
    base = pd.read_csv(out / "forecast.csv")
    np.testing.assert_allclose(scen["base_median"], base["median"], rtol=1e-5)
    change = scen.set_index("period")["change_from_base_pct"]
    assert change["2026Q1"] == 0 and change["2026Q2"] == 0
    # log(0.9): the shock alone until the growth change starts (csv keeps 6 figures).
    assert change["2026Q3"] == change["2026Q4"] == -10
    assert change["2027Q2"] < change["2027Q1"] < -10
    summary = json.loads((out / "summary.json").read_text())
    assert summary["scenario"]["period"] == "2027Q2"
    assert "growth x0.5 from 2027Q1" in summary["scenario"]["description"]
    printed = capsys.readouterr().out
    assert "scenario (growth x0.5 from 2027Q1; one-off shock -10% in 2026Q3)" in printed


def test_scenario_options_refused_in_one_line_before_any_work(tmp_path, capsys):
    cases = [
        (["--scenario-growth", "0.5", "--scenario-growth-from", "2030Q1"],
         "not a forecast period"),
        (["--scenario-shock-in", "2026Q2"], "only with --scenario-shock"),
        (["--scenario-shock", "-100"], "above -100"),
        (["--scenario-shock", "half"], "not a number"),
        (["--scenario-shock", "5", "--recalibrate"], "not with --recalibrate"),
    ]
    for extra, fragment in cases:
        out = tmp_path / "x"
        rc = main(["forecast", str(demo_path()), "-H", "4", "--out", str(out), "--quiet",
                   *extra])
        err = capsys.readouterr().err.strip().splitlines()
        assert rc == 2 and not out.exists(), extra
        assert len(err) == 1 and fragment in err[0], (extra, err)
