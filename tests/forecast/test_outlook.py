"""Time to target (first passage from joint paths) and the band's sources (state-space fits)."""

import copy
import math

import numpy as np
import pytest

import bayesgrowth as bg
from bayesgrowth.cli import main
from bayesgrowth.forecast.band_sources import (
    SOURCE_LABELS,
    SOURCES,
    band_sources,
    shock_variance,
    source_labels,
    variance_parts,
)
from bayesgrowth.forecast.target import first_passage
from bayesgrowth.inference.run import fit_series
from bayesgrowth.plots.band_sources import plot_band_sources
from bayesgrowth.report.outlook import band_sources_phrase


@pytest.fixture(scope="module")
def local_fit():
    return fit_series(bg.load_demo(), engine="exact", model="local-trend",
                      drift="mean-reverting", seasonal=True, seed=5)


@pytest.fixture(scope="module")
def local_fc(local_fit):
    return bg.forecast(local_fit, 8)


def _mixture_variance(weight, mean, var):
    """Variance of a normal mixture: ``sum w (s^2 + m^2) - (sum w m)^2`` (textbook moments)."""
    centre = weight @ mean
    return weight @ (var + mean**2) - centre**2


# ---- time to target ---------------------------------------------------------------------


def test_deterministic_growth_reaches_the_target_in_the_period_solving_the_growth_equation():
    # compared with: the smallest k with v0 (1 + g)^k >= T, i.e. ceil(log(T / v0) / log(1 + g))
    v0, g, target, horizon = 100.0, 0.07, 150.0, 12
    path = v0 * (1 + g) ** np.arange(1, horizon + 1)
    k = math.ceil(math.log(target / v0) / math.log1p(g))
    periods = [f"p{i}" for i in range(1, horizon + 1)]
    ttt = first_passage(np.repeat(path[None, :], 3, axis=0), target, periods)
    assert ttt.period_at(0.5) == f"p{k}"
    np.testing.assert_array_equal(ttt.first_reached, np.eye(horizon)[k - 1])
    assert ttt.not_reached == 0.0
    assert first_passage(path[None, :], 1e6, periods).not_reached == 1.0


def test_symmetric_random_walk_matches_sparre_andersen():
    # compared with: Sparre Andersen's theorem (Sparre Andersen 1954, Math. Scand. 2; Feller,
    # An Introduction to Probability Theory, vol. II, 2nd ed., XII.7): for a random walk with
    # symmetric continuous steps, P(S_1 < 0, ..., S_k < 0) = C(2k, k) / 4^k, whatever the step
    # distribution. A driftless Gaussian walk on the log scale with the target at the starting
    # value never reaches it by period k with that probability.
    rng = np.random.default_rng(20261203)
    n, horizon = 200_000, 8
    paths = 1000.0 * np.exp(np.cumsum(0.1 * rng.standard_normal((n, horizon)), axis=1))
    ttt = first_passage(paths, 1000.0, [str(i) for i in range(1, horizon + 1)])
    k = np.arange(1, horizon + 1)
    never = np.array([math.comb(2 * int(j), int(j)) / 4.0**j for j in k])
    se = np.sqrt(never * (1 - never) / n)  # binomial standard error of a share
    assert np.all(np.abs((1 - ttt.reached_by) - never) < 4 * se)
    np.testing.assert_allclose(ttt.table["std_error"], se, rtol=0.02)
    # first passage is not a marginal quantity: each period's own probability is 1/2 here,
    # yet by period 8 the walk has been at or above the start with probability 1 - 0.196
    assert (paths[:, -1] >= 1000.0).mean() == pytest.approx(0.5, abs=4 * math.sqrt(0.25 / n))
    assert ttt.reached_by[-1] > 0.75


def test_forecast_first_passage_matches_brute_force_from_the_joint_covariances(local_fit,
                                                                               local_fc):
    # compared with: a brute-force simulation of the same model by another route: a node by
    # its weight, then the path from that node's joint normal (mean and full covariance of the
    # future log values from the filter), instead of the state recursion behind the draws
    post = local_fit.state_space
    joint = post.predictive(local_fc.t, joint=True)
    rng = np.random.default_rng(99)
    n = 40_000
    nodes = rng.choice(post.weight.size, size=n, p=post.weight)
    root = np.linalg.cholesky(joint["value_cov"])
    z = rng.standard_normal((n, local_fc.horizon))
    paths = np.exp(joint["mean"][nodes] + np.einsum("sij,sj->si", root[nodes], z))
    target = float(local_fc.table["median"].iloc[4])
    mine = local_fc.time_to_target(target)
    brute = first_passage(paths, target, local_fc.periods)
    p1, p2 = mine.reached_by, brute.reached_by
    se = np.sqrt(p1 * (1 - p1) / mine.n_paths + p2 * (1 - p2) / n)
    assert np.all(np.abs(p1 - p2) <= 4 * se)
    # reaching by k includes being above in k, so never below the exact marginal probability
    marginal = local_fc.prob_exceeds(target).to_numpy()
    assert np.all(p1 >= marginal - 4 * np.sqrt(marginal * (1 - marginal) / mine.n_paths))


def test_summary_and_cli_report_time_to_target_and_band_sources(tmp_path, local_fc, capsys):
    target = float(local_fc.table["median"].iloc[3])
    entry = local_fc.summary(target)["time_to_target"]
    ttt = local_fc.time_to_target(target)
    assert entry["probability_not_reached_within_horizon"] == pytest.approx(ttt.not_reached)
    assert entry["reached_by_with_probability"]["0.5"] == ttt.period_at(0.5)
    assert "time_to_target" not in local_fc.summary()
    rc = main(["demo", "--out", str(tmp_path / "out"), "--target", "7000", "--quiet"])
    printed = capsys.readouterr().out
    assert rc == 0
    assert "time to target 7,000 (reached at least once): " in printed
    assert "band of 2027Q4 (variance of the log value): " in printed


# ---- band sources -----------------------------------------------------------------------


def test_shock_variance_matches_the_sums_of_squares():
    # compared with: sum_{k<=h} k^2 = h (h + 1) (2h + 1) / 6 (drifting growth), and for
    # rho < 1 the expanded geometric sums of ((1 - rho^k) / (1 - rho))^2
    rho = np.array([1.0, 0.8])
    params = {"rho": rho, "sigma_growth": np.array([0.02, 0.03]),
              "sigma_level": np.array([0.01, 0.0])}
    h = np.arange(1, 13)
    got = shock_variance(params, h)
    walk = 0.01**2 * h + 0.02**2 * h * (h + 1) * (2 * h + 1) / 6
    r = 0.8
    fading = (h - 2 * r * (1 - r**h) / (1 - r) + r**2 * (1 - r ** (2 * h)) / (1 - r**2)) \
        / (1 - r) ** 2
    np.testing.assert_allclose(got[0], walk, rtol=1e-12)
    np.testing.assert_allclose(got[1], 0.03**2 * fading, rtol=1e-12)


def test_band_sources_add_up_to_the_mixture_variance(local_fit, local_fc):
    tab = band_sources(local_fc)
    assert set(tab["source"]) == set(SOURCES)
    assert (tab["share"] >= 0).all()
    np.testing.assert_allclose(tab.groupby("step")["share"].sum(), 1.0, rtol=1e-12)
    # compared with: the variance of the normal mixture, once from the filter's joint
    # covariances (another code path) and once from the forecast's own mixture description
    post = local_fit.state_space
    joint = post.predictive(local_fc.t, joint=True)
    diag = np.einsum("gii->gi", joint["value_cov"])
    total = tab.groupby("step")["variance"].sum().to_numpy()
    np.testing.assert_allclose(total, _mixture_variance(post.weight, joint["mean"], diag),
                               rtol=1e-10)
    e = local_fc.exact
    np.testing.assert_allclose(total, _mixture_variance(e["weight"], e["mean"],
                                                        e["value_sd"] ** 2), rtol=1e-10)


def _simulated_variance(post, t, n, seed):
    rng = np.random.default_rng(seed)
    nodes, draws = post.sample(n, rng)
    _, value = post.simulate(t, nodes, post.beta_of(draws), rng)
    dev = value - value.mean(axis=0)
    var = (dev**2).mean(axis=0)
    # standard error of a sample variance: sqrt((m4 - var^2) / n) (textbook)
    return var, np.sqrt(((dev**4).mean(axis=0) - var**2) / n)


def test_without_future_shocks_the_shock_share_is_zero_and_simulation_agrees(local_fit,
                                                                            local_fc):
    post = copy.copy(local_fit.state_space)
    post.params = {**post.params, "sigma_level": np.zeros(post.n_nodes),
                   "sigma_growth": np.zeros(post.n_nodes)}
    parts = variance_parts(post, local_fc.t, local_fit.series.t_last)
    assert np.all(parts["shocks"] == 0.0)
    joint = post.predictive(local_fc.t, joint=True)
    # the same variance summed in two orders: they agree to rounding (E[x^2] - E[x]^2 over
    # the nodes cancels about three digits of the 16)
    np.testing.assert_allclose(
        parts["total"],
        _mixture_variance(post.weight, joint["mean"], np.einsum("gii->gi", joint["value_cov"])),
        rtol=1e-9)
    # compared with: brute-force paths by the state recursion with the shocks switched off
    # (estimation plus noise), and with them on (all three sources)
    for p, seed in ((post, 3), (local_fit.state_space, 4)):
        want = variance_parts(p, local_fc.t, local_fit.series.t_last)["total"]
        got, se = _simulated_variance(p, local_fc.t, 20_000, seed)
        assert np.all(np.abs(got - want) < 4 * se)


def test_band_sources_need_a_state_space_fit(demo_exact_fit):
    with pytest.raises(ValueError, match="exact state-space engine"):
        band_sources(bg.forecast(demo_exact_fit, 4))


def test_band_sources_chart(local_fc):
    ax = plot_band_sources(local_fc)
    assert "where the band's width comes from" in ax.get_title(loc="left")
    assert "Share of predictive variance" in ax.get_ylabel()
    labels = [t.get_text() for t in ax.get_legend().get_texts()]
    assert sorted(labels) == sorted(v.capitalize() for v in SOURCE_LABELS.values())
    assert [t.get_text() for t in ax.get_xticklabels()] == local_fc.periods
    heights = np.array([[b.get_height() for b in c] for c in ax.containers])
    np.testing.assert_allclose(heights.sum(axis=0), 1.0, rtol=1e-12)


def test_band_sources_name_the_seasons_when_they_drift(local_fc):
    # with drifting seasons their future shocks are counted in the shock share (see
    # test_season_drift.py), so its label must name them; with fixed seasons it must not
    drifting = bg.forecast(fit_series(bg.load_demo(), engine="exact", model="local-trend",
                                      drift="random-walk", seasonal="drifting", seed=5), 4)
    with_seasons = "future shocks to the level, the growth rate and the seasonal factors"
    tab = band_sources(drifting)
    assert set(tab.loc[tab["source"] == "shocks", "label"]) == {with_seasons}
    assert source_labels(True)["shocks"] == with_seasons
    assert f"from {with_seasons}, " in band_sources_phrase(tab)
    legend = [t.get_text() for t in plot_band_sources(drifting).get_legend().get_texts()]
    assert with_seasons.capitalize() in legend
    fixed = band_sources_phrase(band_sources(local_fc))
    assert f"from {SOURCE_LABELS['shocks']}, " in fixed and "seasonal factors" not in fixed


def test_report_names_time_to_target_and_band_sources():
    from bayesgrowth.report.build import build_report

    page = build_report(bg.load_demo(), 8, target=7000.0, with_backtest=False,
                        fit_options={"model": "local-trend"})
    assert "Time to target 7,000 (reached at least once)" in page
    assert "Band of 2027Q4 (variance of the log value)" in page
    assert 'alt="Sources of the band by forecast period"' in page
