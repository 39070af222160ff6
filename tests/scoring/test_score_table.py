import numpy as np
import pandas as pd
import pytest
from scipy import stats

from bayesgrowth.scoring.crps import crps_t
from bayesgrowth.scoring.logscore import log_score_t
from bayesgrowth.scoring.pit import pit_t
from bayesgrowth.scoring.table import score_table

LEVELS = (50, 80, 95)


def _frame(method, scale_used, true_scale, n_origins, steps, rng):
    """Invented backtest rows: outcomes ~ N(0, true_scale), forecast N(0, scale_used)."""
    rows = []
    for origin in range(n_origins):
        for step in steps:
            y = rng.normal(scale=true_scale)
            row = {"method": method, "origin": origin, "step": step, "actual": y, "median": 0.0}
            for lev in LEVELS:
                q = stats.norm.ppf(0.5 + lev / 200) * scale_used
                row[f"lower_{lev}"], row[f"upper_{lev}"] = -q, q
            row["pit"] = pit_t(y, 0.0, scale_used, np.inf)
            row["crps"] = crps_t(y, 0.0, scale_used, np.inf)
            row["log_score"] = log_score_t(y, 0.0, scale_used, np.inf)
            rows.append(row)
    return pd.DataFrame(rows)


@pytest.fixture(scope="module")
def frame():
    rng = np.random.default_rng(314)
    good = _frame("steady", 1.0, 1.0, 400, (1, 2, 3), rng)
    narrow = _frame("overconfident", 0.4, 1.0, 400, (1, 2, 3), rng)
    wide = _frame("timid", 3.0, 1.0, 400, (1, 2, 3), rng)
    return pd.concat([good, narrow, wide], ignore_index=True)


def test_contract_columns_and_rows(frame):
    table = score_table(frame)
    for col in ["method", "step", "n", "coverage_50", "coverage_80", "coverage_95", "crps",
                "log_score", "abs_pct_error_median", "verdict"]:
        assert col in table.columns
    for lev in LEVELS:
        assert {f"coverage_{lev}_low", f"coverage_{lev}_high"} <= set(table.columns)
    assert table["method"].tolist() == ["steady"] * 4 + ["overconfident"] * 4 + ["timid"] * 4
    assert table["step"].tolist() == [1, 2, 3, "all"] * 3
    assert table["n"].tolist() == [400, 400, 400, 1200] * 3


def test_values_recomputed_directly(frame):
    table = score_table(frame).set_index(["method", "step"])
    sub = frame[(frame["method"] == "overconfident") & (frame["step"] == 2)]
    row = table.loc[("overconfident", 2)]
    inside = (sub["lower_80"] <= sub["actual"]) & (sub["actual"] <= sub["upper_80"])
    assert row["coverage_80"] == pytest.approx(inside.mean())
    assert row["crps"] == pytest.approx(sub["crps"].mean())
    assert row["log_score"] == pytest.approx(sub["log_score"].mean())
    ape = 100 * np.abs(sub["actual"] - sub["median"]) / np.abs(sub["actual"])
    assert row["abs_pct_error_median"] == pytest.approx(ape.mean())
    # interval score, Gneiting & Raftery 2007 sec. 6.2, written out
    lo, hi, y = sub["lower_80"], sub["upper_80"], sub["actual"]
    iscore = (hi - lo) + 10 * (lo - y).clip(lower=0) + 10 * (y - hi).clip(lower=0)
    assert row["interval_score_80"] == pytest.approx(iscore.mean())
    all_row = table.loc[("overconfident", "all")]
    every = frame[frame["method"] == "overconfident"]
    assert all_row["crps"] == pytest.approx(every["crps"].mean())
    assert all_row["coverage_80_low"] < all_row["coverage_80"] < all_row["coverage_80_high"]


def test_verdicts_on_clear_cases(frame):
    table = score_table(frame).set_index(["method", "step"])
    # forecast sd 0.4 for outcome sd 1: the 80% band holds P(|Z| < 0.51) = 39%.
    assert table.loc[("overconfident", "all"), "verdict"] == "bands too narrow"
    # forecast sd 3: the 50% band holds P(|Z| < 2.02) = 96%.
    assert table.loc[("timid", "all"), "verdict"] == "bands too wide"
    assert table.loc[("steady", "all"), "verdict"] == "calibrated"
    assert table.loc[("steady", "all"), "pit_ks_pvalue"] > 1e-3
    assert table.loc[("overconfident", "all"), "pit_ks_pvalue"] < 1e-6
    # a proper score prefers the forecast with the right spread
    assert table.loc[("steady", "all"), "crps"] < table.loc[("overconfident", "all"), "crps"]
    assert table.loc[("steady", "all"), "crps"] < table.loc[("timid", "all"), "crps"]


def test_few_outcomes_and_missing_actuals():
    rng = np.random.default_rng(1)
    small = _frame("tiny", 1.0, 1.0, 6, (1,), rng)
    small.loc[0, "actual"] = np.nan
    table = score_table(small)
    assert table["n"].tolist() == [5, 5]
    assert set(table["verdict"]) == {"too few outcomes"}


def test_missing_column_named():
    rng = np.random.default_rng(2)
    bad = _frame("x", 1.0, 1.0, 3, (1,), rng).drop(columns=["upper_95", "pit"])
    with pytest.raises(ValueError, match="pit, upper_95"):
        score_table(bad)
    with pytest.raises(ValueError, match="levels"):
        score_table(bad, levels=(0.8,))
