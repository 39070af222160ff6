"""Ranking backtested models: the Diebold-Mariano comparison and the ranking table."""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest
from scipy import stats

from bayesgrowth.backtest import backtest
from bayesgrowth.backtest.ranking import (
    case_losses,
    diebold_mariano,
    newey_west_lags,
    rank_models,
    ranking_lines,
)


def test_diebold_mariano_by_hand():
    # Hand computation (Diebold & Mariano 1995 statistic, Newey-West 1987 Bartlett weights):
    # d = (1, -0.5, 2, 0.5, 1.5), mean 0.9, centred u = (0.1, -1.4, 1.1, -0.4, 0.6).
    # gamma_0 = (0.01 + 1.96 + 1.21 + 0.16 + 0.36) / 5 = 0.74
    # gamma_1 = (-0.14 - 1.54 - 0.44 - 0.24) / 5 = -0.472, weight 1 - 1/2 = 0.5
    # long-run variance 0.74 + 2 * 0.5 * (-0.472) = 0.268; se = sqrt(0.268 / 5) = 0.231517
    # DM = 0.9 / 0.231517 = 3.887408; Harvey-Leybourne-Newbold (1997) factor with n = 5,
    # h = 2: sqrt((5 + 1 - 4 + 2/5) / 5) = sqrt(0.48) = 0.692820; DM* = 2.693275.
    d = [1.0, -0.5, 2.0, 0.5, 1.5]
    p = diebold_mariano(d, lags=1)
    assert p.mean == pytest.approx(0.9, rel=1e-12)
    assert p.se == pytest.approx(math.sqrt(0.268 / 5), rel=1e-12)
    assert p.stat == pytest.approx(0.9 / math.sqrt(0.268 / 5) * math.sqrt(0.48), rel=1e-12)
    assert p.stat == pytest.approx(2.693275, abs=1e-6)
    # Two-sided p-value from Student's t with n - 1 = 4 degrees of freedom (HLN 1997).
    assert p.pvalue == pytest.approx(2 * stats.t.sf(2.693275, 4), rel=1e-5)
    plain = diebold_mariano(d, lags=1, small_sample=False)
    assert plain.stat == pytest.approx(3.887408, abs=1e-6)
    assert (p.n, p.n_origins, p.lags) == (5, 5, 1)


@pytest.mark.parametrize("lags", [0, 1, 3])
def test_newey_west_se_matches_statsmodels_hac_regression(lags):
    # Reference: statsmodels OLS of the loss difference on a constant with HAC (Newey-West,
    # Bartlett kernel) standard errors and no small-sample correction; with use_t its
    # p-value uses t(n - 1), the same reference distribution as ours.
    sm = pytest.importorskip("statsmodels.api")
    rng = np.random.default_rng(7)
    d = np.convolve(rng.standard_normal(43), [1.0, 0.7, 0.4, 0.2], mode="valid") + 0.3
    res = sm.OLS(d, np.ones_like(d)).fit(
        cov_type="HAC", cov_kwds={"maxlags": lags, "use_correction": False}, use_t=True)
    p = diebold_mariano(d, lags=lags, small_sample=False)
    assert p.se == pytest.approx(res.bse[0], rel=1e-10)
    assert p.stat == pytest.approx(res.tvalues[0], rel=1e-10)
    assert p.pvalue == pytest.approx(res.pvalues[0], rel=1e-8)


def test_grouped_variance_matches_statsmodels_driscoll_kraay():
    # Several steps per origin: centred differences summed per origin, Bartlett weights
    # across origins. Reference: statsmodels.stats.sandwich_covariance.cov_nw_groupsum
    # (Driscoll & Kraay 1998) on the regression of d on a constant, time = origin.
    sm = pytest.importorskip("statsmodels.api")
    from statsmodels.stats.sandwich_covariance import cov_nw_groupsum

    rng = np.random.default_rng(11)
    origins = np.repeat(np.arange(15), 4)[:-3]  # the last origin has one step only
    d = rng.normal(0.2, 1.0, origins.size) + 0.5 * rng.standard_normal(15)[origins]
    res = sm.OLS(d, np.ones_like(d)).fit()
    ref = math.sqrt(cov_nw_groupsum(res, 3, origins)[0, 0])
    p = diebold_mariano(d, lags=3, groups=origins, small_sample=False)
    assert p.se == pytest.approx(ref, rel=1e-10)
    assert p.n_origins == 15 and p.n == origins.size


def test_identical_forecasts_and_too_few_origins():
    same = diebold_mariano(np.zeros(8), lags=1)
    assert math.isnan(same.stat) and same.pvalue == 1.0
    assert math.isnan(diebold_mariano([1.0, 2.0], lags=0).pvalue)
    with pytest.raises(ValueError, match="finite"):
        diebold_mariano([1.0, np.nan, 2.0], lags=0)
    # lags are capped at origins - 2, where the small-sample factor stays positive
    assert diebold_mariano(np.arange(5.0) % 3, lags=10).lags == 3


def test_lags_cover_the_origins_whose_targets_overlap():
    # h-step forecasts from origins less than h apart share targets: h - 1 lags at stride 1
    # (Diebold & Mariano 1995); with stride s, ceil(h / s) - 1 origins overlap.
    assert [newey_west_lags(h) for h in (1, 2, 4)] == [0, 1, 3]
    assert newey_west_lags(4, stride=2) == 1 and newey_west_lags(4, stride=4) == 0


def test_size_allows_for_the_dependence():
    # No true difference, loss differences dependent over 4 origins (MA(3)), 60 origins,
    # 1,000 seeded runs at a nominal 5%: the plain variance rejects about a third of the
    # time, the package's test far less (about 10%; benchmarks/ranking_size.py).
    rng = np.random.default_rng(20240601)
    ours = plain = 0
    for _ in range(1000):
        d = np.convolve(rng.standard_normal(63), np.ones(4), mode="valid")
        ours += diebold_mariano(d, lags=3).pvalue < 0.05
        plain += diebold_mariano(d, lags=0, small_sample=False).pvalue < 0.05
    assert plain > 250 and ours < 140


def _frame(losses: dict[str, list[float]], origins: list[str], steps: list[int]):
    rows = []
    for model, values in losses.items():
        for origin, step, v in zip(origins, steps, values, strict=True):
            rows.append({"method": model, "origin": origin, "step": step, "actual": 1.0,
                         "median": 1.0, "lower_80": 0.9, "upper_80": 1.1, "pit": 0.5,
                         "crps": v, "log_score": v})
    return pd.DataFrame(rows)


def test_rank_models_orders_by_mean_and_compares_with_the_best():
    origins = ["o1", "o1", "o2", "o2", "o3", "o3", "o4", "o4"]
    steps = [1, 2] * 4
    rng = np.random.default_rng(3)
    base = rng.uniform(1, 2, 8)
    frame = _frame({"a": list(base + 0.5), "b": list(base), "c": list(base + 0.01)},
                   origins, steps)
    rank = rank_models(frame)
    top = rank[rank["step"] == "all"]
    assert top["method"].tolist() == ["b", "c", "a"]
    assert top["rank"].tolist() == [1, 2, 3] and set(top["vs"]) == {"b"}
    a = top.set_index("method").loc["a"]
    # constant difference 0.5: mean 0.5, no spread, so no standard error
    assert a["diff"] == pytest.approx(0.5) and a["diff_se"] == pytest.approx(0, abs=1e-12)
    assert a["diff_pct"] == pytest.approx(100 * 0.5 / base.mean())
    per_step = rank[rank["step"] == 1]
    assert per_step["n_cases"].tolist() == [4, 4, 4] and per_step["lags"].isna().iloc[0]
    assert (per_step["lags"].dropna() == 0).all()
    assert (top["lags"].dropna() == 1).all()  # two steps: neighbouring origins overlap
    lines = ranking_lines(rank)
    assert lines[1].strip().startswith("1. b") and "(best)" in lines[1]
    assert "p = " in lines[2] and "8 forecasts" in lines[0]


def test_point_forecasts_leave_the_interval_and_log_score_rankings(demo):
    r = backtest(demo, models="exponential,revenue-scale,naive", horizon=2, min_train=14)
    crps = r.ranking()
    assert set(crps["method"]) == {"exponential", "revenue-scale", "naive"}
    for score in ("interval_score_80", "log_score"):
        assert set(r.ranking(score)["method"]) == {"exponential", "naive"}
    with pytest.raises(ValueError, match="no 90% bands"):
        r.ranking("interval_score_90")
    with pytest.raises(ValueError, match="unknown score"):
        r.ranking("rmse")
    # the mean of the ranked CRPS over shared cases is the score table's mean CRPS
    scores = r.scores[r.scores["step"] == "all"].set_index("method")["crps"]
    means = crps[crps["step"] == "all"].set_index("method")["mean"]
    np.testing.assert_allclose(means[scores.index], scores, rtol=1e-12)
    # the case table lists every origin and step once, in time order
    cases = case_losses(r.forecasts)
    assert list(cases.columns) == ["exponential", "revenue-scale", "naive"]
    assert cases.index.get_level_values("origin")[0] == demo.labels[13]
