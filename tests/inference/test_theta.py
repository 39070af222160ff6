"""The Gamma(2) prior's closed-form CDF and its quantile by Newton steps, against scipy."""

import numpy as np
from scipy import special

from bayesgrowth.inference.theta import _Gamma2, _gamma2_cdf, _gamma2_quantile


def test_gamma2_cdf_matches_scipy_where_the_closed_form_cancels_and_beyond():
    # reference: scipy.special.gammainc (regularised lower incomplete gamma), shape 2
    u = np.concatenate([np.logspace(-8, 1.5, 120), [0.999999, 1.0, 1.000001]])
    mine = np.array([_gamma2_cdf(float(v)) for v in u])
    np.testing.assert_allclose(mine, special.gammainc(2.0, u), rtol=1e-14, atol=0)


def test_gamma2_quantile_matches_scipy_into_both_tails():
    # reference: scipy.special.gammaincinv, shape 2, from 1e-15 to 1 - 1e-15
    q = np.concatenate([np.logspace(-15, np.log10(0.5), 60), 1 - np.logspace(-15, -0.31, 60)])
    mine = np.array([_gamma2_quantile(float(p)) for p in q])
    np.testing.assert_allclose(mine, special.gammaincinv(2.0, q), rtol=1e-14, atol=0)


def test_gamma2_quantile_edges_and_the_scaled_prior():
    # reference: the quantile's limits; scipy.special.gammaincinv for the scaled prior
    assert [_gamma2_quantile(p) for p in (0.0, 1.0)] == [0.0, np.inf]
    assert np.isnan(_gamma2_quantile(1.5))
    q = np.array([[1e-4, 0.5], [0.9, 1 - 1e-4]])
    np.testing.assert_allclose(_Gamma2(0.08).ppf(q), 0.04 * special.gammaincinv(2.0, q),
                               rtol=1e-14)
