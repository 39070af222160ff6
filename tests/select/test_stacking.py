"""Stacking weights against ArviZ and against the optimality conditions of the problem.

References: Yao, Vehtari, Simpson & Gelman (2018), "Using stacking to average
Bayesian predictive distributions", Bayesian Analysis 13(3), eq. 4 (the
objective); ArviZ ``az.compare(method="stacking")`` as the reference implementation.
"""

import warnings

import numpy as np
import pytest

from bayesgrowth.select.stacking import (
    kkt_gap,
    stacking_gradient,
    stacking_objective,
    stacking_weights,
)


def _idata_set(rng, n=40, draws=300):
    """Three synthetic models: 'a' fits a random 60% of points well, 'b' the rest, 'c' neither."""
    import arviz as az

    good = rng.random(n) < 0.6
    scales = {"a": np.where(good, 0.5, 2.0), "b": np.where(good, 2.0, 0.5),
              "c": np.full(n, 1.2)}
    out = {}
    for name, scale in scales.items():
        ll = -0.5 * (rng.normal(size=(2, draws, n)) * 0.2 + scale) ** 2 - np.log(scale)
        out[name] = az.from_dict(log_likelihood={"y": ll},
                                 posterior={"x": rng.normal(size=(2, draws))})
    return out


@pytest.mark.parametrize("seed", [0, 1, 2])
def test_weights_equal_arviz_stacking(seed):
    # Reference: ArviZ az.compare(method="stacking"), which solves the same problem
    # with SciPy's minimize; the weights agree to the optimisers' precision.
    import arviz as az

    ids = _idata_set(np.random.default_rng(seed))
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        ref = az.compare(ids, method="stacking")
        lpd = np.column_stack([az.loo(ids[k], pointwise=True).loo_i.values for k in ids])
    w = stacking_weights(lpd)
    w_ref = ref.loc[list(ids), "weight"].to_numpy()
    assert 0.05 < w[0] < 0.95  # an interior optimum: the comparison is not trivial
    np.testing.assert_allclose(w, w_ref, atol=1e-4)
    # And ours is at least as good by the objective of Yao et al. (2018) eq. 4.
    assert stacking_objective(w, lpd) >= stacking_objective(w_ref / w_ref.sum(), lpd) - 1e-12


@pytest.mark.parametrize("seed", [3, 4, 5, 6])
def test_weights_satisfy_the_optimum_conditions(seed):
    # Yao et al. (2018) eq. 4 is concave in w: at the optimum on the simplex no
    # transfer of weight from a weighted model to another model raises it.
    rng = np.random.default_rng(seed)
    n, k = 30, 4
    lpd = rng.normal(-1.0, 0.8, size=(n, k)) + rng.normal(0, 0.5, size=(1, k))
    w = stacking_weights(lpd)
    assert np.all(w >= 0) and w.sum() == pytest.approx(1.0, abs=1e-12)
    assert kkt_gap(w, lpd) < 1e-8
    base = stacking_objective(w, lpd)
    eps = 1e-4
    for src in np.flatnonzero(w > eps):
        for dst in range(k):
            if dst == src:
                continue
            moved = w.copy()
            moved[src] -= eps
            moved[dst] += eps
            assert stacking_objective(moved, lpd) <= base + 1e-12
    # Random points of the simplex never beat it either.
    for cand in rng.dirichlet(np.ones(k), size=500):
        assert stacking_objective(cand, lpd) <= base + 1e-12


def test_gradient_matches_finite_differences():
    rng = np.random.default_rng(7)
    lpd = rng.normal(size=(25, 3))
    w = np.array([0.2, 0.5, 0.3])
    h = 1e-6
    fd = [(stacking_objective(w + h * e, lpd) - stacking_objective(w - h * e, lpd)) / (2 * h)
          for e in np.eye(3)]
    np.testing.assert_allclose(stacking_gradient(w, lpd), fd, rtol=1e-6)


def test_dominated_model_gets_no_weight_and_a_copy_splits_nothing_away():
    rng = np.random.default_rng(8)
    best = rng.normal(-1, 0.3, size=20)
    lpd = np.column_stack([best, best - 2.0])  # model 2 is worse at every point
    np.testing.assert_allclose(stacking_weights(lpd), [1.0, 0.0], atol=1e-9)
    assert stacking_weights(best[:, None]).tolist() == [1.0]


def test_very_negative_densities_do_not_underflow():
    # exp(-2000) underflows to 0; the objective is invariant to a per-point shift.
    rng = np.random.default_rng(9)
    lpd = rng.normal(-1, 0.5, size=(30, 3))
    w = stacking_weights(lpd)
    np.testing.assert_allclose(stacking_weights(lpd - 2000.0), w, atol=1e-8)


def test_bad_input_is_refused():
    with pytest.raises(ValueError, match="2-D"):
        stacking_weights(np.zeros(5))
    with pytest.raises(ValueError, match="finite"):
        stacking_weights(np.array([[0.0, np.nan]]))


def test_fixed_point_with_equal_observation_weights_is_the_stacking_optimum():
    # The bootstrap's solver, given every observation the same weight, must land on the
    # optimum that test_weights_equal_arviz_stacking checks against ArviZ.
    from bayesgrowth.select.stacking import _densities, weighted_stacking

    rng = np.random.default_rng(7)
    lpd = rng.normal(size=(30, 3)) - np.array([0.0, 0.2, 0.5])
    ref = stacking_weights(lpd)
    got = weighted_stacking(_densities(lpd), np.full((1, 30), 1 / 30), iterations=20000)[0]
    np.testing.assert_allclose(got, ref, atol=2e-3)
    assert stacking_objective(got, lpd) == pytest.approx(stacking_objective(ref, lpd), abs=1e-7)


def test_bootstrap_weights_show_when_the_data_cannot_choose():
    from bayesgrowth.select.stacking import bootstrap_stacking_weights

    rng = np.random.default_rng(3)
    base = rng.normal(size=20)
    same = bootstrap_stacking_weights(np.column_stack([base, base]), n_boot=50)
    np.testing.assert_allclose(same, 0.5)  # identical predictions: no replicate prefers one
    clear = bootstrap_stacking_weights(np.column_stack([base, base - 5.0]), n_boot=50)
    assert clear[:, 0].min() > 0.99  # 5 nats worse on every observation: no weight in any
