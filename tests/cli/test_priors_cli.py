"""``bayesgrowth priors`` and ``bayesgrowth sensitivity`` on the exact engine (fast)."""

import numpy as np
import pandas as pd
import pytest

from bayesgrowth.cli import main
from bayesgrowth.cli.output import MANIFEST

# Invented data: 8% a quarter with a fixed +-6% wiggle.
GOOD = "period,value\n" + "\n".join(
    f"{2021 + i // 4}Q{i % 4 + 1},{100 * 1.08 ** i * (1.06, 0.94, 1.0)[i % 3]:.1f}"
    for i in range(12)) + "\n"
EXP = ["--model", "exponential", "--quiet"]


@pytest.fixture
def good_csv(tmp_path):
    path = tmp_path / "revenue.csv"
    path.write_text(GOOD)
    return path


def test_priors_writes_its_files_and_reads_the_check(tmp_path, good_csv, capsys):
    out = tmp_path / "p"
    assert main(["priors", str(good_csv), "-H", "4", "--out", str(out), *EXP]) == 0
    assert sorted(p.name for p in out.iterdir()) == [
        MANIFEST, "prior_predictive.csv", "prior_predictive.png"]
    tab = pd.read_csv(out / "prior_predictive.csv")
    assert list(tab["part"]).count("forecast") == 4
    assert list(tab["part"]).count("history") == 12
    printed = capsys.readouterr().out
    assert "12 of 12 observed values inside the 95% prior band" in printed
    assert "warning" not in printed


def test_priors_that_contradict_the_data_are_flagged(tmp_path, good_csv, capsys):
    # A firm prior of 30% decline a quarter cannot hold a series growing 8% a quarter.
    argv = ["priors", str(good_csv), "-H", "2", "--out", str(tmp_path / "p"), *EXP,
            "--growth", "-30", "--growth-give-or-take", "1", "--noise", "2"]
    assert main(argv) == 0
    assert "the priors contradict the data" in capsys.readouterr().out


def test_priors_bad_option_exit_2_nothing_written(tmp_path, good_csv, capsys):
    out = tmp_path / "p"
    rc = main(["priors", str(good_csv), "-H", "2", "--out", str(out), "--prior-draws", "5",
               *EXP])
    assert rc == 2 and not out.exists()
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "--prior-draws" in err[0]


def test_sensitivity_tells_a_prior_that_matters_from_one_that_does_not(tmp_path, good_csv,
                                                                      capsys):
    out = tmp_path / "s"
    # A growth prior of give or take 1 point: its centre, varied from -10% to 20% a quarter,
    # must drag the forecast with it; the wide default (30 points) leaves it to the data.
    assert main(["sensitivity", str(good_csv), "-H", "4", "--out", str(out), *EXP,
                 "--growth", "8", "--growth-give-or-take", "1"]) == 0
    printed = capsys.readouterr().out
    centre = next(line for line in printed.splitlines() if "growth centre" in line)
    assert "this prior matters" in centre
    tab = pd.read_csv(out / "prior_sensitivity.csv")
    rows = tab[tab["factor"] == "growth centre"].sort_values("value")
    assert np.all(np.diff(rows["median"]) > 0)  # a higher centre, a higher forecast
    assert (out / "prior_sensitivity.png").read_bytes()[:4] == b"\x89PNG"
    assert main(["sensitivity", str(good_csv), "-H", "4", "--out", str(tmp_path / "s2"),
                 *EXP]) == 0
    centre = next(line for line in capsys.readouterr().out.splitlines()
                  if "growth centre" in line)
    assert "the data decide" in centre


@pytest.mark.parametrize("value", ["0", "-2", "lots", "nan"])
def test_season_drift_refuses_a_bad_value_in_one_line(tmp_path, good_csv, capsys, value):
    out = tmp_path / "f"
    rc = main(["forecast", str(good_csv), "-H", "2", "--out", str(out), "--quiet",
               "--seasonal", "drifting", "--season-drift", value])
    assert rc == 2 and not out.exists()
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "--season-drift" in err[0] and value in err[0]


def test_season_drift_sets_the_drifting_seasons_prior():
    from bayesgrowth.cli.common import priors_from_args
    from bayesgrowth.cli.main import build_parser
    from bayesgrowth.priors import LocalTrendPrior

    base = ["forecast", "revenue.csv", "-H", "2", "--out", "o"]
    parse = build_parser("forecast").parse_args
    given = priors_from_args(parse([*base, "--seasonal", "drifting", "--season-drift", "5"]))
    assert given.local_trend.season_drift_pct == 5.0
    # without the option, the library's default (the other local-trend priors untouched)
    assert priors_from_args(parse(base)).local_trend == LocalTrendPrior()


def test_season_drift_reaches_the_fitted_model(tmp_path, good_csv):
    import json

    out = tmp_path / "f"
    assert main(["forecast", str(good_csv), "-H", "2", "--out", str(out), "--quiet",
                 "--seasonal", "drifting", "--season-drift", "5"]) == 0
    priors = json.loads((out / "summary.json").read_text())["priors"]
    assert priors["used"]["season_drift_scale"] == pytest.approx(np.log1p(0.05))
    assert "drifting seasons: shocks of about 5% per period move the factors" in (
        priors["in_words"])
