"""The exact state-space engine: priors, mixture quantiles, bands, model averaging, calibration."""

import math

import numpy as np
import pytest
from scipy import stats

import bayesgrowth as bg
from bayesgrowth.inference import statespace as ss
from bayesgrowth.inference import statespace_nodes as nodes
from bayesgrowth.inference.mixture import mixture_cdf, mixture_quantiles
from bayesgrowth.inference.run import fit_series
from bayesgrowth.inference.theta import _Gamma2, _HalfNormal, _LogNormal
from bayesgrowth.models.spec import ModelSpec
from bayesgrowth.priors import Priors


@pytest.mark.parametrize(
    "mine,ref",
    [
        (_HalfNormal(0.26), stats.halfnorm(scale=0.26)),
        (_Gamma2(0.05), stats.gamma(a=2.0, scale=0.025)),
        (_LogNormal(math.log(8), math.log(3)), stats.lognorm(s=math.log(3), scale=8)),
    ],
)
def test_prior_densities_and_quantiles_match_scipy(mine, ref):
    # reference: scipy.stats' distributions
    x = np.array([1e-4, 0.01, 0.1, 0.5, 3.0, 20.0])
    np.testing.assert_allclose(mine.logpdf(x), ref.logpdf(x), rtol=1e-12)
    q = np.array([1e-4, 0.1, 0.5, 0.9, 1 - 1e-4])
    np.testing.assert_allclose(mine.ppf(q), ref.ppf(q), rtol=1e-10)


def test_mixture_quantiles_invert_the_cdf_and_match_a_large_sample():
    rng = np.random.default_rng(0)
    w = rng.dirichlet(np.ones(40))
    m = rng.normal(size=(40, 3))
    s = rng.uniform(0.05, 1.0, size=(40, 3))
    probs = [0.025, 0.1, 0.5, 0.9, 0.975]
    q = mixture_quantiles(w, m, s, probs)
    np.testing.assert_allclose(mixture_cdf(w, m, s, q), np.broadcast_to(np.array(probs)[:, None],
                                                                        q.shape), atol=1e-9)
    comp = rng.choice(40, size=400_000, p=w)
    x = m[comp] + s[comp] * rng.standard_normal((comp.size, 3))
    np.testing.assert_allclose(q, np.quantile(x, probs, axis=0), atol=0.02)


@pytest.fixture(scope="module")
def demo_fit():
    return fit_series(bg.load_demo(), engine="exact", model="local-trend", drift="adaptive",
                      seasonal=True, seed=11)


def test_exact_bands_agree_with_the_predictive_draws(demo_fit):
    fc = bg.forecast(demo_fit, 8)
    tab = fc.table
    n = fc.draws.shape[0]
    for level in (50, 80, 95):
        inside = ((fc.draws >= tab[f"lower_{level}"].to_numpy())
                  & (fc.draws <= tab[f"upper_{level}"].to_numpy())).mean(axis=0)
        # binomial standard error of a share from n independent draws: sqrt(p (1 - p) / n)
        se = math.sqrt(level / 100 * (1 - level / 100) / n)
        assert np.all(np.abs(inside - level / 100) < 4 * se)
    p_exact = fc.prob_exceeds(float(tab["median"].iloc[-1])).iloc[-1]
    # exact up to the mixture's compaction, which drops at most 1e-5 of its mass before the
    # quantiles are found (mixture._TAIL_MASS), so the probability can differ by that much
    assert p_exact == pytest.approx(0.5, abs=1e-5)


def test_adaptive_weights_are_the_normalised_evidences(monkeypatch):
    # Bayesian model averaging (Hoeting, Madigan, Raftery & Volinsky 1999, Statistical
    # Science 14(4)): with prior mass 1/2 each, a branch's weight is its evidence share.
    # The three fits are refined until their probes move by 0.2% (not the default 2%), so
    # that each one's own grid error in the evidence (a few hundredths) does not blur it.
    monkeypatch.setattr(ss, "_SETTLE", 0.002)
    s = bg.load_demo()
    pr = Priors().resolve(s)
    both = ss.state_space_posterior(s, pr, ModelSpec(model="local-trend", drift="adaptive"))
    rw = ss.state_space_posterior(s, pr, ModelSpec(model="local-trend", drift="random-walk"))
    mr = ss.state_space_posterior(s, pr, ModelSpec(model="local-trend", drift="mean-reverting"))
    share = 1 / (1 + math.exp(mr.log_evidence - rw.log_evidence))
    assert both.branch_weight["drifting"] == pytest.approx(share, abs=0.01)
    combined = math.log(0.5 * math.exp(rw.log_evidence) + 0.5 * math.exp(mr.log_evidence))
    assert both.log_evidence == pytest.approx(combined, abs=0.01)


def test_seasonal_auto_needs_two_full_years():
    s = bg.load_demo()
    short = s.head(7)
    assert fit_series(short, engine="exact", model="local-trend", drift="random-walk",
                      seasonal="auto", seed=1).spec.seasonal is False
    assert fit_series(s, engine="exact", model="local-trend", drift="random-walk",
                      seasonal="auto", seed=1).spec.seasonal is True


def test_log_likelihood_matches_the_dense_gaussian(demo_fit):
    # the one-step densities multiply to the joint normal density of the log values given
    # each draw's parameters: compare with the dense covariance of the local trend
    # (bayesgrowth.models.local_trend, itself checked against statsmodels)
    from bayesgrowth.models import local_trend

    ll = demo_fit.log_likelihood().reshape(-1, demo_fit.series.n)[:50]
    flat = {k: v[:50] for k, v in demo_fit.flat().items()}
    s = demo_fit.series
    fades = np.isfinite(flat["half_life"])
    for spec, rows in ((ModelSpec(model="local-trend", drift="random-walk"), ~fades),
                       (ModelSpec(model="local-trend", drift="mean-reverting"), fades)):
        if not rows.any():
            continue
        d = {k: v[rows] for k, v in flat.items()}
        resid = s.log_values[None, :] - d["season"][:, np.arange(s.n) % 4]
        dense = local_trend.log_likelihood(spec, d, s.t, resid, demo_fit.priors.t_ref)
        np.testing.assert_allclose(ll[rows].sum(axis=1),
                                   dense.sum(axis=1) - np.log(s.values).sum(), rtol=1e-6)


def test_compiled_and_numpy_routes_give_the_same_posterior(monkeypatch):
    s = bg.load_demo()
    pr = Priors().resolve(s)
    spec = ModelSpec(model="local-trend", drift="mean-reverting", seasonal=True)
    monkeypatch.setattr(nodes, "_ROUTE", "numpy")
    plain = ss.state_space_posterior(s, pr, spec)
    monkeypatch.setattr(nodes, "_ROUTE", "compiled")
    compiled = ss.state_space_posterior(s, pr, spec)
    assert compiled.log_evidence == pytest.approx(plain.log_evidence, abs=1e-9)
    np.testing.assert_allclose(compiled.weight, plain.weight, rtol=1e-8, atol=1e-14)


def test_long_horizons_need_memory_in_proportion_to_the_horizon(demo_fit):
    import tracemalloc

    tracemalloc.start()
    fc = bg.forecast(demo_fit, 250)
    _, peak = tracemalloc.get_traced_memory()
    tracemalloc.stop()
    assert fc.draws.shape == (demo_fit.n_draws, 250)
    # draws (4000 x 250) and a few per-node arrays: far below the 1.8 GB a joint
    # (nodes, H, H) covariance would take
    assert peak < 400e6
    tab = fc.table
    assert np.all(np.diff(tab["upper_95"] - tab["lower_95"]) > 0)



def test_the_compiled_filter_takes_over_once_a_process_has_done_enough_work(monkeypatch):
    import sys

    monkeypatch.delitem(sys.modules, "numba", raising=False)
    monkeypatch.setattr(nodes, "_filtered", 0)
    small = nodes._COMPILE_ABOVE // 2
    assert not nodes.use_compiled(small)  # one small fit: plain numpy, no compile or import
    assert nodes.use_compiled(nodes._COMPILE_ABOVE + 1)  # a large grid: compiled
    while nodes._filtered <= nodes._WARM:
        nodes.use_compiled(small)
    assert nodes.use_compiled(small)  # a backtest or batch: compiled from then on


def test_reported_theta_spreads_over_its_cells_as_the_midpoint_rule_assumes(demo_fit):
    # The weights are a midpoint rule: the posterior as constant over each cell of the grid.
    # Spread for reporting, each value must lie in its node's cell (in the grid coordinate:
    # x for the scales, log x for the half-life) and be uniform there: the offsets from the
    # node, divided by the cell width, look Uniform(-1/2, 1/2) (Kolmogorov-Smirnov against
    # scipy's uniform).
    post = demo_fit.state_space
    node = demo_fit.extra["nodes"].reshape(-1)
    rng = np.random.default_rng(5)
    for name, (width, log) in post._cells.items():
        w = width[node]
        on = w > 0
        if not on.any():
            continue
        x, mid = post.spread(name, node, rng)[on], post.params[name][node][on]
        offset = np.where(log[node][on], np.log(x) - np.log(mid), x - mid) / w[on]
        assert np.all(np.abs(offset) <= 0.5 + 1e-12), name
        assert stats.kstest(offset, stats.uniform(-0.5, 1).cdf).pvalue > 1e-3, name
    # so the reported interval of the half-life is not stuck on a few grid values
    half = bg.forecast(demo_fit, 4).summary()["growth_fades"]["half_life_periods_if_fading"]
    assert half["lower_95"] < half["lower_80"] < half["median"] < half["upper_80"]
