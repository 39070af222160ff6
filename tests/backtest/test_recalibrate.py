"""Quantile recalibration: the map, its shrinkage, the recalibrated forecast, an honest check."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy import stats

from bayesgrowth.forecast.recalibrated import RecalibratedForecast, apply_map
from bayesgrowth.forecast.recalibration_map import learn_map


def _dkw_epsilon(n: int, alpha: float = 1e-3) -> float:
    # Dvoretzky-Kiefer-Wolfowitz inequality with Massart's (1990, Ann. Probab. 18(3)) tight
    # constant: P(sup_p |F_n(p) - F(p)| > eps) <= 2 exp(-2 n eps^2).
    return math.sqrt(math.log(2 / alpha) / (2 * n))


GRID = np.linspace(0.001, 0.999, 999)


def test_map_is_strictly_increasing_inside_unit_interval_and_inverts(rng):
    pit = np.concatenate([rng.beta(0.4, 0.7, 300), [0.0, 1.0, 0.5, 0.5]])  # ties and ends
    step = rng.integers(1, 5, pit.size)
    qmap = learn_map(pit, step)
    assert qmap.horizon == 4
    for h in range(1, 5):
        r = qmap.forward(GRID, h)
        assert np.all(np.diff(r) > 0)
        assert np.all((r > 0) & (r < 1))
        np.testing.assert_allclose(qmap.inverse(r, h), GRID, atol=1e-12)
        assert qmap.forward(0.0, h) == 0.0 and qmap.forward(1.0, h) == 1.0


def test_map_is_identity_for_evenly_spread_pit():
    # Hazen positions (i - 1/2)/n of n evenly spread PIT values: the empirical CDF at the
    # middle of each jump is the identity exactly, and so is the shrunk map.
    n = 200
    qmap = learn_map((np.arange(n) + 0.5) / n, np.ones(n, dtype=int))
    np.testing.assert_allclose(qmap.forward(GRID, 1), GRID, atol=1e-12)


def test_map_is_near_identity_for_uniform_pit_within_dkw(rng):
    n = 20_000
    qmap = learn_map(rng.uniform(size=n), np.ones(n, dtype=int))
    assert qmap.n_outcomes[0] == n and qmap.effective_n[0] == pytest.approx(n)
    gap = np.max(np.abs(qmap.forward(GRID, 1) - GRID))
    assert gap < _dkw_epsilon(n) + 1.0 / n  # sampling error, plus the Hazen half-step


def test_map_recovers_closed_form_of_overconfident_forecast(rng):
    # A forecast whose sd is half the truth: PIT = Phi(2 Z) with Z standard normal, so the
    # share of PIT values below p is Phi(Phi^-1(p) / 2) (closed form, scipy's normal).
    n = 20_000
    pit = stats.norm.cdf(2 * rng.standard_normal(n))
    qmap = learn_map(pit, np.ones(n, dtype=int))
    truth = stats.norm.cdf(stats.norm.ppf(GRID) / 2)
    shrink = n / (n + qmap.pseudo_count)
    assert np.max(np.abs(qmap.forward(GRID, 1) - truth)) < _dkw_epsilon(n) + 1 / n + (1 - shrink)
    # the recalibrated 80% band reaches the truth's 10% / 90% points: Phi(+-2 * 1.2816)
    lo, hi = qmap.inverse([0.1, 0.9], 1)
    assert lo == pytest.approx(stats.norm.cdf(-2 * 1.2815516), abs=0.003)
    assert hi == pytest.approx(stats.norm.cdf(2 * 1.2815516), abs=0.003)


def test_few_outcomes_shrink_towards_identity():
    pit = np.array([0.02, 0.03, 0.05])  # all far in the lower tail
    qmap = learn_map(pit, [1, 1, 1], pseudo_count=20)
    assert qmap.effective_n[0] == pytest.approx(3.0)
    # R_shrunk = (3 R + 20 p) / 23 with R the Hazen empirical CDF: R(0.05) = 2.5 / 3
    assert qmap.forward(0.05, 1) == pytest.approx((3 * 2.5 / 3 + 20 * 0.05) / 23)
    assert np.max(np.abs(qmap.forward(GRID, 1) - GRID)) <= 3 / 23 + 1e-12
    many = learn_map(np.tile(pit, 1000), np.ones(3000, dtype=int), pseudo_count=20)
    # 3,000 outcomes: the same tied values, now almost all the data's own map
    assert many.forward(0.05, 1) == pytest.approx((3000 * 2.5 / 3 + 20 * 0.05) / 3020)


def test_empty_steps_borrow_neighbours_with_kish_effective_n():
    # 10 outcomes at step 1 and 30 at step 3; min_outcomes 40 pools all three steps.
    pit = np.linspace(0.05, 0.95, 40)
    step = np.array([1] * 10 + [3] * 30)
    qmap = learn_map(pit, step, min_outcomes=40)
    assert list(qmap.own_outcomes) == [10, 0, 30]
    # Step 1 needs distance 2: weights 1 (step 1) and 1 - 2/3 (step 3). Kish (1965):
    # n_eff = (sum w)^2 / sum w^2.
    w = np.array([1.0] * 10 + [1 / 3] * 30)
    assert qmap.effective_n[0] == pytest.approx(w.sum() ** 2 / np.sum(w**2))
    assert qmap.n_outcomes[1] == 40  # step 2: both neighbours at distance 1
    with pytest.raises(ValueError, match="same length"):
        learn_map([0.5, 0.5], [1])
    with pytest.raises(ValueError, match="between 0 and 1"):
        learn_map([1.5], [1])


@pytest.fixture(scope="module")
def trend_forecast():
    import warnings

    import bayesgrowth as bg

    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return bg.GrowthModel(seed=3).fit(bg.load_demo()).forecast(4)


def _skewed_map(rng):
    # misses mostly below the bands: PIT piled towards 0
    return learn_map(rng.beta(0.5, 1.2, 2000), rng.integers(1, 5, 2000))


def _mixture_cdf(fc, x, h):
    # The exact engine's predictive of log value: sum_g w_g Normal(m_g, s_g), by scipy.
    e = fc.exact
    return float(np.sum(e["weight"] * stats.norm.cdf(np.log(x), e["mean"][:, h],
                                                     e["value_sd"][:, h])))


def _slope(qmap, p, step, d=1e-4):
    return abs(qmap.forward(p + d, step) - qmap.forward(p - d, step)) / (2 * d)


def test_recalibrated_bands_invert_the_map_on_the_exact_mixture(trend_forecast, rng):
    qmap = _skewed_map(rng)
    fixed = apply_map(trend_forecast, qmap, {"where": "test"})
    assert isinstance(fixed, RecalibratedForecast)
    tab = fixed.table
    for h in range(4):
        for level in (50, 80, 95):
            a = (100 - level) / 200
            lo, hi = tab[f"lower_{level}"].iloc[h], tab[f"upper_{level}"].iloc[h]
            for x, want in ((lo, a), (hi, 1 - a)):
                p = _mixture_cdf(trend_forecast, x, h)
                # the bands come from the mixture without its lightest components (at most
                # 1e-5 of the mass, mixture._TAIL_MASS), so p is off by up to 1e-5, which
                # the map passes on times its slope there
                assert qmap.forward(p, h + 1) == pytest.approx(
                    want, abs=1e-5 * _slope(qmap, p, h + 1) + 1e-7)
        # prob_exceeds at a band's upper end is the band's upper tail share
        p = fixed.prob_exceeds(float(tab["upper_80"].iloc[h])).iloc[h]
        assert p == pytest.approx(0.10, abs=1e-6)
    # the curve bands are the model's own and stay
    assert np.allclose(tab["curve_lower_80"], trend_forecast.table["curve_lower_80"])
    assert tab.attrs["recalibrated"]["n_outcomes"] == 2000


def test_recalibrated_draws_follow_the_map(trend_forecast, rng):
    qmap = _skewed_map(rng)
    fixed = apply_map(trend_forecast, qmap)
    base = trend_forecast.draws
    for h in range(4):
        for q in (0.1, 0.5, 0.9):
            moved = np.quantile(fixed.draws[:, h], q)
            # the moved draws' q-quantile sits at the original draws' R^-1(q) share
            share = np.mean(base[:, h] <= moved)
            assert share == pytest.approx(float(qmap.inverse(q, h + 1)), abs=2 / base.shape[0])
    # ranks kept: the dependence between steps is unchanged
    for h in range(3):
        rho_base = stats.spearmanr(base[:, h], base[:, h + 1])[0]
        rho_fixed = stats.spearmanr(fixed.draws[:, h], fixed.draws[:, h + 1])[0]
        assert rho_fixed == pytest.approx(rho_base, abs=1e-3)


def test_summary_and_identity_map_change_nothing(trend_forecast):
    n = 400  # 100 evenly spread PIT values per step: the identity at every step
    identity = learn_map(np.tile((np.arange(100) + 0.5) / 100, 4), np.repeat([1, 2, 3, 4], 100),
                         min_outcomes=100)
    fixed = apply_map(trend_forecast, identity, {"where": "test"})
    cols = ["median", "lower_80", "upper_80", "lower_95", "upper_95"]
    np.testing.assert_allclose(fixed.table[cols], trend_forecast.table[cols], rtol=1e-7)
    target = float(trend_forecast.table["median"].iloc[-1])
    np.testing.assert_allclose(fixed.prob_exceeds(target), trend_forecast.prob_exceeds(target),
                               atol=1e-9)
    summary = fixed.summary(target)
    assert summary["recalibrated"]["method"] == "quantile"
    assert summary["recalibrated"]["n_outcomes"] == n
    assert "recalibrated from 400 outcomes" in summary["cautions"][0]
    assert summary["final_period"]["upper_95"] == pytest.approx(
        float(fixed.table["upper_95"].iloc[-1]))


def _simulated_panel(rng, n_series: int, length: int):
    from bayesgrowth.data.periods import PeriodAxis
    from bayesgrowth.data.series import GrowthSeries

    t = np.arange(length)
    axis = PeriodAxis(style="quarter", step=1, origin=2000 * 4)
    for i in range(n_series):
        log_y = math.log(100.0) + 0.03 * t + 0.10 * rng.standard_normal(length)
        yield GrowthSeries(values=np.exp(log_y), t=t, axis=axis, name=f"s{i}", source="sim")


@pytest.mark.slow
def test_recalibration_restores_coverage_on_held_out_periods(rng):
    import warnings

    from bayesgrowth.backtest.recalibrate import backtest_model, recalibrate_panel
    from bayesgrowth.backtest.recalibration_check import nested_evaluation
    from bayesgrowth.forecast.forecast import forecast
    from bayesgrowth.inference.run import fit_series
    from bayesgrowth.priors import NoisePrior, Priors

    # Truth: exponential growth with independent normal log-scale noise of sd 0.10. Model:
    # the exponential curve whose noise prior (half-normal, scale log(1.01) = 0.01) holds
    # the posterior noise sd near 0.05 on 12 points: half the truth.
    priors = Priors(noise=NoisePrior(1.0))
    n_series, train, window, horizon = 300, 20, 12, 3
    forecasts, results, held = [], [], []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for i, s in enumerate(_simulated_panel(rng, n_series, train + horizon)):
            past = s.take(np.arange(train))
            fit = fit_series(past.take(np.arange(train - window, train)), engine="exact",
                             priors=priors, model="exponential", seed=i)
            forecasts.append(forecast(fit, horizon))
            # rolling origins inside the first 20 points only: the map never sees 21-23
            results.append(backtest_model(fit, past, horizon=horizon, min_train=window,
                                          window=window, stride=3, seed=i))
            held.append(s.values[train:])
    fixed = recalibrate_panel(forecasts, results)
    assert fixed[0].recalibrated["n_outcomes"] == sum(len(r.forecasts) for r in results)
    # One held-out outcome per series (steps 1, 2, 3 in turn), so the outcomes are
    # independent and the binomial interval applies.
    step = np.arange(n_series) % horizon

    def inside(fcs):
        return int(sum(fc.table["lower_80"].iloc[k] <= y[k] <= fc.table["upper_80"].iloc[k]
                       for fc, y, k in zip(fcs, held, step, strict=True)))

    before, after = inside(forecasts), inside(fixed)
    # Clopper-Pearson 95% intervals (Clopper & Pearson 1934), from scipy's binomtest.
    ci_before = stats.binomtest(before, n_series).proportion_ci(0.95, method="exact")
    ci_after = stats.binomtest(after, n_series).proportion_ci(0.95, method="exact")
    assert ci_before.high < 0.70  # well below 80% before
    assert ci_after.low <= 0.80 <= ci_after.high  # within sampling error of 80% after
    # nested on the backtests themselves (earlier origins learn, later ones score): the
    # misses fall on both sides, and recalibration cuts both
    table = nested_evaluation(results).set_index("level")
    assert table.loc[80, "coverage_after"] > table.loc[80, "coverage_before"] + 0.2
    for side in ("below", "above"):
        assert table.loc[80, f"{side}_after"] < table.loc[80, f"{side}_before"] - 0.05


def test_fan_chart_title_says_the_bands_were_recalibrated(trend_forecast, rng):
    import matplotlib.pyplot as plt

    from bayesgrowth.plots.fan import plot_fan

    fixed = apply_map(trend_forecast, _skewed_map(rng), {"where": "test"})
    ax = plot_fan(fixed)
    assert ax.get_title().splitlines()[-1] == "Bands recalibrated by a backtest"
    plain = plot_fan(trend_forecast)
    assert "recalibrated" not in plain.get_title()
    plt.close("all")
