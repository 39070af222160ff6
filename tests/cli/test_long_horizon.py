"""Far ahead the predictive mean is not finite: every writer leaves it empty and says why once.

The predictive of the default model is a mixture of log-normals; a log-normal's mean is
``exp(m + s^2 / 2)`` (its textbook moment), so with the log-scale spread ``s`` growing with
the horizon the mean overflows double precision (about 1.8e308, IEEE 754) while the median
``exp(m)`` and the bands stay finite.
"""

from __future__ import annotations

import contextlib
import io
import json
import math

import numpy as np
import pandas as pd
import pytest

from bayesgrowth.cli import main
from bayesgrowth.data.demo import demo_path


@pytest.fixture(scope="module")
def long_run(tmp_path_factory):
    out = tmp_path_factory.mktemp("long") / "out"
    printed = io.StringIO()
    with contextlib.redirect_stdout(printed):
        assert main(["forecast", str(demo_path()), "-H", "400", "--out", str(out),
                     "--quiet"]) == 0
    return out, printed.getvalue()


def test_the_csv_leaves_the_mean_empty_where_it_is_not_finite(long_run):
    out, _ = long_run
    text = (out / "forecast.csv").read_text()
    assert "inf" not in text.lower() and "nan" not in text.lower()
    table = pd.read_csv(out / "forecast.csv")
    empty = table["mean"].isna().to_numpy()
    assert empty.any() and not empty.all()
    first = int(np.argmax(empty))
    assert empty[first:].all()  # from one period on, and only there
    # the median and every band stay finite in every period
    assert np.isfinite(table.drop(columns=["period", "mean"]).to_numpy(float)).all()


def test_summary_and_terminal_say_once_from_which_period(long_run):
    out, printed = long_run
    table = pd.read_csv(out / "forecast.csv")
    first = table.loc[table["mean"].isna(), "period"].iloc[0]
    summary = json.loads((out / "summary.json").read_text())
    assert summary["final_period"]["mean"] is None
    assert math.isfinite(summary["final_period"]["median"])
    # every null of summary.json is listed with its reason (a mean too large to hold);
    # the caution says what to read instead
    listed = {m["field"]: m["reason"] for m in summary["numbers_not_available"]}
    assert "above the range of numbers a computer holds" in listed["final_period.mean"]
    said = [c for c in summary["cautions"] if "predictive mean" in c]
    assert len(said) == 1 and f"too large to compute from period {first} on" in said[0]
    assert "read the median" in said[0]
    assert printed.count("predictive mean") == 1 and f"caution: {said[0]}" in printed
    assert "final_period.mean" not in printed  # not said a second time as a missing number
    for word in ("inf", "nan"):
        assert word not in printed.lower().split()


def test_a_short_horizon_has_every_mean_and_no_such_caution(tmp_path, capsys):
    out = tmp_path / "out"
    assert main(["forecast", str(demo_path()), "-H", "8", "--out", str(out), "--quiet"]) == 0
    assert pd.read_csv(out / "forecast.csv")["mean"].notna().all()
    assert "predictive mean" not in capsys.readouterr().out
