"""The pooled (hierarchical) growth model: shrinkage where it helps, honest bands, and
agreement with the single-series model when the group has one member."""

from __future__ import annotations

import warnings

import numpy as np
import pandas as pd
import pytest
from scipy import stats

from bayesgrowth.data.panel import read_panel
from bayesgrowth.data.periods import parse_periods
from bayesgrowth.forecast import forecast
from bayesgrowth.models.hierarchical import GroupPrior, choose_centred, stack_panel
from bayesgrowth.priors import Priors

#: The simulated hierarchy: growth centre and spread of log(1+g), noise sd.
MU, TAU, SIGMA = 0.04, 0.015, 0.08
N_SHORT, N_LONG = 12, 12
HORIZON = 1


def simulate_group(seed: int):
    """Series drawn from the hierarchy: 12 short (4-6 points) and 12 long (20-30 points),
    each with one more held-out period for the forecast check."""
    rng = np.random.default_rng(seed)
    axis, _ = parse_periods(["2019Q1"])
    rows, truth, future = [], {}, {}
    for i in range(N_SHORT + N_LONG):
        n = int(rng.integers(4, 7)) if i < N_SHORT else int(rng.integers(20, 31))
        b = MU + TAU * rng.standard_normal()
        log_a = np.log(200.0) + rng.normal(0, 0.7)
        t = np.arange(n + HORIZON)
        log_y = log_a + b * t + SIGMA * rng.standard_normal(t.size)
        name = f"g{i:02d}"
        truth[name] = np.expm1(b)
        future[name] = float(np.exp(log_y[-1]))
        rows.append(pd.DataFrame({"series": name, "period": axis.labels(t[:n]),
                                  "value": np.exp(log_y[:n])}))
    panel, bad = read_panel(pd.concat(rows, ignore_index=True))
    assert not bad
    return panel, truth, future


@pytest.fixture(scope="module")
def pooled_runs():
    from bayesgrowth.inference import fit_series
    from bayesgrowth.inference.pooled import fit_pooled

    runs = []
    for seed in (11, 12):
        panel, truth, future = simulate_group(seed)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            pooled = fit_pooled(panel, seed=seed, draws=1000, tune=1000, chains=4, cores=2)
        alone = {n: fit_series(s, engine="exact", seed=seed, draws=500,
                               model="exponential") for n, s in panel.items()}
        runs.append((panel, truth, future, pooled, alone))
    return runs


def test_group_prior_is_validated():
    with pytest.raises(ValueError, match="growth spread"):
        GroupPrior(growth_spread_pts=0)
    assert GroupPrior(growth_spread_pts=10).tau_scale == pytest.approx(0.10)


def test_stacking_keeps_every_observation_in_order():
    panel, _, _ = simulate_group(1)
    series = list(panel.values())
    data = stack_panel(series, [Priors().resolve(s) for s in series])
    assert data.log_y.size == sum(s.n for s in series)
    for i, s in enumerate(series):
        np.testing.assert_allclose(data.log_y[data.index == i], s.log_values)
        assert data.first[data.index == i].sum() == 1
    # Long series pin their own growth: they are the ones sampled centred.
    centred = choose_centred(series, 0.1)
    assert centred[[s.n >= 20 for s in series]].all()
    assert not centred[[s.n <= 6 for s in series]].all()


@pytest.mark.slow
def test_pooling_lowers_the_error_of_short_series(pooled_runs):
    # Over 2 seeded simulations x 12 short series. Fitted alone, a 4-6 point series'
    # growth has a standard error se = SIGMA / sqrt(sum (t - tbar)^2) of 0.036, 0.025,
    # 0.019 (4, 5, 6 points; RMS 0.0275). Knowing the group (spread TAU = 0.015) the
    # error sd is 1 / sqrt(1/TAU^2 + 1/se^2) = 0.0138, 0.0129, 0.0118 (RMS 0.0129), an
    # expected RMSE ratio of 0.47 (slightly more with mu and tau estimated). Each RMSE
    # over 24 errors has a relative sd of about 1/sqrt(48) = 0.14, so the ratio's is
    # about 0.2; we require below 0.75, about 2.5 such sd above the expectation, which
    # a pooling that did nothing (ratio ~1) fails.
    err_pooled, err_alone = [], []
    for panel, truth, _, pooled, alone in pooled_runs:
        summary = pooled.summary().set_index("series")
        for name, s in panel.items():
            if s.n > 6:
                continue
            g_alone = np.median(alone[name].derived()["growth_per_period"])
            err_pooled.append(summary.loc[name, "growth_median"] - truth[name])
            err_alone.append(g_alone - truth[name])
    rmse_pooled = float(np.sqrt(np.mean(np.square(err_pooled))))
    rmse_alone = float(np.sqrt(np.mean(np.square(err_alone))))
    assert len(err_pooled) == 2 * N_SHORT
    assert rmse_pooled < 0.75 * rmse_alone, (rmse_pooled, rmse_alone)


@pytest.mark.slow
def test_pooled_intervals_and_bands_keep_near_nominal_coverage(pooled_runs):
    # 48 series (2 simulations x 24). Binomial sd of the coverage of a 90% interval
    # over 48 independent series: sqrt(0.9 * 0.1 / 48) = 0.043; we allow 3 sd below
    # nominal (0.77). The 80% band of the held-out next value: sd sqrt(.8*.2/48) =
    # 0.058, 3 sd gives 0.63. The upper limit catches bands far too wide (all 48 in).
    hits_g, hits_fc = [], []
    for _, truth, future, pooled, _ in pooled_runs:
        fc = forecast(pooled, HORIZON, levels=(80,))
        for i, name in enumerate(pooled.names):
            g = np.expm1(pooled.posterior["log1p_g"][:, :, i].ravel())
            lo, hi = np.quantile(g, [0.05, 0.95])
            hits_g.append(lo <= truth[name] <= hi)
            row = fc.forecasts[name].table.iloc[0]
            hits_fc.append(row["lower_80"] <= future[name] <= row["upper_80"])
        assert pooled.diagnostics.divergences == 0
        assert pooled.diagnostics.max_rhat < 1.01
    assert 0.77 <= np.mean(hits_g) <= 1.0
    assert 0.63 <= np.mean(hits_fc) < 1.0


@pytest.mark.slow
def test_group_total_sums_draws_not_bands(pooled_runs):
    _, _, _, pooled, _ = pooled_runs[0]
    fc = forecast(pooled, 3, levels=(95,))
    assert fc.total is not None
    # Series end in different quarters; the total starts after the latest of them.
    last = max(s.axis.origin + s.t_last for s in pooled.series.values())
    axis = next(iter(pooled.series.values())).axis
    assert fc.total["period"].iloc[0] == axis.__class__(axis.style, 1, last + 1).label(0)
    np.testing.assert_allclose(fc.total["mean"], fc.total_draws.mean(axis=0))
    np.testing.assert_allclose(fc.total_draws, sum(fc.aligned.values()))
    # A series ending in the latest quarter contributes its own forecast draws.
    latest = next(n for n, s in pooled.series.items() if s.axis.origin + s.t_last == last)
    np.testing.assert_array_equal(fc.aligned[latest], fc.forecasts[latest].draws)
    # The total's 95% band is narrower than the sum of the series' bands at the same
    # periods (noise partly cancels across series): the draws were added, not bands.
    q = {n: np.quantile(d, [0.025, 0.975], axis=0) for n, d in fc.aligned.items()}
    widths = sum(v[1] - v[0] for v in q.values())
    total_width = (fc.total["upper_95"] - fc.total["lower_95"]).to_numpy()
    assert (total_width < widths).all()
    # each series is forecast from its own next period through the total's last one
    for name, series in pooled.series.items():
        rows = fc.table[fc.table["series"] == name]
        assert len(rows) == 3 + last - (series.axis.origin + series.t_last), name
        assert rows["period"].iloc[-1] == fc.total["period"].iloc[-1]


def _marginal_growth_prior(b, m, s, tau_scale):
    """Density of b = mu + tau z with mu ~ N(m, s), tau ~ HalfNormal(tau_scale),
    z ~ N(0, 1): a scale mixture of N(m, sqrt(s^2 + tau^2)), integrated over a fine
    grid of tau (trapezoid rule on 4,001 points up to 10 tau_scale)."""
    tau = np.linspace(0.0, 10 * tau_scale, 4001)
    w = stats.halfnorm.pdf(tau, scale=tau_scale)
    scale = np.sqrt(s**2 + tau[None, :] ** 2)
    # in chunks of 2,000 values: 100,000 draws at once would take 3 GB per temporary
    return np.concatenate([
        np.trapezoid(stats.norm.pdf(chunk[:, None], loc=m, scale=scale) * w[None, :], tau,
                     axis=1)
        for chunk in np.array_split(b, max(1, b.size // 2000))])


@pytest.mark.slow
def test_one_series_agrees_with_single_series_model_under_the_implied_prior():
    # With one member the pooled model is the single-series model whose growth prior
    # is the marginal of mu + tau z (not the Normal(0, 0.30) of the single model).
    # Reference: the exact engine's posterior with a wide Normal growth prior,
    # importance-reweighted to that marginal prior (density by numerical
    # integration). Noise and initial-value priors are the same in both.
    from bayesgrowth.inference import fit_series
    from bayesgrowth.inference.pooled import fit_pooled
    from bayesgrowth.priors import GrowthPrior

    panel, _, _ = simulate_group(5)
    name = next(n for n, s in panel.items() if s.n == 5) if any(
        s.n == 5 for s in panel.values()) else next(iter(panel))
    series = panel[name]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        pooled = fit_pooled({name: series}, seed=3, draws=1000, tune=1000, chains=4,
                            cores=2, group=GroupPrior(pool_noise=False))
    b_pooled = pooled.posterior["log1p_g"][:, :, 0].ravel()

    p = Priors().resolve(series)
    wide = 1.0  # proposal prior sd on log(1+g); the posterior sd is about 0.03
    ref = fit_series(series, engine="exact", seed=4, draws=25_000,
                     priors=Priors(growth=GrowthPrior(0.0, 100 * wide)), model="exponential")
    b_ref = ref.posterior["log1p_g"].ravel()
    w = _marginal_growth_prior(b_ref, p.log1p_g_mu, p.log1p_g_sd, GroupPrior().tau_scale)
    w = w / stats.norm.pdf(b_ref, loc=0.0, scale=wide)
    w = w / w.sum()
    ref_mean = float(np.sum(w * b_ref))
    ref_sd = float(np.sqrt(np.sum(w * (b_ref - ref_mean) ** 2)))
    order = np.argsort(b_ref)
    cdf = np.cumsum(w[order])
    ref_q = [float(b_ref[order][np.searchsorted(cdf, q)]) for q in (0.05, 0.95)]
    # Tolerance: Monte Carlo error of the NUTS mean is ref_sd / sqrt(ESS) with ESS
    # >= 400 (checked below), so 4 of those (<= 0.2 ref_sd); the 5% and 95%
    # quantiles within 0.25 ref_sd (their MC sd at ESS 400 is about 0.1 ref_sd).
    assert pooled.diagnostics.min_ess_bulk >= 400
    assert abs(b_pooled.mean() - ref_mean) < 0.2 * ref_sd
    assert abs(b_pooled.std() - ref_sd) < 0.15 * ref_sd
    for q, r in zip((0.05, 0.95), ref_q, strict=True):
        assert abs(np.quantile(b_pooled, q) - r) < 0.25 * ref_sd
