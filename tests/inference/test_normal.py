"""The NumPy normal CDF and quantile against scipy.special and a 60-digit reference."""

from decimal import Decimal, localcontext

import numpy as np
import pytest
from scipy import special

from bayesgrowth.inference.normal import ndtr, ndtri

# pi to 80 digits (a published constant, from memory; math.pi has only 16)
PI = Decimal("3.1415926535897932384626433832795028841971693993751058209749445923078164062862")


def cdf_60_digits(x: float) -> float:
    """Phi(x) in 60-digit decimals: the power series of Abramowitz & Stegun 26.2.11 above
    x = -5, Laplace's continued fraction for the lower tail (A&S 26.2.14) below it."""
    with localcontext() as ctx:
        ctx.prec = 60
        d = Decimal(x)
        density = (-d * d / 2).exp() / (2 * PI).sqrt()
        if x > -5:
            term, total, k = d, d, 1
            while abs(term) > Decimal(10) ** -58 * abs(total) or k < 3:
                k += 2
                term = term * d * d / k
                total += term
            return float(Decimal("0.5") + density * total)
        fraction = Decimal(0)
        for k in range(800, 0, -1):  # at -d >= 5, 800 terms settle far beyond 60 digits
            fraction = k / (-d + fraction)
        return float(density / (-d + fraction))


def test_cdf_matches_a_60_digit_reference_into_the_far_lower_tail():
    # reference: the series and continued fraction above, evaluated in 60 digits; the
    # approximation's own error (Cody 1993) is below 1e-15, a few units in the last place
    x = np.concatenate([np.linspace(-37.5, 8.5, 93), [-5.0001, -4.9999, -0.66291, 5.6568]])
    ref = np.array([cdf_60_digits(float(v)) for v in x])
    np.testing.assert_allclose(ndtr(x), ref, rtol=4e-15, atol=0)


def test_cdf_matches_scipy_across_blocks_and_shapes():
    # reference: scipy.special.ndtr (Cephes). Its own error grows like x^2 * 1e-16 in the
    # lower tail (8e-15 at x = -6), so the comparison stops at -5; the tail is checked above
    rng = np.random.default_rng(7)
    x = np.concatenate([rng.uniform(-5, 8.5, 40_000), np.linspace(-5, 8.5, 2001)])
    np.testing.assert_allclose(ndtr(x), special.ndtr(x), rtol=1e-14, atol=0)
    grid = x[:24_000].reshape(3, 8000, 1)[:, ::2]  # three dimensions, not contiguous
    np.testing.assert_allclose(ndtr(grid), special.ndtr(grid), rtol=1e-14, atol=0)
    assert ndtr(grid).shape == (3, 4000, 1)


def test_cdf_edges():
    # reference: the CDF's limits (0 and 1), its symmetry point (1/2) and NaN passing through
    out = ndtr([-np.inf, -1e300, -40.0, 0.0, -0.0, 9.0, 1e300, np.inf, np.nan])
    np.testing.assert_array_equal(out[:-1], [0.0, 0.0, 0.0, 0.5, 0.5, 1.0, 1.0, 1.0])
    assert np.isnan(out[-1])
    assert isinstance(ndtr(0.3), np.floating)
    assert ndtr(np.zeros((2, 0))).shape == (2, 0)


def test_quantile_matches_scipy_and_inverts_the_cdf():
    # reference: scipy.special.ndtri, from 1e-300 to 1 - 1e-16
    p = np.concatenate([np.logspace(-300, -1, 120), np.linspace(0.01, 0.49, 25),
                        np.linspace(0.51, 0.99, 25), 1 - np.logspace(-16, -1, 40)])
    np.testing.assert_allclose(ndtri(p), special.ndtri(p), rtol=1e-14, atol=0)
    # round trip: an error d in z moves log p by about z d, so the tolerance holds to |z| < 9
    z = ndtri(p[p > 1e-20])
    np.testing.assert_allclose(ndtr(z), p[p > 1e-20], rtol=1e-13)
    assert ndtri(0.5) == 0.0


@pytest.mark.parametrize("p,expected", [(0.0, -np.inf), (1.0, np.inf)])
def test_quantile_limits(p, expected):
    # reference: the quantile's limits (as scipy.special.ndtri gives them)
    assert ndtri(p) == expected
    assert np.isnan(ndtri([-0.1, 1.5, np.nan])).all()
