"""The recalibration benchmark harness (benchmarks/recalibration.py): outcomes and variants."""

from __future__ import annotations

import math
import sys
from pathlib import Path

import numpy as np
import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[2] / "benchmarks"))

from realdata_data import SeriesRecord  # noqa: E402
from recalibration import MAX_ORIGINS, backtest_task, learn_maps, score_task  # noqa: E402

from bayesgrowth.forecast.recalibration_map import learn_map  # noqa: E402


def _record(n_train: int = 16, h: int = 4) -> SeriesRecord:
    rng = np.random.default_rng(11)
    y = 100 * np.exp(0.05 * np.arange(n_train + h) + 0.05 * rng.standard_normal(n_train + h))
    return SeriesRecord("M1", "invented", "quarterly", 4, y[:n_train], y[n_train:], h)


def test_backtest_stays_inside_the_training_part():
    record = _record()
    out = backtest_task((record, "exponential"))
    assert out["error"] == ""
    # first training set 8 of 16 points, stride ceil(8 / 6) = 2: origins after 8, 10, 12,
    # 14 points, each scored on the next min(h, 16 - k) training points only
    stride = math.ceil(8 / MAX_ORIGINS)
    expected = sum(min(record.h, 16 - k) for k in range(8, 16, stride))
    assert out["pit"].size == expected
    assert out["step"].max() <= record.h


def test_identity_maps_leave_the_hold_out_scores_unchanged():
    record = _record()
    identity = learn_map(np.tile((np.arange(50) + 0.5) / 50, 4), np.repeat([1, 2, 3, 4], 50),
                         min_outcomes=50)
    rows = score_task((record, "exponential", {"own": identity, "pooled": identity}))
    assert [r["method"] for r in rows] == [
        "exponential", "exponential, recalibrated (own series)",
        "exponential, recalibrated (pooled)"]
    for col in ("inside_80", "inside_95", "msis", "scaled_crps", "smape"):
        assert rows[1][col] == pytest.approx(rows[0][col], rel=1e-9)
        assert rows[2][col] == pytest.approx(rows[0][col], rel=1e-9)


def test_pooled_map_counts_every_series_outcomes():
    records = [_record(), _record(20)]
    backtests = [backtest_task((r, "exponential")) for r in records]
    for r, b in zip(records, backtests, strict=True):
        b["key"] = (r.collection, r.name + str(r.train.size), "exponential")
    keyed = [SeriesRecord(r.collection, r.name + str(r.train.size), r.frequency, r.period,
                          r.train, r.test, r.h) for r in records]
    own, pooled, table = learn_maps(keyed, backtests, ["exponential"])
    qmap = pooled[("quarterly", "exponential")]
    assert qmap.total_outcomes == sum(b["pit"].size for b in backtests)
    assert table["outcomes"].sum() == qmap.total_outcomes
    assert len(own) == 2
