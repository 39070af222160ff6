"""The generic nonlinear least-squares helper against NIST StRD certified values."""

from __future__ import annotations

import numpy as np
import pytest

from bayesgrowth.leastsq import LeastSquaresError, fit_nonlinear


def _saturating(x: np.ndarray, b: np.ndarray) -> np.ndarray:
    return b[0] * (1.0 - np.exp(-b[1] * x))


def _power(x: np.ndarray, b: np.ndarray) -> np.ndarray:
    return b[0] * x ** b[1]


def _logistic(x: np.ndarray, b: np.ndarray) -> np.ndarray:
    return b[0] / (1.0 + np.exp(b[1] - b[2] * x))


# Models exactly as stated in each NIST StRD file header.
NIST_MODELS = {
    "Misra1a": _saturating,  # y = b1*(1-exp[-b2*x])
    "BoxBOD": _saturating,  # y = b1*(1-exp[-b2*x])
    "DanWood": _power,  # y = b1*x**b2
    "Rat42": _logistic,  # y = b1 / (1+exp[b2-b3*x])
}


@pytest.mark.parametrize("name", sorted(NIST_MODELS))
def test_nist_certified_values_from_start2(nist, name):
    # Source: NIST StRD nonlinear regression, certified values in <name>.dat.
    # Tolerances: NIST quote 11 significant digits; rtol 1e-6 on parameters, 1e-5 on their
    # standard deviations (finite-difference Jacobian) and 1e-8 on the RSS, as suggested in
    # shared/reference/nist/SOURCE.md.
    prob = nist(name)
    fit = fit_nonlinear(NIST_MODELS[name], prob.x, prob.y, prob.start2)
    assert fit.converged
    assert fit.dof == prob.x.size - prob.start2.size
    np.testing.assert_allclose(fit.params, prob.certified, rtol=1e-6)
    np.testing.assert_allclose(fit.std_errors, prob.certified_sd, rtol=1e-5)
    np.testing.assert_allclose(fit.rss, prob.rss, rtol=1e-8)
    np.testing.assert_allclose(fit.residual_sd, prob.residual_sd, rtol=1e-8)


def test_nist_with_analytic_jacobian(nist):
    # Source: NIST StRD Misra1a.dat certified values; same tolerances as above.
    prob = nist("Misra1a")

    def jac(x, b):
        e = np.exp(-b[1] * x)
        return np.column_stack([1.0 - e, b[0] * x * e])

    fit = fit_nonlinear(_saturating, prob.x, prob.y, prob.start2, jac=jac)
    assert fit.converged
    np.testing.assert_allclose(fit.params, prob.certified, rtol=1e-6)
    np.testing.assert_allclose(fit.std_errors, prob.certified_sd, rtol=1e-5)
    np.testing.assert_allclose(fit.rss, prob.rss, rtol=1e-8)


def test_evaluation_budget_exhausted_is_reported(nist):
    prob = nist("Rat42")
    fit = fit_nonlinear(_logistic, prob.x, prob.y, prob.start2, max_nfev=2)
    assert not fit.converged
    assert np.all(np.isnan(fit.std_errors))
    # Not yet at the certified minimum (NIST Rat42.dat) after two evaluations.
    assert fit.rss > prob.rss * (1 + 1e-6)


def test_non_finite_data_raise():
    x = np.arange(5.0)
    y = np.array([1.0, 2.0, np.nan, 4.0, 5.0])
    with pytest.raises(LeastSquaresError, match="finite"):
        fit_nonlinear(_power, x, y, np.array([1.0, 1.0]))


def test_model_not_finite_at_start_raises():
    x = np.array([1.0, 2.0, 3.0, 4.0])
    y = np.array([1.0, 2.0, 3.0, 4.0])
    with pytest.raises(LeastSquaresError, match="starting point"):
        fit_nonlinear(_saturating, x, y, np.array([1.0, -1000.0]))


def test_too_few_observations_raise():
    with pytest.raises(LeastSquaresError, match="cannot determine"):
        fit_nonlinear(_logistic, np.array([1.0, 2.0]), np.array([1.0, 2.0]), np.ones(3))


def test_exactly_determined_fit_has_no_standard_errors():
    # Two points, two parameters: y = b1*x**b2 through (1, 2) and (2, 8) is b1=2, b2=2 exactly.
    fit = fit_nonlinear(_power, np.array([1.0, 2.0]), np.array([2.0, 8.0]), np.array([1.5, 1.5]))
    assert fit.converged and fit.dof == 0
    np.testing.assert_allclose(fit.params, [2.0, 2.0], rtol=1e-10)
    assert np.isnan(fit.residual_sd) and np.all(np.isnan(fit.std_errors))
