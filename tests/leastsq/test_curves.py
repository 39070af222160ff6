"""Least-squares bending curves against NIST StRD Rat42 and against simulated truth."""

from __future__ import annotations

import math

import numpy as np
import pytest

from bayesgrowth.leastsq.curves import (
    damped_curve,
    fit_curve,
    gompertz_curve,
    logistic_curve,
    logistic_nist,
)
from bayesgrowth.leastsq.nls import LeastSquaresError


def test_rat42_logistic_matches_nist_certified_values(nist):
    # Source: NIST StRD nonlinear regression, Rat42 (logistic growth b1 / (1 + exp(b2 - b3 x))),
    # certified values to 11 digits; we require 6 significant digits from Start 2.
    prob = nist("Rat42")
    b1, b2, b3 = prob.start2
    # the project's parameterisation: R = K / (1 + ((K - a) / a) exp(-r t)), t_ref = 0
    p0 = np.array([b1 / (1 + math.exp(b2)), b1, b3])
    fit = fit_curve("logistic", prob.x, prob.y, t_ref=0.0, p0=p0)
    a, k, r = fit.params["a"], fit.params["K"], fit.params["r"]
    got = np.array([k, math.log((k - a) / a), r])
    np.testing.assert_allclose(got, prob.certified, rtol=1e-6)
    np.testing.assert_allclose(fit.fit.rss, prob.rss, rtol=1e-6)
    np.testing.assert_allclose(fit.fit.residual_sd, prob.residual_sd, rtol=1e-6)
    # and the curve itself equals NIST's form at the certified values
    np.testing.assert_allclose(fit.value_at(prob.x), logistic_nist(prob.x, prob.certified),
                               rtol=1e-6)


def test_gompertz_and_damped_are_one_family():
    # From the two formulas: Gompertz log R = log a + ln(K/a) (1 - e^(-r dt)) and damped
    # log R = log a + b (1 - e^(-r dt)) / (1 - e^(-r)) coincide when b = ln(K/a) (1 - e^(-r)),
    # so a damped curve with long-run growth 0 is a Gompertz curve stated through its growth.
    a, k, r = 100.0, 900.0, 0.3
    b = math.log(k / a) * -math.expm1(-r)
    t = np.arange(0, 40)
    np.testing.assert_allclose(damped_curve(t, (a, b, r)), gompertz_curve(t, (a, k, r)),
                               rtol=1e-12)


@pytest.mark.parametrize("curve", ["logistic", "gompertz", "damped"])
def test_fit_recovers_noise_free_curves(curve):
    t = np.arange(0, 24, dtype=float)
    truth = (200.0, 0.12, 0.15) if curve == "damped" else (200.0, 2000.0, 0.25)
    func = {"logistic": logistic_curve, "gompertz": gompertz_curve, "damped": damped_curve}[curve]
    fit = fit_curve(curve, t, func(t, truth))
    np.testing.assert_allclose(list(fit.params.values()), truth, rtol=1e-6)
    assert fit.half_life == pytest.approx(math.log(2) / truth[2], rel=1e-6)


def test_bad_input_is_refused():
    with pytest.raises(LeastSquaresError, match="curve must be one of"):
        fit_curve("cubic", np.arange(5), np.ones(5))
    with pytest.raises(LeastSquaresError, match="at least 4 points"):
        fit_curve("logistic", np.arange(3), np.ones(3))
